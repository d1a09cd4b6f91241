"""Lattice polytopes, Ehrhart counting and Hilbert series, checked against outside sources:
theorems (named beside each check), sympy, and brute force over a box."""
from __future__ import annotations

from fractions import Fraction
from itertools import combinations, product
from math import comb, gcd

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

from conelang.geometry import cone as gcone
from conelang.geometry import polytope as gp


def hull(pts):
    return gp.polytope_from_points(pts, len(pts[0]))


def random_points(d, lo=-3, hi=3, n_max=7):
    return st.lists(st.tuples(*[st.integers(lo, hi)] * d), min_size=d + 1, max_size=n_max)


def full(pts):
    return hull(pts).full


# ---- brute force against the half-open decomposition ----------------------------------------
@settings(max_examples=60, deadline=None)
@given(st.integers(1, 4).flatmap(lambda d: random_points(d, -2, 2, 6 if d < 4 else 5)))
def test_lattice_points_match_box_enumeration(pts):
    """Brute force: every point of the bounding box tested against the facets."""
    P = hull(pts)
    data = gp.lattice_data(P, limit=10**6)
    box = gp.lattice_points_bruteforce(P)
    assert data.points == box
    assert gp.lattice_points(P) == len(box)
    assert gp.interior_points(P) == sum(1 for x in box if gp.in_interior(P, x))
    # the determinants of the triangulation add up to h*(1) (Stanley 1980: both are dim!·vol)
    assert gp.normalized_volume(P) == sum(data.h_star)


@settings(max_examples=40, deadline=None)
@given(random_points(2, -4, 4, 7).filter(full))
def test_pick_theorem(pts):
    """Pick, "Geometrisches zur Zahlenlehre" (1899): A = I + B/2 - 1, so the normalized volume
    2A equals 2I + B - 2.  The area is taken independently by the shoelace formula."""
    P = hull(pts)
    B = gp.lattice_points(P) - gp.interior_points(P)
    I = gp.interior_points(P)
    assert gp.normalized_volume(P) == 2 * I + B - 2
    # shoelace on the vertices in angular order around the centroid
    vs = P.vertices
    cx = Fraction(sum(v[0] for v in vs), len(vs))
    cy = Fraction(sum(v[1] for v in vs), len(vs))
    order = sorted(vs, key=lambda v: sympy.atan2(v[1] - cy, v[0] - cx))
    twice_area = abs(sum(a[0] * b[1] - b[0] * a[1] for a, b in zip(order, order[1:] + order[:1])))
    assert twice_area == gp.normalized_volume(P)


@settings(max_examples=40, deadline=None)
@given(st.integers(2, 3).flatmap(lambda d: random_points(d, -2, 2, 6)).filter(full))
def test_macdonald_reciprocity(pts):
    """Ehrhart–Macdonald reciprocity (Macdonald, "Polynomials associated with finite cell
    complexes", 1971): the interior points of tP number (-1)^d L(-t); the interior points are
    counted by brute force in the box."""
    P = hull(pts)
    L = gp.ehrhart(P)
    d = P.dim
    for t in (1, 2):
        tP = gp.dilate(P, t)
        inner = sum(1 for x in gp.lattice_points_bruteforce(tP) if gp.in_interior(tP, x))
        assert inner == (-1) ** d * gp.evaluate(L, -t)
        assert gp.evaluate(L, t) == len(gp.lattice_points_bruteforce(tP))


@settings(max_examples=40, deadline=None)
@given(st.integers(2, 4).flatmap(lambda d: random_points(d, -2, 2, 6)))
def test_stanley_nonnegativity(pts):
    """Stanley, "Decompositions of rational convex polytopes" (1980): h* has nonnegative
    entries, h*_0 = 1, and h*_1 = L(1) - dim - 1."""
    P = hull(pts)
    h = gp.h_star(P)
    assert all(x >= 0 for x in h) and h[0] == 1
    if len(h) > 1:
        assert h[1] == len(gp.lattice_points_bruteforce(P)) - P.dim - 1


# ---- Ehrhart polynomials of standard polytopes ----------------------------------------------
@pytest.mark.parametrize("d", [1, 2, 3, 4, 5])
def test_standard_simplex(d):
    """Beck–Robins, "Computing the Continuous Discretely", Theorem 2.2 (from memory): the
    standard simplex has L(n) = C(n + d, d); its h* is (1); expanded by sympy."""
    pts = [(0,) * d] + [tuple(int(i == j) for j in range(d)) for i in range(d)]
    P = hull(pts)
    n = sympy.symbols("n")
    ref = sympy.Poly(sympy.expand_func(sympy.binomial(n + d, d)), n).all_coeffs()[::-1]
    assert gp.ehrhart(P) == tuple(Fraction(int(c.p), int(c.q)) for c in ref)
    assert gp.h_star(P) == (1,)


@pytest.mark.parametrize("d", [1, 2, 3, 4])
def test_unit_cube(d):
    """The unit cube: L(n) = (n + 1)^d (Beck–Robins, Section 2.2, from memory); h* are the
    Eulerian numbers (1, 1), (1, 4, 1), (1, 11, 11, 1) (same source); f-vector 2^(d-k) C(d, k)."""
    P = hull(list(product((0, 1), repeat=d)))
    assert gp.ehrhart(P) == tuple(Fraction(comb(d, k)) for k in range(d + 1))
    eulerian = {1: (1,), 2: (1, 1), 3: (1, 4, 1), 4: (1, 11, 11, 1)}
    assert gp.h_star(P) == eulerian[d]
    assert gp.f_vector(P) == tuple(2 ** (d - k) * comb(d, k) for k in range(d))


def test_reeve_tetrahedra():
    """Reeve (1957): the tetrahedra with vertices 0, e1, e2, (1, 1, r) have no lattice points
    but their vertices, volume r/6, so L(n) = r/6 n^3 + n^2 + (2 - r/6) n + 1: the number of
    points does not determine the volume in dimension 3."""
    for r in (1, 2, 5, 13):
        P = hull([(0, 0, 0), (1, 0, 0), (0, 1, 0), (1, 1, r)])
        assert gp.ehrhart(P) == (1, 2 - Fraction(r, 6), 1, Fraction(r, 6))
        assert gp.lattice_points(P) == 4 and gp.normalized_volume(P) == r


# ---- the 16 reflexive polygons --------------------------------------------------------------
# Poonen–Rodriguez-Villegas, "Lattice polygons and the number 12", Amer. Math. Monthly 107
# (2000), from memory: up to lattice equivalence there are 16 reflexive polygons (5 triangles,
# 7 quadrilaterals, 3 pentagons, 1 hexagon), with 3..9 boundary points, and for each one the
# boundary points of P and of its polar add up to 12.  Listed here: those with at most 6
# boundary points (the others are their polars, by the same theorem).
SMALL_REFLEXIVE = {
    "T3": [(1, 0), (0, 1), (-1, -1)],
    "T4": [(1, 0), (0, 1), (-1, -2)],
    "Q4a": [(1, 0), (0, 1), (-1, 0), (0, -1)],
    "Q4b": [(1, 0), (0, 1), (-1, -1), (0, -1)],
    "Q5": [(1, 0), (0, 1), (-1, -1), (1, -1)],
    "P5": [(1, 0), (0, 1), (-1, 0), (-1, -1), (0, -1)],
    "T6": [(1, 0), (0, 1), (-2, -3)],
    "Q6": [(1, 0), (0, 1), (-1, 0), (-1, -2)],
    "P6": [(1, 0), (0, 1), (-1, 1), (-1, -1), (0, -1)],
    "H6": [(1, 0), (0, 1), (-1, 1), (-1, 0), (0, -1), (1, -1)],
}


def polar(P):
    verts = gp.polar_vertices(P)
    assert all(x.denominator == 1 for v in verts for x in v), "the polar of a reflexive polygon is a lattice polygon"
    return hull([tuple(int(x) for x in v) for v in verts])


def edge_lengths(P):
    """The lattice lengths of the edges, as a cyclic sequence normalised up to rotation and
    reflection (an invariant of lattice equivalence)."""
    lengths = {}
    for u, _ in P.facets:
        F = gp.face(P, u)
        lengths[u] = gp.lattice_points(F) - 1
    # order the edges by the angle of their normals (exactly, by sympy)
    seq = [lengths[u] for u in sorted(lengths, key=lambda u: sympy.atan2(u[1], u[0]))]
    rots = [tuple(seq[i:] + seq[:i]) for i in range(len(seq))]
    rots += [tuple(reversed(r)) for r in rots]
    return min(rots)


def boundary(P):
    return gp.lattice_points(P) - gp.interior_points(P)


def test_sixteen_reflexive_polygons():
    polygons = {}
    for name, pts in SMALL_REFLEXIVE.items():
        P = hull(pts)
        assert gp.is_reflexive(P) and gp.interior_points(P) == 1, name
        Q = polar(P)
        assert gp.is_reflexive(Q), name
        assert gp.polytope_from_points(gp.polar_vertices(Q), 2) == P   # P** = P
        assert boundary(P) + boundary(Q) == 12, name                   # "the number 12"
        polygons[name] = P
        polygons[name + "*"] = Q
    # H6 and T6 (and Q6, P6) are self-dual up to equivalence: the 20 polygons give 16 classes
    invariant = {n: (boundary(P), len(P.vertices), edge_lengths(P), edge_lengths(polar(P)))
                 for n, P in polygons.items()}
    assert len(set(invariant.values())) == 16
    shapes = sorted(len(P.vertices) for P in {invariant[n]: P for n, P in polygons.items()}.values())
    assert shapes.count(3) == 5 and shapes.count(4) == 7 and shapes.count(5) == 3 and shapes.count(6) == 1
    for P in polygons.values():
        assert gp.gorenstein_index(P) == 1


def reflexive_examples():
    out = [hull(pts) for pts in SMALL_REFLEXIVE.values()]
    out.append(hull([(1, 0, 0), (0, 1, 0), (0, 0, 1), (-1, -1, -1)]))           # P^3's polytope
    out.append(hull(list(product((-1, 1), repeat=3))))                           # [-1, 1]^3
    out.append(gp.product(hull(SMALL_REFLEXIVE["H6"]), hull([(-1,), (1,)])))
    out.append(gp.product(hull(SMALL_REFLEXIVE["T3"]), hull(SMALL_REFLEXIVE["Q5"])))
    return out


@pytest.mark.parametrize("P", reflexive_examples(), ids=lambda P: f"dim{P.dim}-{len(P.vertices)}v")
def test_hibi_symmetry(P):
    """Hibi, "Dual polytopes of rational convex polytopes", Combinatorica 12 (1992): P is
    reflexive iff h* is symmetric of degree dim P (with 0 interior); Stanley's nonnegativity too."""
    assert gp.is_reflexive(P)
    h = gp.h_star(P)
    assert len(h) == P.dim + 1 and h == h[::-1] and min(h) >= 0
    assert gp.gorenstein_index(P) == 1


@pytest.mark.parametrize("pts", [[(0, 0), (1, 0), (0, 1)], [(0, 0), (2, 0), (0, 1)], [(0, 0, 0), (1, 0, 0), (0, 1, 0), (0, 0, 1)],
                                 [(0, 0), (3, 0), (0, 1)], [(0, 0), (1, 0), (0, 1), (1, 1)]])
def test_gorenstein_index_by_symmetry(pts):
    """Stanley, "Hilbert functions of graded algebras" (1978) / De Negri–Hibi (1997): the cone
    over P is Gorenstein iff h* is symmetric, and then r = dim P + 1 - deg h*; r·P - m is
    reflexive for the Gorenstein point (m, r), checked by translating."""
    P = hull(pts)
    h = gp.h_star(P)
    r = gp.gorenstein_index(P)
    assert (r is not None) == (h == h[::-1])
    if r is not None:
        assert r == P.dim + 1 - (len(h) - 1)
        rP = gp.dilate(P, r)
        m = next(x for x in gp.lattice_points_bruteforce(rP) if gp.in_interior(rP, x))
        shifted = hull([tuple(a - b for a, b in zip(v, m)) for v in rP.vertices])
        assert gp.is_reflexive(shifted)


# ---- derived polytopes -------------------------------------------------------------------------
def test_minkowski_sum_of_segments_is_a_zonotope():
    """The sum of the segments [0, e1], [0, e2], [0, e1 + e2] is a hexagon (common practice, no
    source); its points are counted by brute force."""
    segs = [hull([(0, 0), v]) for v in [(1, 0), (0, 1), (1, 1)]]
    Z = gp.minkowski_sum(gp.minkowski_sum(segs[0], segs[1]), segs[2])
    assert len(Z.vertices) == 6
    assert gp.lattice_points(Z) == len(gp.lattice_points_bruteforce(Z)) == 7


def test_normal_and_face_fans_are_dual():
    """The face fan of P* is the normal fan of P for reflexive P (Cox–Little–Schenck, Toric
    Varieties, Theorem 2.3.2 and Exercise 2.3.1, from memory)."""
    P = hull(SMALL_REFLEXIVE["P5"])
    nrays, ncones = gp.normal_fan(P)
    frays, fcones = gp.face_fan(polar(P))
    assert set(nrays) == set(frays)
    as_sets = lambda rays, cones: {frozenset(rays[i] for i in c) for c in cones}
    assert as_sets(nrays, ncones) == as_sets(frays, fcones)


def test_halfspaces_give_the_same_polytope():
    pts = SMALL_REFLEXIVE["Q6"]
    P = hull(pts)
    res = gp.polyhedron_from_halfspaces(P.facets, 2)
    assert hull([tuple(int(x) for x in v) for v in res.vertices]) == P and not res.redundant


# ---- Hilbert series ------------------------------------------------------------------------
def coprime_pairs():
    return st.integers(2, 11).flatmap(lambda n: st.integers(1, n - 1).filter(lambda q: gcd(n, q) == 1)
                                      .map(lambda q: (n, q)))


@settings(max_examples=30, deadline=None)
@given(coprime_pairs(), st.sampled_from([None, (1, 1), (2, 1)]))
def test_hilbert_series_of_cyclic_quotient(nq, w):
    """The coordinate ring of the cyclic quotient singularity 1/n(1, q) is C[σ^∨ ∩ M] for
    σ = cone(e2, n e1 - q e2) (Cox–Little–Schenck, Example 1.3.5, from memory); its Hilbert
    series expanded against the brute-force count of monoid elements of each degree."""
    n, q = nq
    sigma = gcone.cone_from_rays([(0, 1), (n, -q)], 2)
    dual = gcone.dual(sigma)
    if w is None:
        from conelang.geometry.monoid import hilbert_basis
        w = gp.default_grading(dual, hilbert_basis(dual))
    if any(gcone.linalg.dot(w, r) <= 0 for r in dual.rays):
        return
    H = gp.hilbert_series(dual, w)
    top = 12
    bound = top * (n + 2)
    counts = [0] * (top + 1)
    for x in product(range(-bound, bound + 1), repeat=2):
        deg = gcone.linalg.dot(w, x)
        if 0 <= deg <= top and gcone.contains(dual, x):
            counts[deg] += 1
    assert H.coefficients(top) == tuple(counts)
    # the quasi-polynomial agrees with the counts from where it is valid
    for k in range(H.valid_from, top + 1):
        assert gp.evaluate(H.quasi_polynomial[k % H.period], k) == counts[k]
    # multiplicity: the normalized length of the slice {w = 1} (sympy's exact rationals)
    a, b = [sympy.Rational(1, gcone.linalg.dot(w, r)) for r in dual.rays]
    r1, r2 = dual.rays
    assert H.multiplicity == Fraction(abs(r1[0] * r2[1] - r1[1] * r2[0])) * Fraction(str(a * b))


def test_ehrhart_series_is_the_hilbert_series_of_the_cone_over_p():
    """Ehrhart (1962): Σ L(n) t^n = h*(t) / (1 - t)^(d+1), the Hilbert series of the cone over P
    graded by height."""
    P = hull([(0, 0, 0), (2, 0, 0), (0, 1, 0), (0, 0, 1), (1, 1, 1)])
    H = gp.hilbert_series(P.cone, (0, 0, 0, 1))
    assert H.numerator == gp.h_star(P) and H.denominator == (1, 1, 1, 1)
    assert H.quasi_polynomial == (gp.ehrhart(P),)
    assert H.multiplicity == gp.normalized_volume(P)
