"""Quotient singularities, ages and the classes of singularities, against theorems and brute force.

References (independent of the engine): the ages of 1/r(a_1, …, a_n) are Σ (k a_i mod r)/r over
k = 1 … r-1 (Reid, Young person's guide to canonical singularities, §3 (from memory)); lattice
points of small height by enumerating a box.
"""
from __future__ import annotations

import itertools
import random
from fractions import Fraction
from math import gcd

import pytest

from conelang.geometry import lattice as glat
from conelang.geometry import singularities as S
from conelang.geometry.cone import cone_from_rays, contains
from conelang.geometry.fan import resolve
from conelang.geometry.invariants import gorenstein_index


def cyclic_cone(r: int, weights):
    """The positive orthant in N = Z^n + Z·(a_1, …, a_n)/r, in lattice coordinates (the cone of
    1/r(a_1, …, a_n)); None when some e_i is not primitive in N (a pseudo-reflection)."""
    n = len(weights)
    L = glat.overlattice(n, [tuple(Fraction(a, r) for a in weights)])
    rays = []
    for i in range(n):
        e = tuple(int(i == j) for j in range(n))
        x = glat.to_coords(L, e)
        if gcd(*x) != 1:
            return None
        rays.append(x)
    return cone_from_rays(rays, n)


def naive_ages(r, weights):
    return sorted(sum(Fraction(k * a % r, r) for a in weights) for k in range(1, r))


def small_types(n, rmax):
    for r in range(2, rmax + 1):
        for a in itertools.product(range(r), repeat=n):
            if gcd(r, *a) == 1:
                yield r, a


@pytest.mark.parametrize("n,rmax", [(2, 9), (3, 7)])
def test_ages_and_type_match_the_weights(n, rmax):
    for r, a in small_types(n, rmax):
        c = cyclic_cone(r, a)
        if c is None:
            continue
        q = S.quotient_group(c)
        assert q.order == r and q.cyclic is not None
        assert sorted(e.age for e in q.elements) == naive_ages(r, a), (r, a)
        assert S.normal_form(*q.cyclic) == S.normal_form(r, a), (r, a)
        for e in q.elements:        # each element is the lattice point Σ λ_i v_i of the parallelepiped
            assert all(0 <= w < 1 for w in e.weights)
            assert tuple(sum(w * v[j] for w, v in zip(e.weights, q.rays)) for j in range(n)) == e.point


def test_terminal_lemma_in_dimension_three():
    """Reid, YPG, Thm 5.2 (terminal lemma, from memory; Morrison–Stevens, White–Frumkin): a
    3-dimensional cyclic quotient 1/r(a,b,c) without pseudo-reflections is terminal iff it is
    1/r(a,-a,b) with a, b prime to r (terminal 3-fold points are isolated)."""
    seen = {True: 0, False: 0}
    for r, w in small_types(3, 9):
        c = cyclic_cone(r, w)
        if c is None:
            continue
        isolated = all(gcd(x, r) == 1 for x in w)
        expected = isolated and any((w[i] + w[j]) % r == 0 for i, j in ((0, 1), (0, 2), (1, 2)))
        got = S.singularity_class(c)
        assert got.terminal == expected, (r, w)
        seen[expected] += 1
    assert seen[True] > 20 and seen[False] > 100


def test_reid_tai_and_gorenstein_for_cyclic_quotients():
    """Reid–Tai (YPG §4, from memory): C^n/G (no pseudo-reflections) is canonical iff every
    nonzero element has age >= 1, terminal iff > 1.  Watanabe (from memory): Gorenstein iff
    G ⊂ SL, i.e. Σ a_i ≡ 0 mod r."""
    for r, a in itertools.chain(small_types(2, 11), small_types(3, 6), small_types(4, 4)):
        c = cyclic_cone(r, a)
        if c is None:
            continue
        ages = naive_ages(r, a)
        s = S.singularity_class(c)
        assert s.canonical == (min(ages) >= 1), (r, a)
        assert s.terminal == (min(ages) > 1), (r, a)
        assert s.log_terminal
        assert (gorenstein_index(c) == 1) == (sum(a) % r == 0), (r, a)


def test_surface_classes():
    """Fulton §2.6 / Reid (from memory): 1/r(1,q) is canonical iff q = r-1 (A_{r-1}), never
    terminal; the exceptional curve of 1/n(1,1) has discrepancy -1 + 2/n, those of A_n 0."""
    for r in range(2, 12):
        for q in range(1, r):
            if gcd(q, r) != 1:
                continue
            s = S.singularity_class(cyclic_cone(r, (1, q)))
            assert s.canonical == (q == r - 1) and not s.terminal
        c = cyclic_cone(r, (1, 1))
        res = resolve(c)
        m = S.canonical_functional(c.rays, 2)
        new = [v for v in res.rays if v not in c.rays]
        assert [S.discrepancy(m, v) for v in new] == [Fraction(-1) + Fraction(2, r)]
        a = cyclic_cone(r, (1, r - 1))
        m = S.canonical_functional(a.rays, 2)
        assert all(S.discrepancy(m, v) == 0 for v in resolve(a).rays)


def test_one_third_one_one_one():
    """Reid, YPG §3 (from memory): 1/3(1,1,1) is canonical, not terminal; its one junior
    element is (1/3)(1,1,1), and its crepant blow-up has one exceptional divisor (discrepancy 0)."""
    c = cyclic_cone(3, (1, 1, 1))
    q = S.quotient_group(c)
    assert S.type_string(q) == "1/3(1,1,1)"
    assert [e.weights for e in q.junior] == [(Fraction(1, 3),) * 3]
    s = S.singularity_class(c)
    assert s.canonical and not s.terminal and s.terminal_witness == q.junior[0].point


def test_junior_elements_count_crepant_divisors():
    """Ito–Reid (McKay correspondence, from memory): for a Gorenstein simplicial 3-dimensional
    cone the junior elements are the lattice points of height one other than the rays (the
    exceptional divisors of the crepant partial resolution)."""
    for r, a in small_types(3, 8):
        if sum(a) % r:
            continue
        c = cyclic_cone(r, a)
        if c is None:
            continue
        q = S.quotient_group(c)
        res = resolve(c)
        assert len(q.junior) == len(res.crepant_rays) - 3, (r, a)
    z22 = cone_from_rays([(1, 0, 0), (0, 1, 0), (0, 0, 1)], 3)      # C^3/(Z/2 × Z/2) below
    L = glat.overlattice(3, [(Fraction(1, 2), Fraction(1, 2), 0), (0, Fraction(1, 2), Fraction(1, 2))])
    rays = [glat.to_coords(L, v) for v in z22.rays]
    q = S.quotient_group(cone_from_rays(rays, 3))
    assert q.cyclic is None and q.invariants == (2, 2) and len(q.junior) == 3
    assert S.type_string(q) == "Z/2 + Z/2"


def brute_height_points(c, m, bound):
    out = []
    for v in itertools.product(range(-bound, bound + 1), repeat=c.ambient_dim):
        if any(v) and contains(c, v) and sum(x * y for x, y in zip(m, v)) <= 1 and v not in c.rays:
            out.append((sum(Fraction(x) * y for x, y in zip(m, v)), v))
    return sorted(out)


def test_height_points_against_a_box():
    """The points of P = {v ∈ σ : <m_K, v> <= 1} = conv(0, rays) lie in the box of the rays."""
    rng = random.Random(15)
    tried = 0
    while tried < 40:
        gens = [tuple(rng.randint(-3, 3) for _ in range(3)) for _ in range(rng.randint(3, 5))]
        c = cone_from_rays(gens, 3)
        if not (c.pointed and c.full):
            continue
        m = S.canonical_functional(c.rays, 3)
        if m is None or any(sum(x * y for x, y in zip(m, r)) != 1 for r in c.rays):
            continue
        bound = max(abs(x) for r in c.rays for x in r)
        assert S.height_points(c, m) == brute_height_points(c, m, bound), c.rays
        tried += 1


def test_doctests():
    """The worked examples in the docstrings of the new modules."""
    import doctest

    from conelang.geometry import intersection, subdivision
    from conelang.render import layer
    from conelang.semantics import singularities as sem
    for mod in (S, intersection, subdivision, layer, sem):
        assert doctest.testmod(mod).failed == 0, mod.__name__


def test_the_type_is_the_same_whatever_the_order_of_the_rays():
    # 1/n(1,q) is cone(e2, n e1 - q e2) (Fulton, Introduction to Toric Varieties §2.2, from
    # memory) and 1/n(1,q) = 1/n(1,q') when q q' = 1 mod n; the written type is the sorted
    # least form, so it is 1/n(1, min(q, q')) in every order of the rays
    from itertools import permutations
    for n in range(2, 12):
        for q in range(1, n):
            if gcd(n, q) != 1:
                continue
            qq = next(x for x in range(1, n) if q * x % n == 1)
            for rays in permutations([(0, 1), (n, -q)]):
                g = S.quotient_group(cone_from_rays(list(rays), 2))
                assert S.type_string(g) == f"1/{n}(1,{min(q, qq)})", (n, q, rays)
    # three dimensions: Z^3 + 1/7 (1,2,4) over the orthant, rays in any order (Reid, from memory)
    for rays in permutations([(1, 0, 0), (0, 1, 0), (0, 0, 1)]):
        L = glat.overlattice(3, [(Fraction(1, 7), Fraction(2, 7), Fraction(4, 7))])
        gens = [glat.to_coords(L, r) for r in rays]
        g = S.quotient_group(cone_from_rays(gens, 3))
        assert S.type_string(g) == "1/7(1,2,4)"
        # the weights are written in the order of q.rays: Σ w_i v_i is the group element's point
        for e in g.elements:
            assert tuple(sum(w * v[j] for w, v in zip(e.weights, g.rays)) for j in range(3)) == e.point
