"""Benchmark: lattice points and h* of polytopes by the half-open triangulation of the cone
over P and its fundamental parallelepipeds, against box enumeration (every point of the
bounding box tested against the facets), measured in the same run.

Two baselines: the Ehrhart polynomial by boxes (count the points of kP for k = 1..dim in their
bounding boxes and interpolate: what h* and L(n) cost without the decomposition), and the
single count L(1) by one box.  The decomposition enumerates about vol(P)·dim! parallelepiped
points, so for one count of a small polytope the box can be faster; the Ehrhart data is what it
is for.

Cases: the 24-cell (vertices the permutations of (±1, ±1, 0, 0)) and its dilations, dilated
cross-polytopes, and random lattice polytopes in dimensions 4 and 5.  The box baseline is run
only where it takes at most a few seconds; both methods must give the same count.

Run: python benchmarks/bench_polytopes.py [--quick]
"""
from __future__ import annotations

import itertools
import random
import sys
import time

from conelang.geometry import polytope as gp


def timed(fn):
    t = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t


def cell24():
    pts = set()
    for i, j in itertools.combinations(range(4), 2):
        for a, b in itertools.product((-1, 1), repeat=2):
            v = [0] * 4
            v[i], v[j] = a, b
            pts.add(tuple(v))
    return gp.polytope_from_points(sorted(pts), 4)


def cross(d):
    pts = [tuple(s * int(i == j) for j in range(d)) for i in range(d) for s in (1, -1)]
    return gp.polytope_from_points(pts, d)


def random_polytope(d, n, r, seed):
    rng = random.Random(seed)
    while True:
        P = gp.polytope_from_points([tuple(rng.randint(-r, r) for _ in range(d)) for _ in range(n)], d)
        if P.full:
            return P


def cases(quick: bool):
    C = cell24()
    out = [("24-cell", C), ("2 · 24-cell", gp.dilate(C, 2))]
    if not quick:
        out.append(("3 · 24-cell", gp.dilate(C, 3)))
    out += [("4 · cross-polytope, dim 4", gp.dilate(cross(4), 4)),
            ("2 · cross-polytope, dim 5", gp.dilate(cross(5), 2))]
    for seed in range(2 if quick else 4):
        out.append((f"random dim 4, 8 points in [-3,3]^4 (seed {seed})", random_polytope(4, 8, 3, seed)))
    for seed in range(1 if quick else 3):
        out.append((f"random dim 5, 8 points in [-2,2]^5 (seed {seed})", random_polytope(5, 8, 2, seed)))
    return out


def box_size(P):
    size = 1
    for i in range(P.ambient_dim):
        size *= max(v[i] for v in P.vertices) - min(v[i] for v in P.vertices) + 1
    return size


def box_ehrhart(P):
    """L(n) from the box counts of kP, k = 0..dim (Lagrange interpolation, exact)."""
    ks = list(range(P.dim + 1))
    counts = [1] + [len(gp.lattice_points_bruteforce(gp.dilate(P, k))) for k in ks[1:]]
    return gp._interpolate(ks, counts)


def main(quick: bool = False) -> None:
    limit = 300_000 if quick else 3_000_000
    print(f"{'polytope':46} {'points':>7} {'volume':>7} {'half-open s':>11} {'box L s':>9} {'ratio':>6} "
          f"{'box L(1) s':>10} {'ratio':>6}")
    tot = [0.0, 0.0, 0.0, 0.0]
    for name, P in cases(quick):
        data, fast = timed(lambda: gp.lattice_data(P))
        count = gp.lattice_points(P)
        vol = sum(data.h_star)
        one, one_t = timed(lambda: gp.lattice_points_bruteforce(P))
        assert len(one) == count, name
        boxes = sum(box_size(gp.dilate(P, k)) for k in range(1, P.dim + 1))
        if boxes <= limit:
            L, slow = timed(lambda: box_ehrhart(P))
            assert tuple(L) == tuple(gp.ehrhart_from_h_star(data.h_star, P.dim)), name
            tot[0] += fast
            tot[1] += slow
            ehr = f"{slow:9.3f} {slow / fast:6.1f}"
        else:
            ehr = f"{'-':>9} {'-':>6}"
        tot[2] += fast
        tot[3] += one_t
        print(f"{name:46} {count:7} {vol:7} {fast:11.3f} {ehr} {one_t:10.3f} {one_t / fast:6.1f}")
    print(f"Ehrhart data, where the boxes ran: half-open {tot[0]:.2f} s, boxes {tot[1]:.2f} s, "
          f"ratio {tot[1] / tot[0]:.1f}")
    print(f"one count L(1), every case: half-open {tot[2]:.2f} s, box {tot[3]:.2f} s, "
          f"ratio {tot[3] / tot[2]:.2f}")


if __name__ == "__main__":
    main("--quick" in sys.argv)
