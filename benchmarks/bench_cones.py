"""Benchmark: the language front end and the double description method.

Prints times and ratios against baselines measured in the same run:
* parse + analyse a generated 2 000-line file (the ratio is against parsing alone);
* dual cones of 30 random rays in dimension 5 by double description, against a brute-force
  facet enumeration (every 4-subset of rays spans a candidate hyperplane).

Run: python benchmarks/bench_cones.py
"""
from __future__ import annotations

import itertools
import random
import time

from conelang.geometry import cone as gcone
from conelang.geometry import linalg
from conelang.semantics.analysis import Analysis
from conelang.syntax.parser import parse


def generated_file(lines: int = 2000, seed: int = 1) -> str:
    rng = random.Random(seed)
    out = ["lattice N = Z^3", "lattice P = Z^2"]
    i = 0
    while len(out) < lines:
        rays = " ".join(f"({rng.randint(0, 5)},{rng.randint(0, 5)},1)" for _ in range(4))
        out.append(f"cone c{i} in N {{ rays {rays} }}")
        out.append(f"cone d{i} = dual c{i}")
        out.append(f"expect d{i} == dual c{i}")
        out.append(f"# cone number {i}")
        i += 1
    return "\n".join(out[:lines]) + "\n"


def brute_force_facets(rays, d):
    facets = set()
    for subset in itertools.combinations(rays, d - 1):
        if linalg.rank(subset, d) < d - 1:
            continue
        (normal,) = linalg.orthogonal_complement(subset, d)
        for sign in (1, -1):
            u = tuple(sign * x for x in normal)
            if all(linalg.dot(u, r) >= 0 for r in rays):
                facets.add(u)
    return facets


def timed(fn, repeat=1):
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        result = fn()
        best = min(best, time.perf_counter() - t)
    return best, result


def main() -> None:
    text = generated_file()
    t_parse, _ = timed(lambda: parse(text), 3)
    t_all, a = timed(lambda: Analysis(text).diagnostics(), 1)
    print(f"front end, 2000 lines: parse {t_parse * 1000:.0f} ms, parse + analyse + check {t_all * 1000:.0f} ms "
          f"(ratio {t_all / t_parse:.1f}x parsing alone)")

    rng = random.Random(5)
    total_dd = total_bf = 0.0
    for trial in range(3):
        rays = [tuple([rng.randint(-6, 6) for _ in range(4)] + [rng.randint(5, 9)]) for _ in range(30)]
        t_dd, c = timed(lambda: gcone.dual(gcone.cone_from_rays(rays, 5)))
        t_bf, facets = timed(lambda: brute_force_facets(rays, 5))
        assert set(c.rays) == {linalg.primitive(u) for u in facets}, "double description disagrees with brute force"
        total_dd += t_dd
        total_bf += t_bf
        print(f"dual of 30 rays in dimension 5 (trial {trial + 1}): double description {t_dd * 1000:.0f} ms, "
              f"brute force {t_bf * 1000:.0f} ms, {len(c.rays)} facets")
    print(f"ratio brute force / double description: {total_bf / total_dd:.1f}x")


if __name__ == "__main__":
    main()
