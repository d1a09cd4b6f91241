"""Cones: worked examples from the literature, and hypothesis checks against brute force.

The brute-force references below are written independently of the engine: determinants by
the Leibniz formula, ranks by Gaussian elimination over Fractions, facets by enumerating
hyperplanes through generators, membership by Carathéodory's theorem.
"""
from __future__ import annotations

import doctest
import itertools
import re
from fractions import Fraction
from math import gcd

import pytest
import sympy
from hypothesis import assume, given, settings, strategies as st

import conelang.geometry.cone as cone_mod
from conelang.geometry.budget import Budget, BudgetExceeded
from conelang.geometry.cone import (
    Cone, a_line_in, cone_from_inequalities, cone_from_rays, contains, dual, extreme_rays, face,
    facet_ray_incidence, faces, full_space, intersection, is_face, is_in_interior,
    redundant_generators, redundant_inequalities, relative_interior_point, zero_cone,
)
from references import magic_square_constraints
from strategies import cone_inputs, inequality_inputs, pointed_full_generators, vectors

SETTINGS = settings(max_examples=60, deadline=None)


# ---------------------------------------------------------------------------------------------
# independent helpers


def perm_sign(p):
    inv = sum(1 for i in range(len(p)) for j in range(i + 1, len(p)) if p[i] > p[j])
    return -1 if inv % 2 else 1


def det_leibniz(M):
    n = len(M)
    total = 0
    for p in itertools.permutations(range(n)):
        term = perm_sign(p)
        for i in range(n):
            term *= M[i][p[i]]
        total += term
    return total


def cross(rows, d):
    """Generalised cross product of d-1 vectors in Q^d (zero iff they are dependent)."""
    return tuple((-1) ** i * det_leibniz([r[:i] + r[i + 1:] for r in rows]) for i in range(d))


def qrank(rows):
    M = [[Fraction(x) for x in r] for r in rows]
    rk = 0
    ncols = len(M[0]) if M else 0
    for c in range(ncols):
        p = next((i for i in range(rk, len(M)) if M[i][c] != 0), None)
        if p is None:
            continue
        M[rk], M[p] = M[p], M[rk]
        for i in range(len(M)):
            if i != rk and M[i][c] != 0:
                f = M[i][c] / M[rk][c]
                M[i] = [a - f * b for a, b in zip(M[i], M[rk])]
        rk += 1
    return rk


def prim(v):
    g = 0
    for x in v:
        g = gcd(g, x)
    return tuple(x // g for x in v)


def ip(u, v):
    return sum(a * b for a, b in zip(u, v))


def span_complement(G, d):
    """Integer basis of span(G)^perp via sympy's rational nullspace."""
    if not G:
        return [tuple(int(i == j) for j in range(d)) for i in range(d)]
    out = []
    for v in sympy.Matrix(G).nullspace():
        den = sympy.ilcm(*[x.q for x in v]) if len(v) else 1
        out.append(prim(tuple(int(x * den) for x in v)))
    return out


def in_span_form(u, E):
    """The facet normal ``u`` as the primitive integer normal inside span(σ) (the Euclidean
    projection orthogonal to the equations ``E``): the form ``brute_facets`` produces, so the
    engine's normals (primitive in M/σ^⊥, reduced modulo the equations) can be compared."""
    if not E:
        return tuple(u)
    M = sympy.Matrix(E).T
    proj = sympy.Matrix(u) - M * (M.T * M).inv() * (M.T * sympy.Matrix(u))
    den = sympy.ilcm(*[x.q for x in proj])
    return prim(tuple(int(x * den) for x in proj))


def span_facets(c):
    return {in_span_form(u, c.equations) for u in c.facets}


def all_generators(gens, lin):
    return [tuple(g) for g in gens if any(g)] + [tuple(l) for l in lin if any(l)] + \
        [tuple(-x for x in l) for l in lin if any(l)]


def brute_facets(G, d):
    """Facet normals in span(G): hyperplanes through dim-1 independent generators."""
    E = span_complement(G, d)
    k = d - len(E)
    if k == 0:
        return set()
    out = set()
    for S in itertools.combinations(sorted(set(G)), k - 1):
        n = cross(list(S) + E, d)
        if not any(n):
            continue
        for s in (n, tuple(-x for x in n)):
            if all(ip(s, g) >= 0 for g in G):
                out.add(prim(s))
    return out


def brute_rays_pointed(G, d):
    """Extremal ray generators of a pointed cone: generators on dim-1 independent facets."""
    F = brute_facets(G, d)
    k = d - len(span_complement(G, d))
    out = set()
    for g in G:
        tight = [u for u in F if ip(u, g) == 0]
        if qrank(tight) == k - 1 if tight else k - 1 == 0:
            out.add(prim(g))
    return out


def brute_rays_from_inequalities(A, E, d):
    """Extreme rays of a pointed cone {A x >= 0, E x = 0}: 1-dimensional solution sets of
    d-1 tight rows (all equations tight)."""
    rows = sorted(set(tuple(r) for r in A if any(r))) + [tuple(e) for e in E if any(e)]
    out = set()
    for S in itertools.combinations(rows, d - 1):
        n = cross(list(S), d)
        if not any(n):
            continue
        for s in (n, tuple(-x for x in n)):
            if all(ip(a, s) >= 0 for a in A) and all(ip(e, s) == 0 for e in E):
                out.add(prim(s))
    return out


def caratheodory_contains(G, v):
    """v in cone(G) iff v is a nonnegative combination of linearly independent generators
    (Carathéodory's theorem for cones; Ziegler, Lectures on Polytopes, §1 — from memory)."""
    G = sorted(set(g for g in G if any(g)))
    if not any(v):
        return True
    d = len(v)
    for k in range(1, d + 1):
        for S in itertools.combinations(G, k):
            gram = [[Fraction(ip(a, b)) for b in S] for a in S]
            det = det_leibniz(gram)
            if det == 0:
                continue
            rhs = [ip(a, v) for a in S]
            coeffs = []
            for j in range(k):
                Mj = [row[:j] + [rhs[i]] + row[j + 1:] for i, row in enumerate(gram)]
                coeffs.append(Fraction(det_leibniz(Mj)) / det)
            if any(c < 0 for c in coeffs):
                continue
            w = tuple(sum(c * s[i] for c, s in zip(coeffs, S)) for i in range(d))
            if w == tuple(v):
                return True
    return False


def same_span(A, B):
    return qrank(list(A) + list(B)) == qrank(list(A)) == qrank(list(B)) if (A or B) else True


# ---------------------------------------------------------------------------------------------
# worked examples


def test_doctests():
    assert doctest.testmod(cone_mod).failed == 0


def test_cls_dual_example():
    # Cox–Little–Schenck, Toric Varieties, §1.2: σ = Cone(e2, 2e1 - e2) has dual
    # σ^∨ = Cone(e1, e1 + 2e2) (from memory)
    s = cone_from_rays([(0, 1), (2, -1)], 2)
    assert dual(s) == cone_from_rays([(1, 0), (1, 2)], 2)
    assert dual(s).rays == ((1, 0), (1, 2))
    assert s.simplicial and s.pointed and s.full and s.dim == 2


@pytest.mark.parametrize("d", [1, 2, 3, 4])
def test_positive_orthant_self_dual(d):
    # The positive orthant is self-dual (Fulton, Introduction to Toric Varieties, §1.2 —
    # from memory; common practice)
    e = [tuple(int(i == j) for j in range(d)) for i in range(d)]
    o = cone_from_rays(e, d)
    assert dual(o) == o
    assert cone_from_inequalities(e, [], d) == o
    assert o.rays == o.facets == tuple(sorted(e))
    assert o.simplicial
    # the faces of the orthant are the 2^d coordinate cones
    assert len(faces(o)) == 2 ** d


def test_cone_over_square():
    # Ziegler, Lectures on Polytopes (Minkowski–Weyl): the cone over a square has 4 rays and
    # 4 facets and is not simplicial (from memory)
    sq = cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3)
    assert len(sq.rays) == 4 and len(sq.facets) == 4
    assert not sq.simplicial and sq.pointed and sq.full
    # facets by hand: x >= 0, y >= 0, z - x >= 0, z - y >= 0
    assert set(sq.facets) == {(1, 0, 0), (0, 1, 0), (-1, 0, 1), (0, -1, 1)}


def test_cube_and_cross_polytope_are_polar():
    # Ziegler, Lectures on Polytopes, Ch. 2: the polar of the 3-cube is the octahedron, so the
    # dual of the cone over the cube [-1,1]^3 is the cone over the cross-polytope (from memory);
    # the cube has f-vector (8, 12, 6)
    cube = [(a, b, c, 1) for a in (-1, 1) for b in (-1, 1) for c in (-1, 1)]
    octa = [tuple(s * int(i == j) for j in range(3)) + (1,) for i in range(3) for s in (-1, 1)]
    C = cone_from_rays(cube, 4)
    assert len(C.rays) == 8 and len(C.facets) == 6
    assert dual(C) == cone_from_rays(octa, 4)
    assert set(C.facets) == set(octa)
    by_dim = [sum(1 for f in faces(C) if f.dim == k) for k in range(5)]
    assert by_dim == [1, 8, 12, 6, 1]


def test_cyclic_polytope_and_four_cube():
    # Ziegler, Lectures on Polytopes, Ch. 0 (from memory): the cyclic 4-polytope with n
    # vertices on the moment curve has n(n-3)/2 facets and is 2-neighborly (every pair of
    # vertices is an edge); facets obey Gale's evenness condition.
    for n in (6, 7):
        pts = [(t, t * t, t ** 3, t ** 4, 1) for t in range(n)]
        C = cone_from_rays(pts, 5)
        assert len(C.rays) == n and len(C.facets) == n * (n - 3) // 2
        assert set(C.facets) == brute_facets(pts, 5)
        edges = [f for f in faces(C) if f.dim == 2]
        assert len(edges) == n * (n - 1) // 2
        # Gale's evenness: a 4-set S of vertices is a facet iff between any two non-members
        # an even number of members lie
        gale = set()
        for S in itertools.combinations(range(n), 4):
            outside = [i for i in range(n) if i not in S]
            if all(sum(1 for s in S if a < s < b) % 2 == 0
                   for a, b in itertools.combinations(outside, 2)):
                gale.add(frozenset(pts[i] for i in S))
        assert {frozenset(C.rays[i] for i in S) for S in facet_ray_incidence(C)} == gale
    # the 4-cube [-1,1]^4 (16 vertices, 8 facets) is polar to the cross-polytope
    # (8 vertices, 16 facets) (Ziegler, Ch. 2 — from memory)
    cube = [v + (1,) for v in itertools.product((-1, 1), repeat=4)]
    cross = [tuple(s * int(i == j) for j in range(4)) + (1,) for i in range(4) for s in (-1, 1)]
    C = cone_from_rays(cube, 5)
    X = cone_from_rays(cross, 5)
    assert (len(C.rays), len(C.facets), len(X.rays), len(X.facets)) == (16, 8, 8, 16)
    assert dual(C) == X
    # f-vector of the 4-cube: (16, 32, 24, 8)
    assert [sum(1 for f in faces(C) if f.dim == k) for k in range(6)] == [1, 16, 32, 24, 8, 1]


@settings(max_examples=30, deadline=None)
@given(pointed_full_generators(5, 9))
def test_dimension_five_against_brute_force(gens):
    c = cone_from_rays(gens, 5)
    assert set(c.facets) == brute_facets(gens, 5)
    assert set(c.rays) == brute_rays_pointed(gens, 5)
    assert cone_from_inequalities(c.facets, [], 5) == c


def test_degenerate_dimension_five_example():
    # a degenerate configuration (many generators on common hyperplanes) where the adjacency
    # test of the double description matters; reference: brute-force facets
    gens = [(-1, 1, 0, -1, 0), (0, -1, -1, -1, 1), (-1, -1, 0, 0, 2), (1, 0, -1, 1, 0),
            (0, 0, -1, 1, 1), (0, 0, 1, 0, 0), (0, 0, -1, -1, 0), (0, 0, 1, 1, 1),
            (1, -1, -1, 0, 2)]
    c = cone_from_rays(gens, 5)
    assert c.pointed and c.full
    assert set(c.facets) == brute_facets(gens, 5)
    assert set(c.rays) == brute_rays_pointed(gens, 5)


@settings(max_examples=25, deadline=None)
@given(st.lists(st.tuples(*[st.integers(-1, 1)] * 4, st.integers(0, 2)), min_size=5, max_size=9))
def test_degenerate_dimension_five_against_brute_force(gens):
    # 0/±1 configurations are highly degenerate; facets against brute force, and rays too
    # when the cone is pointed
    c = cone_from_rays(gens, 5)
    G = [g for g in gens if any(g)]
    assert span_facets(c) == brute_facets(G, 5)
    if c.pointed:
        assert set(c.rays) == brute_rays_pointed(G, 5)


@settings(max_examples=40, deadline=None)
@given(inequality_inputs(3, 5, max_ineqs=6, max_eqs=0), st.data())
def test_inequalities_with_implicit_equations(inp, data):
    # add the negatives of some inequalities: the cone then has implicit equations, which the
    # double description must handle inside a lower-dimensional space
    A, _, d = inp
    k = data.draw(st.integers(0, len(A)))
    A2 = list(A) + [tuple(-x for x in a) for a in A[:k]]
    c = cone_from_inequalities(A2, [], d)
    assert c == cone_from_inequalities(A[k:], A[:k], d)
    if c.pointed:
        assert set(c.rays) == brute_rays_from_inequalities(A2, [], d)


def test_language_contract_examples():
    # the cones of the language contract, checked by hand
    wedge = cone_from_rays([(1, 0, 0), (0, 1, 0), (1, 1, 4)], 3)
    # normals through pairs of rays: e3; (4,0,-1) ⟂ e2,(1,1,4); (0,4,-1) ⟂ e1,(1,1,4)
    assert set(wedge.facets) == {(0, 0, 1), (4, 0, -1), (0, 4, -1)}
    assert wedge.simplicial and wedge.pointed
    top = face(wedge, (0, 0, 1))
    assert top == cone_from_rays([(1, 0, 0), (0, 1, 0)], 3) and top.dim == 2
    # slab: {x >= 0, y >= 0} in Q^3 has lineality Q e3 and rays e1, e2
    slab = cone_from_inequalities([(1, 0, 0), (0, 1, 0)], [], 3)
    assert slab.lineality == ((0, 0, 1),) and slab.rays == ((0, 1, 0), (1, 0, 0))
    assert not slab.pointed and slab.simplicial and slab.full
    # mag: x, y, z >= 0 and x + y = 2z: rays (2,0,1) and (0,2,1)
    mag = cone_from_inequalities([(1, 0, 0), (0, 1, 0), (0, 0, 1)], [(1, 1, -2)], 3)
    assert set(mag.rays) == {(2, 0, 1), (0, 2, 1)}
    assert mag.equations == ((1, 1, -2),) and mag.dim == 2 and not mag.full
    # the facets of mag are primitive in M/σ^⊥ and reduced modulo the equation (1,1,-2)
    # (first coordinate in [0, 1)); by hand: in the lattice {x + y = 2z} with basis
    # b = (1,1,1), (2,0,1), the ray (0,2,1) is 2b - (2,0,1), so the functional vanishing on
    # one ray takes the value 2 (the multiplicity) on the other: (0,1,0) and (0,-1,2)
    assert set(mag.facets) == {(0, 1, 0), (0, -1, 2)}
    assert {ip(u, r) for u in mag.facets for r in mag.rays} == {0, 2}
    assert all(contains(mag, r) for r in [(2, 0, 1), (0, 2, 1), (1, 1, 1)])
    assert not contains(mag, (1, 0, 0))


def test_not_pointed_line():
    c = cone_from_rays([(1, -1, 0), (-1, 1, 0), (0, 0, 1)], 3)
    assert not c.pointed and a_line_in(c) in {(1, -1, 0), (-1, 1, 0)}
    assert c.lineality_dim == 1 and c.dim == 2
    assert a_line_in(cone_from_rays([(1, 0)], 2)) is None


def test_rays_are_primitive_modulo_the_lineality():
    # documented canonical choice (changed deliberately, issue 15 item 6: it used to be the
    # projection orthogonal to the lineality, which need not be primitive in N/L): the rays
    # are primitive in N/L and reduced modulo the Hermite basis of L
    c = cone_from_rays([(1, 1, 0)], 3, lineality=[(0, 1, 0)])
    assert c.rays == ((1, 0, 0),) and c.lineality == ((0, 1, 0),)
    assert c == cone_from_rays([(1, 0, 0), (0, 5, 0), (0, -1, 0)], 3)
    # a cone with a 2-dimensional lineality given by two different bases
    a = cone_from_rays([(1, 2, 3)], 3, lineality=[(1, 1, 0), (0, 1, 1)])
    b = cone_from_rays([(1, 2, 3), (1, 2, 1)], 3, lineality=[(1, 0, -1), (2, 1, -1)])
    assert a == b
    # by hand: Z^3/L ≅ Z through φ = (1,-1,1); φ(1,2,3) = 2, so the class of (1,2,3) is twice
    # a primitive class; its representative reduced modulo the rows (1,0,-1), (0,1,1) of the
    # Hermite basis (first two coordinates 0) is (0,0,1), and φ(0,0,1) = 1
    assert a.lineality == ((1, 0, -1), (0, 1, 1)) and a.rays == ((0, 0, 1),)
    # the old projection (1,-1,1) has φ = 3: not primitive in N/L
    assert ip((1, -1, 1), (1, -1, 1)) == 3


def test_edge_cases():
    z0 = cone_from_rays([], 0)
    assert z0 == cone_from_inequalities([], [], 0) == dual(z0) and z0.dim == 0
    assert cone_from_rays([(0, 0), (0, 0)], 2) == zero_cone(2)
    assert zero_cone(2).equations == ((1, 0), (0, 1)) and zero_cone(2).simplicial
    assert dual(zero_cone(3)) == full_space(3)
    assert full_space(2).lineality == ((1, 0), (0, 1)) and full_space(2).facets == ()
    ray = cone_from_rays([(5,)], 1)
    assert ray.rays == ((1,),) and ray.facets == ((1,),) and dual(ray) == ray
    assert cone_from_rays([(2,), (-3,)], 1) == full_space(1)
    assert cone_from_inequalities([(1,), (-1,)], [], 1) == zero_cone(1)
    half = cone_from_inequalities([(1, 0)], [], 2)
    assert half.rays == ((1, 0),) and half.lineality == ((0, 1),) and half.facets == ((1, 0),)
    with pytest.raises(ValueError):
        cone_from_rays([(1, 2, 3)], 2)


def test_face_error_names_a_ray():
    c = cone_from_rays([(1, 0, 0), (0, 1, 0), (1, 1, 4)], 3)
    with pytest.raises(ValueError, match=r"\(1, 1, 4\).*-3"):
        face(c, (1, 0, -1))
    slab = cone_from_inequalities([(1, 0, 0)], [], 3)
    with pytest.raises(ValueError, match="line"):
        face(slab, (1, 1, 0))


def test_budget_is_respected():
    # the cone over a 12-gon-like set in dimension 4 needs more than 5 work units
    gens = [(a, b, c, 3) for a in (-1, 0, 1) for b in (-1, 0, 1) for c in (-1, 1)]
    with pytest.raises(BudgetExceeded):
        cone_from_rays(gens, 4, budget=Budget(limit=5))


def test_redundancy_examples():
    # hand computation: (1,1) is inside the quadrant, (2,0) repeats the ray of (1,0)
    assert redundant_generators([(1, 0), (1, 1), (0, 1), (2, 0), (0, 0)], 2) == [1, 3, 4]
    # a generator in the lineality space spans no ray (documented choice)
    assert redundant_generators([(1, 0), (-1, 0), (0, 1)], 2) == [0, 1]
    # x >= 0, y >= 0, x + y >= 0 (implied), 2x >= 0 (duplicate facet)
    assert redundant_inequalities([(1, 0), (0, 1), (1, 1), (2, 0)], [], 2) == [2, 3]
    # implicit equations are not reported (documented choice); (0, 0) always is
    assert redundant_inequalities([(1, 0), (-1, 0), (0, 1), (0, 0)], [], 2) == [3]
    # on the line x = 0, x + y >= 0 says the same as y >= 0: both define the facet {0} of the
    # ray (0, 1), and the later one is reported
    assert redundant_inequalities([(0, 1), (1, 1)], [(1, 0)], 2) == [1]


# ---------------------------------------------------------------------------------------------
# hypothesis: brute force and theorems


@SETTINGS
@given(cone_inputs(2, 4, max_gens=6, max_lineality=1))
def test_facets_and_span_match_brute_force(inp):
    gens, lin, d = inp
    c = cone_from_rays(gens, d, lin)
    G = all_generators(gens, lin)
    assert span_facets(c) == brute_facets(G, d)
    assert len(set(c.facets)) == len(c.facets) and list(c.facets) == sorted(c.facets)
    assert c.dim == qrank(G) if G else c.dim == 0
    assert same_span(c.equations, span_complement(G, d)) if c.equations else c.full
    # lineality = span of generators g with -g in the cone; checked with Carathéodory
    for l in c.lineality:
        assert caratheodory_contains(G, l) and caratheodory_contains(G, tuple(-x for x in l))


@SETTINGS
@given(cone_inputs(2, 4, max_gens=7, max_lineality=0))
def test_rays_of_pointed_cones_match_brute_force(inp):
    gens, _, d = inp
    c = cone_from_rays(gens, d)
    assume(c.pointed)
    G = [tuple(g) for g in gens if any(g)]
    assert set(c.rays) == brute_rays_pointed(G, d)


@SETTINGS
@given(inequality_inputs(2, 4, max_ineqs=6, max_eqs=1))
def test_inequalities_match_brute_force(inp):
    A, E, d = inp
    c = cone_from_inequalities(A, E, d)
    # lineality: the solutions of A x = 0, E x = 0 (sympy nullspace)
    rows = [tuple(r) for r in A] + [tuple(e) for e in E]
    null = span_complement(rows, d) if any(any(r) for r in rows) else span_complement([], d)
    assert c.lineality_dim == len(null) and (not null or same_span(c.lineality, null))
    if c.pointed:
        assert set(c.rays) == brute_rays_from_inequalities(A, E, d)
    # every ray and lineality vector satisfies the system
    for r in c.rays:
        assert all(ip(a, r) >= 0 for a in A) and all(ip(e, r) == 0 for e in E)
    for l in c.lineality:
        assert all(ip(a, l) == 0 for a in A) and all(ip(e, l) == 0 for e in E)


@SETTINGS
@given(cone_inputs(2, 4, max_gens=6, max_lineality=1))
def test_duality_and_minkowski_weyl(inp):
    gens, lin, d = inp
    c = cone_from_rays(gens, d, lin)
    # σ^∨ = {u : <u, g> >= 0 for all generators, <u, l> = 0 on the lineality} (definition)
    assert cone_from_inequalities(gens, lin, d) == dual(c)
    # Farkas–Minkowski–Weyl: the H-description gives back the same cone; duality theorem
    # (σ^∨)^∨ = σ (Fulton, §1.2 (i) — from memory)
    assert cone_from_inequalities(c.facets, c.equations, d) == c
    assert cone_from_rays(c.rays, d, c.lineality) == c
    assert dual(dual(c)) == c
    assert cone_from_inequalities(dual(c).rays, dual(c).lineality, d) == c


@SETTINGS
@given(cone_inputs(2, 4, max_gens=6, max_lineality=1), st.randoms(use_true_random=False),
       st.lists(st.integers(1, 4), min_size=10, max_size=10))
def test_invariance_under_reordering_scaling_duplicates(inp, rnd, scales):
    gens, lin, d = inp
    c = cone_from_rays(gens, d, lin)
    g2 = [tuple(s * x for x in g) for g, s in zip(gens, scales)]
    g2 = g2 + g2[:2] + [tuple(0 for _ in range(d))]
    rnd.shuffle(g2)
    lin2 = [tuple(-x for x in l) for l in lin]
    assert cone_from_rays(g2, d, lin2) == c


@SETTINGS
@given(cone_inputs(2, 3, max_gens=5, max_lineality=1), st.lists(vectors(3, -3, 3), max_size=6))
def test_contains_agrees_with_caratheodory(inp, points):
    gens, lin, d = inp
    c = cone_from_rays(gens, d, lin)
    G = all_generators(gens, lin)
    for p in points:
        v = p[:d]
        assert contains(c, v) == caratheodory_contains(G, v)
    for g in G:
        assert contains(c, g)
    p = relative_interior_point(c)
    assert contains(c, p) and is_in_interior(c, p)
    assert is_in_interior(c, p, relative=False) == c.full


@SETTINGS
@given(st.integers(2, 4).flatmap(lambda d: pointed_full_generators(d, 8).map(lambda g: (g, d))))
def test_pointed_full_incidences(gd):
    gens, d = gd
    c = cone_from_rays(gens, d)
    assert c.pointed and c.full
    # facet normals are nonnegative on all generators
    assert all(ip(u, g) >= 0 for u in c.facets for g in gens)
    # every extremal ray lies on >= d-1 facets whose normals span a hyperplane, and every facet
    # contains d-1 linearly independent rays (common practice, no source)
    for r in c.rays:
        tight = [u for u in c.facets if ip(u, r) == 0]
        assert len(tight) >= d - 1 and qrank(tight) == d - 1
    for S in facet_ray_incidence(c):
        assert qrank([c.rays[i] for i in S]) == d - 1
    assert c.simplicial == (len(c.rays) == d)


@settings(max_examples=40, deadline=None)
@given(cone_inputs(2, 4, max_gens=6, max_lineality=1))
def test_face_lattice(inp):
    gens, lin, d = inp
    c = cone_from_rays(gens, d, lin)
    fs = faces(c)
    assert len(set(fs)) == len(fs) and c in fs
    assert min(f.dim for f in fs) == c.lineality_dim
    # Euler–Poincaré for the face lattice of a cone that is not a linear space:
    # sum (-1)^dim = 0 (Ziegler, Lectures on Polytopes, §8.4 — from memory)
    if c.rays:
        assert sum((-1) ** f.dim for f in fs) == 0
    dc = dual(c)
    for f in fs:
        assert is_face(c, f)
        # dual face τ* = σ^∨ ∩ τ^⊥ has dim τ + dim τ* = d, and τ** = τ
        # (Fulton, Introduction to Toric Varieties, §1.2 — from memory)
        fstar = face(dc, relative_interior_point(f))
        assert f.dim + fstar.dim == d
        assert face(c, relative_interior_point(fstar)) == f
        # faces of faces are faces (Fulton §1.2 — from memory)
        for g in faces(f):
            assert is_face(c, g)
    # a face is never a proper cone in the interior: a relative interior ray is not a face
    if c.rays and c.dim - c.lineality_dim >= 2:
        mid = cone_from_rays([relative_interior_point(c)], d, c.lineality)
        assert not is_face(c, mid)


@SETTINGS
@given(cone_inputs(2, 4, max_gens=6, max_lineality=1), st.lists(st.integers(0, 3), min_size=8,
                                                                   max_size=8), st.data())
def test_face_by_functional(inp, coeffs, data):
    gens, lin, d = inp
    c = cone_from_rays(gens, d, lin)
    dc = dual(c)
    u = tuple(sum(k * r[i] for k, r in zip(coeffs, dc.rays)) for i in range(d))
    f = face(c, u)
    # by definition the face is cone(rays with <u, r> = 0) + lineality
    assert f == cone_from_rays([r for r in c.rays if ip(u, r) == 0], d, c.lineality)
    assert all(ip(u, r) == 0 for r in f.rays)
    w = data.draw(vectors(d))
    if contains(dc, w):
        face(c, w)
    else:
        with pytest.raises(ValueError) as err:
            face(c, w)
        # the message names a ray (or a line direction) where w is negative
        vecs = [tuple(int(x) for x in m.split(","))
                for m in re.findall(r"\((-?\d+(?:, -?\d+)*)\)", str(err.value))]
        assert any(ip(w, v) < 0 for v in vecs[1:])


@SETTINGS
@given(cone_inputs(2, 3, max_gens=5, max_lineality=1), cone_inputs(3, 3, max_gens=5,
                                                                   max_lineality=1))
def test_intersection_pointwise(a_inp, b_inp):
    d = a_inp[2]
    a = cone_from_rays(a_inp[0], d, a_inp[1])
    b = cone_from_rays([g[:d] for g in b_inp[0]], d, [l[:d] for l in b_inp[1]])
    m = intersection(a, b)
    for v in itertools.product(range(-2, 3), repeat=d):
        assert contains(m, v) == (contains(a, v) and contains(b, v))
    assert intersection(a, a) == a and intersection(a, b) == intersection(b, a)


@SETTINGS
@given(cone_inputs(2, 4, max_gens=7, max_lineality=0))
def test_redundant_generators(inp):
    gens, _, d = inp
    c = cone_from_rays(gens, d)
    red = redundant_generators(gens, d)
    kept = [g for i, g in enumerate(gens) if i not in red]
    assert len(kept) == len(c.rays)
    assert cone_from_rays(kept, d, c.lineality) == c
    if c.pointed:
        # each kept generator is needed, each redundant one can go (alone)
        for i, g in enumerate(gens):
            rest = gens[:i] + gens[i + 1:]
            assert (cone_from_rays(rest, d) == c) == (i in red or
                                                     any(prim(h) == prim(g) for h in rest if any(h)))


@SETTINGS
@given(inequality_inputs(2, 4, max_ineqs=6, max_eqs=1))
def test_redundant_inequalities(inp):
    A, E, d = inp
    c = cone_from_inequalities(A, E, d)
    red = redundant_inequalities(A, E, d)
    kept = [a for i, a in enumerate(A) if i not in red]
    assert cone_from_inequalities(kept, E, d) == c
    implicit = [a for a in kept if all(ip(a, r) == 0 for r in c.rays)]
    assert len(kept) - len(implicit) == len(c.facets)


@settings(max_examples=80, deadline=None)
@given(cone_inputs(1, 5, max_gens=8, max_lineality=1))
def test_second_description_read_off_agrees_with_a_second_double_description(inp):
    # cone_from_rays / cone_from_inequalities run the double description once and read the
    # extremal members of the input off the incidences; the reference runs it a second time
    # on the other side (the symmetric construction; common practice, no source)
    gens, lin, d = inp
    facets, eqs = extreme_rays(gens, lin, d)
    rays, L = extreme_rays(facets, eqs, d)
    c = cone_from_rays(gens, d, lin)
    assert (c.rays, c.lineality, c.facets, c.equations) == (rays, L, facets, eqs)
    rays, L = extreme_rays(gens, lin, d)
    facets, eqs = extreme_rays(rays, L, d)
    c = cone_from_inequalities(gens, lin, d)
    assert (c.rays, c.lineality, c.facets, c.equations) == (rays, L, facets, eqs)


def _magic_squares(n):
    ineqs, eqs = magic_square_constraints(n)
    return cone_from_inequalities(ineqs, eqs, n * n)


@pytest.mark.parametrize("n,rays", [(3, 4), (4, 20), (5, 1940)])
def test_magic_squares_extreme_rays(n, rays):
    # magic squares of order n >= 3 form a cone of dimension n^2 - 2n (2n + 1 equations with
    # one relation: the row total equals the column total) with 4, 20 and 1940 extreme rays
    # for n = 3, 4, 5 (M. Ahmed, Polyhedral geometry of magic squares, from memory)
    c = _magic_squares(n)
    assert (c.dim, len(c.rays)) == (n * n - 2 * n, rays)
    assert c.pointed and all(contains(c, r) for r in c.rays)
