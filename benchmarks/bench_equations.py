"""Benchmark: minimal binomial equations (toric ideals), with baselines measured in the same run.

1. A fixed seeded family of pointed 3-dimensional cones with ray entries in [-4, 4] (printed):
   the affine toric variety by the fiber method (the default) against the previous engine, the
   binomial Buchberger saturation (``method="groebner"``), each under the default work budget.
   Goals: every cone in at most 1 s; at least 100x faster in the geometric mean.  When the
   baseline goes over its budget its time is a lower bound, and so is the ratio (marked ">=").
2. Small cases against sympy's Gröbner basis of the elimination ideal (the textbook method), which
   also checks that both give the same ideal.
3. A table to set the next goal from: rational normal curves up to degree 30, Segre and Veronese
   embeddings, and random 4-dimensional cones with 30-80 generators (generators, minimal
   equations, seconds).

Run: python benchmarks/bench_equations.py [--count N] [--quick]
"""
from __future__ import annotations

import argparse
import itertools
import math
import random
import time

import sympy

from conelang.geometry import cone as gcone
from conelang.geometry import toric
from conelang.geometry.budget import DEFAULT_LIMIT, Budget, BudgetExceeded


def timed(fn):
    t = time.perf_counter()
    r = fn()
    return time.perf_counter() - t, r


def family(count: int, seed: int = 11, lo: int = -4, hi: int = 4, dim: int = 3):
    """``count`` pointed full-dimensional cones, 3-6 random rays with entries in [lo, hi]."""
    rng = random.Random(seed)
    out = []
    while len(out) < count:
        rays = [tuple(rng.randint(lo, hi) for _ in range(dim)) for _ in range(rng.randint(dim, dim + 3))]
        try:
            c = gcone.cone_from_rays(rays, dim)
        except ValueError:
            continue
        if c.pointed and c.dim == dim:
            out.append((rays, c))
    return out


def variety(c, method):
    try:
        return toric.affine_toric_variety(c, Budget(DEFAULT_LIMIT), method=method)
    except BudgetExceeded:
        return None


def equations(gens, facets, method):
    """The equations step alone (the generators given), best of three when it is fast."""
    best, out = None, None
    for _ in range(3):
        t = time.perf_counter()
        try:
            out = toric.toric_ideal(gens, Budget(DEFAULT_LIMIT), facets=facets, method=method)
        except BudgetExceeded:
            out = None
        took = time.perf_counter() - t
        best = took if best is None else min(best, took)
        if took > 0.05:
            break
    return best, out


def _gm(xs):
    return math.exp(sum(map(math.log, xs)) / len(xs)) if xs else float("nan")


def bench_family(count: int) -> None:
    print(f"1. {count} pointed 3-dimensional cones, entries in [-4, 4] (seed 11), default budget;")
    print("   times of the equations step (generators given); 'variety s' is the whole U_σ by fibers")
    print(f"{'rays':<40} {'gens':>4} {'eqs':>5} {'variety s':>9} {'fibers s':>9} {'Buchberger s':>13} {'ratio':>8}")
    rows, worst, lower = [], 0.0, 0
    for rays, c in family(count):
        tv, X = timed(lambda: variety(c, "auto"))
        assert X is not None, f"over budget: {rays}"
        worst = max(worst, tv)
        gens = X.generators
        tn, new = equations(gens, c.rays, "auto")
        to, old = equations(gens, None, "groebner")
        assert new == X.binomials
        if old is not None:
            assert old == new, f"different answers on {rays}"
        lower += old is None
        ratio = to / max(tn, 1e-6)
        rows.append((len(gens), tn, to, ratio))
        print(f"{' '.join(''.join(map(str, r)) for r in rays):<40} {len(gens):>4} {len(new):>5} {tv:>9.3f} "
              f"{tn:>9.4f} {to:>12.3f}{'+' if old is None else ' '} "
              f"{('>=' if old is None else '') + format(ratio, '.0f'):>8}")
    big = [r for g, _, _, r in rows if g >= 15]
    ge = ">= " if lower else ""
    print(f"worst whole variety {worst:.3f} s (goal <= 1 s); baseline over budget on {lower} of {count} "
          f"('+': its time to the budget, so ratios are lower bounds)")
    print(f"ratio, geometric mean: all {count} cones {ge}{_gm([r for *_, r in rows]):.0f}x, the "
          f"{len(big)} with >= 15 generators {ge}{_gm(big):.0f}x (goal >= 100x); total time "
          f"{ge}{sum(o for _, _, o, _ in rows) / sum(n for _, n, _, _ in rows):.0f}x")


def _sympy_ideal(gens):
    n = len(gens[0])
    t = sympy.symbols(f"t1:{n + 1}")
    z = sympy.symbols(f"z1:{len(gens) + 1}")
    s = sympy.Symbol("s")
    rel = []
    for zi, g in zip(z, gens):      # z_i * t^(g-) = t^(g+), and s * prod(t) = 1 for the Laurent part
        plus = sympy.Mul(*[ti ** a for ti, a in zip(t, g) if a > 0])
        minus = sympy.Mul(*[ti ** -a for ti, a in zip(t, g) if a < 0])
        rel.append(zi * minus - plus)
    rel.append(s * sympy.Mul(*t) - 1)
    G = sympy.groebner(rel, s, *t, *z, order="lex")
    return [g for g in G.exprs if not (g.free_symbols & (set(t) | {s}))], z


def bench_sympy() -> None:
    print("\n2. small cases against sympy's elimination ideal (the same ideal, checked)")
    cases = [("rational normal curve d=4", [(1, i) for i in range(5)]),
             ("rational normal curve d=5", [(1, i) for i in range(6)]),
             ("cone over a square", [(1, 0, 0), (1, 1, 0), (1, 0, 1), (1, 1, 1)]),
             ("1/5(1,2) surface", None)]
    for label, gens in cases:
        if gens is None:
            c = gcone.cone_from_rays([(0, 1), (5, -2)], 2)
            gens = list(toric.affine_toric_variety(c).generators)
        facets = gcone.cone_from_rays(gens, len(gens[0])).facets
        tn, ours = timed(lambda: toric.toric_ideal(gens, facets=facets))
        ts, (G, z) = timed(lambda: _sympy_ideal(gens))
        mine = [sympy.sympify(toric.binomial_string(p, m).replace("^", "**"),
                              locals={f"z{i + 1}": zi for i, zi in enumerate(z)}) for p, m in ours]
        same = sympy.groebner(mine, *z, order="grevlex") == sympy.groebner(G, *z, order="grevlex")
        print(f"{label:<28} {len(ours):>3} equations  fibers {tn:.4f} s  sympy {ts:.3f} s  "
              f"ratio {ts / max(tn, 1e-6):.0f}x  same ideal: {same}")
        assert same


def segre(dims):
    """Exponents of the Segre embedding of P^a × P^b × ...: one unit vector per factor."""
    blocks = [[tuple(1 if j == i else 0 for j in range(a + 1)) for i in range(a + 1)] for a in dims]
    return [sum(p, ()) for p in itertools.product(*blocks)]


def veronese(n, k):
    """Exponents of the degree-k Veronese embedding of P^n."""
    return [e for e in itertools.product(range(k + 1), repeat=n + 1) if sum(e) == k]


def random_4d(count: int, seed: int = 7):
    rng = random.Random(seed)
    out = []
    tries = 0
    while len(out) < count and tries < 2000:
        tries += 1
        rays = [tuple(rng.randint(-2, 3) for _ in range(4)) for _ in range(rng.randint(4, 6))]
        try:
            c = gcone.cone_from_rays(rays, 4)
        except ValueError:
            continue
        if not c.pointed or c.dim < 4:
            continue
        r = len(toric.hilbert_basis(gcone.dual(c)))
        if 30 <= r <= 80:
            out.append((rays, c))
    return out


def bench_table(quick: bool) -> None:
    print("\n3. table for the next goal (fiber method, default budget)")
    print(f"{'case':<44} {'gens':>5} {'eqs':>6} {'seconds':>8}")
    rows = [(f"rational normal curve d={d}", [(1, i) for i in range(d + 1)], None)
            for d in (10, 20, 30)]
    rows += [(f"Segre P^{' x P^'.join(map(str, dims))}", segre(dims), None)
             for dims in ((1, 2), (2, 2), (1, 1, 1), (2, 3), (1, 1, 1, 1))]
    rows += [(f"Veronese v_{k}(P^{n})", veronese(n, k), None) for n, k in ((2, 2), (2, 3), (3, 2), (2, 4))]
    rows += [("random 4-dim " + " ".join("".join(map(str, r)) for r in rays), None, c)
             for rays, c in random_4d(3 if quick else 6)]
    for label, gens, c in rows:
        if c is not None:
            t, X = timed(lambda: variety(c, "auto"))
            g, e = (X.embedding_dimension, len(X.binomials)) if X else ("?", "budget")
        else:
            facets = gcone.cone_from_rays(gens, len(gens[0])).facets
            try:
                t, B = timed(lambda: toric.toric_ideal(gens, Budget(DEFAULT_LIMIT), facets=facets))
                g, e = len(gens), len(B)
            except BudgetExceeded:
                t, g, e = float("nan"), len(gens), "budget"
        print(f"{label[:44]:<44} {g:>5} {e:>6} {t:>8.3f}")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--count", type=int, default=20, help="cones in the seeded family")
    ap.add_argument("--quick", action="store_true", help="a smaller table")
    args = ap.parse_args()
    bench_family(args.count)
    bench_sympy()
    bench_table(args.quick)


if __name__ == "__main__":
    main()
