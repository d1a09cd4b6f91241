"""Benchmark: batch checking of 1 000 generated files with 1 and with 2 jobs.

Prints both times and the speed-up (the baseline is the 1-job run, measured in the same run).
Run: python benchmarks/bench_batch.py [--files N]
"""
from __future__ import annotations

import argparse
import random
import tempfile
import time
from pathlib import Path

from conelang import batch
from conelang.semantics import engine


def make_files(folder: Path, n: int) -> list[str]:
    rng = random.Random(11)
    paths = []
    for i in range(n):
        a, b = rng.randint(2, 9), rng.randint(1, 9)
        text = (f"lattice N = Z^3\n"
                f"cone c in N {{ rays (1,0,0) (0,1,0) ({a},{b},{rng.randint(2, 7)}) (1,1,1) }}\n"
                f"cone d = dual c\nexpect d == dual c\nexpect c pointed\n")
        p = folder / f"f{i:04d}.cone"
        p.write_text(text)
        paths.append(str(p))
    return paths


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--files", type=int, default=1000)
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        paths = make_files(Path(tmp), args.files)
        times = {}
        for jobs in (1, 2):
            engine.clear_cache()
            t = time.perf_counter()
            results = batch.run(paths, jobs=jobs)
            times[jobs] = time.perf_counter() - t
            assert len(results) == len(paths)
            print(f"{jobs} job{'s' if jobs > 1 else ''}: {times[jobs]:.2f} s for {len(paths)} files")
        print(f"speed-up 1 → 2 jobs: {times[1] / times[2]:.2f}x (ideal 2.00x)")


if __name__ == "__main__":
    main()
