"""Fans and resolutions, checked against published examples, classical theorems and brute force.

The references below are written independently of the engine: determinants by sympy or the
2x2 formula, Smith forms by sympy, membership in a plane cone by solving for the coefficients
with Fractions, Hirzebruch–Jung continued fractions by their defining recursion.
"""
from __future__ import annotations

import doctest
import itertools
from fractions import Fraction
from math import gcd, lcm

import pytest
import sympy
from hypothesis import assume, given, settings, strategies as st

import conelang.geometry.fan as fan_mod
from conelang.geometry import lattice as glat
from conelang.geometry.budget import Budget, BudgetExceeded
from conelang.semantics.forms import fan_problem_message
from conelang.geometry.cone import cone_from_rays, contains
from conelang.geometry.fan import (
    cartier_basis, check_fan, class_group, fan_invariants, hirzebruch_jung, picard_group, resolve,
)
from conelang.geometry.monoid import hilbert_basis
from references import hirzebruch_jung as hj_reference

SETTINGS = settings(max_examples=40, deadline=None)


def test_doctests():
    assert doctest.testmod(fan_mod).failed == 0


# ---------------------------------------------------------------------------------------------
# independent helpers


def det2(a, b):
    return a[0] * b[1] - a[1] * b[0]


def sympy_det(rows):
    return int(sympy.Matrix(rows).det())


def sympy_group(rows, ncols):
    """(free rank, torsion) of Z^len(rows) / (column span of the matrix with these rows)."""
    m = len(rows)
    if m == 0:
        return (0, ())
    M = sympy.Matrix(rows)
    from sympy.matrices.normalforms import smith_normal_form
    D = smith_normal_form(M, domain=sympy.ZZ)
    diag = [abs(int(D[i, i])) for i in range(min(D.shape)) if D[i, i] != 0]
    return (m - len(diag), tuple(x for x in diag if x != 1))


def in_plane_cone(p, gens):
    """Brute-force membership of p in cone(gens) in Q^2 for 1 or 2 generators."""
    if not any(p):
        return True
    if len(gens) == 1:
        a = gens[0]
        return det2(a, p) == 0 and a[0] * p[0] + a[1] * p[1] > 0
    a, b = gens
    d = det2(a, b)
    if d == 0:
        raise ValueError("degenerate")
    s = Fraction(det2(p, b), d)
    t = Fraction(det2(a, p), d)
    return s >= 0 and t >= 0


def carrier_plane(p, gens):
    """The set of generators of the smallest face of cone(gens) (pointed, plane) containing p."""
    if not any(p):
        return frozenset()
    if len(gens) == 1:
        return frozenset(gens)
    a, b = gens
    d = det2(a, b)
    s = Fraction(det2(p, b), d)
    t = Fraction(det2(a, p), d)
    return frozenset(g for g, c in ((a, s), (b, t)) if c > 0)




def evaluate_cf(bs):
    x = Fraction(bs[-1])
    for b in reversed(bs[:-1]):
        x = b - 1 / x
    return x


# ---------------------------------------------------------------------------------------------
# complete fans from the literature

P2 = ([(1, 0), (0, 1), (-1, -1)], [(0, 1), (1, 2), (2, 0)])


def hirzebruch(a):
    # Fulton §1.1 / CLS Example 3.1.16 (from memory): rays (1,0), (0,1), (-1,a), (0,-1)
    return [(1, 0), (0, 1), (-1, a), (0, -1)], [(0, 1), (1, 2), (2, 3), (3, 0)]


def test_projective_plane():
    # CLS Example 3.1.9 / 4.1.? (from memory): P^2 is smooth and complete, Pic = Cl = Z,
    # 3 fixed points, 3 invariant curves, 1 dense orbit; the lines have self-intersection 1.
    f = check_fan(*P2, 2)
    assert f.valid and f.problems == ()
    inv = fan_invariants(f)
    assert inv.complete and inv.smooth and inv.simplicial
    assert inv.orbits == (3, 3, 1)
    assert inv.class_group == (1, ()) and inv.picard_group == (1, ())
    assert inv.self_intersections == (1, 1, 1)


@pytest.mark.parametrize("a", range(0, 6))
def test_hirzebruch_surfaces(a):
    # Fulton §1.1, §2.5 (from memory): H_a is smooth and complete with Pic = Cl = Z^2; its
    # invariant curves have self-intersections -a, a (the sections) and 0, 0 (the fibres).
    f = check_fan(*hirzebruch(a), 2)
    inv = fan_invariants(f)
    assert inv.complete and inv.smooth
    assert inv.orbits == (4, 4, 1)
    assert inv.class_group == (2, ()) and inv.picard_group == (2, ())
    assert sorted(inv.self_intersections) == sorted([-a, a, 0, 0])


def weighted_plane_rays(q):
    """Rays of P(q0, q1, q2): primitive v_i generating Z^2 with sum q_i v_i = 0, by search."""
    for v1 in itertools.product(range(-6, 7), repeat=2):
        for v2 in itertools.product(range(-6, 7), repeat=2):
            num = [-(q[1] * v1[k] + q[2] * v2[k]) for k in range(2)]
            if any(x % q[0] for x in num):
                continue
            v0 = tuple(x // q[0] for x in num)
            vs = [v0, v1, v2]
            if any(gcd(*v) != 1 for v in vs):
                continue
            minors = [det2(a, b) for a, b in itertools.combinations(vs, 2)]
            if gcd(*minors) == 1:
                return vs
    raise AssertionError("no rays found")


@pytest.mark.parametrize("q", [(1, 1, 2), (1, 2, 3), (1, 1, 3), (1, 2, 5), (2, 3, 5), (1, 3, 4)])
def test_weighted_projective_planes(q):
    # CLS Example 4.1.? and Exercise 4.2.? (from memory): for well-formed weights, Cl(P(q)) = Z
    # (D_i of degree q_i) and Pic(P(q)) = Z, generated by O(lcm(q)), so [Cl : Pic] = lcm(q).
    # P(q) is smooth iff q = (1,1,1); it is complete and simplicial.
    rays = weighted_plane_rays(q)
    f = check_fan(rays, [(0, 1), (1, 2), (2, 0)], 2)
    assert f.valid
    inv = fan_invariants(f)
    assert inv.complete and inv.simplicial and not inv.smooth
    assert inv.orbits == (3, 3, 1)
    assert inv.class_group == (1, ()) and inv.picard_group == (1, ())
    assert inv.picard_index == lcm(*q)


def test_overlapping_cones_are_named():
    # (1,1) lies inside cone((1,0),(0,1)): cone((0,1),(1,1)) overlaps it (common practice, no source)
    f = check_fan([(1, 0), (0, 1), (1, 1), (-1, -1)], [(0, 1), (1, 2), (2, 3)], 2)
    assert not f.valid
    (p,) = [p for p in f.problems if p.code == "fan-overlap"]
    assert {p.cone, p.other} == {0, 1}
    # the witness lies in both cones, but not in a common face
    w = p.vector
    assert in_plane_cone(w, [(1, 0), (0, 1)]) and in_plane_cone(w, [(0, 1), (1, 1)])
    assert carrier_plane(w, [(1, 0), (0, 1)]) != carrier_plane(w, [(0, 1), (1, 1)])
    msg = fan_problem_message(p)
    assert "[1 2]" in msg and "[2 3]" in msg
    with pytest.raises(ValueError):
        fan_invariants(f)


def test_not_pointed_and_not_extremal():
    f = check_fan([(1, 0, 0), (-1, 0, 0), (0, 1, 0), (1, 1, 0), (0, 0, 1)], [(0, 1, 2), (0, 2, 3)], 3)
    codes = sorted((p.code, p.cone) for p in f.problems if p.is_error)
    assert codes == [("fan-not-pointed", 0), ("fan-not-ray", 1)]
    notray = next(p for p in f.problems if p.code == "fan-not-ray")
    assert notray.ray == 3 and set(notray.face) == {0, 2}      # (1,1,0) = (1,0,0) + (0,1,0)
    line = next(p for p in f.problems if p.code == "fan-not-pointed").vector
    assert line[1:] == (0, 0) and line[0] != 0


def test_warnings_do_not_invalidate():
    f = check_fan([(1, 0), (0, 1), (-1, 0)], [(0, 1), (0,), (0, 1)], 2)
    assert f.valid
    codes = sorted(p.code for p in f.problems)
    assert codes == ["fan-redundant-cone", "fan-redundant-cone", "fan-unused-ray"]
    inv = fan_invariants(f)
    # maximal cones: [1 2] and the unused ray [3] as a cone of its own
    assert sorted(inv.maximal_cones) == [(0, 1), (2,)]
    assert inv.orbits == (1, 3, 1)


def test_duplicate_rays_are_errors():
    f = check_fan([(1, 0), (0, 1), (2, 0)], [(0, 1), (2, 1)], 2)
    assert not f.valid
    assert any(p.code == "fan-duplicate-ray" and p.ray == 2 and p.other_ray == 0 for p in f.problems)


def test_class_group_when_rays_do_not_span():
    # CLS Theorem 4.1.3 (from memory): Cl = Z^{Σ(1)} / M even when M -> Z^{Σ(1)} is not
    # injective; a torus factor does not change the class group (CLS Proposition 4.2.? (from memory)).
    # P^1 x (C^*)^2: rays ±e1 in Z^3
    assert class_group([(1, 0, 0), (-1, 0, 0)], 3) == (1, ())
    # U_σ x C^* for σ = cone((1,0),(1,2)): Cl = Z/2 (CLS Example 4.1.? (from memory))
    assert class_group([(1, 0, 0), (1, 2, 0)], 3) == (0, (2,))
    f = check_fan([(1, 0, 0), (-1, 0, 0)], [(0,), (1,)], 3)
    inv = fan_invariants(f)
    assert not inv.complete and inv.picard_group == (1, ()) and inv.orbits == (0, 0, 2, 1)


# ---------------------------------------------------------------------------------------------
# properties on random inputs


@SETTINGS
@given(st.lists(st.tuples(st.integers(-4, 4), st.integers(-4, 4), st.integers(-4, 4)), min_size=3, max_size=3))
def test_simplicial_cone_shortcut_is_canonical(gens):
    # the inverse-matrix construction gives the same canonical cone as double description
    assume(sympy_det(gens) != 0)
    prim = [tuple(x // gcd(*g) for x in g) for g in gens]
    assert fan_mod.simplicial_cone(prim, 3) == cone_from_rays(prim, 3)

small = st.integers(-2, 2)
plane_vec = st.tuples(small, small).filter(lambda v: v != (0, 0))


@SETTINGS
@given(st.lists(plane_vec, min_size=2, max_size=5, unique_by=lambda v: (v[0] // gcd(*v), v[1] // gcd(*v))),
       st.data())
def test_plane_fans_against_brute_force(vs, data):
    # Brute force: a list of plane cones is a fan iff each cone is pointed and every lattice
    # point in the box [-4, 4]^2 has the same carrier face in all cones containing it (the box
    # is large enough: intersections of plane cones are spanned by input rays, so the sum of
    # two rays of the intersection, with entries in [-4, 4], lies in its relative interior).
    rays = [tuple(x // gcd(*v) for x in v) for v in vs]
    n = len(rays)
    pairs = list(itertools.combinations(range(n), 2))
    cones = data.draw(st.lists(st.sampled_from(pairs), min_size=1, max_size=4, unique=True))
    f = check_fan(rays, cones, 2)
    pointed = all(det2(rays[a], rays[b]) != 0 or rays[a][0] * rays[b][0] + rays[a][1] * rays[b][1] > 0
                  for a, b in cones)
    all_cones = [[rays[a], rays[b]] for a, b in cones]
    used = {i for c in cones for i in c}
    all_cones += [[rays[i]] for i in range(n) if i not in used]
    if not pointed:
        assert not f.valid
        return
    ok = True
    for p in itertools.product(range(-4, 5), repeat=2):
        carriers = {carrier_plane(p, c) for c in all_cones if in_plane_cone(p, c)}
        if len(carriers) > 1:
            ok = False
            break
    assert f.valid == ok
    if ok:
        inv = fan_invariants(f)
        covered = all(any(in_plane_cone(p, c) for c in all_cones)
                      for p in itertools.product(range(-4, 5), repeat=2))
        assert inv.complete == covered
        # Cl by sympy's Smith form
        assert inv.class_group == sympy_group(rays, 2)


def blow_up(rays, order, k):
    """Blow up the fixed point of the k-th cone (order = rays in cyclic order)."""
    a, b = order[k], order[(k + 1) % len(order)]
    new = tuple(x + y for x, y in zip(rays[a], rays[b]))
    rays = rays + [new]
    order = order[:k + 1] + [len(rays) - 1] + order[k + 1:]
    return rays, order


@SETTINGS
@given(st.sampled_from(["P2", "H0", "H1", "H3"]), st.lists(st.integers(0, 20), max_size=5))
def test_smooth_complete_surfaces(start, blowups):
    # Every smooth complete toric surface is P^2, H_a or a blow-up of these at fixed points
    # (Fulton §2.5 (from memory)).  For them: Pic = Cl = Z^{r-2}, and the self-intersections
    # satisfy  sum D_i^2 = 12 - 3r  (Fulton §2.5, Noether's formula (from memory)).
    if start == "P2":
        rays, order = list(P2[0]), [0, 1, 2]
    else:
        rays, order = list(hirzebruch(int(start[1]))[0]), [0, 1, 2, 3]
    for k in blowups:
        rays, order = blow_up(rays, order, k % len(order))
    cones = [(order[i], order[(i + 1) % len(order)]) for i in range(len(order))]
    f = check_fan(rays, cones, 2)
    assert f.valid
    inv = fan_invariants(f)
    r = len(rays)
    assert inv.smooth and inv.complete
    assert inv.class_group == (r - 2, ()) and inv.picard_group == (r - 2, ())
    assert sum(inv.self_intersections) == 12 - 3 * r
    assert inv.orbits == (r, r, 1)


@SETTINGS
@given(st.lists(st.tuples(small, small, st.integers(1, 3)), min_size=3, max_size=5))
def test_affine_fans_have_trivial_picard_group(gens):
    # CLS Proposition 4.2.2 (from memory): Pic(U_σ) = 0 for an affine toric variety, and
    # Cl(U_σ) = Z^{σ(1)} / M (its Smith form, computed here by sympy).
    c = cone_from_rays(gens, 3)
    rays = list(c.rays)
    f = check_fan(rays, [tuple(range(len(rays)))], 3)
    assert f.valid
    inv = fan_invariants(f)
    assert inv.picard_group == (0, ())
    assert inv.class_group == sympy_group(rays, 3)
    # a T-Cartier divisor on U_σ is div(χ^m): the Cartier lattice is the image of M
    B = cartier_basis(rays, [tuple(range(len(rays)))], 3)
    image = [tuple(v[j] for v in rays) for j in range(3)]
    assert sympy.Matrix(B).rank() == sympy.Matrix(image).rank()


# ---------------------------------------------------------------------------------------------
# resolutions in dimension 2


def test_hirzebruch_jung_small_cases():
    # Fulton §2.6 (from memory): n/(n-1) = [2, ..., 2] (n-1 twos, the A_{n-1} singularity), n/1 = [n]
    for n in range(2, 12):
        assert hirzebruch_jung(n, n - 1) == (2,) * (n - 1)
        assert hirzebruch_jung(n, 1) == (n,)


ALL_NQ = [(n, q) for n in range(2, 31) for q in range(1, n) if gcd(n, q) == 1]


def test_minimal_resolutions_of_all_cyclic_quotients_up_to_30():
    # Fulton §2.6, CLS §10.2 (from memory): the minimal resolution of cone((0,1), (n,-q)) has the
    # rays v_0 = (0,1), v_1, ..., v_{s+1} = (n,-q) with v_{i-1} + v_{i+1} = b_i v_i, where
    # n/q = [b_1, ..., b_s] is the Hirzebruch–Jung continued fraction; the rays are the
    # Hilbert basis of σ ∩ Z^2, and the exceptional curves have self-intersection -b_i.
    assert len(ALL_NQ) > 250
    for n, q in ALL_NQ:
        sigma = cone_from_rays([(0, 1), (n, -q)], 2)
        bs = hj_reference(n, q)
        assert evaluate_cf(bs) == Fraction(n, q)
        r = resolve(sigma)
        assert r.continued_fraction == tuple(bs) and r.cyclic_quotient == (n, q)
        v = r.rays
        assert len(v) == len(bs) + 2
        assert v[0] == (0, 1) and v[-1] == (n, -q)
        assert r.cones == tuple((i, i + 1) for i in range(len(v) - 1))
        for i in range(len(v) - 1):
            # smooth, and consecutive rays turn the same way from (0,1) to (n,-q): the cones
            # tile σ, so the support of the resolution is σ
            assert det2(v[i + 1], v[i]) == 1
            assert in_plane_cone(v[i], [(0, 1), (n, -q)])
        for i in range(1, len(v) - 1):
            assert tuple(a + c for a, c in zip(v[i - 1], v[i + 1])) == tuple(bs[i - 1] * x for x in v[i])
        assert set(v) == set(hilbert_basis(sigma))
        inv = fan_invariants(check_fan(v, r.cones, 2, trusted=True))   # a fan: shown just above
        assert inv.smooth and not inv.complete
        assert inv.self_intersections == (None,) + tuple(-b for b in bs) + (None,)


@SETTINGS
@given(st.sampled_from(ALL_NQ[:80]), st.integers(-3, 3), st.integers(-3, 3), st.booleans())
def test_resolution_is_equivariant(nq, s, t, flip):
    # The minimal resolution is unique, so it commutes with automorphisms of the lattice
    # (common practice, no source): compare resolve(g σ) with g(resolve σ).
    n, q = nq
    g = [[1, s], [0, 1]] if flip else [[1, 0], [t, 1]]
    g = (sympy.Matrix(g) * sympy.Matrix([[1, 0], [t, 1]])).tolist()
    apply = lambda v: tuple(int(sum(g[i][j] * v[j] for j in range(2))) for i in range(2))
    sigma = cone_from_rays([(0, 1), (n, -q)], 2)
    moved = cone_from_rays([apply((0, 1)), apply((n, -q))], 2)
    r1, r2 = resolve(sigma), resolve(moved)
    assert set(map(apply, r1.rays)) == set(r2.rays)
    assert r2.continued_fraction in (r1.continued_fraction, tuple(reversed(r1.continued_fraction)))


def test_two_dimensional_cone_in_three_space():
    # a plane cone inside Z^3 is resolved in its own saturated lattice span ∩ Z^3
    sigma = cone_from_rays([(0, 1, 1), (3, -2, 1)], 3)
    r = resolve(sigma)
    assert all(contains(sigma, v) for v in r.rays)
    assert r.continued_fraction == (2, 2)     # 3/2 = [2, 2]: the A_2 singularity
    for a, b in r.cones:
        # part of a basis of Z^3: the 2x2 minors are coprime
        minors = [r.rays[a][i] * r.rays[b][j] - r.rays[a][j] * r.rays[b][i] for i, j in ((0, 1), (0, 2), (1, 2))]
        assert gcd(*minors) == 1


# ---------------------------------------------------------------------------------------------
# resolutions in dimension 3


def orthant_in(glue):
    """The positive orthant in N = Z^3 + Z glue, in lattice coordinates: the cone of the
    cyclic quotient singularity 1/n(a, b, c) for glue = (a, b, c)/n."""
    L = glat.overlattice(3, [glue])
    return cone_from_rays([glat.to_coords(L, e) for e in ((1, 0, 0), (0, 1, 0), (0, 0, 1))], 3)


def truncated_volume(gens, w):
    """Volume of {x in cone(gens) : <w, x> <= 1} for a simplicial full cone (sympy det)."""
    k = len(gens)
    h = 1
    for g in gens:
        h *= sum(a * b for a, b in zip(w, g))
    return Fraction(abs(sympy_det(gens)), sympy.factorial(k) * h)


def check_smooth_refinement(sigma, r, sigma_volume=None, w=None):
    k = sigma.ambient_dim
    if w is None:
        w = tuple(sum(u[i] for u in sigma.facets) for i in range(k))   # positive on σ ∖ 0
    for v in r.rays:
        assert contains(sigma, v)
    for c in r.cones:
        assert abs(sympy_det([r.rays[i] for i in c])) == 1
    # the cones form a fan (checked pairwise, untrusted) ...
    assert check_fan(r.rays, r.cones, k).valid
    # ... inside σ whose truncated volume is that of σ: the support is all of σ
    total = sum(truncated_volume([r.rays[i] for i in c], w) for c in r.cones)
    if sigma_volume is None:
        sigma_volume = truncated_volume(list(sigma.rays), w)
    assert total == sigma_volume


def test_cone_over_a_square():
    # The cone over the unit square (the conifold xy = zw): its two triangulations are its two
    # small crepant resolutions (CLS Example 11.1.? (from memory)).  For w = (0, 0, 1) the
    # truncation {<w, x> <= 1} is the pyramid over the unit square, of volume 1/3.
    sigma = cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3)
    r = resolve(sigma)
    assert len(r.rays) == 4 and len(r.cones) == 2
    assert r.crepant_smooth is True and r.method == "crepant subdivision"
    check_smooth_refinement(sigma, r, Fraction(1, 3), w=(0, 0, 1))


def ages(n, a, b, c):
    """Number of group elements of age one in 1/n(a, b, c) (Ito–Reid (from memory))."""
    return sum(1 for k in range(1, n) if (k * a % n + k * b % n + k * c % n) == n)


@pytest.mark.parametrize("n,a,b,c", [(3, 1, 1, 1), (5, 1, 2, 2), (7, 1, 2, 4), (6, 1, 2, 3), (9, 1, 2, 6),
                                     (8, 1, 3, 4), (11, 1, 3, 7)])
def test_gorenstein_cyclic_quotients_have_crepant_resolutions(n, a, b, c):
    # For a Gorenstein 1/n(a,b,c) (a + b + c ≡ 0 mod n) the subdivision at the lattice points of
    # height one is a crepant resolution; the exceptional divisors correspond to the elements of
    # age one (Ito–Reid, McKay correspondence (from memory)), and the Euler number of the
    # resolution, its number of torus-fixed points, is |G| = n (Roan; Batyrev (from memory)).
    assert (a + b + c) % n == 0
    sigma = orthant_in((Fraction(a, n), Fraction(b, n), Fraction(c, n)))
    r = resolve(sigma)
    check_smooth_refinement(sigma, r)
    assert r.crepant_smooth is True
    m = fan_mod.gorenstein_functional(list(sigma.rays), 3)
    assert all(sum(x * y for x, y in zip(m, v)) == 1 for v in r.rays)        # crepant
    assert len(r.rays) - 3 == ages(n, a, b, c)
    assert len(r.cones) == n


@pytest.mark.parametrize("n,a,b,c", [(2, 1, 1, 1), (7, 1, 2, 3), (5, 1, 1, 1), (12, 1, 5, 7), (13, 1, 3, 9)])
def test_other_cyclic_quotients(n, a, b, c):
    sigma = orthant_in((Fraction(a, n), Fraction(b, n), Fraction(c, n)))
    r = resolve(sigma)
    check_smooth_refinement(sigma, r)
    if (a + b + c) % n:
        assert r.crepant_rays is None


def test_required_examples_by_name():
    # the cone over a square, 1/3(1,1,1) and 1/5(1,2,2): smooth, and supported on σ (the
    # square pyramid has volume 1/3; the simplicial cones are compared with their own volume)
    square = cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3)
    check_smooth_refinement(square, resolve(square), Fraction(1, 3), w=(0, 0, 1))
    for glue in ((Fraction(1, 3),) * 3, (Fraction(1, 5), Fraction(2, 5), Fraction(2, 5))):
        sigma = orthant_in(glue)
        check_smooth_refinement(sigma, resolve(sigma))


@settings(max_examples=15, deadline=None)
@given(st.lists(st.tuples(small, small, st.integers(1, 3)), min_size=3, max_size=5))
def test_random_three_dimensional_cones(gens):
    c = cone_from_rays(gens, 3)
    assume(c.dim == 3)
    r = resolve(c)
    assert set(c.rays) <= set(r.rays)
    w = tuple(sum(u[i] for u in c.facets) for i in range(3))
    from conelang.geometry.monoid import triangulate
    ref = sum(truncated_volume([c.rays[i] for i in s], w) for s in triangulate(c))
    check_smooth_refinement(c, r, ref)


def test_four_dimensional_terminal_quotient_is_not_crepantly_smooth():
    # 1/2(1,1,1,1) is Gorenstein and terminal: no lattice point at height one besides the rays,
    # so the crepant partial resolution is σ itself and is not smooth (Reid, "Young person's
    # guide" (from memory)); the stellar resolution still exists.
    L = glat.overlattice(4, [(Fraction(1, 2),) * 4])
    sigma = cone_from_rays([glat.to_coords(L, e) for e in
                            ((1, 0, 0, 0), (0, 1, 0, 0), (0, 0, 1, 0), (0, 0, 0, 1))], 4)
    r = resolve(sigma)
    assert r.crepant_smooth is False and len(r.crepant_rays) == 4
    for cc in r.cones:
        assert abs(sympy_det([r.rays[i] for i in cc])) == 1
    assert check_fan(r.rays, r.cones, 4).valid


def test_budget_is_respected():
    sigma = orthant_in((Fraction(1, 101), Fraction(7, 101), Fraction(30, 101)))
    with pytest.raises(BudgetExceeded):
        resolve(sigma, Budget(limit=200))


def test_smooth_and_low_dimensional_cones():
    assert resolve(cone_from_rays([(1, 0, 0), (1, 1, 0), (0, 0, 1)], 3)).method == "smooth"
    r = resolve(cone_from_rays([(1, 0), (1, 1)], 2))
    assert r.method == "smooth" and r.continued_fraction is None and len(r.cones) == 1
    r = resolve(cone_from_rays([(2, 3)], 2))
    assert r.rays == ((2, 3),) and r.cones == ((0,),)
    r = resolve(cone_from_rays([], 2))
    assert r.rays == () and r.cones == ((),)
    with pytest.raises(ValueError):
        resolve(cone_from_rays([(1, 0), (-1, 0)], 2))
