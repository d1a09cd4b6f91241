"""Hilbert bases of the monoids ``σ ∩ Z^d`` and decompositions into them.

Everything is in lattice coordinates (see :mod:`conelang.geometry`).

Method (for a pointed cone)
---------------------------
1. Restrict to the lattice ``Λ = span(σ) ∩ Z^d`` (saturated, of rank ``k = dim σ``), in which
   σ is full-dimensional; see :func:`pointed_model`.
2. Triangulate σ without new rays (a *pulling* triangulation: pull the first ray, cone it over
   the recursively triangulated facets that do not contain it).
3. For every simplicial cone ``τ = cone(g_1, ..., g_k)`` of the triangulation enumerate the
   lattice points of its half-open fundamental parallelepiped ``{Σ λ_i g_i : 0 <= λ_i < 1}``.
   They are the images of the finite group ``Z^k / (Z g_1 + ... + Z g_k)`` and are read off the
   Smith normal form ``U G V = D`` of the generator matrix ``G``: the class of ``c`` in
   ``⊕ Z/d_i`` has coefficients ``λ = frac(Σ_i (c_i / d_i) U_i)``.  There are ``|det G|``
   of them (the *index* of τ), which is the cost estimate given to the budget.
4. Every irreducible element of ``σ ∩ Z^k`` is a ray generator or one of these points, so the
   Hilbert basis is the set of candidates ``x`` such that ``x - y ∉ σ`` for every smaller
   irreducible candidate ``y``; "smaller" refers to a positive grading (the sum of the facet
   normals), which makes one pass in increasing degree sufficient.

Simplicial cones skip steps 2-3's facet values: they are reduced in the coordinates λ of
the parallelepiped (:func:`_hilbert_basis_simplicial`).  Cones with more rays than facets use
the dual method instead, Pottier's completion one facet at a time
(:func:`_hilbert_basis_dual`); :func:`hilbert_basis_pointed` makes the choice.

Cones with lineality
--------------------
For a cone that is not pointed, let ``L = lin(σ) ∩ Z^d`` (its lineality lattice, rank ``l``)
and ``Λ = span(σ) ∩ Z^d``.  The *pointed part* of σ is its image ``σ̄`` in ``Λ / L ≅ Z^(k-l)``,
a pointed full-dimensional cone.  Its Hilbert basis is lifted back to ``Λ`` by a fixed linear
section ``s : Λ / L → Λ`` (the lift of each basis vector is reduced modulo the Hermite basis
of ``L``, so the section depends only on σ).  Because the section is linear,
``σ ∩ Z^d = s(σ̄ ∩ Z^(k-l)) ⊕ L`` as monoids, and the returned Hilbert basis is the lifted
Hilbert basis of σ̄ followed by ``u, -u`` for each vector ``u`` of the Hermite basis of ``L``.

>>> hilbert_basis(cone_from_rays([(0, 1), (3, -2)], 2))
((3, -2), (2, -1), (1, 0), (0, 1))
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from itertools import product
from math import lcm, prod
from typing import Sequence

from . import linalg
from .budget import Budget, ensure
from .cone import Cone, contains, cone_from_rays, simplicial_rays
from .linalg import Vec, dot, primitive

__all__ = [
    "PointedModel", "pointed_model", "hilbert_basis", "hilbert_basis_bruteforce", "decompose",
    "triangulate", "parallelepiped_points", "grading", "canonical_order", "hilbert_basis_pointed",
]


# ---------------------------------------------------------------------------------------------
# coordinates: the pointed full-dimensional model of a cone


@dataclass(frozen=True)
class PointedModel:
    """σ seen as a pointed full-dimensional cone ``cone`` in ``Z^k = Λ / L``.

    ``projection`` (k rows of length d) maps a point ``v`` of ``Λ = span(σ) ∩ Z^d`` to its
    coordinates ``(<p_1, v>, ..., <p_k, v>)`` in ``Λ / L``; ``section`` (k vectors of Z^d) is
    the linear lift ``x ↦ Σ x_j s_j``; ``lineality`` is the Hermite basis of
    ``L = lin(σ) ∩ Z^d``.  On Λ: ``project(lift(x)) = x`` and ``v - lift(project(v)) ∈ L``.

    >>> m = pointed_model(cone_from_rays([(1, 0, 0), (1, 2, 0)], 3))
    >>> m.cone.rays, m.project((1, 1, 0)), m.lift((1, 1))
    (((1, 0), (1, 2)), (1, 1), (1, 1, 0))
    """

    source: Cone
    cone: Cone
    projection: tuple[Vec, ...]
    section: tuple[Vec, ...]
    lineality: tuple[Vec, ...]

    def project(self, v: Sequence[int]) -> Vec:
        """Coordinates in ``Λ / L`` of a point ``v`` of ``Λ``."""
        return tuple(dot(p, v) for p in self.projection)

    def lift(self, x: Sequence[int]) -> Vec:
        """The point ``Σ x_j s_j`` of Λ (the fixed linear lift)."""
        out = [0] * self.source.ambient_dim
        for c, s in zip(x, self.section):
            if c:
                for i, y in enumerate(s):
                    out[i] += c * y
        return tuple(out)


def _right_inverse(rows: Sequence[Vec], n: int) -> tuple[Vec, ...]:
    """For a k x n integer matrix ``B`` whose rows span a saturated lattice, an n x k integer
    matrix ``C`` with ``B C = I_k`` (returned as its n rows)."""
    k = len(rows)
    if k == 0:
        return tuple(() for _ in range(n))
    D, U, V = linalg.smith(rows, n)
    if any(D[i][i] != 1 for i in range(k)):
        raise ValueError("rows do not span a saturated lattice")
    # B V [I;0] U = U^-1 D V^-1 V [I;0] U = I
    return tuple(tuple(sum(V[r][i] * U[i][j] for i in range(k)) for j in range(k))
                 for r in range(n))


def _reduce_mod_hnf(v: Sequence[int], h: Sequence[Vec]) -> Vec:
    """Canonical representative of ``v + lattice(h)`` for ``h`` in row Hermite normal form."""
    v = list(v)
    for row in h:
        c = next(i for i, x in enumerate(row) if x)
        q = v[c] // row[c]
        if q:
            v = [a - q * b for a, b in zip(v, row)]
    return tuple(v)


def pointed_model(c: Cone) -> PointedModel:
    """The pointed full-dimensional model of a cone (see the module docstring and
    :class:`PointedModel`).  For a pointed full-dimensional cone this is the cone itself with
    identity coordinates.

    The half-plane ``{x >= y}`` = cone((1, -1)) + span((1, 1)): its pointed part is the ray
    of ``Z^2 / Z(1, 1) ≅ Z`` (coordinate ``x - y``), lifted by ``1 ↦ (0, -1)``.

    >>> m = pointed_model(cone_from_rays([(1, -1)], 2, lineality=[(1, 1)]))
    >>> m.cone.rays, m.projection, m.section, m.lineality
    (((1,),), ((1, -1),), ((0, -1),), ((1, 1),))
    >>> m.project((1, 0)), m.project((1, -1))
    ((1,), (2,))
    """
    d = c.ambient_dim
    if c.pointed and c.full:
        ident = linalg.identity(d)
        return PointedModel(c, c, ident, ident, ())
    lin = linalg.saturate(c.lineality, d) if c.lineality else ()
    # basis B of Λ = span ∩ Z^d and integer coordinates x = v C on Λ
    B = linalg.kernel_basis(c.equations, d) if c.equations else linalg.identity(d)
    m = len(B)
    C = _right_inverse(B, d)                          # d x m, B C = I
    if lin:
        Lc = [linalg.vec_mat(v, C, m) for v in lin]   # lineality in Λ-coordinates
        W = linalg.kernel_basis(Lc, m)                # k x m, saturated, kernel = Lc
    else:
        W = linalg.identity(m)
    k = len(W)
    # projection v -> v C W^T, as k functionals on Z^d
    proj = tuple(tuple(sum(C[r][i] * w[i] for i in range(m)) for r in range(d)) for w in W)
    R = _right_inverse(W, m)                          # m x k, W R = I
    section = []
    for j in range(k):
        coords = tuple(R[i][j] for i in range(m))     # W coords = e_j
        s = linalg.vec_mat(coords, B, d)
        section.append(_reduce_mod_hnf(s, lin))
    section = tuple(section)
    rays = sorted(set(primitive(tuple(dot(p, r) for p in proj)) for r in c.rays))
    facets = sorted(set(primitive(tuple(dot(s, u) for s in section)) for u in c.facets))
    model = Cone(k, tuple(rays), (), tuple(facets), ())
    return PointedModel(c, model, proj, section, lin)


# ---------------------------------------------------------------------------------------------
# triangulation and parallelepipeds


def triangulate(c: Cone, budget: Budget | None = None) -> tuple[tuple[int, ...], ...]:
    """A triangulation of a pointed full-dimensional cone without new rays, as tuples of
    indices into ``c.rays`` (each of length ``dim c``).  It is the pulling triangulation for
    the order of the rays: the cone over the first ray and the (recursively triangulated)
    facets not containing it.

    >>> sq = cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3)
    >>> triangulate(sq)
    ((0, 1, 3), (0, 2, 3))
    """
    if not (c.pointed and c.full):
        raise ValueError("triangulate needs a pointed full-dimensional cone")
    budget = ensure(budget)
    k = c.ambient_dim
    n = len(c.rays)
    if k == 0:
        return ((),)
    if n == k:
        return (tuple(range(n)),)
    inc = [frozenset(i for i, r in enumerate(c.rays) if dot(u, r) == 0) for u in c.facets]

    @cache
    def tri(face: frozenset, m: int) -> tuple[tuple[int, ...], ...]:
        if len(face) == m:
            return (tuple(sorted(face)),)
        budget.tick(len(inc), "triangulation", f"{n} rays in dimension {k}")
        apex = min(face)
        cand = {face & f for f in inc if not face <= f}
        facets = [s for s in cand if not any(s < t for t in cand)]
        out = []
        for s in sorted(facets, key=sorted):
            if apex in s:
                continue
            for simplex in tri(s, m - 1):
                out.append(tuple(sorted((apex,) + simplex)))
        return tuple(out)

    return tuple(sorted(tri(frozenset(range(n)), k)))


def parallelepiped_points(gens: Sequence[Vec], budget: Budget | None = None,
                          what: str = "parallelepiped") -> tuple[Vec, ...]:
    """The lattice points ``Σ λ_i g_i`` with ``0 <= λ_i < 1`` for linearly independent
    generators spanning ``Q^k`` (there are ``|det|`` of them, including 0), via the Smith
    normal form of the generator matrix.

    >>> sorted(parallelepiped_points([(1, 0), (1, 3)]))
    [(0, 0), (1, 1), (1, 2)]
    """
    k = len(gens)
    if k == 0:
        return ((),)
    D, U, _ = linalg.smith(gens, k)
    ds = [D[i][i] for i in range(k)]
    if any(x == 0 for x in ds):
        raise ValueError("generators are linearly dependent")
    delta = ds[-1]
    nontriv = [i for i in range(k) if ds[i] > 1]
    # lambda * delta = Σ c_i (delta / d_i) U_i  (mod delta)
    steps = [tuple(x * (delta // ds[i]) for x in U[i]) for i in nontriv]
    out = []
    cost = 2 * k * k
    for count, cs in enumerate(product(*[range(ds[i]) for i in nontriv])):
        if budget is not None and not count % 1024:
            budget.tick(1024 * cost, what, f"about {abs(prod(ds))} lattice points to enumerate")
        lam = [0] * k
        for ci, st in zip(cs, steps):
            if ci:
                for j in range(k):
                    lam[j] += ci * st[j]
        lam = [x % delta for x in lam]
        pt = tuple(sum(lam[i] * gens[i][j] for i in range(k)) // delta for j in range(k))
        out.append(pt)
    return tuple(out)


# ---------------------------------------------------------------------------------------------
# Hilbert bases


def grading(c: Cone) -> Vec:
    """A positive grading of a pointed cone: the sum of its facet normals, which is positive
    on every nonzero point (for the zero cone: the zero vector).

    >>> grading(cone_from_rays([(1, 0), (1, 2)], 2))   # facets (0, 1) and (2, -1)
    (2, 0)
    """
    if not c.pointed:
        raise ValueError("a cone with lineality has no positive grading")
    w = [0] * c.ambient_dim
    for u in c.facets:
        w = [a + b for a, b in zip(w, u)]
    if c.dim == 1 and not c.facets:
        w = list(c.rays[0])
    return tuple(w)


def canonical_order(vectors) -> tuple[Vec, ...]:
    """The canonical order of Hilbert basis elements: decreasing lexicographic.

    >>> canonical_order([(0, 1), (1, 0), (1, 1)])
    ((1, 1), (1, 0), (0, 1))
    """
    return tuple(sorted(set(tuple(v) for v in vectors), reverse=True))


_NUMPY_FROM = 5000        # total parallelepiped points from which the vectorised path is used
_CHUNK = 1 << 16
_REDUCERS = 64            # low-degree points used to discard most candidates at once
_INT64_SAFE = 1 << 62
_SIMPLICIAL_NUMPY = 48    # index from which a simplicial cone is reduced vectorised
_SIMPLICIAL_SAFE = 1 << 20  # ... and up to which (δ^2 k stays inside int64, memory stays small)
_QUICK = 128              # dual method: low-degree elements tried first on every sum
_PAIR_CHUNK = 1 << 20     # dual method: entries of the sums formed at once (8 MB)
_BLOCK_BOOLS = 1 << 22    # dual method: booleans of one block of the plain reducibility test
_BITSET_BYTES = 1 << 23   # dual method: largest bitset tables of the reducibility test
_BITSET_ROWS = 4096       # dual method: candidates tested at once against the bitsets
_DUAL_SAFE = 1 << 40      # dual method: largest facet value (sums stay far inside int64)


def _hilbert_basis_full(c: Cone, budget: Budget, what: str) -> list[Vec]:
    """Hilbert basis of a pointed full-dimensional cone in Z^k (unsorted)."""
    k = c.ambient_dim
    if k == 0:
        return []
    rays = c.rays
    simplices = triangulate(c, budget)
    gens = [[rays[i] for i in s] for s in simplices]
    dets = [abs(linalg.det(g)) for g in gens]
    total = sum(dets)
    if len(gens) == 1 and _SIMPLICIAL_NUMPY <= total <= _SIMPLICIAL_SAFE:
        budget.check(total * k, what, f"about {total} lattice points to enumerate")
        return _hilbert_basis_simplicial(gens[0], total, budget, what)
    nf = len(c.facets)
    detail = f"about {total} lattice points to enumerate"
    if total >= _NUMPY_FROM and _numpy_safe(gens, dets, c.facets):
        # two vectorised passes; one unit per point and pass (vector operations are about
        # fifty times cheaper than the interpreted path, whose units are single operations)
        budget.check(total * 2, what, detail)
        cand = _candidates_numpy(c, gens, dets, budget, what, detail)
    else:
        # per point: the Smith-form coordinates (2 k^2) and the facet values (nf k)
        budget.check(total * (2 * k * k + nf * k), what, detail)
        cand = set(rays)
        for g, dt in zip(gens, dets):
            if dt > 1:
                cand.update(p for p in parallelepiped_points(g, budget, what) if any(p))
    return _reduce_candidates(c, cand, budget, what)


def _hilbert_basis_simplicial(g: Sequence[Vec], det: int, budget: Budget, what: str) -> list[Vec]:
    """Hilbert basis of the simplicial cone ``cone(g_1, ..., g_k)`` (independent, spanning
    Q^k, ``det = |det g|``), vectorised.  A point ``x = Σ λ_i g_i`` is handled through the
    integer vector ``δ λ`` (``δ`` the largest Smith invariant): ``x - y`` is in the cone iff
    ``λ(y) <= λ(x)`` coordinatewise, so the reduction needs no facet values, and only the
    survivors are turned into points.

    >>> sorted(_hilbert_basis_simplicial([(0, 1), (7, -3)], 7, Budget(None), "h"))
    [(0, 1), (1, 0), (3, -1), (5, -2), (7, -3)]
    """
    import numpy as np

    k = len(g)
    D, U, _ = linalg.smith(g, k)
    ds = [D[i][i] for i in range(k)]
    delta = ds[-1]
    nontriv = [i for i in range(k) if ds[i] > 1]
    steps = np.array([[x * (delta // ds[i]) % delta for x in U[i]] for i in nontriv], dtype=np.int64)
    budget.tick(det * k // 8 + 1, what, f"about {det} lattice points to enumerate")
    lam = np.zeros((0, k), dtype=np.int64)
    if nontriv:
        coeffs = np.indices([ds[i] for i in nontriv], dtype=np.int64).reshape(len(nontriv), -1).T
        lam = np.zeros((len(coeffs), k), dtype=np.int64)
        for j in range(len(nontriv)):                 # Σ c_j step_j mod δ, term by term
            lam = (lam + coeffs[:, j:j + 1] * steps[j][None, :]) % delta
    lam = lam[lam.any(axis=1)]
    lam = np.concatenate([lam, delta * np.eye(k, dtype=np.int64)])
    A = np.concatenate([lam, np.zeros((len(lam), 1), dtype=np.int64)], axis=1)
    deg = lam.sum(axis=1)
    cols = np.arange(k)
    # the lowest-degree points discard most of the others at once (a reducer of smaller
    # degree is never the point itself) ...
    low = np.argsort(deg, kind="stable")[:_QUICK]
    budget.tick(len(A) * len(low) // 256 + 1, what, f"about {det} lattice points")
    below = np.searchsorted(deg[low], deg, side="left")
    alive = ~_Reducers(A[low], cols, k)(A, below)
    lam, A, deg = lam[alive], A[alive], deg[alive]
    # ... and the survivors reduce each other
    budget.tick(len(A) * len(A) // 256 + 1, what, f"{len(A)} candidates")
    keep = ~_reducible_within(A, deg, cols, k)
    out = []
    for row in lam[keep].tolist():
        out.append(tuple(sum(row[i] * g[i][j] for i in range(k)) // delta for j in range(k)))
    return out


def _reduce_candidates(c: Cone, cand, budget: Budget, what: str) -> list[Vec]:
    """The irreducible elements among candidates that contain the Hilbert basis."""
    k, nf = c.ambient_dim, len(c.facets)
    budget.tick(len(cand) * nf * k, what, f"{len(cand)} candidates")
    facets = c.facets
    fvals = {x: tuple(dot(u, x) for u in facets) for x in cand}
    w = grading(c)
    by_deg: dict[int, list[Vec]] = {}
    for x in cand:
        by_deg.setdefault(dot(w, x), []).append(x)
    basis: list[Vec] = []
    bvals: list[tuple[int, ...]] = []
    for deg in sorted(by_deg):
        level = by_deg[deg]
        budget.tick(len(level) * (len(basis) + 1) * nf, what, f"{len(cand)} candidates")
        new = []
        for x in level:
            fx = fvals[x]
            if not any(all(a <= b for a, b in zip(fy, fx)) for fy in bvals):
                new.append(x)
        basis.extend(new)
        bvals.extend(fvals[x] for x in new)
    return basis


def _numpy_safe(gens, dets, facets) -> bool:
    """Whether all intermediate values of the vectorised path fit in int64."""
    for g, dt in zip(gens, dets):
        k = len(g)
        mg = max(abs(x) for r in g for x in r)
        if k * dt * mg >= _INT64_SAFE:
            return False
        mx = k * mg
        mf = max((abs(x) for u in facets for x in u), default=0)
        if len(facets) * k * mx * mf >= _INT64_SAFE:
            return False
    return True


def _parallelepiped_chunks(g, budget: Budget, what: str, detail: str, cost: int):
    """The parallelepiped points of a simplicial cone as int64 arrays (chunks of rows)."""
    import numpy as np

    k = len(g)
    D, U, _ = linalg.smith(g, k)
    ds = [D[i][i] for i in range(k)]
    delta = ds[-1]
    nontriv = [i for i in range(k) if ds[i] > 1]
    G = np.array(g, dtype=np.int64)
    if not nontriv:
        yield np.zeros((1, k), dtype=np.int64)
        return
    steps = [np.array([x * (delta // ds[i]) % delta for x in U[i]], dtype=np.int64)
             for i in nontriv]
    last, s_last = ds[nontriv[-1]], steps[-1]
    for cs in product(*[range(ds[i]) for i in nontriv[:-1]]):
        base = np.zeros(k, dtype=np.int64)
        for ci, st in zip(cs, steps):
            base = (base + ci * st) % delta
        for t0 in range(0, last, _CHUNK):
            t = np.arange(t0, min(last, t0 + _CHUNK), dtype=np.int64)
            budget.tick(len(t) * cost, what, detail)
            lam = (base[None, :] + t[:, None] * s_last[None, :]) % delta
            yield (lam @ G) // delta


def _candidates_numpy(c: Cone, gens, dets, budget: Budget, what: str, detail: str) -> set:
    """Vectorised enumeration: pass 1 finds the lowest-degree parallelepiped points, pass 2
    keeps only the points that none of them (nor a ray) reduces; the survivors contain the
    Hilbert basis (a point x with x - y in the cone for some nonzero lattice point y != x is
    reducible, whatever y is)."""
    import numpy as np

    k = c.ambient_dim
    F = np.array(c.facets, dtype=np.int64).T           # k x nf
    cost = 1
    # pass 1: the _REDUCERS points of smallest degree (sum of the facet values)
    best_pts = np.zeros((0, k), dtype=np.int64)
    best_deg = np.zeros(0, dtype=np.int64)
    for g, dt in zip(gens, dets):
        if dt == 1:
            continue
        for X in _parallelepiped_chunks(g, budget, what, detail, cost):
            deg = (X @ F).sum(axis=1)
            keep = deg > 0
            X, deg = X[keep], deg[keep]
            if len(deg) > _REDUCERS:
                idx = np.argpartition(deg, _REDUCERS)[:_REDUCERS]
                X, deg = X[idx], deg[idx]
            best_pts = np.concatenate([best_pts, X])
            best_deg = np.concatenate([best_deg, deg])
            if len(best_deg) > 4 * _REDUCERS:
                idx = np.argpartition(best_deg, _REDUCERS)[:_REDUCERS]
                best_pts, best_deg = best_pts[idx], best_deg[idx]
    R = np.unique(np.concatenate([best_pts, np.array(c.rays, dtype=np.int64)]), axis=0)
    RF = R @ F
    Rdeg = RF.sum(axis=1)
    order = np.argsort(Rdeg, kind="stable")
    RF, Rdeg = RF[order], Rdeg[order]
    # pass 2: discard what the reducers reduce
    cand = set(c.rays)
    cand.update(tuple(int(x) for x in r) for r in best_pts)
    for g, dt in zip(gens, dets):
        if dt == 1:
            continue
        for X in _parallelepiped_chunks(g, budget, what, detail, cost):
            XF = X @ F
            deg = XF.sum(axis=1)
            alive = deg > 0
            X, XF, deg = X[alive], XF[alive], deg[alive]
            for rf, rd in zip(RF, Rdeg):
                alive = ~(((XF >= rf[None, :]).all(axis=1)) & (deg > rd))
                X, XF, deg = X[alive], XF[alive], deg[alive]
                if not len(X):
                    break
            for row in X.tolist():
                cand.add(tuple(row))
    return cand


# ---------------------------------------------------------------------------------------------
# the dual method: Pottier's completion, one inequality at a time


def _start_facets(c: Cone, budget: Budget) -> tuple[list[int], int]:
    """``k`` linearly independent facets of a pointed full-dimensional cone in Z^k whose
    simplicial cone has a small index (the number of points of its parallelepiped): the best
    of a few greedy choices."""
    import random

    facets = c.facets
    k = c.ambient_dim
    best: tuple[int, list[int]] | None = None
    rnd = random.Random(0)
    order = list(range(len(facets)))
    for attempt in range(8):
        if attempt:
            rnd.shuffle(order)
        chosen: list[int] = []
        for i in order:
            if linalg.rank([facets[j] for j in chosen] + [facets[i]], k) > len(chosen):
                chosen.append(i)
                if len(chosen) == k:
                    break
        budget.tick(len(facets) * k * k, "Hilbert basis", "choosing a start cone")
        gens = simplicial_rays([facets[j] for j in chosen])
        index = abs(linalg.det(gens))
        if best is None or index < best[0]:
            best = (index, sorted(chosen))
        if index == 1:
            break
    return best[1], best[0]


class _Reducers:
    """A reducibility test against fixed ``reducers`` (rows of facet values): called on
    candidate rows ``s`` it tells whether some reducer ``g`` has ``g[cols] <= s[cols]`` and
    ``g[t]`` between 0 and ``s[t]`` (inclusive); with ``below`` only the first ``below[i]``
    reducers count for candidate ``i``.  The values in ``cols`` are non-negative.  With small
    values the reducers are packed once into bitsets per column and value, so a test costs
    one AND per column and 64 reducers; otherwise blocks of the boolean comparison are used."""

    def __init__(self, reducers, cols, t):
        import numpy as np

        self.n = n = len(reducers)
        self.cols, self.t = cols, t
        self.RP = RP = reducers[:, cols]
        self.Rt = Rt = reducers[:, t]
        self.tables = None
        if not n:
            return
        vmax = int(RP.max()) if RP.size else 0
        tlo, thi = int(min(Rt.min(), 0)), int(max(Rt.max(), 0))
        self.words = words = (n + 63) // 64
        if (len(cols) * (vmax + 1) + (thi - tlo + 1)) * words * 8 > _BITSET_BYTES:
            return

        def pack(mask):                              # (values, reducers) bool -> uint64 words
            pad = np.zeros((mask.shape[0], words * 64 - n), dtype=bool)
            return np.packbits(np.concatenate([mask, pad], axis=1), axis=1, bitorder="little").view(np.uint64)

        vals = np.arange(vmax + 1)
        tv = np.arange(tlo, thi + 1)[:, None]
        self.side = pack(np.where(tv >= 0, (Rt[None, :] >= 0) & (Rt[None, :] <= tv),
                                  (Rt[None, :] <= 0) & (Rt[None, :] >= tv)))
        self.tables = [pack(RP[None, :, j] <= vals[:, None]) for j in range(len(cols))]
        self.vmax, self.tlo, self.thi = vmax, tlo, thi

    def cost(self, count: int) -> int:
        """Work units of testing ``count`` candidates (about one per microsecond: measured on
        the magic squares for the bitsets and on cones with large facet values for blocks)."""
        if self.tables is not None:
            return count * self.n // 256 + 1
        return count * self.n * len(self.cols) // 1000 + 1

    def __call__(self, cands, below=None):
        import numpy as np

        out = np.zeros(len(cands), dtype=bool)
        if not self.n or not len(cands):
            return out
        cols, t = self.cols, self.t
        if self.tables is not None:
            SP = np.minimum(cands[:, cols], self.vmax)
            St = np.minimum(np.maximum(cands[:, t], self.tlo), self.thi) - self.tlo
            starts = np.arange(self.words, dtype=np.int64) * 64
            for b0 in range(0, len(cands), _BITSET_ROWS):
                acc = self.side[St[b0:b0 + _BITSET_ROWS]]
                if below is not None:
                    # bits 0 .. below-1 (little-endian bit order within each word)
                    bl = below[b0:b0 + _BITSET_ROWS, None] - starts[None, :]
                    part = np.left_shift(np.uint64(1), np.minimum(np.maximum(bl, 0), 63).astype(np.uint64)) - np.uint64(1)
                    acc = acc & np.where(bl >= 64, np.uint64(~np.uint64(0)), np.where(bl <= 0, np.uint64(0), part))
                for j, tab in enumerate(self.tables):
                    acc &= tab[SP[b0:b0 + _BITSET_ROWS, j]]
                out[b0:b0 + _BITSET_ROWS] = acc.any(axis=1)
            return out
        RP, Rt = self.RP, self.Rt
        idx = np.arange(self.n)
        rows = max(1, _BLOCK_BOOLS // max(1, self.n * len(cols)))     # bounded memory
        for b0 in range(0, len(cands), rows):
            S = cands[b0:b0 + rows]
            le = (RP[None, :, :] <= S[:, cols][:, None, :]).all(axis=2)
            st = S[:, t][:, None]
            side = np.where(st >= 0, (Rt[None, :] >= 0) & (Rt[None, :] <= st),
                            (Rt[None, :] <= 0) & (Rt[None, :] >= st))
            hit = le & side
            if below is not None:
                hit &= idx[None, :] < below[b0:b0 + rows, None]
            out[b0:b0 + rows] = hit.any(axis=1)
        return out


def _reducible_within(A, deg, cols, t):
    """For each row of ``A``: is it reducible (in the sense of :class:`_Reducers`) by another
    row of smaller degree?  (A reducer other than the row itself always has smaller degree.)"""
    import numpy as np

    order = np.argsort(deg, kind="stable")
    sdeg = deg[order]
    below = np.searchsorted(sdeg, sdeg, side="left")
    flags = np.zeros(len(A), dtype=bool)
    flags[order] = _Reducers(A[order], cols, t)(A[order], below)
    return flags


class _TooLarge(Exception):
    """Values of the dual method would leave the safe range of 64-bit integers."""


def _hilbert_basis_dual(c: Cone, budget: Budget, what: str) -> list[Vec]:
    """Hilbert basis of a pointed full-dimensional cone in Z^k by Pottier's completion (the
    dual method: it needs the facets, not a triangulation).

    Points are represented by their facet values ``y = (<u_1, x>, ..., <u_m, x>)``.  Start
    with ``k`` independent facets, whose simplicial cone ``C_0`` has a small parallelepiped,
    and its Hilbert basis (:func:`_dual_start`).  Then add one facet ``λ`` at a time
    (:func:`_add_facet`): with ``C`` the current cone and ``H`` its Hilbert basis, close ``H``
    under sums ``p + n`` (``λ(p) > 0 > λ(n)``), keeping a sum only when no element ``g`` of
    the set satisfies ``s - g ∈ C`` with ``λ(g)`` between 0 and ``λ(s)``.  The closed set
    contains the Hilbert bases of both ``C ∩ {λ >= 0}`` and ``C ∩ {λ <= 0}`` (Pottier, "The
    Euclidean algorithm in dimension n", ISSAC 1996; the induction on the degree is in
    DEVELOPERS.md), and the elements with ``λ >= 0`` that are irreducible in
    ``C ∩ {λ >= 0}`` are its Hilbert basis.  Last, the facet values go back to coordinates
    (:func:`_from_facet_values`).

    >>> sq = cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3)
    >>> sorted(_hilbert_basis_dual(sq, Budget(None), "Hilbert basis"))
    [(0, 0, 1), (0, 1, 1), (1, 0, 1), (1, 1, 1)]
    """
    facets = list(c.facets)
    start, Y = _dual_start(c, facets, budget, what)
    P = list(start)
    for t in [j for j in range(len(facets)) if j not in start]:
        Y = _add_facet(Y, P, t, budget, what)
        P.append(t)
    return _from_facet_values(Y, [facets[j] for j in start], start)


def _dual_start(c: Cone, facets: list, budget: Budget, what: str):
    """The start facets (indices) and the facet values of the Hilbert basis of their cone."""
    import numpy as np

    k, m = c.ambient_dim, len(facets)
    start, index = _start_facets(c, budget)
    budget.check(index * (2 * k * k + m * k), what, f"a start cone with {index} lattice points")
    simplex = cone_from_rays(simplicial_rays([facets[j] for j in start]), k, budget=budget)
    H0 = _hilbert_basis_full(simplex, budget, what)
    Y = [[dot(u, h) for u in facets] for h in H0]
    if max((abs(x) for y in Y for x in y), default=0) > _DUAL_SAFE:
        raise _TooLarge
    return start, np.array(Y, dtype=np.int64)


def _add_facet(Y, P: list, t: int, budget: Budget, what: str):
    """From the Hilbert basis ``Y`` (facet values) of the cone of the facets ``P``, that of
    the cone of ``P`` and ``t``: complete, then keep the irreducible elements with λ_t ≥ 0."""
    import numpy as np

    cols = np.array(P)
    G = _complete(Y, cols, t, budget, what)
    Hc = G[G[:, t] >= 0]
    budget.tick(len(Hc) * len(Hc) // 256 + 1, what, f"{len(Hc)} elements")
    return Hc[~_reducible_within(Hc, _degree(Hc, cols, t), cols, t)]


def _degree(A, cols, t):
    """The degree of the completion for the facet ``t``: Σ_{j ∈ cols} y_j + |y_t|."""
    import numpy as np

    return A[:, cols].sum(axis=1) + np.abs(A[:, t])


def _complete(G, cols, t: int, budget: Budget, what: str):
    """Close ``G`` under the irreducible sums ``p + n`` (``λ_t(p) > 0 > λ_t(n)``), round by
    round: each round pairs the new elements of one side with all of the other side."""
    import numpy as np

    m = G.shape[1]
    new_pos, new_neg = G[G[:, t] > 0], G[G[:, t] < 0]
    old_pos = np.zeros((0, m), dtype=np.int64)
    old_neg = np.zeros((0, m), dtype=np.int64)
    while len(new_pos) or len(new_neg):
        if np.abs(G).max() > _DUAL_SAFE:
            raise _TooLarge
        all_neg = np.concatenate([old_neg, new_neg])
        pairs = [(A, B) for A, B in ((new_pos, all_neg), (old_pos, new_neg)) if len(A) and len(B)]
        old_pos = np.concatenate([old_pos, new_pos])
        old_neg = all_neg
        if not pairs:
            break
        S = _new_sums(G, pairs, cols, t, budget, what)
        if S is None:
            break
        G = np.concatenate([G, S])
        new_pos, new_neg = S[S[:, t] > 0], S[S[:, t] < 0]
    return G


def _new_sums(G, pairs, cols, t: int, budget: Budget, what: str):
    """The sums of one round that no element of ``G`` (nor another sum of the round)
    reduces, or None when there is none."""
    import numpy as np

    m = G.shape[1]
    # the lowest-degree elements discard most sums at once; the rest is checked fully
    quick = _Reducers(G[np.argsort(_degree(G, cols, t), kind="stable")[:_QUICK]], cols, t)
    full = _Reducers(G, cols, t)
    found = []
    for A, B in pairs:
        step = max(1, _PAIR_CHUNK // (len(B) * m))
        for a0 in range(0, len(A), step):
            S = (A[a0:a0 + step, None, :] + B[None, :, :]).reshape(-1, m)
            budget.tick(len(S) * m // 64 + quick.cost(len(S)), what, f"{len(S)} candidate sums")
            S = S[~quick(S)]
            if len(S):
                budget.tick(full.cost(len(S)), what, f"{len(S)} candidate sums against {len(G)} elements")
                S = S[~full(S)]
            if len(S):
                found.append(S)
    if not found:
        return None
    S = np.unique(np.concatenate(found), axis=0)
    # sums of the same round reduce each other
    budget.tick(len(S) * len(S) // 256 + 1, what, f"{len(S)} new elements")
    return S[~_reducible_within(S, _degree(S, cols, t), cols, t)]


def _from_facet_values(Y, start_facets: list, start: list) -> list[Vec]:
    """Back to coordinates: x = F_S^{-1} y_S = (den F_S^{-1}) y_S / den."""
    inv = linalg.inverse_rational(start_facets)
    den = 1
    for row in inv:
        for x in row:
            den = lcm(den, x.denominator)
    M = [[int(x * den) for x in row] for row in inv]
    out = []
    for y in Y.tolist():
        ys = [y[j] for j in start]
        out.append(tuple(sum(a * b for a, b in zip(row, ys)) // den for row in M))
    return out


def hilbert_basis_pointed(c: Cone, budget: Budget | None = None, what: str = "Hilbert basis") -> list[Vec]:
    """Hilbert basis (unsorted) of a pointed full-dimensional cone in Z^k, by the method that
    suits its shape: the dual method (:func:`_hilbert_basis_dual`) when the cone has more
    rays than facets and is not simplicial (a triangulation would have many simplices, the
    completion adds few inequalities), the triangulation with parallelepipeds otherwise.
    Measured on random cones of dimension 3 and 4 (``bench_varieties.py --choice``): with
    more rays than facets the dual method takes 4.3 s in total against 6.5 s, 5-35x faster
    on cones whose triangulation has a large volume and a few milliseconds slower on small
    ones; otherwise the triangulation takes 0.27 s against 12.8 s.

    >>> sorted(hilbert_basis_pointed(cone_from_rays([(1, 0), (1, 2)], 2)))
    [(1, 0), (1, 1), (1, 2)]
    """
    budget = ensure(budget)
    if c.ambient_dim and not c.simplicial and len(c.rays) > len(c.facets):
        try:
            return _hilbert_basis_dual(c, budget, what)
        except _TooLarge:
            pass
    return _hilbert_basis_full(c, budget, what)


def hilbert_basis(c: Cone, budget: Budget | None = None) -> tuple[Vec, ...]:
    """The minimal generators of the monoid ``c ∩ Z^d`` in canonical order.

    For a pointed cone: its Hilbert basis in decreasing lexicographic order.  Otherwise: the
    lifted Hilbert basis of the pointed part (see the module docstring) in decreasing
    lexicographic order, followed by ``u, -u`` for each vector ``u`` of the Hermite basis of
    the lineality lattice.  The zero cone gives ``()``.

    >>> hilbert_basis(cone_from_rays([(1, 0), (1, 2)], 2))
    ((1, 2), (1, 1), (1, 0))
    >>> hilbert_basis(cone_from_rays([(0, 1)], 2, lineality=[(1, 0)]))
    ((0, 1), (1, 0), (-1, 0))
    >>> hilbert_basis(cone_from_rays([], 2))
    ()
    """
    budget = ensure(budget)
    what = "Hilbert basis"
    m = pointed_model(c)
    hb = hilbert_basis_pointed(m.cone, budget, what)
    out = list(canonical_order(m.lift(x) for x in hb))
    for u in m.lineality:
        out.append(tuple(u))
        out.append(tuple(-x for x in u))
    return tuple(out)


def hilbert_basis_bruteforce(c: Cone, bound: int) -> tuple[Vec, ...]:
    """Reference implementation for tests: the irreducible elements of ``c ∩ Z^d`` among the
    points of the box ``[-bound, bound]^d``, assuming the cone is pointed and its Hilbert
    basis lies in the box (then the answer is exact), in canonical order.  A point is
    irreducible iff it is not ``q + (p - q)`` with ``q`` an irreducible point of smaller
    degree (for the grading by the sum of the facet normals) and ``p - q`` in the cone.

    >>> hilbert_basis_bruteforce(cone_from_rays([(1, 0), (1, 2)], 2), 2)
    ((1, 2), (1, 1), (1, 0))
    """
    if not c.pointed:
        raise ValueError("brute force only for pointed cones")
    d = c.ambient_dim
    w = [0] * d
    for u in c.facets:
        w = [a + b for a, b in zip(w, u)]
    if c.dim == 1:
        w = list(c.rays[0])
    pts = [p for p in product(range(-bound, bound + 1), repeat=d) if any(p) and contains(c, p)]
    pts.sort(key=lambda p: dot(w, p))
    out: list[Vec] = []
    for p in pts:
        if not any(dot(w, q) < dot(w, p) and contains(c, tuple(a - b for a, b in zip(p, q)))
                   for q in out):
            out.append(p)
    return canonical_order(out)


# ---------------------------------------------------------------------------------------------
# decomposition


def decompose(point: Sequence[int], basis: Sequence[Sequence[int]], c: Cone,
              budget: Budget | None = None) -> tuple[int, ...]:
    """Non-negative integer coefficients ``a`` with ``point = Σ a_i basis[i]``.

    ``basis`` must consist of points of ``c``; its elements inside the lineality space must
    come with their negatives (as in :func:`hilbert_basis`).  The search is exact: greedy
    in decreasing degree of the pointed part, with backtracking (which is never needed when
    ``basis`` contains a Hilbert basis); see :class:`_Decomposition`.  Raises ``ValueError``
    when ``point`` is not in ``c`` or is not a non-negative combination of ``basis``.

    >>> c = cone_from_rays([(1, 0), (1, 2)], 2)
    >>> decompose((3, 4), hilbert_basis(c), c)
    (2, 0, 1)
    >>> decompose((1, 0), [(1, 0), (-1, 0)], cone_from_rays([], 2, lineality=[(1, 0)]))
    (1, 0)
    """
    point = tuple(point)
    basis = [tuple(b) for b in basis]
    if not contains(c, point):
        raise ValueError(f"{point} is not in the cone")
    for b in basis:
        if not contains(c, b):
            raise ValueError(f"basis element {b} is not in the cone")
    work = _Decomposition(point, basis, c, ensure(budget))
    res = work.greedy()
    if res is None:
        res = work.search(work.target, 0)
    if res is None:
        raise ValueError(f"{point} is not a non-negative integer combination of the basis")
    return tuple(res.get(i, 0) for i in range(len(basis)))


class _Decomposition:
    """The data of one :func:`decompose`: the basis projected to the pointed part (the
    elements projecting to 0 are the units, each with the index of its negative), sorted by
    decreasing degree, and the pointed part of the point."""

    def __init__(self, point: Vec, basis: list[Vec], c: Cone, budget: Budget):
        self.point, self.basis, self.budget = point, basis, budget
        m = pointed_model(c)
        k = m.cone.ambient_dim
        self.proj = proj = [m.project(b) for b in basis]
        self.units = units = [i for i, p in enumerate(proj) if not any(p)]
        w = grading(m.cone) if k else ()
        self.rest = sorted((i for i, p in enumerate(proj) if any(p)), key=lambda i: (-dot(w, proj[i]), i))
        self.neg_of = {i: self._negative(i) for i in units}
        self.target = m.project(point)
        self.facets = m.cone.facets
        unit_vecs = [basis[i] for i in units]
        d = c.ambient_dim
        self.unit_mat = linalg.transpose(unit_vecs, d) if units else ()
        # the remainder in L must lie in the group U generated by the units; when U = L every
        # remainder does, and failures depend only on the pointed part (memoisation is sound)
        self.units_span_all = (not m.lineality) or (
            bool(units) and linalg.hnf(unit_vecs, d) == linalg.hnf(m.lineality, d))
        self.failed: set = set()
        self.stack: dict[int, int] = {}

    def _negative(self, i: int) -> int:
        negb = tuple(-x for x in self.basis[i])
        j = next((j for j in self.units if self.basis[j] == negb), None)
        if j is None:
            raise ValueError(f"basis element {self.basis[i]} is a unit whose negative is missing")
        return j

    def inside(self, y: Vec) -> bool:
        return all(dot(u, y) >= 0 for u in self.facets)

    def unit_part(self, chosen: dict[int, int]) -> dict[int, int] | None:
        """``chosen`` completed by units to a decomposition of the point, or None."""
        r = list(self.point)
        for i, a in chosen.items():
            r = [x - a * y for x, y in zip(r, self.basis[i])]
        if not any(r):
            return dict(chosen)
        if not self.units:
            return None
        y = linalg.solve_integer(self.unit_mat, tuple(r), len(self.units))
        if y is None:
            return None
        coef = dict(chosen)
        for i, yi in zip(self.units, y):
            if yi > 0:
                coef[i] = coef.get(i, 0) + yi
            elif yi < 0:
                coef[self.neg_of[i]] = coef.get(self.neg_of[i], 0) - yi
        return coef

    def greedy(self) -> dict[int, int] | None:
        """Subtract the first element that keeps the rest in the cone, as long as one does
        (always succeeds when the basis contains a Hilbert basis)."""
        x, chosen = self.target, {}
        while any(x):
            self.budget.tick(1, "decomposition into the Hilbert basis")
            for i in self.rest:
                y = tuple(a - b for a, b in zip(x, self.proj[i]))
                if self.inside(y):
                    x = y
                    chosen[i] = chosen.get(i, 0) + 1
                    break
            else:
                break
        return None if any(x) else self.unit_part(chosen)

    def search(self, x: Vec, start: int) -> dict | None:
        """Exhaustive search over multisets (indices non-decreasing along ``rest``)."""
        self.budget.tick(1, "decomposition into the Hilbert basis")
        if not any(x):
            return self.unit_part(self.stack)
        if self.units_span_all and (x, start) in self.failed:
            return None
        stack = self.stack
        for pos in range(start, len(self.rest)):
            i = self.rest[pos]
            y = tuple(a - b for a, b in zip(x, self.proj[i]))
            if self.inside(y):
                stack[i] = stack.get(i, 0) + 1
                res = self.search(y, pos)
                stack[i] -= 1
                if not stack[i]:
                    del stack[i]
                if res is not None:
                    return res
        self.failed.add((x, start))
        return None
