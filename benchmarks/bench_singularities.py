"""Classes of singularities and intersection numbers: ratios against baselines measured in
the same run.

* terminal/canonical test of cyclic quotients 1/r(a, b, c): the lattice points of height <= 1
  from the parallelepiped (engine) against enumerating the box of the rays (brute force);
* top intersection numbers of iterated blow-ups of P^3: the memoised recursion (engine)
  against the same products computed without the memo (each product from scratch).
"""
from __future__ import annotations

import itertools
import time
from fractions import Fraction

from conelang.geometry import lattice as glat
from conelang.geometry import singularities as S
from conelang.geometry.cone import cone_from_rays, contains
from conelang.geometry.intersection import IntersectionRing
from conelang.geometry.subdivision import refine


def cyclic_cone(r, w):
    L = glat.overlattice(3, [tuple(Fraction(a, r) for a in w)])
    return cone_from_rays([glat.to_coords(L, tuple(int(i == j) for j in range(3))) for i in range(3)], 3)


def brute(c, m):
    b = max(abs(x) for v in c.rays for x in v)
    return [v for v in itertools.product(range(-b, b + 1), repeat=3)
            if any(v) and contains(c, v) and sum(x * y for x, y in zip(m, v)) <= 1]


def timed(fn):
    t = time.perf_counter()
    fn()
    return time.perf_counter() - t


def main():
    cones = [cyclic_cone(r, (1, r - 1, a)) for r in (11, 13, 17) for a in (2, 3, 5)]
    ms = [S.canonical_functional(c.rays, 3) for c in cones]
    base = timed(lambda: [brute(c, m) for c, m in zip(cones, ms)])
    eng = timed(lambda: [S.singularity_class(c) for c in cones])
    print(f"height <= 1 points, 9 cyclic quotients: brute force {base:.3f} s, engine {eng:.3f} s, "
          f"ratio {base / eng:.1f}x")

    rays = [(1, 0, 0), (0, 1, 0), (0, 0, 1), (-1, -1, -1)]
    cones3 = list(itertools.combinations(range(4), 3))
    rays, cones3 = refine(rays, cones3, 3, [(1, 1, 1), (1, 1, 0), (2, 1, 1), (-1, 0, 0)])
    keys = list(itertools.combinations_with_replacement(range(len(rays)), 3))
    ring = IntersectionRing(rays, cones3, 3)
    eng = timed(lambda: [ring.top(k) for k in keys])

    def fresh():
        for k in keys:
            IntersectionRing(rays, cones3, 3).top(k)
    base = timed(fresh)
    print(f"{len(keys)} top products on a blow-up of P^3 with {len(rays)} rays: one memo {eng:.3f} s, "
          f"from scratch {base:.3f} s, ratio {base / eng:.1f}x")


if __name__ == "__main__":
    main()
