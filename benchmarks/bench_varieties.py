"""Benchmark: Hilbert bases and binomial equations, with baselines measured in the same run.

* Hilbert basis (triangulation + Smith-form parallelepipeds, or Pottier's completion) against
  brute-force enumeration of a box, on cones of dimension 3 and 4 (goal: at least 100x faster).
* Minimal binomial equations of rational normal cones of degree d >= 8 (ideal of 2x2 minors)
  against a sympy Gröbner basis of the elimination ideal (goal: at least 20x faster).
* The Hilbert basis of the cone of 5x5 magic squares (4828 elements, from memory; goal: under a
  minute on 2 cores) with --magic, since it is long.

* Both Hilbert basis methods on random cones, on each side of the rule that chooses between them
  (--choice).

Run: python benchmarks/bench_varieties.py [--magic] [--choice]
"""
from __future__ import annotations

import argparse
import time

import sympy

from conelang.geometry import cone as gcone
from conelang.geometry import monoid, toric


def timed(fn):
    t = time.perf_counter()
    r = fn()
    return time.perf_counter() - t, r


def timed_best(fn, repeat: int = 5):
    """The best of a few runs (the first run also pays one-time imports such as numpy's)."""
    best = None
    for _ in range(repeat):
        t, r = timed(fn)
        best = t if best is None else min(best, t)
    return best, r


HILBERT_CASES = [
    ("dim 2, 1/7(1,3)", [(0, 1), (7, -3)]),
    ("dim 3, e1 e2 (1,1,4)", [(1, 0, 0), (0, 1, 0), (1, 1, 4)]),
    ("dim 3, e1 e2 (2,3,11)", [(1, 0, 0), (0, 1, 0), (2, 3, 11)]),
    ("dim 3, e1 e2 (3,5,17)", [(1, 0, 0), (0, 1, 0), (3, 5, 17)]),
    ("dim 3, cone over a square", [(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)]),
    ("dim 4, e1 e2 e3 (1,2,3,7)", [(1, 0, 0, 0), (0, 1, 0, 0), (0, 0, 1, 0), (1, 2, 3, 7)]),
]


def bench_hilbert() -> None:
    """Both the cone's own monoid and the dual monoid of each case.  The brute-force box is the
    smallest one that contains the Hilbert basis (so brute force is exact and as fast as it can be).
    Ours is the best of five runs (brute force, much slower, runs once)."""
    total_fast = total_bf = 0.0
    for label, rays in HILBERT_CASES:
        for which in ("cone", "dual"):
            c = gcone.cone_from_rays(rays, len(rays[0]))
            if which == "dual":
                c = gcone.dual(c)
            t_fast, hb = timed_best(lambda: monoid.hilbert_basis(c))
            bound = max(abs(x) for h in hb for x in h)
            t_bf, bf = timed(lambda: monoid.hilbert_basis_bruteforce(c, bound))
            assert set(hb) == set(bf), label
            total_fast += t_fast
            total_bf += t_bf
            print(f"  {label} ({which}): {len(hb)} elements, {t_fast * 1000:.1f} ms vs brute force in the box "
                  f"[-{bound}, {bound}] {t_bf * 1000:.0f} ms: {t_bf / t_fast:.0f}x")
    print(f"Hilbert basis, total ratio brute force / ours: {total_bf / total_fast:.0f}x (goal >= 100x)")


def bench_method_choice(trials: int = 40, seed: int = 3) -> None:
    """Both Hilbert basis methods on random non-simplicial cones of dimension 3 and 4 (and their
    duals), grouped by the rule of ``monoid.hilbert_basis_pointed`` (dual method iff more rays
    than facets).  A method that goes over a budget of 2M steps counts as that budget's time
    (measured at about a microsecond per step), so a blow-up does not stall the benchmark."""
    import random
    from conelang.geometry.budget import Budget, BudgetExceeded

    rnd = random.Random(seed)
    sums = {True: [0.0, 0.0, 0, 0], False: [0.0, 0.0, 0, 0]}     # primal s, dual s, cases, dual wins

    def run(fn, c):
        t = time.perf_counter()
        try:
            fn(c, Budget(2_000_000), "Hilbert basis")
        except BudgetExceeded:
            return max(time.perf_counter() - t, 2.0)
        return time.perf_counter() - t

    for _ in range(trials):
        d = rnd.randint(3, 4)
        r = rnd.choice([2, 4, 6])
        gens = [tuple(rnd.randint(-r, r) for _ in range(d)) for _ in range(rnd.randint(d + 1, d + 6))]
        c = gcone.cone_from_rays(gens, d)
        if not (c.pointed and c.full) or c.simplicial:
            continue
        for x in (c, gcone.dual(c)):
            side = len(x.rays) > len(x.facets)
            tp, td = run(monoid._hilbert_basis_full, x), run(monoid._hilbert_basis_dual, x)
            acc = sums[side]
            acc[0] += tp
            acc[1] += td
            acc[2] += 1
            acc[3] += td < tp
    for side, (tp, td, n, wins) in sums.items():
        label = "more rays than facets (dual method chosen)" if side else "rays <= facets (triangulation chosen)"
        print(f"  {label}: {n} cones, triangulation {tp:.2f} s, dual method {td:.2f} s, "
              f"dual faster on {wins}")


def sympy_rational_normal(d: int):
    s, t = sympy.symbols("s t")
    zs = sympy.symbols(f"z0:{d + 1}")
    polys = [zs[i] - s ** (d - i) * t ** i for i in range(d + 1)]
    gb = sympy.groebner(polys, s, t, *zs, order="lex")
    return [g for g in gb.exprs if not g.has(s) and not g.has(t)]


def bench_equations() -> None:
    total_ours = total_sympy = 0.0
    for d in (8, 9):
        gens = [(d - i, i) for i in range(d + 1)]
        t_ours, ideal = timed(lambda: toric.toric_ideal(gens))
        assert len(ideal) == d * (d - 1) // 2, "2x2 minors of a 2 x d Hankel matrix: binom(d, 2) quadrics"
        t_sym, elim = timed(lambda: sympy_rational_normal(d))
        total_ours += t_ours
        total_sympy += t_sym
        print(f"  rational normal curve of degree {d}: {len(ideal)} quadrics in {t_ours * 1000:.0f} ms; "
              f"sympy elimination {t_sym * 1000:.0f} ms ({len(elim)} elements): {t_sym / t_ours:.0f}x")
    print(f"equations, total ratio sympy / ours: {total_sympy / total_ours:.0f}x (goal >= 20x)")


def magic_squares_cone(n: int):
    """Nonnegative n x n squares whose rows, columns and two diagonals have equal sums."""
    d = n * n
    idx = lambda i, j: i * n + j
    lines = [[idx(i, j) for j in range(n)] for i in range(n)] + [[idx(i, j) for i in range(n)] for j in range(n)]
    lines += [[idx(i, i) for i in range(n)], [idx(i, n - 1 - i) for i in range(n)]]
    eqs = []
    for line in lines[1:]:
        row = [0] * d
        for k in lines[0]:
            row[k] += 1
        for k in line:
            row[k] -= 1
        eqs.append(tuple(row))
    ineqs = [tuple(int(k == m) for k in range(d)) for m in range(d)]
    return gcone.cone_from_inequalities(ineqs, eqs, d)


def bench_magic() -> None:
    """The cone (one double description from the inequalities) and its Hilbert basis (for
    cones with more rays than facets: Pottier's completion, one facet at a time)."""
    for n in (3, 4, 5):
        t_cone, c = timed(lambda: magic_squares_cone(n))
        t, hb = timed(lambda: monoid.hilbert_basis(c, budget=None))
        print(f"  {n}x{n} magic squares: cone of dimension {c.dim} with {len(c.rays)} rays in {t_cone:.2f} s; "
              f"Hilbert basis of {len(hb)} elements in {t:.2f} s (goal for 5x5: 4828 elements, under 60 s "
              f"in total)")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--magic", action="store_true", help="also the 5x5 magic squares (long)")
    ap.add_argument("--choice", action="store_true", help="also both Hilbert basis methods on random cones (long)")
    args = ap.parse_args()
    bench_hilbert()
    bench_equations()
    if args.choice:
        bench_method_choice()
    if args.magic:
        bench_magic()


if __name__ == "__main__":
    main()
