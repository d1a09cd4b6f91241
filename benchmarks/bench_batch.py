"""Benchmark: batch checking of 1 000 generated files with 1 and with 2 jobs.

Prints both times and the speed-up (the baseline is the 1-job run, measured in the same run).
Run: python benchmarks/bench_batch.py [--files N]
"""
from __future__ import annotations

import argparse
import random
import subprocess
import sys
import tempfile
import time
from pathlib import Path



def make_files(folder: Path, n: int) -> list[str]:
    """Files like a classification project's: a cone, its dual, and pinned invariants (the
    pinned values are computed here, before timing, so every check passes)."""
    from conelang.ide import AnalysisHost
    from conelang.semantics.properties import compute
    rng = random.Random(11)
    paths = []
    for i in range(n):
        a, b, c = rng.randint(1, 6), rng.randint(1, 6), rng.randint(2, 7)
        text = (f"lattice N = Z^3\n"
                f"cone c in N {{ rays (1,0,0) (0,1,0) ({a},{b},{c}) }}\n"
                f"cone d = dual c\nexpect d == dual c\nexpect c pointed\n")
        host = AnalysisHost()
        host.apply_change("g", text)
        an = host.analysis("g")
        v = an.value("c")
        text += (f"expect c generators = {compute(an, 'cone', 'generators', v)}\n"
                 f"expect c index = {compute(an, 'cone', 'index', v)}\n")
        p = folder / f"f{i:04d}.cone"
        p.write_text(text)
        paths.append(str(p))
    return paths


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--files", type=int, default=1000)
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        make_files(Path(tmp), args.files)
        times = {}
        for jobs in (1, 2):
            # each run is a fresh `conelang check` process: cold caches, start-up included,
            # exactly what a CI job pays
            t = time.perf_counter()
            proc = subprocess.run([sys.executable, "-m", "conelang.cli", "check", "--jobs", str(jobs), tmp],
                                  capture_output=True, text=True, cwd=tmp)
            times[jobs] = time.perf_counter() - t
            assert proc.returncode == 0, proc.stdout[-2000:] + proc.stderr[-2000:]
            print(f"{jobs} job{'s' if jobs > 1 else ''}: {times[jobs]:.2f} s for {args.files} files "
                  f"({proc.stderr.strip().splitlines()[-1]})")
        print(f"speed-up 1 → 2 jobs: {times[1] / times[2]:.2f}x (ideal 2.00x)")


if __name__ == "__main__":
    main()
