"""Lattice maps acting on cones, and toric morphisms ``U_σ → U_τ`` in coordinates.

A map ``f : N = Z^n → N' = Z^m`` (lattice coordinates) is a tuple of ``m`` rows of length
``n``; its dual ``f^* : M' → M`` is ``u ↦ u ∘ f`` (:func:`transpose_apply`).  A pair of pointed
cones ``σ ⊂ N_Q``, ``τ ⊂ N'_Q`` with ``f(σ) ⊆ τ`` defines the toric morphism
``φ : U_σ → U_τ`` dual to ``f^* : τ^∨ ∩ M' → σ^∨ ∩ M``.

Coordinates
-----------
``U_σ ⊂ C^r`` has the coordinates ``z_i = χ^{u_i}``, ``u_1..u_r`` the Hilbert basis of
``σ^∨ ∩ M`` in the order of :func:`conelang.geometry.monoid.hilbert_basis` (the order used by
the affine toric variety); likewise ``w_j = χ^{u'_j}`` on ``U_τ``.  The pullback of ``w_j`` is
``χ^{f^*(u'_j)} = z^{a_j}`` for any ``a_j ∈ Z_{≥0}^r`` with ``Σ_i a_ji u_i = f^*(u'_j)``
(:func:`pullback_exponents`); two such ``a_j`` give the same function on ``U_σ`` because their
difference is a relation of the toric ideal.  The torus ``T_N`` has the coordinates
``t_i = χ^{e_i^*}`` of the dual basis, and ``φ`` restricted to tori is
``t'_k ↦ ∏_i t_i^{f_ki}`` (:func:`torus_map`).

Kinds of morphisms (:func:`classify`), decided exactly
------------------------------------------------------
Write ``f_Q`` for the map over Q.  For every face ``σ'`` of σ let ``τ'(σ')`` be the smallest
face of τ containing ``f(σ')`` (the one whose relative interior contains ``f`` of a relative
interior point).  φ sends the orbit ``O(σ')`` onto a subtorus orbit of ``O(τ'(σ'))`` through its
distinguished point, by the torus homomorphism of ``N/N_σ' → N'/N'_τ'``.

* ``dominant``: ``f_Q`` surjective (the image of ``T_N`` is dense in ``T_N'``).
* ``birational``: ``f`` is a lattice isomorphism (a homomorphism of tori is birational iff it
  is an isomorphism).
* ``isomorphism``: ``f`` a lattice isomorphism with ``f(σ) = τ``.
* ``open_embedding``: ``f`` a lattice isomorphism and ``f(σ)`` a face of τ: ``U_σ`` is the
  principal open subset ``U_τ ∖ V(χ^m)`` (Cox–Little–Schenck, Prop. 1.3.16, from memory).
* ``subdivision_piece``: ``f`` a lattice isomorphism and ``f(σ) ⊆ τ`` not a face (any such
  cone is a cone of some fan subdividing τ — the arrangement of the hyperplanes of its facets
  and of its span cuts τ into such a fan — so φ is the restriction of a proper birational
  morphism ``X_Σ → U_τ`` to a chart; no condition on the dimension is needed).
* ``finite``: ``σ = f_Q^{-1}(τ)`` (properness criterion for toric morphisms, Cox–Little–
  Schenck Thm. 3.4.11, from memory; a proper affine morphism is finite).
* ``quotient``: ``f`` injective with finite cokernel and ``f(σ) = τ``: ``U_τ = U_σ / G`` for the
  finite group ``G = N'/f(N)`` (Cox–Little–Schenck Prop. 1.3.18, from memory); the ``degree``
  is ``|G| = |det f|``.
* ``closed_embedding``: ``f^*(τ^∨ ∩ M') = σ^∨ ∩ M``, i.e. the pullback of coordinate rings is
  surjective (monomials are linearly independent); checked on the Hilbert basis of σ^∨ with an
  exact monoid membership search (:func:`monoid_combination`).
* ``surjective``: dominant and every face of τ is ``τ'(σ')`` for some face σ' of σ (the image is
  a union of orbits; a dominant map is onto each orbit it meets).
* ``injective``: ``σ' ↦ τ'(σ')`` is injective on faces (all images of orbits contain the
  distinguished points) and every orbit map has trivial kernel, i.e.
  ``f^*(τ'^⊥ ∩ M') = σ'^⊥ ∩ M``.
* ``lattice_injective`` / ``lattice_surjective``: ``f : N → N'`` itself.

>>> from .cone import cone_from_rays
>>> image(((1, 0), (0, 0)), cone_from_rays([(1, 0), (0, 1)], 2)).rays
((1, 0),)
>>> blowup_chart = cone_from_rays([(1, 0), (1, 1)], 2)
>>> plane = cone_from_rays([(1, 0), (0, 1)], 2)
>>> phi = induced_morphism(((1, 0), (0, 1)), blowup_chart, plane)
>>> phi.source_generators, phi.pullbacks
(((1, -1), (0, 1)), ('z1*z2', 'z2'))
>>> classify(((1, 0), (0, 1)), blowup_chart, plane).kinds()
('birational', 'subdivision_piece', 'dominant', 'lattice_injective', 'lattice_surjective')
"""
from __future__ import annotations

from dataclasses import dataclass, fields
from typing import Sequence

from . import linalg
from .budget import Budget, ensure
from .cone import (Cone, cone_from_inequalities, cone_from_rays, contains, dual, face, faces,
                   is_face, relative_interior_point)
from .linalg import Vec, dot

Matrix = tuple[tuple[int, ...], ...]

__all__ = [
    "Matrix", "apply", "transpose_apply", "image", "preimage", "first_violation",
    "is_compatible", "compose", "rank", "is_injective", "is_surjective", "is_isomorphism",
    "is_split_injective", "cokernel", "degree", "monomial_string", "laurent_string",
    "torus_map", "monoid_combination", "pullback_exponents", "compose_pullbacks",
    "InducedMorphism", "induced_morphism", "face_correspondence", "MorphismKinds", "classify",
    "KIND_NAMES", "Incompatible", "NotInMonoid",
]


# ---------------------------------------------------------------------------------------------
# the map and its dual


def apply(matrix: Matrix, v) -> tuple[int, ...]:
    """f(v).

    >>> apply(((1, 1), (0, 2)), (3, 4))
    (7, 8)
    """
    return tuple(sum(a * b for a, b in zip(row, v)) for row in matrix)


def transpose_apply(matrix: Matrix, u, n: int) -> tuple[int, ...]:
    """The dual map f^*(u) = u ∘ f, for u in the dual of the target.

    >>> transpose_apply(((1, 1), (0, 2)), (1, 1), 2)
    (1, 3)
    """
    return tuple(sum(matrix[i][j] * u[i] for i in range(len(matrix))) for j in range(n))


def image(matrix: Matrix, cone: Cone, budget: Budget | None = None) -> Cone:
    """f(σ): the cone generated by the images of the rays and of ± the lineality basis.

    >>> image(((1, 1),), cone_from_rays([(1, 0), (0, 1)], 2)).rays
    ((1,),)
    """
    m = len(matrix)
    gens = [apply(matrix, r) for r in cone.rays]
    lin = [apply(matrix, l) for l in cone.lineality]
    gens += lin + [tuple(-x for x in l) for l in lin]
    return cone_from_rays([g for g in gens if any(g)], m, budget=budget)


def preimage(matrix: Matrix, cone: Cone, budget: Budget | None = None,
             n: int | None = None) -> Cone:
    """f^{-1}(τ) = {v : f(v) ∈ τ}: pull back the facet inequalities and the equations
    (``n``, the source rank, is needed only for a map without rows).

    >>> preimage(((1, 1),), cone_from_rays([(1,)], 1)).facets
    ((1, 1),)
    """
    if n is None:
        n = len(matrix[0]) if matrix else 0
    ineqs = [transpose_apply(matrix, u, n) for u in cone.facets]
    eqs = [transpose_apply(matrix, e, n) for e in cone.equations]
    return cone_from_inequalities([u for u in ineqs if any(u)], [e for e in eqs if any(e)], n,
                                  budget)


def first_violation(matrix: Matrix, source: Cone, target: Cone):
    """The first generator of ``source`` that f sends outside ``target``, or None.

    Returns ``(ray, image, normal, value, is_equation)``: ``<normal, image> = value`` is
    negative for a facet normal, or non-zero for an equation of the linear span of ``target``.

    >>> first_violation(((1, 0), (0, 1)), cone_from_rays([(1, 2), (1, -1)], 2), cone_from_rays([(1, 0), (0, 1)], 2))
    ((1, -1), (1, -1), (0, 1), -1, False)
    """
    gens = list(source.rays) + list(source.lineality) + [tuple(-x for x in l) for l in source.lineality]
    for r in gens:
        img = apply(matrix, r)
        for e in target.equations:
            val = linalg.dot(e, img)
            if val != 0:
                return (r, img, e, val, True)
        for u in target.facets:
            val = linalg.dot(u, img)
            if val < 0:
                return (r, img, u, val, False)
    return None


def is_compatible(matrix: Matrix, source: Cone, target: Cone) -> bool:
    """True iff f(σ) ⊆ τ.

    >>> plane = cone_from_rays([(1, 0), (0, 1)], 2)
    >>> is_compatible(((1, 0), (0, 1)), cone_from_rays([(1, 0), (1, 1)], 2), plane)
    True
    >>> is_compatible(((1, 0), (0, 1)), plane, cone_from_rays([(1, 0), (1, 1)], 2))
    False
    """
    return first_violation(matrix, source, target) is None


def compose(outer: Matrix, inner: Matrix, n: int) -> Matrix:
    """The matrix of ``outer ∘ inner`` (``inner`` has ``n`` columns).

    >>> compose(((1, 1),), ((1, 0), (0, 2)), 2)
    ((1, 2),)
    """
    return tuple(tuple(r) for r in linalg.mat_mul(outer, inner, n)) if outer else ()


# ---------------------------------------------------------------------------------------------
# the map on lattices


def rank(matrix: Matrix, n: int) -> int:
    """Rank of f (over Q).

    >>> rank(((1, 2, 3), (2, 4, 6)), 3)
    1
    """
    return linalg.rank(matrix, n) if matrix else 0


def is_injective(matrix: Matrix, n: int) -> bool:
    """f : Z^n → Z^m is injective (rank n).

    >>> is_injective(((1,), (1,)), 1), is_injective(((1, 1),), 2)
    (True, False)
    """
    return rank(matrix, n) == n


def cokernel(matrix: Matrix, n: int) -> tuple[int, tuple[int, ...]]:
    """The cokernel ``Z^m / f(Z^n)`` as ``(free_rank, invariant factors d1 | d2 | …)``
    (factors 1 dropped).

    >>> cokernel(((2, 0), (0, 3)), 2)
    (0, (6,))
    >>> cokernel(((1, 0, 0),), 3), cokernel(((1,), (1,)), 1)
    ((0, ()), (1, ()))
    """
    m = len(matrix)
    if n == 0 or m == 0:
        return (m, ())
    inv = linalg.snf_invariants(matrix, n)
    return (m - len(inv), tuple(d for d in inv if d != 1))


def is_surjective(matrix: Matrix, n: int) -> bool:
    """f : Z^n → Z^m is surjective (trivial cokernel).

    >>> is_surjective(((1, 1),), 2), is_surjective(((2,),), 1)
    (True, False)
    """
    return cokernel(matrix, n) == (0, ())


def is_isomorphism(matrix: Matrix, n: int) -> bool:
    """f is a lattice isomorphism (square with determinant ±1).

    >>> is_isomorphism(((1, 1), (0, 1)), 2), is_isomorphism(((2, 0), (0, 1)), 2)
    (True, False)
    """
    return len(matrix) == n and abs(linalg.det(matrix)) == 1


def is_split_injective(matrix: Matrix, n: int) -> bool:
    """f is injective with a torsion-free cokernel (equivalently ``f^*`` is surjective, the
    homomorphism of tori ``T_N → T_N'`` is injective).

    >>> is_split_injective(((1,), (1,)), 1), is_split_injective(((2,), (0,)), 1)
    (True, False)
    """
    return is_injective(matrix, n) and not cokernel(matrix, n)[1]


def degree(matrix: Matrix, n: int) -> int | None:
    """``|det f|`` for a square non-singular map (the degree of the dominant, generically
    finite homomorphism of tori, = ``|N'/f(N)|``); None otherwise.

    >>> degree(((1, 0), (1, 7)), 2), degree(((1, 1),), 2)
    (7, None)
    """
    if len(matrix) != n:
        return None
    d = abs(linalg.det(matrix))
    return d or None


# ---------------------------------------------------------------------------------------------
# strings


def _power(var: str, i: int, e: int) -> str:
    return f"{var}{i}" if e == 1 else f"{var}{i}^{e}"


def monomial_string(exponents: Sequence[int], var: str = "z") -> str:
    """``z1^2*z3`` for the exponents ``(2, 0, 1)``; ``1`` for the constant.

    >>> monomial_string((2, 0, 1)), monomial_string((0, 0))
    ('z1^2*z3', '1')
    """
    parts = [_power(var, i, e) for i, e in enumerate(exponents, 1) if e]
    return "*".join(parts) if parts else "1"


def laurent_string(exponents: Sequence[int], var: str = "t") -> str:
    """A Laurent monomial: ``t1*t2^-1`` for the exponents ``(1, -1)``; ``1`` for the constant.

    >>> laurent_string((1, -1)), laurent_string((0, 3), "s"), laurent_string((0,))
    ('t1*t2^-1', 's2^3', '1')
    """
    return monomial_string(exponents, var)


def torus_map(matrix: Matrix, n: int) -> tuple[str, ...]:
    """The homomorphism of tori ``T_N → T_N'``, coordinate by coordinate: the k-th target
    coordinate ``t'_k`` pulls back to ``∏ t_i^{f_ki}`` (row k of the matrix).

    >>> torus_map(((1, -1), (0, 2), (0, 0)), 2)
    ('t1*t2^-1', 't2^2', '1')
    """
    return tuple(laurent_string(row) for row in matrix)


# ---------------------------------------------------------------------------------------------
# exact monoid membership


def _positive_relation(gens: list[Vec], d: int, budget: Budget) -> Vec:
    """A relation ``Σ c_j g_j = 0`` with every ``c_j ≥ 1``, for vectors whose cone is a linear
    space (it is the sum of the rays of ``{c ≥ 0 : Σ c_j g_j = 0}``)."""
    k = len(gens)
    eqs = [tuple(g[i] for g in gens) for i in range(d)]
    rel = cone_from_inequalities(linalg.identity(k), eqs, k, budget)
    c = relative_interior_point(rel)
    if any(x <= 0 for x in c):
        raise ValueError("the vectors do not span a linear space as a cone")
    return c


def monoid_combination(point: Sequence[int], gens: Sequence[Sequence[int]],
                       budget: Budget | None = None) -> tuple[int, ...] | None:
    """Non-negative integers ``a`` with ``Σ a_j gens[j] = point``, or None if there are none.

    Exact for any finite list of integer vectors.  Let ``K = cone(gens)`` and ``w`` the sum of
    its facet normals: ``<w, g> = 0`` exactly for the generators in the lineality space of K
    (they generate a *group*, since a positive relation among them exists) and ``<w, g> ≥ 1``
    for the others.  A depth-first search over multisets of the latter, pruned by
    ``point - chosen ∈ K`` and bounded by the degree ``<w, point>``, leaves a remainder that must
    lie in that group (an integer linear system, made non-negative by adding multiples of
    the positive relation).

    >>> monoid_combination((3,), [(2,), (5,)]) is None, monoid_combination((7,), [(2,), (5,)])
    (True, (1, 1))
    >>> monoid_combination((-1, 0), [(1, 0), (-2, 0), (0, 1)])
    (1, 1, 0)
    """
    budget = ensure(budget)
    point = tuple(int(x) for x in point)
    d = len(point)
    gens = [tuple(int(x) for x in g) for g in gens]
    zero = [0] * len(gens)
    if not any(point):
        return tuple(zero)
    nz = [j for j, g in enumerate(gens) if any(g)]
    if not nz:
        return None
    K = cone_from_rays([gens[j] for j in nz], d, budget=budget)
    if not contains(K, point):
        return None
    w = [0] * d
    for u in K.facets:
        w = [a + b for a, b in zip(w, u)]
    deg = {j: dot(w, gens[j]) for j in nz}
    group = [j for j in nz if deg[j] == 0]
    pos = sorted((j for j in nz if deg[j] > 0), key=lambda j: (-deg[j], j))
    rel = _positive_relation([gens[j] for j in group], d, budget) if group else ()
    gmat = linalg.transpose([gens[j] for j in group], d) if group else ()

    def group_part(r: Vec) -> list[int] | None:
        if not any(r):
            return [0] * len(group)
        if not group:
            return None
        y = linalg.solve_integer(gmat, r, len(group))
        if y is None:
            return None
        k = max([(-yj + c - 1) // c for yj, c in zip(y, rel) if yj < 0], default=0)
        return [yj + k * c for yj, c in zip(y, rel)]

    failed: set = set()
    chosen = [0] * len(gens)

    def search(r: Vec, start: int) -> bool:
        budget.tick(1, "monoid membership")
        if dot(w, r) == 0:
            y = group_part(r)
            if y is None:
                return False
            for j, yj in zip(group, y):
                chosen[j] += yj
            return True
        if (r, start) in failed:
            return False
        for pos_i in range(start, len(pos)):
            j = pos[pos_i]
            s = tuple(a - b for a, b in zip(r, gens[j]))
            if contains(K, s):
                chosen[j] += 1
                if search(s, pos_i):
                    return True
                chosen[j] -= 1
        failed.add((r, start))
        return False

    if not search(point, 0):
        return None
    return tuple(chosen)


# ---------------------------------------------------------------------------------------------
# the induced morphism of affine toric varieties


def _combination(coeffs: Sequence[int], vecs: Sequence[Vec], d: int) -> Vec:
    out = [0] * d
    for a, v in zip(coeffs, vecs):
        if a:
            for i, x in enumerate(v):
                out[i] += a * x
    return tuple(out)


class Incompatible(ValueError):
    """The map does not send the source cone into the target cone.  ``violation`` is the
    witness of :func:`first_violation` (ray, image, normal, value, is it an equation); the
    analysis words it (``conelang.semantics.forms.violation_message``)."""

    def __init__(self, violation):
        self.violation = violation
        super().__init__(*violation)


class NotInMonoid(ValueError):
    """``f^*(u)`` (``image``) is not a non-negative combination of the source generators."""

    def __init__(self, u, image):
        self.u, self.image = tuple(u), image
        super().__init__(self.u, image)


def _require_compatible(matrix: Matrix, source: Cone, target: Cone) -> None:
    bad = first_violation(matrix, source, target)
    if bad is not None:
        raise Incompatible(bad)


def pullback_exponents(matrix: Matrix, source: Cone, target: Cone,
                       source_generators: Sequence[Vec] | None = None,
                       target_generators: Sequence[Vec] | None = None,
                       budget: Budget | None = None) -> tuple[Vec, ...]:
    """For each generator ``u'_j`` of ``τ^∨ ∩ M'``, exponents ``a_j ≥ 0`` with
    ``Σ_i a_ji u_i = f^*(u'_j)`` over the generators ``u_i`` of ``σ^∨ ∩ M`` (both default to the
    Hilbert bases of the duals, the coordinates of the affine toric varieties).  ValueError
    when ``f(σ) ⊄ τ``.

    The blow-up chart ``cone(e1, e1 + e2) → cone(e1, e2)``: ``u_1 = (1, -1)``, ``u_2 = (0, 1)``,
    and ``x = χ^(1,0) = z1*z2``, ``y = χ^(0,1) = z2``.

    >>> pullback_exponents(((1, 0), (0, 1)), cone_from_rays([(1, 0), (1, 1)], 2),
    ...                    cone_from_rays([(1, 0), (0, 1)], 2))
    ((1, 1), (0, 1))
    """
    from .monoid import decompose, hilbert_basis
    budget = ensure(budget)
    _require_compatible(matrix, source, target)
    n = source.ambient_dim
    sd = dual(source)
    if source_generators is None:
        source_generators = hilbert_basis(sd, budget)
    if target_generators is None:
        target_generators = hilbert_basis(dual(target), budget)
    src = [tuple(u) for u in source_generators]
    out = []
    for u in target_generators:
        p = transpose_apply(matrix, u, n)
        a = None
        try:
            a = tuple(decompose(p, src, sd, budget))
        except ValueError:
            a = None
        if a is None or _combination(a, src, n) != p:
            a = monoid_combination(p, src, budget)
        if a is None:
            raise NotInMonoid(u, p)
        out.append(a)
    return tuple(out)


def compose_pullbacks(outer: Sequence[Sequence[int]], inner: Sequence[Sequence[int]],
                      r: int) -> tuple[Vec, ...]:
    """Exponents of ``(ψ ∘ φ)^*``: ``outer[k]`` writes the k-th coordinate of the last variety
    as a monomial in the middle coordinates, ``inner[j]`` the j-th middle coordinate as a
    monomial in the ``r`` source coordinates; substituting gives ``Σ_j outer[k][j] inner[j]``.

    >>> compose_pullbacks([(1, 1)], [(1, 1), (0, 1)], 2)    # w1*w2 with w1 = z1*z2, w2 = z2
    ((1, 2),)
    """
    return tuple(_combination(b, [tuple(a) for a in inner], r) for b in outer)


@dataclass(frozen=True)
class InducedMorphism:
    """The toric morphism ``U_σ → U_τ`` of a compatible map, in the coordinates
    ``z_i = χ^{source_generators[i]}`` and ``w_j = χ^{target_generators[j]}``.

    >>> phi = induced_morphism(((1,), (1,)), cone_from_rays([(1,)], 1),
    ...                        cone_from_rays([(1, 0), (0, 1)], 2))
    >>> phi.pullbacks, phi.torus
    (('z1', 'z1'), ('t1', 't1'))
    """

    matrix: Matrix
    source_generators: tuple[Vec, ...]
    target_generators: tuple[Vec, ...]
    exponents: tuple[Vec, ...]

    @property
    def pullbacks(self) -> tuple[str, ...]:
        """``φ^*(w_j)`` as monomials in ``z_1..z_r``."""
        return tuple(monomial_string(a) for a in self.exponents)

    @property
    def torus(self) -> tuple[str, ...]:
        """The homomorphism of tori (see :func:`torus_map`)."""
        return tuple(laurent_string(row) for row in self.matrix)


def induced_morphism(matrix: Matrix, source: Cone, target: Cone,
                     budget: Budget | None = None) -> InducedMorphism:
    """The morphism ``U_σ → U_τ`` induced by ``f`` with ``f(σ) ⊆ τ`` (ValueError otherwise).

    The quotient ``C^2 → C^2/μ_2``: the identity of Z^2 into ``N' = Z^2 + Z(1/2, 1/2)``; in the
    lattice coordinates of N' (basis (1/2, 1/2), (0, 1)) the orthant has rays (2, -1), (0, 1)
    and the map is ``(2, 0; -1, 1)``.  The invariants are ``y^2, xy, x^2`` (``x = z1``, ``y = z2``).

    >>> phi = induced_morphism(((2, 0), (-1, 1)), cone_from_rays([(1, 0), (0, 1)], 2),
    ...                        cone_from_rays([(2, -1), (0, 1)], 2))
    >>> phi.pullbacks, phi.torus
    (('z2^2', 'z1*z2', 'z1^2'), ('t1^2', 't1^-1*t2'))
    """
    from .monoid import hilbert_basis
    budget = ensure(budget)
    _require_compatible(matrix, source, target)
    sg = hilbert_basis(dual(source), budget)
    tg = hilbert_basis(dual(target), budget)
    exps = pullback_exponents(matrix, source, target, sg, tg, budget)
    return InducedMorphism(tuple(tuple(r) for r in matrix), tuple(sg), tuple(tg), exps)


# ---------------------------------------------------------------------------------------------
# classification


def _smallest_face(target: Cone, q: Vec, budget: Budget | None) -> Cone:
    """The face of ``target`` whose relative interior contains the point ``q`` of ``target``."""
    u = [0] * target.ambient_dim
    for n in target.facets:
        if dot(n, q) == 0:
            u = [a + b for a, b in zip(u, n)]
    return face(target, tuple(u), budget)


def face_correspondence(matrix: Matrix, source: Cone, target: Cone,
                        budget: Budget | None = None) -> tuple[tuple[Cone, Cone], ...]:
    """For each face σ' of σ (in the order of :func:`conelang.geometry.cone.faces`), the pair
    ``(σ', τ')`` with τ' the smallest face of τ containing ``f(σ')``: φ maps the orbit
    ``O(σ')`` into ``O(τ')``.

    >>> pairs = face_correspondence(((1, 0), (0, 1)), cone_from_rays([(1, 0), (1, 1)], 2),
    ...                             cone_from_rays([(1, 0), (0, 1)], 2))
    >>> [(s.rays, t.rays) for s, t in pairs]
    [((), ()), (((1, 0),), ((1, 0),)), (((1, 1),), ((0, 1), (1, 0))), (((1, 0), (1, 1)), ((0, 1), (1, 0)))]
    """
    budget = ensure(budget)
    out = []
    for s in faces(source, budget):
        q = apply(matrix, relative_interior_point(s))
        out.append((s, _smallest_face(target, q, budget)))
    return tuple(out)


KIND_NAMES = ("isomorphism", "open_embedding", "closed_embedding", "quotient", "finite",
              "birational", "subdivision_piece", "dominant", "surjective", "injective",
              "lattice_injective", "lattice_surjective")


@dataclass(frozen=True)
class MorphismKinds:
    """Which kinds of toric morphism ``U_σ → U_τ`` a compatible map gives (see the module
    docstring for the exact criteria), and the degree when it is defined.

    >>> k = classify(((1, 0), (0, 1)), cone_from_rays([(1, 0)], 2), cone_from_rays([(1, 0), (0, 1)], 2))
    >>> k.open_embedding, k.isomorphism, k.injective, k.surjective
    (True, False, True, False)
    """

    isomorphism: bool
    open_embedding: bool
    closed_embedding: bool
    quotient: bool
    finite: bool
    birational: bool
    subdivision_piece: bool
    dominant: bool
    surjective: bool
    injective: bool
    lattice_injective: bool
    lattice_surjective: bool
    degree: int | None

    def kinds(self) -> tuple[str, ...]:
        """The names of the kinds that hold, in the order of :data:`KIND_NAMES`."""
        return tuple(k for k in KIND_NAMES if getattr(self, k))

    def as_dict(self) -> dict:
        """All fields by name."""
        return {f.name: getattr(self, f.name) for f in fields(self)}


def _closed_embedding(matrix: Matrix, source: Cone, target: Cone, budget: Budget) -> bool:
    from .monoid import hilbert_basis
    n = source.ambient_dim
    images = [transpose_apply(matrix, u, n) for u in hilbert_basis(dual(target), budget)]
    for u in hilbert_basis(dual(source), budget):
        if monoid_combination(u, images, budget) is None:
            return False
    return True


def classify(matrix: Matrix, source: Cone, target: Cone,
             budget: Budget | None = None) -> MorphismKinds:
    """Decide the kinds of the toric morphism of a compatible map exactly (ValueError when
    ``f(σ) ⊄ τ``); see the module docstring for the criteria.

    The quotient ``C^2 → C^2/μ_2`` (see :func:`induced_morphism`):

    >>> k = classify(((2, 0), (-1, 1)), cone_from_rays([(1, 0), (0, 1)], 2),
    ...              cone_from_rays([(2, -1), (0, 1)], 2))
    >>> k.kinds(), k.degree
    (('quotient', 'finite', 'dominant', 'surjective', 'lattice_injective'), 2)
    """
    budget = ensure(budget)
    _require_compatible(matrix, source, target)
    n, m = source.ambient_dim, target.ambient_dim
    matrix = tuple(tuple(r) for r in matrix)
    inj = is_injective(matrix, n)
    surj = is_surjective(matrix, n)
    iso = inj and surj and m == n
    dominant = rank(matrix, n) == m
    img = image(matrix, source, budget)
    onto_cone = img == target
    finite = source == preimage(matrix, target, budget, n)
    open_emb = iso and is_face(target, img)
    quotient = inj and m == n and onto_cone
    pairs = face_correspondence(matrix, source, target, budget)
    hit = {t for _, t in pairs}
    surjective = dominant and len(hit) == len(faces(target, budget))
    injective = len(hit) == len(pairs) and all(
        linalg.hnf([transpose_apply(matrix, e, n) for e in t.equations], n) == s.equations
        for s, t in pairs)
    closed = finite and is_split_injective(matrix, n) and _closed_embedding(matrix, source, target, budget)
    return MorphismKinds(
        isomorphism=iso and onto_cone, open_embedding=open_emb, closed_embedding=closed,
        quotient=quotient, finite=finite, birational=iso,
        subdivision_piece=iso and not open_emb, dominant=dominant, surjective=surjective,
        injective=injective, lattice_injective=inj, lattice_surjective=surj,
        degree=degree(matrix, n))
