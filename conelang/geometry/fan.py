"""Fans in Z^d (lattice coordinates): validity, invariants of X_Σ, and resolutions.

A fan is given as a list of primitive ray generators and a list of cones, each a list of
0-based indices into the rays (the user lists the maximal cones; faces of listed cones are
implicitly in the fan, and a ray used by no listed cone is a one-dimensional cone by itself).

Validity (:func:`check_fan`) is decided exactly:

* every listed cone is pointed (``fan-not-pointed``, with a line it contains);
* the listed rays of a cone are exactly the extremal rays of the cone they generate
  (``fan-not-ray``, with the smallest face of the cone containing the offending ray);
* two cones meet in a common face (``fan-overlap``).  When ``τ = σ_i ∩ σ_j`` is not a face of
  both, a point ``w`` of the relative interior of ``τ`` is reported: the smallest faces of
  ``σ_i`` and ``σ_j`` containing ``w`` are then different (if they were the same face ``F``
  then ``F ⊆ τ``, and ``F ⊇ τ`` because a face containing a relative interior point of the
  convex set ``τ ⊆ σ_i`` contains ``τ``; so ``τ = F`` would be a common face), i.e. ``w`` lies
  in no common face;
* and, as warnings: duplicate rays (an error: ``fan-duplicate-ray``), rays in no cone
  (``fan-unused-ray``), listed cones that are faces of other listed cones
  (``fan-redundant-cone``).

Invariants of a valid fan (:func:`fan_invariants`): completeness (every wall of a
full-dimensional cone lies in exactly two full-dimensional cones: a pseudomanifold without
boundary), simpliciality, smoothness, the number of torus orbits of each dimension
(orbit of dimension ``k`` ↔ cone of dimension ``n - k``), the class group
``Cl(X_Σ) = coker(M → Z^{Σ(1)})`` and the Picard group ``Pic(X_Σ) = CDiv_T(X_Σ) / M``, where the
lattice of T-Cartier divisors ``CDiv_T`` is computed exactly as the projection to the
divisor coordinates of the kernel lattice of the gluing conditions
``a_ρ = <m_σ, v_ρ>`` (for every maximal cone σ and ray ρ of σ, unknowns ``a`` and ``m_σ``).

Resolutions (:func:`resolve`): a smooth fan refining a pointed cone σ, computed in the
saturated lattice ``span(σ) ∩ Z^d``.  In dimension 2 it is the minimal resolution, from the
Hirzebruch–Jung continued fraction; in dimension ≥ 3 it is obtained by stellar subdivisions
(see :func:`resolve` for the strategy and the termination argument).

>>> f = check_fan([(1, 0), (0, 1), (-1, -1)], [(0, 1), (1, 2), (2, 0)], 2)
>>> f.valid
True
>>> inv = fan_invariants(f)
>>> inv.complete, inv.smooth, inv.orbits, inv.class_group, inv.picard_group
(True, True, (3, 3, 1), (1, ()), (1, ()))
"""
from __future__ import annotations

from dataclasses import dataclass, replace
from fractions import Fraction
from math import gcd
from typing import Sequence

from . import linalg
from .budget import Budget, ensure
from .cone import (Cone, a_line_in, cone_from_rays, faces, intersection, is_face,
                   relative_interior_point)
from .linalg import Vec, dot, primitive

__all__ = [
    "FanProblem", "FanCheck", "FanInvariants", "Resolution", "ERROR_CODES", "WARNING_CODES",
    "check_fan", "fan_invariants", "cones_by_dimension", "class_group", "picard_group",
    "cartier_basis", "self_intersections", "hirzebruch_jung", "cyclic_normal_form",
    "resolve", "crepant_partial_resolution", "gorenstein_functional", "is_unimodular",
    "simplicial_cone",
]

ERROR_CODES = frozenset({"fan-duplicate-ray", "fan-not-pointed", "fan-not-ray", "fan-overlap"})
WARNING_CODES = frozenset({"fan-unused-ray", "fan-redundant-cone"})


# ---------------------------------------------------------------------------------------------
# validity


@dataclass(frozen=True)
class FanProblem:
    """One reason why a list of cones is not a fan, or a warning about it.

    ``cone``/``other`` are indices into the list of cones given to :func:`check_fan`;
    ``ray``/``other_ray`` are indices into the rays; ``vector`` is a witness in lattice
    coordinates (a line in a non-pointed cone, a point of an overlap); ``face``/``other_face``
    are ray index tuples (the smallest face containing the non-extremal ray, or the faces of
    ``cone`` and ``other`` whose relative interiors contain the overlap witness); ``meet`` are
    the rays of the intersection of two overlapping cones.

    The wording of each problem is made by the analysis
    (:func:`conelang.semantics.forms.fan_problem_message`); here it is data only.

    >>> p = check_fan([(1, 0), (0, 1), (1, 1)], [(0, 1), (2,)], 2).problems[0]
    >>> p.code, p.cone, p.other, p.not_face_of, p.vector, p.meet, p.face, p.other_face
    ('fan-overlap', 1, 0, 0, (1, 1), ((1, 1),), (2,), (0, 1))
    """

    code: str
    cone: int | None = None
    other: int | None = None
    ray: int | None = None
    other_ray: int | None = None
    vector: Vec | None = None
    face: tuple[int, ...] | None = None
    other_face: tuple[int, ...] | None = None
    meet: tuple[Vec, ...] | None = None
    cones: tuple[tuple[int, ...], ...] = ()   # the cone list, for messages
    not_face_of: int | None = None            # overlap: the cone of which the meet is not a face

    @property
    def is_error(self) -> bool:
        """True for problems that make the fan invalid (warnings otherwise)."""
        return self.code in ERROR_CODES


@dataclass(frozen=True)
class FanCheck:
    """Result of :func:`check_fan`.

    ``cones`` are the cones as given plus one singleton per unused ray (so every ray is in
    some cone); ``maximal`` indexes the non-redundant ones; ``geometry[i]`` is the
    :class:`Cone` spanned by ``cones[i]``.
    """

    ambient_dim: int
    rays: tuple[Vec, ...]
    cones: tuple[tuple[int, ...], ...]
    geometry: tuple[Cone, ...]
    maximal: tuple[int, ...]
    problems: tuple[FanProblem, ...]

    @property
    def valid(self) -> bool:
        """True iff no problem is an error."""
        return not any(p.is_error for p in self.problems)

    @property
    def errors(self) -> tuple[FanProblem, ...]:
        return tuple(p for p in self.problems if p.is_error)


def simplicial_cone(gens: Sequence[Vec], d: int) -> Cone | None:
    """The canonical :class:`Cone` spanned by ``d`` linearly independent primitive vectors of
    Z^d, built from the inverse matrix (the facet opposite to ``g_j`` has the normal ``j``-th
    column of ``G^{-1}``), without a double description; None if they are dependent.

    >>> simplicial_cone([(1, 0), (1, 2)], 2) == cone_from_rays([(1, 0), (1, 2)], 2)
    True
    """
    import flint
    if len(gens) != d or d == 0:
        return None
    m = flint.fmpz_mat(d, d, [int(x) for g in gens for x in g])
    if m.det() == 0:
        return None
    inv = m.inv()
    facets = []
    for j in range(d):
        col = [Fraction(int(inv[i, j].p), int(inv[i, j].q)) for i in range(d)]
        den = 1
        for x in col:
            den = den * x.denominator // gcd(den, x.denominator)
        facets.append(primitive(int(x * den) for x in col))
    return Cone(d, tuple(sorted(primitive(g) for g in gens)), (), tuple(sorted(facets)), ())


def _carrier(c: Cone, v: Sequence[int], index_of: dict) -> tuple[int, ...]:
    """Ray indices of the smallest face of the pointed cone ``c`` containing ``v``."""
    tight = [u for u in c.facets if dot(u, v) == 0]
    return tuple(sorted(index_of[r] for r in c.rays if all(dot(u, r) == 0 for u in tight)))


def _separated(a: Cone, b: Cone) -> bool:
    """A quick sufficient test that two pointed cones meet in a common face: a functional
    ``u >= 0`` on ``a``, ``<= 0`` on ``b``, vanishing on exactly the common rays ``S`` of both.
    Then ``a ∩ b ⊆ a ∩ u^⊥ = cone(S) = b ∩ u^⊥``, a common face (the separation lemma, CLS
    Lemma 1.2.13 (from memory)).  The candidates are the normals cutting out the smallest
    face containing ``S`` in ``a`` (and, negated, in ``b``)."""
    common = set(a.rays) & set(b.rays)
    for x, y, sign in ((a, b, 1), (b, a, -1)):
        u = [0] * x.ambient_dim
        for n in x.facets:
            if all(dot(n, r) == 0 for r in common):
                u = [p + q for p, q in zip(u, n)]
        if {r for r in x.rays if dot(u, r) == 0} != common:
            continue
        vals = [dot(u, r) for r in y.rays]
        if all(v <= 0 for v in vals) and {r for r, v in zip(y.rays, vals) if v == 0} == common:
            return True
    return False


def check_fan(rays: Sequence[Sequence[int]], cones: Sequence[Sequence[int]], d: int,
              trusted: bool = False, budget: Budget | None = None) -> FanCheck:
    """Decide exactly whether ``cones`` (index lists into ``rays``) form a fan in Q^d.

    Rays are replaced by their primitive vectors; repeated indices in a cone are ignored.
    With ``trusted=True`` the pairwise intersections are not checked (for fans built by
    this module, e.g. resolutions, which are fans by construction).  The steps: the rays
    (:func:`_ray_problems`), each cone alone (:func:`_cone_problems`), cones that are faces
    of others (:func:`_redundant_cones`), then pairs of cones (:func:`_overlaps`).

    >>> ok = check_fan([(1, 0), (0, 1), (-1, -1)], [(0, 1), (1, 2), (2, 0)], 2)
    >>> ok.valid, ok.maximal
    (True, (0, 1, 2))
    >>> bad = check_fan([(1, 0), (0, 1), (1, 1), (-1, 0)], [(0, 1, 2), (1, 3)], 2)
    >>> [(p.code, p.cone, p.ray) for p in bad.problems]
    [('fan-not-ray', 0, 2)]
    >>> [p.code for p in check_fan([(1, 0), (-1, 0)], [(0, 1)], 2).problems]
    ['fan-not-pointed']
    """
    budget = ensure(budget)
    rays = _checked_rays(rays, cones, d)
    problems, listed = _ray_problems(rays, cones)
    geo, sound = _cone_problems(rays, listed, d, budget, problems)
    redundant = _redundant_cones(sound, listed, geo, problems)
    if not trusted:
        _overlaps([i for i in sound if i not in redundant], rays, listed, geo, d, budget, problems)
    problems = [replace(p, cones=listed) for p in problems]
    maximal = tuple(i for i in range(len(listed)) if i not in redundant)
    return FanCheck(d, rays, listed, tuple(geo), maximal, tuple(problems))


def _checked_rays(rays, cones, d: int) -> tuple[Vec, ...]:
    """The primitive rays, after checking their lengths and the indices of the cones."""
    rays = tuple(primitive(r) for r in rays)
    for r in rays:
        if len(r) != d:
            raise ValueError(f"ray {r} has length {len(r)}, expected {d}")
    for cidx in cones:
        for i in cidx:
            if not 0 <= i < len(rays):
                raise ValueError(f"ray index {i} out of range")
    return rays


def _ray_problems(rays: tuple[Vec, ...], cones) -> tuple[list[FanProblem], tuple[tuple[int, ...], ...]]:
    """Duplicate and unused rays, and the list of cones: the given ones (repeated indices
    dropped) and a one-ray cone for each unused ray."""
    problems: list[FanProblem] = []
    first: dict[Vec, int] = {}
    for i, r in enumerate(rays):
        if r in first:
            problems.append(FanProblem("fan-duplicate-ray", ray=i, other_ray=first[r]))
        else:
            first[r] = i
    listed = [tuple(dict.fromkeys(c)) for c in cones]
    used = {i for c in listed for i in c}
    dups = {p.ray for p in problems}
    for i in range(len(rays)):
        if i not in used and i not in dups:
            problems.append(FanProblem("fan-unused-ray", ray=i))
            listed.append((i,))
    return problems, tuple(listed)


def _cone_problems(rays, listed, d: int, budget: Budget, problems: list) -> tuple[list[Cone], list[int]]:
    """The cone spanned by each listed cone, and the indices of the sound ones (pointed, with
    extremal listed rays); the others' problems are appended to ``problems``."""
    geo, sound = [], []
    for ci, c in enumerate(listed):
        budget.tick(len(c) * d + 1, "fan check")
        g = simplicial_cone([rays[i] for i in c], d) if len(c) == d else None
        if g is None:
            g = cone_from_rays([rays[i] for i in c], d, budget=budget)
        geo.append(g)
        line = a_line_in(g)
        if line is not None:
            problems.append(FanProblem("fan-not-pointed", cone=ci, vector=line))
            continue
        extremal = set(g.rays)
        local: dict[Vec, int] = {}
        for i in c:
            local.setdefault(rays[i], i)
        bad = [i for i in c if rays[i] not in extremal]
        problems.extend(FanProblem("fan-not-ray", cone=ci, ray=i, face=_carrier(g, rays[i], local))
                        for i in bad)
        if not bad:
            sound.append(ci)
    return geo, sound


def _redundant_cones(sound, listed, geo, problems: list) -> set[int]:
    """Sound cones that are faces of other listed cones (same ray sets first)."""
    redundant: set[int] = set()
    sets = [frozenset(c) for c in listed]
    for a in sound:
        for b in sound:
            if a == b or b in redundant:
                continue
            if sets[a] <= sets[b] and (sets[a] < sets[b] or a > b):
                if sets[a] == sets[b] or is_face(geo[b], geo[a]):
                    redundant.add(a)
                    problems.append(FanProblem("fan-redundant-cone", cone=a, other=b))
                    break
    return redundant


def _overlaps(cand, rays, listed, geo, d: int, budget: Budget, problems: list) -> None:
    """Pairs of the candidate cones that do not meet in a common face, with a witness in the
    relative interior of their intersection (see the module docstring)."""
    for x in range(len(cand)):
        for y in range(x):
            i, j = cand[x], cand[y]
            budget.tick(len(listed[i]) * len(listed[j]) * d, "fan check",
                        f"{len(cand)} cones to intersect pairwise")
            gi, gj = geo[i], geo[j]
            if _separated(gi, gj):
                continue
            meet = intersection(gi, gj, budget)
            fi, fj = is_face(gi, meet), is_face(gj, meet)
            if fi and fj:
                continue
            w = relative_interior_point(meet)
            li = {rays[k]: k for k in listed[i]}
            lj = {rays[k]: k for k in listed[j]}
            problems.append(FanProblem(
                "fan-overlap", cone=i, other=j, vector=w, face=_carrier(gi, w, li),
                other_face=_carrier(gj, w, lj), meet=meet.rays,
                not_face_of=j if fi else i))


# ---------------------------------------------------------------------------------------------
# invariants


def cones_by_dimension(f: FanCheck, budget: Budget | None = None) -> tuple[tuple[frozenset, ...], ...]:
    """All cones of a valid fan as sets of ray indices, grouped by dimension 0..d.

    >>> f = check_fan([(1, 0), (0, 1)], [(0, 1)], 2)
    >>> [sorted(sorted(s) for s in level) for level in cones_by_dimension(f)]
    [[[]], [[0], [1]], [[0, 1]]]
    """
    budget = ensure(budget)
    index_of = {r: i for i, r in enumerate(f.rays)}
    found: dict[frozenset, int] = {frozenset(): 0}
    for ci in f.maximal:
        g = f.geometry[ci]
        if g.simplicial:
            # every subset of the rays of a simplicial cone spans a face
            idx = [index_of[r] for r in g.rays]
            n = len(idx)
            budget.tick(2 ** n, "faces of the fan")
            for mask in range(1 << n):
                s = frozenset(idx[k] for k in range(n) if mask >> k & 1)
                found[s] = len(s)
        else:
            for fc in faces(g, budget):
                found[frozenset(index_of[r] for r in fc.rays)] = fc.dim
    levels = [[] for _ in range(f.ambient_dim + 1)]
    for s, k in found.items():
        levels[k].append(s)
    return tuple(tuple(sorted(level, key=sorted)) for level in levels)


def class_group(rays: Sequence[Vec], d: int) -> tuple[int, tuple[int, ...]]:
    """``Cl(X_Σ) = Z^{Σ(1)} / {(<m, v_ρ>)_ρ : m ∈ M}`` as ``(free rank, invariant factors)``.
    The map from M need not be injective (rays that do not span): the cokernel is taken
    all the same.

    >>> class_group([(1, 0), (0, 1), (-1, -1)], 2)       # P^2
    (1, ())
    >>> class_group([(1, 0), (0, 1)], 2)                 # C^2
    (0, ())
    >>> class_group([(1, 0, 0)], 3)                      # C x (C^*)^2
    (0, ())
    """
    r = len(rays)
    if r == 0:
        return (0, ())
    inv = linalg.snf_invariants(rays, d) if d else ()
    return (r - len(inv), tuple(x for x in inv if x != 1))


def cartier_basis(rays: Sequence[Vec], maximal: Sequence[Sequence[int]], d: int,
                  budget: Budget | None = None) -> tuple[Vec, ...]:
    """Hermite basis of the lattice ``CDiv_T ⊆ Z^{Σ(1)}`` of T-Cartier divisors
    ``Σ a_ρ D_ρ``: those for which every maximal cone σ has ``m_σ ∈ M`` with
    ``<m_σ, v_ρ> = a_ρ`` for all rays ρ of σ.

    Method: the gluing condition on σ says that ``a|σ`` lies in the lattice ``L_σ`` spanned by
    the columns of the matrix ``V_σ`` of the rays of σ.  With the Smith form
    ``U V_σ W = diag(d_1, ..., d_t, 0, ...)`` this is ``(U a|σ)_i ≡ 0 mod d_i`` for ``i <= t`` and
    ``(U a|σ)_i = 0`` beyond (trivial when ``d_i = 1``: smooth cones impose nothing).  The
    lattice of solutions of these congruences is the projection of the kernel lattice of
    ``[A | diag(d)]``.

    For P(1,1,2) (rays (-1,-2), (1,0), (0,1)) a Weil divisor is Cartier iff it is so at the
    singular point, the cone of (-1,-2) and (1,0):

    >>> cartier_basis([(-1, -2), (1, 0), (0, 1)], [(0, 1), (1, 2), (2, 0)], 2)
    ((1, 1, 0), (0, 2, 0), (0, 0, 1))
    """
    budget = ensure(budget)
    r = len(rays)
    conds: list[tuple[list[int], int]] = []
    for cone in maximal:
        if not cone:
            continue
        V = [rays[rho] for rho in cone]
        budget.tick(len(cone) * d * d + 1, "Picard group")
        D, U, _ = linalg.smith(V, d)
        for i in range(len(cone)):
            mod = D[i][i] if i < d else 0
            if mod == 1:
                continue
            row = [0] * r
            for j, rho in enumerate(cone):
                row[rho] += U[i][j]
            if any(row):
                conds.append((row, mod))
    if not conds:
        return linalg.identity(r)
    c = len(conds)
    budget.tick(c * (r + c) * (r + c), "Picard group", f"{c} gluing conditions")
    A = [tuple(row + [mod if k == i else 0 for k in range(c)]) for i, (row, mod) in enumerate(conds)]
    K = linalg.kernel_basis(A, r + c)
    proj = [k[:r] for k in K if any(k[:r])]
    return linalg.hnf(proj, r) if proj else ()


def picard_group(rays: Sequence[Vec], maximal: Sequence[Sequence[int]], d: int,
                 budget: Budget | None = None, basis: Sequence[Vec] | None = None
                 ) -> tuple[int, tuple[int, ...]]:
    """``Pic(X_Σ) = CDiv_T(X_Σ) / M`` as ``(free rank, invariant factors)`` (``basis``: the
    :func:`cartier_basis`, when already known).

    >>> picard_group([(-1, -2), (1, 0), (0, 1)], [(0, 1), (1, 2), (2, 0)], 2)   # P(1,1,2)
    (1, ())
    >>> picard_group([(1, 0), (1, 2)], [(0, 1)], 2)                            # affine: Pic = 0
    (0, ())
    """
    B = basis if basis is not None else cartier_basis(rays, maximal, d, budget)
    k = len(B)
    if k == 0:
        return (0, ())
    Bt = linalg.transpose(B, len(rays))
    coords = []
    for j in range(d):
        w = tuple(v[j] for v in rays)
        if not any(w):
            continue
        c = linalg.solve_integer(Bt, w, k)
        if c is None:   # pragma: no cover - principal divisors are Cartier
            raise AssertionError("a principal divisor is not in the Cartier lattice")
        coords.append(c)
    inv = linalg.snf_invariants(coords, k) if coords else ()
    return (k - len(inv), tuple(x for x in inv if x != 1))


def is_unimodular(gens: Sequence[Vec]) -> bool:
    """True iff the vectors are part of a basis of Z^d (linearly independent, and the
    lattice they span is saturated).

    >>> is_unimodular([(1, 0, 0), (1, 1, 0)]), is_unimodular([(1, 0), (1, 2)])
    (True, False)
    """
    if not gens:
        return True
    d = len(gens[0])
    inv = linalg.snf_invariants(gens, d)
    return len(inv) == len(gens) and all(x == 1 for x in inv)


def self_intersections(rays: Sequence[Vec], twocones: Sequence[Sequence[int]]
                       ) -> tuple[int | None, ...]:
    """For a smooth fan in Z^2 (given by its 2-dimensional cones): ``D_ρ^2`` for each ray ρ
    lying in two 2-cones, where the neighbours satisfy ``v_- + v_+ = b v_ρ`` and
    ``D_ρ^2 = -b`` (the curve D_ρ is compact); None for the other rays.

    >>> self_intersections([(1, 0), (0, 1), (-1, 2), (0, -1)], [(0, 1), (1, 2), (2, 3), (3, 0)])
    (0, -2, 0, 2)
    """
    nb: dict[int, list[int]] = {}
    for c in twocones:
        a, b = c
        nb.setdefault(a, []).append(b)
        nb.setdefault(b, []).append(a)
    out = []
    for i, v in enumerate(rays):
        n = nb.get(i, [])
        if len(n) != 2:
            out.append(None)
            continue
        s = tuple(x + y for x, y in zip(rays[n[0]], rays[n[1]]))
        if s[0] * v[1] - s[1] * v[0] != 0:
            out.append(None)    # not smooth there: no integral self-intersection
            continue
        b = s[0] // v[0] if v[0] else s[1] // v[1]
        out.append(-b)
    return tuple(out)


@dataclass(frozen=True)
class FanInvariants:
    """The invariants of a valid fan and of its toric variety X_Σ (see the module docstring).

    ``orbits[k]`` is the number of torus orbits of dimension k (= cones of dimension d - k);
    groups are ``(free rank, invariant factors)``; ``picard_index`` is ``[Cl : Pic]`` when it
    is finite (else None); ``self_intersections`` is given for smooth 2-dimensional fans.
    """

    complete: bool
    simplicial: bool
    smooth: bool
    orbits: tuple[int, ...]
    class_group: tuple[int, tuple[int, ...]]
    picard_group: tuple[int, tuple[int, ...]]
    picard_index: int | None
    self_intersections: tuple[int | None, ...] | None
    maximal_cones: tuple[tuple[int, ...], ...]


def fan_invariants(f: FanCheck, budget: Budget | None = None) -> FanInvariants:
    """Invariants of a valid fan (raises ``ValueError`` for an invalid one).

    Hirzebruch surface H_2 (Fulton §1.1 (from memory)): smooth, complete, Pic = Cl = Z^2.

    >>> f = check_fan([(1, 0), (0, 1), (-1, 2), (0, -1)], [(0, 1), (1, 2), (2, 3), (3, 0)], 2)
    >>> i = fan_invariants(f)
    >>> i.complete, i.smooth, i.orbits, i.picard_group, i.self_intersections
    (True, True, (4, 4, 1), (2, ()), (0, -2, 0, 2))
    """
    if not f.valid:
        raise ValueError(f"not a fan ({f.errors[0].code})")
    budget = ensure(budget)
    d = f.ambient_dim
    levels = cones_by_dimension(f, budget)
    orbits = tuple(len(levels[d - k]) for k in range(d + 1))
    maximal = tuple(tuple(sorted(f.cones[i])) for i in f.maximal)
    top = levels[d]
    if d == 0:
        complete = True
    elif not top:
        complete = False
    else:
        count: dict[frozenset, int] = {}
        for s in top:
            for w in levels[d - 1]:
                if w <= s:
                    count[w] = count.get(w, 0) + 1
        complete = all(v == 2 for v in count.values())
    geos = [f.geometry[i] for i in f.maximal]
    simplicial = all(g.simplicial for g in geos)
    smooth = simplicial and all(is_unimodular(g.rays) for g in geos)
    cl = class_group(f.rays, d)
    B = cartier_basis(f.rays, maximal, d, budget)
    pic = picard_group(f.rays, maximal, d, budget, basis=B)
    r = len(f.rays)
    pidx = abs(linalg.det(B)) if len(B) == r else None
    si = None
    if d == 2 and smooth:
        si = self_intersections(f.rays, [c for c in maximal if len(c) == 2])
    return FanInvariants(complete, simplicial, smooth, orbits, cl, pic, pidx, si, maximal)


# ---------------------------------------------------------------------------------------------
# resolutions


def hirzebruch_jung(n: int, q: int) -> tuple[int, ...]:
    """The Hirzebruch–Jung continued fraction ``n/q = b1 - 1/(b2 - 1/(... - 1/bs))`` with
    all ``b_i >= 2``, for ``0 < q < n`` coprime (``()`` when ``q == 0`` and ``n == 1``).

    >>> hirzebruch_jung(7, 3), hirzebruch_jung(5, 4), hirzebruch_jung(5, 1)
    ((3, 2, 2), (2, 2, 2, 2), (5,))
    """
    if n == 1 and q == 0:
        return ()
    if not (0 < q < n) or gcd(n, q) != 1:
        raise ValueError(f"need 0 < q < n coprime, got n={n}, q={q}")
    out = []
    while q:
        b = -(-n // q)
        out.append(b)
        n, q = q, b * q - n
    return tuple(out)


def cyclic_normal_form(u: Vec, w: Vec) -> tuple[int, int, Vec]:
    """For primitive, linearly independent ``u, w`` in Z^2: ``(n, q, p)`` such that in the
    basis ``(p, u)`` of Z^2 the vectors are ``u = (0, 1)`` and ``w = (n, -q)`` with
    ``0 <= q < n`` (so cone(u, w) is the cone of the cyclic quotient singularity of type
    ``1/n(1, q)``; Fulton §2.2 (from memory)).  ``u`` and ``w`` must be ordered so that
    ``det(w, u) > 0``.

    >>> cyclic_normal_form((0, 1), (3, -2))
    (3, 2, (1, 0))
    >>> cyclic_normal_form((1, 2), (1, 0))[:2]
    (2, 1)
    """
    n = w[0] * u[1] - w[1] * u[0]
    if n <= 0:
        raise ValueError("need det(w, u) > 0")
    # p with det(p, u) = p0 u1 - p1 u0 = 1
    g, x, y = _ext_gcd(u[1], -u[0])
    if g != 1:
        raise ValueError("u is not primitive")
    p = (x, y)
    # w = n p + b u
    b = _exact_coefficient(w, p, u, n)
    t = -(-b // n)              # ceil(b / n)
    q = n * t - b
    p = (p[0] + t * u[0], p[1] + t * u[1])
    return n, q, p


def _ext_gcd(a: int, b: int) -> tuple[int, int, int]:
    """``(g, x, y)`` with ``a x + b y = g = gcd(a, b) >= 0``."""
    x0, y0, x1, y1 = 1, 0, 0, 1
    while b:
        k = a // b
        a, b = b, a - k * b
        x0, x1 = x1, x0 - k * x1
        y0, y1 = y1, y0 - k * y1
    if a < 0:
        a, x0, y0 = -a, -x0, -y0
    return a, x0, y0


def _exact_coefficient(w: Vec, p: Vec, u: Vec, n: int) -> int:
    # w - n p is a multiple of u
    r = (w[0] - n * p[0], w[1] - n * p[1])
    b = r[0] // u[0] if u[0] else r[1] // u[1]
    assert (b * u[0], b * u[1]) == r
    return b


@dataclass(frozen=True)
class Resolution:
    """A smooth fan refining a pointed cone (rays in the coordinates of the cone's space).

    ``method`` is ``"smooth"`` (the cone was smooth), ``"Hirzebruch–Jung"`` (dimension 2: the
    minimal resolution; ``continued_fraction`` and ``cyclic_quotient = (n, q)`` are set and
    the rays are in order along the boundary), ``"crepant subdivision"`` (a Gorenstein cone
    whose subdivision at the lattice points of height one is already smooth: a crepant
    resolution) or ``"stellar subdivision"``.  For a Gorenstein
    cone ``crepant_rays`` lists the lattice points at height one (the rays of the crepant
    partial resolution) and ``crepant_smooth`` says whether that partial resolution is
    already smooth; otherwise both are None.
    """

    rays: tuple[Vec, ...]
    cones: tuple[tuple[int, ...], ...]
    method: str
    continued_fraction: tuple[int, ...] | None = None
    cyclic_quotient: tuple[int, int] | None = None
    crepant_rays: tuple[Vec, ...] | None = None
    crepant_cones: tuple[tuple[int, ...], ...] | None = None
    crepant_smooth: bool | None = None


def gorenstein_functional(rays: Sequence[Vec], k: int) -> Vec | None:
    """An integer ``m`` with ``<m, v> = 1`` on every ray, or None (not Gorenstein).  For a
    full-dimensional cone it is unique.

    >>> gorenstein_functional([(1, 0), (1, 2)], 2), gorenstein_functional([(0, 1), (3, -1)], 2)
    ((1, 0), None)
    """
    return linalg.solve_integer(rays, (1,) * len(rays), k)


def _lambdas(p: Vec, inv) -> tuple[Fraction, ...]:
    k = len(p)
    return tuple(sum(p[i] * inv[i][j] for i in range(k)) for j in range(k))


def _parallelepiped(gens: Sequence[Vec]) -> list[tuple[Vec, tuple[Fraction, ...]]]:
    """Nonzero lattice points of the half-open parallelepiped of a simplicial full cone, with
    their coefficients."""
    from .monoid import parallelepiped_points
    inv = linalg.inverse_rational(gens)
    out = []
    for p in parallelepiped_points(list(gens)):
        if any(p):
            out.append((p, _lambdas(p, inv)))
    return out


class _SimplicialFan:
    """A simplicial fan in Z^k under construction by stellar subdivisions."""

    def __init__(self, rays: list[Vec], cones: set[tuple[int, ...]]):
        self.rays = list(rays)
        self.cones = set(cones)

    def det(self, c) -> int:
        return abs(linalg.det([self.rays[i] for i in c]))

    def subdivide(self, p: Vec, support: Sequence[int]) -> list[tuple[int, ...]]:
        """Stellar subdivision at ``p``, which lies in the relative interior of the cone
        spanned by the rays ``support``; returns the new cones."""
        sup = set(support)
        idx = len(self.rays)
        self.rays.append(p)
        hit = sorted(c for c in self.cones if sup <= set(c))
        new = []
        for c in hit:
            self.cones.discard(c)
            for i in sorted(sup):
                nc = tuple(sorted([j for j in c if j != i] + [idx]))
                self.cones.add(nc)
                new.append(nc)
        return new

    def locate(self, p: Vec) -> tuple[tuple[int, ...], tuple[Fraction, ...]]:
        """A cone containing ``p`` and the coefficients of ``p`` in its rays."""
        for c in sorted(self.cones):
            lam = _lambdas(p, linalg.inverse_rational([self.rays[i] for i in c]))
            if all(x >= 0 for x in lam):
                return c, lam
        raise ValueError(f"{p} is in no cone of the fan")


def _start(c: Cone, budget: Budget) -> _SimplicialFan:
    from .monoid import triangulate
    rays = list(c.rays)
    return _SimplicialFan(rays, set(triangulate(c, budget)))


def _crepant(c: Cone, m: Vec, budget: Budget) -> _SimplicialFan:
    """Stellar subdivision at every lattice point of height ``<m, ·> = 1`` (full pointed c)."""
    fan = _start(c, budget)
    height_one = set()
    for s in sorted(fan.cones):
        gens = [fan.rays[i] for i in s]
        dt = abs(linalg.det(gens))
        if dt > 1:
            budget.tick(dt * len(gens), "crepant resolution", f"a cone of multiplicity {dt}")
            height_one.update(p for p, lam in _parallelepiped(gens) if sum(lam) == 1)
    for p in sorted(height_one):
        assert dot(m, p) == 1
        cone, lam = fan.locate(p)
        support = [cone[i] for i in range(len(cone)) if lam[i] > 0]
        if len(support) == 1:
            continue   # p is already a ray
        budget.tick(len(fan.cones), "crepant resolution")
        fan.subdivide(p, support)
    return fan


def _stellar_smooth(fan: _SimplicialFan, budget: Budget) -> None:
    """Subdivide until every cone is unimodular.

    Each step takes a cone τ of multiplicity μ > 1 and the nonzero point
    ``p = Σ λ_i v_i`` (0 <= λ_i < 1) of its fundamental parallelepiped with the least
    ``Σ λ_i`` (then the least in lexicographic order); p lies in the relative interior of the
    face F = cone(v_i : λ_i > 0) (which has at least two rays, as p is primitive on no ray
    v_i with λ_i < 1).  Every cone containing p contains F, and is replaced by the cones
    with one ray v_i of F exchanged for p, whose multiplicity is ``λ_i μ' < μ'``.  So each
    step replaces cones by finitely many of strictly smaller multiplicity: the multiset of
    multiplicities decreases in the multiset order, which is well founded, and the loop ends
    with all multiplicities 1.
    """
    work = sorted(fan.cones, reverse=True)
    while work:
        c = work.pop()
        if c not in fan.cones:
            continue
        gens = [fan.rays[i] for i in c]
        dt = abs(linalg.det(gens))
        if dt == 1:
            continue
        budget.tick(dt * len(gens) + len(fan.cones), "resolution", f"a cone of multiplicity {dt}")
        p, lam = min(_parallelepiped(gens), key=lambda pl: (sum(pl[1]), pl[0]))
        support = [c[i] for i in range(len(c)) if lam[i] > 0]
        new = fan.subdivide(p, support)
        work.extend(sorted(new, reverse=True))


def _resolve_full(c: Cone, budget: Budget) -> Resolution:
    """Resolution of a pointed full-dimensional cone in Z^k."""
    k = c.ambient_dim
    if k == 0:
        return Resolution((), ((),), "smooth")
    if c.simplicial and is_unimodular(c.rays):
        res = Resolution(c.rays, (tuple(range(len(c.rays))),), "smooth")
    else:
        res = None
    m = gorenstein_functional(c.rays, k)
    if k == 2:
        u, w = c.rays
        if w[0] * u[1] - w[1] * u[0] < 0:
            u, w = w, u
        n, q, p = cyclic_normal_form(u, w)
        cf = hirzebruch_jung(n, q)
        seq = [u]
        if n > 1:
            seq.append(p)
            for b in cf:
                seq.append(tuple(b * x - y for x, y in zip(seq[-1], seq[-2])))
            assert seq[-1] == w
        else:
            seq.append(w)
        cones = tuple((i, i + 1) for i in range(len(seq) - 1))
        crep = None
        if m is not None:
            crep = tuple(v for v in seq if dot(m, v) == 1)
        if n == 1:
            return Resolution(tuple(seq), cones, "smooth", crepant_rays=crep,
                              crepant_cones=cones if m is not None else None,
                              crepant_smooth=True if m is not None else None)
        return Resolution(tuple(seq), cones, "Hirzebruch–Jung", cf, (n, q),
                          crep, cones if m is not None else None, True if m is not None else None)
    crep_rays = crep_cones = crep_smooth = None
    if m is not None:
        fan = _crepant(c, m, budget)
        crep_rays = tuple(fan.rays)
        crep_cones = tuple(sorted(fan.cones))
        crep_smooth = all(fan.det(s) == 1 for s in fan.cones)
    elif res is None:
        fan = _start(c, budget)
    if res is not None:
        return Resolution(res.rays, res.cones, res.method, crepant_rays=crep_rays,
                          crepant_cones=crep_cones, crepant_smooth=crep_smooth)
    _stellar_smooth(fan, budget)
    method = "crepant subdivision" if crep_smooth else "stellar subdivision"
    return Resolution(tuple(fan.rays), tuple(sorted(fan.cones)), method,
                      crepant_rays=crep_rays, crepant_cones=crep_cones, crepant_smooth=crep_smooth)


def resolve(c: Cone, budget: Budget | None = None) -> Resolution:
    """A smooth fan whose support is the pointed cone ``c`` and whose rays include the rays
    of ``c`` (a resolution of singularities of U_c), in the coordinates of ``c``.

    The cone is first seen as a full-dimensional cone of the saturated lattice
    ``span(c) ∩ Z^d`` (smoothness there is smoothness in Z^d, as that lattice is saturated).

    * dimension <= 1, or c smooth: the cone itself;
    * dimension 2: the minimal resolution.  With ``c = cone(u, w)`` written as
      ``u = (0, 1)``, ``w = (n, -q)`` in a suitable basis, the rays are ``v_0 = u``,
      ``v_1 = (1, 0)``, ``v_{i+1} = b_i v_i - v_{i-1}``, ..., ``v_{s+1} = w`` where
      ``n/q = [b_1, ..., b_s]`` is the Hirzebruch–Jung continued fraction; these are the
      lattice points on the compact edges of conv(c ∩ N ∖ 0), i.e. the Hilbert basis of
      ``c ∩ N``, in order along the boundary (Fulton §2.6, CLS §10.2 (from memory));
    * dimension >= 3: a triangulation of c without new rays; for a Gorenstein cone
      (``<m, v> = 1`` on the rays for some m) first the stellar subdivisions at all lattice
      points of height one (the crepant partial resolution, smooth in dimension 3 because a
      lattice triangle without further lattice points is unimodular); then stellar
      subdivisions at parallelepiped points of least coefficient sum until every cone is
      unimodular (termination: see :func:`_stellar_smooth`).

    >>> r = resolve(cone_from_rays([(0, 1), (3, -2)], 2))
    >>> r.rays, r.cones, r.continued_fraction
    (((0, 1), (1, 0), (2, -1), (3, -2)), ((0, 1), (1, 2), (2, 3)), (2, 2))
    >>> r = resolve(cone_from_rays([(1, 0, 0), (0, 1, 0), (1, 1, 2)], 3))
    >>> r.method, len(r.cones), all(is_unimodular([r.rays[i] for i in s]) for s in r.cones)
    ('stellar subdivision', 3, True)
    """
    budget = ensure(budget)
    if not c.pointed:
        raise ValueError("only pointed cones can be resolved")
    from .monoid import pointed_model
    model = pointed_model(c)
    res = _resolve_full(model.cone, budget)
    lift = model.lift
    L = lambda vs: tuple(lift(v) for v in vs) if vs is not None else None
    return Resolution(L(res.rays), res.cones, res.method, res.continued_fraction,
                      res.cyclic_quotient, L(res.crepant_rays), res.crepant_cones,
                      res.crepant_smooth)


def crepant_partial_resolution(c: Cone, budget: Budget | None = None
                               ) -> tuple[tuple[Vec, ...], tuple[tuple[int, ...], ...]] | None:
    """For a Gorenstein pointed cone: ``(rays, cones)`` of the fan obtained by stellar
    subdivision at every lattice point of height one (crepant: all rays at height one);
    None when the cone is not Gorenstein.

    >>> sigma = cone_from_rays([(0, 1, 0), (0, 0, 1), (3, -1, -1)], 3)   # 1/3(1,1,1)
    >>> rays, cones = crepant_partial_resolution(sigma)
    >>> rays, len(cones)
    (((0, 0, 1), (0, 1, 0), (3, -1, -1), (1, 0, 0)), 3)
    >>> crepant_partial_resolution(cone_from_rays([(1, 0, 0), (0, 1, 0), (1, 1, 2)], 3)) is None
    True
    """
    r = resolve(c, budget)
    if r.crepant_rays is None:
        return None
    return r.crepant_rays, r.crepant_cones
