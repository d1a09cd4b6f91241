"""Lattice maps and toric morphisms: worked examples from the literature, sympy references and
brute force.

Independent references used below:
* ranks and Smith forms of integer matrices: sympy (``Matrix.rank``, ``smith_normal_form``);
* toric ideals: sympy Gröbner bases, eliminating ``t`` from ``z_i - t^{u_i}`` (Sturmfels,
  Gröbner Bases and Convex Polytopes, Algorithm 4.5 (from memory));
* membership in a cone: evaluation of the facet inequalities; membership in a monoid: brute
  force over bounded coefficient vectors;
* the pullback of functions: exact evaluation with Fractions at points of the torus
  (``z_i = t^{u_i}``, ``t'_k = ∏ t_i^{f_ki}``).
"""
from __future__ import annotations

import doctest
import itertools
from fractions import Fraction

import pytest
import sympy
from hypothesis import assume, given, settings, strategies as st
from sympy.matrices.normalforms import smith_normal_form

import conelang.geometry.maps as maps
from conelang.geometry import cone as gcone
from conelang.geometry.budget import Budget, BudgetExceeded
from conelang.geometry.cone import cone_from_rays, contains, dual, faces
from conelang.geometry.monoid import hilbert_basis
from strategies import vectors

SETTINGS = settings(max_examples=50, deadline=None)

PLANE = cone_from_rays([(1, 0), (0, 1)], 2)
ID2 = ((1, 0), (0, 1))


def test_doctests():
    assert doctest.testmod(maps).failed == 0


# ---------------------------------------------------------------------------------------------
# independent helpers


def comb(a, vecs):
    d = len(vecs[0])
    return tuple(sum(ai * v[k] for ai, v in zip(a, vecs)) for k in range(d))


def pullback_point(matrix, u):
    """f^*(u) = u ∘ f computed as a row vector times the matrix."""
    n = len(matrix[0])
    return tuple(sum(u[i] * matrix[i][j] for i in range(len(matrix))) for j in range(n))


def tpow(t, u):
    out = Fraction(1)
    for ti, e in zip(t, u):
        out *= Fraction(ti) ** e
    return out


def check_pullbacks_on_torus(matrix, phi, points):
    """w_j(φ(t)) computed two ways: through the monomial pullback in z_i = t^{u_i}, and through
    the torus map t'_k = ∏ t_i^{f_ki} followed by w_j = t'^{u'_j}."""
    for t in points:
        z = [tpow(t, u) for u in phi.source_generators]
        tp = [tpow(t, row) for row in matrix]
        for a, up in zip(phi.exponents, phi.target_generators):
            assert tpow(z, a) == tpow(tp, up)


def sympy_toric_ideal(gens):
    """Generators of the kernel of z_i ↦ t^{u_i} by elimination (Laurent exponents handled by
    an extra variable s with s * t1 * ... * td = 1)."""
    r, d = len(gens), len(gens[0])
    z = sympy.symbols(f"z1:{r + 1}")
    t = sympy.symbols(f"t1:{d + 1}")
    s = sympy.Symbol("s")
    polys = []
    for zi, u in zip(z, gens):
        pos = sympy.Mul(*[tk ** e for tk, e in zip(t, u) if e > 0])
        neg = sympy.Mul(*[tk ** -e for tk, e in zip(t, u) if e < 0])
        polys.append(zi * neg - pos)
    polys.append(s * sympy.Mul(*t) - 1)
    G = sympy.groebner(polys, s, *t, *z, order="lex")
    return z, [g for g in G.exprs if not (g.free_symbols & set(t) | g.free_symbols & {s})]


def vanishes_on_variety(expr, z, gens):
    """expr(z) lies in the toric ideal of ``gens`` iff it vanishes under z_i = t^{u_i}."""
    d = len(gens[0])
    t = sympy.symbols(f"t1:{d + 1}")
    subs = {zi: sympy.Mul(*[tk ** e for tk, e in zip(t, u)]) for zi, u in zip(z, gens)}
    return sympy.simplify(sympy.expand(expr.subs(subs, simultaneous=True))) == 0


def pulled_back_ideal_vanishes(phi):
    """Every generator of the target's toric ideal, with w_j replaced by its pullback, is zero
    on the source variety."""
    w, ideal = sympy_toric_ideal(list(phi.target_generators))
    r = len(phi.source_generators)
    z = sympy.symbols(f"z1:{r + 1}")
    subs = {wj: sympy.Mul(*[zi ** e for zi, e in zip(z, a)]) for wj, a in zip(w, phi.exponents)}
    for g in ideal:
        assert vanishes_on_variety(g.subs(subs, simultaneous=True), z, list(phi.source_generators)), g
    return len(ideal)


# ---------------------------------------------------------------------------------------------
# lattice maps against sympy


@SETTINGS
@given(st.integers(1, 3), st.integers(1, 3), st.data())
def test_rank_injective_surjective_cokernel_against_sympy(m, n, data):
    rows = tuple(data.draw(vectors(n, -3, 3)) for _ in range(m))
    M = sympy.Matrix(rows)
    rk = M.rank()
    assert maps.rank(rows, n) == rk
    assert maps.is_injective(rows, n) == (rk == n)
    snf = smith_normal_form(M, domain=sympy.ZZ)
    diag = [abs(int(snf[i, i])) for i in range(min(m, n)) if snf[i, i] != 0]
    free = m - len(diag)
    torsion = tuple(sorted(d for d in diag if d != 1))
    assert maps.cokernel(rows, n) == (free, torsion)
    assert maps.is_surjective(rows, n) == (free == 0 and not torsion)
    if m == n:
        assert maps.is_isomorphism(rows, n) == (abs(M.det()) == 1)
        assert maps.degree(rows, n) == (abs(int(M.det())) or None)
    # split injective: injective and the cokernel is torsion-free (common practice, no source)
    assert maps.is_split_injective(rows, n) == (rk == n and not torsion)


def test_cokernel_of_overlattice_inclusion():
    # Z^2 inside N' = Z^2 + Z (1/7, 3/7): N'/Z^2 = Z/7 (Fulton, Introduction to Toric
    # Varieties, §2.2 (from memory)).  Lattice coordinates of N' have basis (1/7, 3/7), (0, 1),
    # so e1 = 7 b1 - 3 b2 and e2 = b2.
    inc = ((7, 0), (-3, 1))
    assert maps.cokernel(inc, 2) == (0, (7,))
    assert maps.degree(inc, 2) == 7


# ---------------------------------------------------------------------------------------------
# images and preimages


def small_points(d, bound=2):
    return list(itertools.product(range(-bound, bound + 1), repeat=d))


@SETTINGS
@given(st.integers(1, 3), st.integers(1, 3), st.data())
def test_image_is_dual_to_pullback_of_dual(m, n, data):
    # Duality: f(σ)^∨ = (f^*)^{-1}(σ^∨) (Farkas' lemma; Fulton §1.2 (from memory)).
    gens = data.draw(st.lists(vectors(n, -2, 2), min_size=1, max_size=4))
    rows = tuple(data.draw(vectors(n, -2, 2)) for _ in range(m))
    sigma = cone_from_rays(gens, n)
    img = maps.image(rows, sigma)
    transpose = tuple(tuple(rows[i][j] for i in range(m)) for j in range(n))
    assert dual(img) == maps.preimage(transpose, dual(sigma), n=m)
    # images of points of σ lie in f(σ); every ray of f(σ) is the image of a ray of σ or of
    # ± a lineality vector (the cone is generated by these images)
    images = [maps.apply(rows, r) for r in sigma.rays]
    images += [maps.apply(rows, l) for l in sigma.lineality]
    images += [tuple(-x for x in maps.apply(rows, l)) for l in sigma.lineality]
    for v in images:
        assert contains(img, v)
    for r in img.rays:
        assert any(v == r or (any(v) and gcone.primitive(v) == r) for v in images) or img.lineality


@SETTINGS
@given(st.integers(1, 3), st.integers(1, 3), st.data())
def test_preimage_membership_by_brute_force(m, n, data):
    gens = data.draw(st.lists(vectors(m, -2, 2), min_size=0, max_size=4))
    rows = tuple(data.draw(vectors(n, -2, 2)) for _ in range(m))
    tau = cone_from_rays(gens, m)
    pre = maps.preimage(rows, tau, n=n)
    for v in small_points(n):
        assert contains(pre, v) == contains(tau, maps.apply(rows, v))


def test_first_violation_names_the_ray_and_the_inequality():
    # the orthant into cone((1,0),(1,1)) = {y >= 0, x - y >= 0}: the ray (0,1) goes to (0,1)
    # and <(1,-1), (0,1)> = -1 < 0
    target = cone_from_rays([(1, 0), (1, 1)], 2)
    assert maps.first_violation(ID2, PLANE, target) == ((0, 1), (0, 1), (1, -1), -1, False)
    # into a ray: the equation (0, 1) of its span (x-axis) is violated by (0, 1)
    ray = cone_from_rays([(1, 0)], 2)
    assert maps.first_violation(ID2, PLANE, ray) == ((0, 1), (0, 1), (0, 1), 1, True)
    assert maps.is_compatible(ID2, ray, PLANE)


@SETTINGS
@given(st.integers(1, 3), st.integers(1, 3), st.data())
def test_compatibility_by_brute_force(m, n, data):
    sgens = data.draw(st.lists(vectors(n, -2, 2), min_size=1, max_size=3))
    tgens = data.draw(st.lists(vectors(m, -2, 2), min_size=0, max_size=3))
    rows = tuple(data.draw(vectors(n, -2, 2)) for _ in range(m))
    sigma, tau = cone_from_rays(sgens, n), cone_from_rays(tgens, m)
    # σ is generated by sgens, so f(σ) ⊆ τ iff every generator lands in τ; check on lattice points
    brute = all(contains(tau, maps.apply(rows, g)) for g in sgens)
    pts = [v for v in small_points(n) if contains(sigma, v)]
    assert brute == all(contains(tau, maps.apply(rows, v)) for v in pts)
    assert maps.is_compatible(rows, sigma, tau) == brute
    bad = maps.first_violation(rows, sigma, tau)
    if bad is not None:
        ray, img, normal, val, is_eq = bad
        assert img == maps.apply(rows, ray)
        assert sum(a * b for a, b in zip(normal, img)) == val
        assert (val != 0) if is_eq else (val < 0)


# ---------------------------------------------------------------------------------------------
# monoid membership


def brute_monoid(point, gens, bound):
    for a in itertools.product(range(bound + 1), repeat=len(gens)):
        if comb(a, gens) == tuple(point):
            return a
    return None


def test_numerical_semigroup_3_5():
    # Sylvester (1884): the largest integer not in <a, b> (coprime) is ab - a - b; for <3, 5>
    # the gaps are 1, 2, 4, 7.
    gaps = [k for k in range(1, 30) if maps.monoid_combination((k,), [(3,), (5,)]) is None]
    assert gaps == [1, 2, 4, 7]
    assert 3 * 5 - 3 - 5 == max(gaps)


@SETTINGS
@given(st.integers(1, 2), st.data())
def test_monoid_combination_against_brute_force(d, data):
    gens = data.draw(st.lists(vectors(d, -3, 3), min_size=1, max_size=3))
    point = data.draw(vectors(d, -4, 4))
    a = maps.monoid_combination(point, gens)
    if a is not None:
        assert all(x >= 0 for x in a) and comb(a, gens) == tuple(point)
    else:
        assert brute_monoid(point, gens, 6) is None


def test_monoid_combination_with_a_group_part():
    # <(1,0), (-2,0), (0,1)>: the first two generate the group Z (1 - 2 + ... ), so every
    # (a, b) with b >= 0 is in the monoid, nothing with b < 0 (common practice, no source)
    gens = [(1, 0), (-2, 0), (0, 1)]
    for a in range(-4, 5):
        for b in range(-2, 3):
            res = maps.monoid_combination((a, b), gens)
            assert (res is not None) == (b >= 0)
            if res is not None:
                assert comb(res, gens) == (a, b) and min(res) >= 0


def test_monoid_combination_respects_the_budget():
    with pytest.raises(BudgetExceeded):
        maps.monoid_combination((1000, 1001), [(1, 0), (0, 1), (1, 1)], Budget(limit=50))


# ---------------------------------------------------------------------------------------------
# worked examples of toric morphisms


def test_identity_morphism():
    # the identity of U_σ: every coordinate pulls back to itself (common practice, no source)
    sigma = cone_from_rays([(0, 1), (2, -1)], 2)      # the A1 cone: U = {z1 z3 = z2^2}
    phi = maps.induced_morphism(ID2, sigma, sigma)
    r = len(phi.source_generators)
    assert phi.exponents == tuple(tuple(int(i == j) for i in range(r)) for j in range(r))
    assert phi.pullbacks == tuple(f"z{j}" for j in range(1, r + 1))
    assert phi.torus == ("t1", "t2")
    k = maps.classify(ID2, sigma, sigma)
    assert k.isomorphism and k.open_embedding and k.closed_embedding and k.birational
    assert k.injective and k.surjective and k.finite and k.quotient and k.degree == 1
    assert not k.subdivision_piece


def test_face_inclusion_is_a_principal_open_subset():
    # Cox–Little–Schenck, Toric Varieties, Prop. 1.3.16 (from memory): for a face τ = σ ∩ m^⊥,
    # U_τ ⊂ U_σ is the principal open set where χ^m ≠ 0 and C[τ^∨ ∩ M] = C[σ^∨ ∩ M][χ^-m].
    sigma = cone_from_rays([(1, 0, 0), (0, 1, 0), (1, 1, 2)], 3)
    m = (0, 0, 1)                                  # <m, rays> = 0, 0, 2
    tau = gcone.face(sigma, m)
    assert tau.rays == ((0, 1, 0), (1, 0, 0))
    id3 = ((1, 0, 0), (0, 1, 0), (0, 0, 1))
    phi = maps.induced_morphism(id3, tau, sigma)
    # every generator of τ^∨ ∩ M is (generator of σ^∨ ∩ M) + k (-m): localization
    minus_m = tuple(-x for x in m)
    for u in phi.source_generators:
        assert maps.monoid_combination(u, list(phi.target_generators) + [minus_m]) is not None
    k = maps.classify(id3, tau, sigma)
    assert k.open_embedding and k.injective and k.birational
    assert not (k.isomorphism or k.surjective or k.finite or k.closed_embedding)
    assert not k.subdivision_piece
    check_pullbacks_on_torus(id3, phi, [(2, 3, 5), (Fraction(1, 2), -1, 7)])
    pulled_back_ideal_vanishes(phi)


def test_blow_up_chart():
    # The blow-up of C^2 at the origin has the chart C^2 → C^2, (u, v) ↦ (u v, v) on the cone
    # spanned by e1 + e2 and e2 (and (u, v) ↦ (u, u v) on the other one); Fulton §2.4,
    # Hartshorne I.4 (from memory).  Here the chart cone(e1, e1 + e2):
    sigma = cone_from_rays([(1, 0), (1, 1)], 2)
    phi = maps.induced_morphism(ID2, sigma, PLANE)
    # σ^∨ = cone((1,-1), (0,1)) is smooth: z1 = χ^(1,-1), z2 = χ^(0,1); x = χ^(1,0), y = χ^(0,1)
    assert phi.source_generators == ((1, -1), (0, 1))
    assert phi.target_generators == ((1, 0), (0, 1))
    # with u = z2, v = z1: x = u v, y = u — the chart (u, v) ↦ (u v, u) of the blow-up
    assert phi.pullbacks == ("z1*z2", "z2")
    k = maps.classify(ID2, sigma, PLANE)
    assert k.birational and k.subdivision_piece and k.dominant
    # it misses the points (0, y), y ≠ 0, and contracts the line u = 0 to the origin
    assert not (k.surjective or k.injective or k.finite or k.open_embedding or k.isomorphism)
    pulled_back_ideal_vanishes(phi)


def test_projection_to_a_lower_rank_lattice():
    # (x, y, z) ↦ (x, y): the projection Z^3 → Z^2 maps the orthant onto the orthant; C^3 → C^2
    # is surjective, not finite, not injective (common practice, no source)
    orth3 = cone_from_rays([(1, 0, 0), (0, 1, 0), (0, 0, 1)], 3)
    pr = ((1, 0, 0), (0, 1, 0))
    phi = maps.induced_morphism(pr, orth3, PLANE)
    assert phi.pullbacks == ("z1", "z2")
    assert phi.torus == ("t1", "t2")
    k = maps.classify(pr, orth3, PLANE)
    assert k.dominant and k.surjective and k.lattice_surjective
    assert not (k.injective or k.finite or k.birational or k.lattice_injective)
    assert k.degree is None


def test_projection_with_units():
    # σ = cone(e1, e2) in Z^3 is not full-dimensional: U_σ = C^2 × C^* with coordinates
    # z1 = x, z2 = y, z3 = w, z4 = 1/w.  Projection to Z^2 onto the orthant.
    sigma = cone_from_rays([(1, 0, 0), (0, 1, 0)], 3)
    pr = ((1, 0, 0), (0, 1, 0))
    phi = maps.induced_morphism(pr, sigma, PLANE)
    assert phi.source_generators[-2:] == ((0, 0, 1), (0, 0, -1))
    for a, up in zip(phi.exponents, phi.target_generators):
        assert comb(a, phi.source_generators) == pullback_point(pr, up)
    k = maps.classify(pr, sigma, PLANE)
    assert k.surjective and not k.injective and not k.finite
    pulled_back_ideal_vanishes(phi)


def test_inclusion_of_the_torus_into_the_line():
    # C^* → C, the open orbit: σ = {0} in Z, τ = the ray; the pullback of x is the unit z1 = χ^1
    zero = cone_from_rays([], 1)
    ray = cone_from_rays([(1,)], 1)
    phi = maps.induced_morphism(((1,),), zero, ray)
    assert phi.source_generators == ((1,), (-1,))
    assert phi.pullbacks == ("z1",)
    k = maps.classify(((1,),), zero, ray)
    assert k.open_embedding and k.injective and not k.surjective and not k.closed_embedding


@pytest.mark.parametrize("n,q", [(2, 1), (3, 1), (3, 2), (5, 2), (7, 3)])
def test_cyclic_quotient(n, q):
    # C^2 → C^2/μ_n, μ_n acting by (ζ, ζ^q): N = Z^2 ⊂ N' = Z^2 + Z (1/n)(1, q), the same
    # orthant (Fulton §2.2, Cox–Little–Schenck Example 1.3.20-ish (from memory)).  The
    # coordinate ring of the quotient is spanned by the invariant monomials x^a y^b,
    # a + q b ≡ 0 mod n, so the pullbacks are the minimal invariant monomials, found here by
    # brute force.  For q = 1, n = 2 they are x^2, xy, y^2 (the A1 singularity).
    from conelang.geometry import lattice as glat
    L = glat.overlattice(2, [(Fraction(1, n), Fraction(q, n))])
    cols = [glat.to_coords(L, e) for e in [(1, 0), (0, 1)]]
    f = tuple(tuple(cols[j][i] for j in range(2)) for i in range(2))
    tau = cone_from_rays([glat.to_coords(L, e) for e in [(1, 0), (0, 1)]], 2)
    phi = maps.induced_morphism(f, PLANE, tau)
    assert phi.source_generators == ((1, 0), (0, 1))        # z1 = x, z2 = y
    invariants = [(a, b) for a in range(n + 1) for b in range(n + 1)
                  if (a, b) != (0, 0) and (a + q * b) % n == 0]
    minimal = {p for p in invariants
               if not any(r != p and r[0] <= p[0] and r[1] <= p[1] for r in invariants)}
    assert set(phi.exponents) == minimal
    if (n, q) == (2, 1):
        assert sorted(phi.pullbacks) == ["z1*z2", "z1^2", "z2^2"]
    k = maps.classify(f, PLANE, tau)
    assert k.quotient and k.finite and k.surjective and k.dominant and k.degree == n
    assert not (k.injective or k.birational or k.closed_embedding or k.lattice_surjective)
    check_pullbacks_on_torus(f, phi, [(2, 3), (Fraction(-1, 3), 5)])
    if n <= 3:
        pulled_back_ideal_vanishes(phi)


def test_parabola_and_cusp():
    # t ↦ (t, t^2) is a closed embedding C → C^2 (the parabola y = x^2); t ↦ (t^2, t^3) is the
    # normalization of the cusp y^2 = x^3: finite and injective but not a closed embedding, as
    # z ∉ C[z^2, z^3] (Hartshorne I, Ex. 3.2 / Fulton §2.? (from memory)).
    ray = cone_from_rays([(1,)], 1)
    par = ((1,), (2,))
    phi = maps.induced_morphism(par, ray, PLANE)
    assert phi.pullbacks == ("z1", "z1^2")
    k = maps.classify(par, ray, PLANE)
    assert k.closed_embedding and k.finite and k.injective and not k.surjective
    cusp = ((2,), (3,))
    psi = maps.induced_morphism(cusp, ray, PLANE)
    assert psi.pullbacks == ("z1^2", "z1^3")
    k = maps.classify(cusp, ray, PLANE)
    assert k.finite and k.injective and not k.closed_embedding and not k.surjective
    # the image is the cusp: y^2 - x^3 pulls back to zero
    z = sympy.Symbol("z1")
    x, y = [z ** a[0] for a in psi.exponents]
    assert sympy.expand(y ** 2 - x ** 3) == 0


def test_composition_of_pullbacks():
    # (ψ ∘ φ)^* = φ^* ∘ ψ^* (functoriality of Spec, common practice, no source): the blow-up
    # chart followed by the quotient C^2 → C^2/μ_2.
    sigma = cone_from_rays([(1, 0), (1, 1)], 2)
    q2 = ((2, 0), (-1, 1))                                  # Z^2 → Z^2 + Z(1/2, 1/2)
    tau = cone_from_rays([(2, -1), (0, 1)], 2)
    phi = maps.induced_morphism(ID2, sigma, PLANE)
    psi = maps.induced_morphism(q2, PLANE, tau)
    comp_matrix = maps.compose(q2, ID2, 2)
    direct = maps.induced_morphism(comp_matrix, sigma, tau)
    composed = maps.compose_pullbacks(psi.exponents, phi.exponents, len(phi.source_generators))
    for a, b in zip(direct.exponents, composed):
        # equal as functions on U_σ: the same character
        assert comb(a, direct.source_generators) == comb(b, phi.source_generators)
    # σ is smooth, so monomials in z are functions in a unique way: the exponents agree
    assert direct.exponents == composed
    check_pullbacks_on_torus(comp_matrix, direct, [(3, 5)])


# ---------------------------------------------------------------------------------------------
# random compatible morphisms


@st.composite
def compatible_morphisms(draw):
    n = draw(st.integers(1, 3))
    m = draw(st.integers(1, 3))
    sgens = draw(st.lists(vectors(n, -2, 2, nonzero=True), min_size=1, max_size=3))
    sigma = cone_from_rays(sgens, n)
    assume(sigma.pointed)
    rows = tuple(draw(vectors(n, -2, 2)) for _ in range(m))
    extra = draw(st.lists(vectors(m, -2, 2), max_size=2))
    tau = cone_from_rays([maps.apply(rows, r) for r in sigma.rays] + extra, m)
    assume(tau.pointed)
    return rows, sigma, tau


@settings(max_examples=40, deadline=None)
@given(compatible_morphisms(), st.lists(st.tuples(st.integers(1, 4), st.integers(-3, -1),
                                                  st.integers(2, 5)), min_size=1, max_size=2))
def test_random_pullbacks_are_exact(mor, torus_points):
    rows, sigma, tau = mor
    n = sigma.ambient_dim
    phi = maps.induced_morphism(rows, sigma, tau)
    assert phi.source_generators == hilbert_basis(dual(sigma))
    assert phi.target_generators == hilbert_basis(dual(tau))
    for a, up in zip(phi.exponents, phi.target_generators):
        assert len(a) == len(phi.source_generators) and min(a, default=0) >= 0
        assert comb(a, phi.source_generators) == pullback_point(rows, up)
    check_pullbacks_on_torus(rows, phi, [p[:n] for p in torus_points])


@settings(max_examples=40, deadline=None)
@given(compatible_morphisms())
def test_kinds_are_consistent_with_theorems(mor):
    rows, sigma, tau = mor
    n, m = sigma.ambient_dim, tau.ambient_dim
    k = maps.classify(rows, sigma, tau)
    # U_τ is irreducible: open and closed embedding together is an isomorphism
    assert k.isomorphism == (k.open_embedding and k.closed_embedding)
    # Zariski's main theorem (U_τ normal): a bijective birational morphism is an isomorphism
    assert k.isomorphism == (k.injective and k.surjective and k.birational)
    assert not k.closed_embedding or (k.finite and k.injective)
    assert not k.open_embedding or k.injective
    assert not k.surjective or k.dominant
    assert not k.quotient or (k.finite and k.surjective and k.degree == abs(sympy.Matrix(rows).det()))
    assert k.birational == (m == n and abs(sympy.Matrix(rows).det()) == 1)
    assert k.subdivision_piece == (k.birational and not k.open_embedding)
    # finiteness: C[σ^∨ ∩ M] is integral over the image iff every generator of σ^∨ lies in the
    # cone generated by f^*(τ^∨) (integrality of monomial algebras, common practice, no source)
    sg = hilbert_basis(dual(sigma))
    images = [pullback_point(rows, u) for u in hilbert_basis(dual(tau))]
    cone_img = cone_from_rays(images, n)
    assert k.finite == all(contains(cone_img, u) for u in sg)
    # closed embedding: every generator of σ^∨ ∩ M is a pullback (brute force, bounded)
    if k.closed_embedding and len(images) <= 5:     # the box search has 5^len(images) points
        assert all(brute_monoid(u, images, 4) is not None for u in sg)


@settings(max_examples=30, deadline=None)
@given(compatible_morphisms())
def test_surjectivity_on_distinguished_points(mor):
    # The distinguished point x_σ' of U_σ has z_i = 1 if u_i ⊥ σ' and 0 otherwise (Cox–Little–
    # Schenck §3.2 (from memory)); φ(x_σ') is a distinguished point of U_τ, read off from the
    # monomial pullbacks.  φ is onto iff it is dominant and hits every distinguished point.
    rows, sigma, tau = mor
    phi = maps.induced_morphism(rows, sigma, tau)

    def dist(face_, gens):
        return tuple(int(all(sum(a * b for a, b in zip(u, r)) == 0 for r in face_.rays)) for u in gens)

    images = set()
    for s in faces(sigma):
        x = dist(s, phi.source_generators)
        images.add(tuple(int(all(x[i] for i, e in enumerate(a) if e)) for a in phi.exponents))
    all_tau = {dist(t, phi.target_generators) for t in faces(tau)}
    assert images <= all_tau
    k = maps.classify(rows, sigma, tau)
    assert k.surjective == (k.dominant and images == all_tau)
    if k.injective:
        assert len(images) == len(faces(sigma))
