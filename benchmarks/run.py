"""Run every benchmark in this folder, one after another (each prints its own ratios)."""
from __future__ import annotations

import runpy
import sys
from pathlib import Path

here = Path(__file__).parent
only = sys.argv[1:]
for path in sorted(here.glob("bench_*.py")):
    if only and path.stem not in only and path.stem.removeprefix("bench_") not in only:
        continue
    print(f"== {path.stem}")
    sys.argv = [str(path)]
    runpy.run_path(str(path), run_name="__main__")
    print()
