"""From characters of a torus action back to cones: groups, limits, normality, holes."""
from __future__ import annotations

import itertools
from math import gcd

import pytest
import sympy

from conelang.geometry.characters import MAX_HOLES, analyse_characters
from conelang.geometry.cone import contains


def _gaps(a, b, limit):
    reach = {i * a + j * b for i in range(limit) for j in range(limit)}
    return [x for x in range(1, a * b) if x not in reach]


@pytest.mark.parametrize("a,b", [(2, 3), (2, 5), (3, 4), (3, 5), (2, 7), (4, 5), (3, 7)])
def test_numerical_semigroups(a, b):
    # the gaps of <a, b> (gcd 1): (a-1)(b-1)/2 of them, the largest a*b - a - b
    # (Sylvester 1884, from memory); here compared with the gaps found by brute force
    an = analyse_characters([(a,), (b,)])
    gaps = _gaps(a, b, b + 1)
    assert len(gaps) == (a - 1) * (b - 1) // 2
    assert max(gaps) == a * b - a - b
    assert not an.normal
    assert an.group_is_everything and an.group_index == 1
    assert [h[0] for h in an.holes] == gaps[:MAX_HOLES]
    # the curve z1^b = z2^a
    assert an.equations == (f"z1^{b} - z2^{a}",)


def test_saturated_examples():
    # the characters (1,0),(1,1),(1,2): cone over a conic, normal (the Hilbert basis of the
    # cone between (1,0) and (1,2) is these three points; common practice, no source)
    an = analyse_characters([(1, 0), (1, 1), (1, 2)])
    assert an.normal and an.holes == ()
    assert an.equations == ("z1*z3 - z2^2",)
    # the standard action of (C^*)^2 on C^2
    an = analyse_characters([(1, 0), (0, 1)])
    assert an.normal and an.binomials == () and an.group_is_everything


def test_twisted_cubic_with_a_missing_point():
    # (1,0),(1,1),(1,3): the projected twisted cubic, not normal; the holes are (k, 3k-1)
    # (points of height k reachable with sums of k elements of {0,1,3}: all but 3k-1;
    # worked out by hand)
    an = analyse_characters([(1, 0), (1, 1), (1, 3)])
    assert not an.normal
    assert an.holes == tuple((k, 3 * k - 1) for k in range(1, MAX_HOLES + 1))
    for k in range(1, 6):
        sums = {sum(c) for c in itertools.combinations_with_replacement((0, 1, 3), k)}
        assert 3 * k - 1 not in sums and all(j in sums for j in range(3 * k + 1)
                                             if j != 3 * k - 1)
    # its ideal, by sympy elimination: z1^2 z3 - z2^3 (implicitization, Cox–Little–O'Shea
    # §3.3, from memory)
    z1, z2, z3, s, t = sympy.symbols("z1 z2 z3 s t")
    G = sympy.groebner([z1 - s, z2 - s * t, z3 - s * t ** 3], s, t, z1, z2, z3, order="lex")
    elim = [g for g in G.exprs if not g.has(s) and not g.has(t)]
    assert sympy.groebner(elim, z1, z2, z3, order="grevlex").exprs == \
        sympy.groebner([z1 ** 2 * z3 - z2 ** 3], z1, z2, z3, order="grevlex").exprs
    assert an.equations == ("z1^2*z3 - z2^3",)


def test_group_is_the_ambient_lattice_for_normality():
    # (2,0),(0,2): G = 2Z^2, and N(2,0) + N(0,2) = cone ∩ G, so normal although (1,1) is a
    # lattice point of the cone outside the monoid (it is not in G)
    an = analyse_characters([(2, 0), (0, 2)])
    assert an.normal and an.holes == ()
    assert an.group_index == 4 and not an.group_is_everything
    # (2,0),(1,1),(0,2): G has index 2; N-span is cone ∩ G (normal); the quadric cone
    an = analyse_characters([(2, 0), (1, 1), (0, 2)])
    assert an.normal and an.group_index == 2 and an.equations == ("z1*z3 - z2^2",)
    # (3,0),(1,1),(0,3): G = {(x,y): x ≡ y mod 3}, index 3; a point (x,y) of cone ∩ G is
    # min(x,y) (1,1) plus a multiple of (3,0) or (0,3), so the monoid is normal (by hand)
    an = analyse_characters([(3, 0), (1, 1), (0, 3)])
    assert an.group_index == 3 and an.normal


def _limit_exists(exponents):
    t = sympy.Symbol("t", positive=True)
    for e in exponents:
        lim = sympy.limit(t ** e, t, 0, "+")
        if not lim.is_finite:
            return False
    return True


def test_limit_cone_is_one_parameter_subgroups_with_a_limit():
    # λ(t)·(1,..,1) = (t^<u_i,λ>)_i has a limit at t -> 0 iff all exponents are >= 0;
    # the limits are computed by sympy, λ runs over a box
    chars = [(1, 0), (1, 1), (-1, 2)]
    an = analyse_characters(chars)
    for lam in itertools.product(range(-2, 3), repeat=2):
        exps = [u[0] * lam[0] + u[1] * lam[1] for u in chars]
        assert contains(an.limit_cone, lam) == _limit_exists(exps), lam


def test_units_and_lineality():
    # C^* acting on C^2 with weights 1, -1: the invariant z1 z2; the orbit closure of (1,1)
    # is {z1 z2 = 1}; the monoid is the group Z (normal); only λ = 0 has a limit
    an = analyse_characters([(1,), (-1,)])
    assert an.normal and an.equations == ("z1*z2 - 1",)
    assert an.limit_cone.rays == () and an.limit_cone.lineality == ()
    # weights 2, -2, 3 generate Z as a monoid: normal
    assert analyse_characters([(2,), (-2,), (3,)]).normal
    # weights (2,0),(-2,0),(0,1),(1,1): G = Z^2 but the units only give 2Z x 0: (1,0) is a
    # hole (a whole coset of 2Z (1,0) of holes, one representative listed)
    an = analyse_characters([(2, 0), (-2, 0), (0, 1), (1, 1)])
    assert not an.normal and an.holes == ((1, 0),)
    # and the toric ideal is the one of sympy's elimination
    z = sympy.symbols("z1:5")
    mine = [sympy.Mul(*[v ** e for v, e in zip(z, p)]) - sympy.Mul(*[v ** e for v, e in zip(z, m)])
            for p, m in an.binomials]
    # relations: z1 z2 = 1 and z1 z3^2 = z4^2 ((2,0) + 2 (0,1) = 2 (1,1))
    assert sympy.groebner(mine, *z, order="grevlex").contains(z[0] * z[2] ** 2 - z[3] ** 2)
    assert sympy.groebner(mine, *z, order="grevlex").contains(z[0] * z[1] - 1)


def test_zero_characters_and_empty():
    an = analyse_characters([(0, 0), (1, 1)])
    assert an.equations == ("z1 - 1",) and an.normal and an.group_rank == 1
    an = analyse_characters([], dim=2)
    assert an.group_rank == 0 and an.normal and an.equations == ()
    with pytest.raises(ValueError):
        analyse_characters([])


def test_holes_brute_force_small():
    # random-ish small configurations in Z^2: each listed hole is in cone ∩ G and not a
    # non-negative combination (brute force over coefficient boxes), and normal == no hole
    # of degree below the largest Hilbert basis degree
    for chars in ([(1, 0), (1, 2), (2, 1)], [(2, 1), (1, 2), (1, 1)], [(1, 0), (2, 3), (0, 1)],
                  [(3, 1), (1, 3), (1, 0), (0, 1)], [(1, 0), (1, 4), (1, 1)]):
        an = analyse_characters(chars)
        for h in an.holes:
            assert contains(an.cone, h)
            found = False
            for co in itertools.product(range(12), repeat=len(chars)):
                if tuple(sum(c * u[j] for c, u in zip(co, chars)) for j in range(2)) == h:
                    found = True
                    break
            assert not found, (chars, h)
        if not an.normal:
            assert an.holes
