"""Polyhedral cones in Z^d (lattice coordinates), exact, in a canonical form.

A :class:`Cone` ``σ ⊆ Q^d`` is stored as

* ``lineality`` – canonical basis (row HNF) of the lattice ``(σ ∩ -σ) ∩ Z^d``;
* ``rays`` – one generator of each extremal ray of the *pointed part* ``σ / lin(σ)``, sorted:
  the class of the generator is primitive in ``N / L`` (``L = lin(σ) ∩ Z^d``) and the
  generator is the canonical representative of its class, reduced modulo the Hermite basis of
  ``L`` (``linalg.primitive_mod``).  So ``σ = cone(rays) + span(lineality)``, and a vector
  ``v`` with ``<u, v> = 1`` for a facet normal ``u`` exists on every ray of a simplicial cone
  exactly when the lattice allows it (the pairing is computed in the quotient);
* ``equations`` – canonical basis (row HNF) of ``σ^⊥ ∩ Z^d`` (the lineality of the dual);
* ``facets`` – inner normals of the facets, sorted, chosen the same way on the dual side:
  primitive in ``M / σ^⊥`` and reduced modulo the Hermite basis of the equations (so the
  facet normal of a ray ``cone(v)`` pairs to 1 with ``v``).  Together with the equations they
  cut out σ: ``σ = {v : <e, v> = 0 for e in equations, <u, v> >= 0 for u in facets}``.
  For a pointed, full-dimensional cone both are the usual primitive vectors.

The construction is symmetric: the dual cone ``σ^∨`` has rays = facets of σ, lineality =
equations of σ, and vice versa, so :func:`dual` is free and ``dual(dual(σ)) == σ``.  Since
each field is a canonical function of the set σ, two cones are equal as sets iff they are
equal as Python values.

All the work is done by one routine, :func:`extreme_rays`, an exact integer double
description method (Motzkin–Raiffa–Thompson–Thrall; Fukuda–Prodon, "Double description
method revisited") with the combinatorial adjacency test, applied once to the dual
description (to get the facets) and once to the primal one (to get canonical rays).

Conventions chosen where the contract is open:

* ``simplicial``: the rays of the pointed part are linearly independent (equivalently,
  modulo the lineality space), i.e. ``len(rays) == dim - lineality_dim``.  The zero cone and
  linear subspaces are simplicial.
* a *redundant generator* is a zero vector, a vector of the lineality space (it spans no
  ray), a vector that is not on an extremal ray (modulo lineality), or a later generator of a
  ray already spanned by an earlier one (positive multiples and translates by the lineality
  count as the same ray; the first one in input order is kept).
* a *redundant inequality* is a zero row, a row that cuts out a face of dimension smaller
  than ``dim - 1``, or a later row defining a facet already defined by an earlier row.
  Implicit equations (rows vanishing on the whole cone) are **not** reported: they are
  needed to cut the cone down to its span.

>>> c = cone_from_rays([(0, 1), (2, -1)], 2)
>>> c.rays, c.facets
(((0, 1), (2, -1)), ((1, 0), (1, 2)))
>>> dual(c).rays
((1, 0), (1, 2))
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import lcm
from typing import Iterable, Sequence

from . import linalg
from .budget import Budget, ensure
from .linalg import Vec, dot, primitive

__all__ = [
    "Cone", "Vec", "extreme_rays", "cone_from_rays", "cone_from_inequalities", "zero_cone",
    "full_space", "dual", "face", "faces", "is_face", "intersection", "contains",
    "relative_interior_point", "is_in_interior", "a_line_in", "redundant_generators",
    "redundant_inequalities", "facet_ray_incidence", "simplicial_rays",
]


@dataclass(frozen=True)
class Cone:
    """A polyhedral cone in canonical form (see the module docstring); build it with
    :func:`cone_from_rays` or :func:`cone_from_inequalities`, not directly.

    >>> c = cone_from_rays([(1, 0, 0), (0, 1, 0)], 3)
    >>> c.dim, c.pointed, c.full, c.simplicial, c.equations
    (2, True, False, True, ((0, 0, 1),))
    """

    ambient_dim: int
    rays: tuple[Vec, ...]
    lineality: tuple[Vec, ...]
    facets: tuple[Vec, ...]
    equations: tuple[Vec, ...]

    @property
    def dim(self) -> int:
        """Dimension of the linear span.

        >>> cone_from_rays([(1, 1)], 2).dim
        1
        """
        return self.ambient_dim - len(self.equations)

    @property
    def lineality_dim(self) -> int:
        """Dimension of the largest linear subspace contained in the cone.

        >>> cone_from_inequalities([(1, 0, 0)], [], 3).lineality_dim
        2
        """
        return len(self.lineality)

    @property
    def pointed(self) -> bool:
        """True iff the cone contains no line.

        >>> cone_from_rays([(1, 0), (-1, 0)], 2).pointed
        False
        """
        return not self.lineality

    @property
    def full(self) -> bool:
        """True iff the cone is full-dimensional.

        >>> cone_from_rays([(1, 0), (0, 1)], 2).full
        True
        """
        return not self.equations

    @property
    def simplicial(self) -> bool:
        """True iff the rays of the pointed part are linearly independent.

        >>> cone_from_rays([(1, 0, 1), (0, 1, 1), (1, 1, 1)], 3).simplicial
        True
        >>> cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3).simplicial
        False
        """
        return len(self.rays) == self.dim - self.lineality_dim


# ---------------------------------------------------------------------------------------------
# the double description core


def _clean_rows(rows: Iterable[Sequence[int]], d: int, what: str) -> list[Vec]:
    out: list[Vec] = []
    for r in rows:
        r = tuple(r)
        if len(r) != d:
            raise ValueError(f"{what} {r} has length {len(r)}, expected {d}")
        for x in r:
            if isinstance(x, float) or (isinstance(x, Fraction) and x.denominator != 1):
                raise ValueError(f"{what} {r} is not an integer vector")
        r = tuple(int(x) for x in r)
        if any(r):
            out.append(r)
    return out


def _popcount(x: int) -> int:
    return x.bit_count()


def simplicial_rays(normals: Sequence[Vec]) -> list[Vec]:
    """The primitive rays of the simplicial cone ``{x : <a, x> >= 0 for a in normals}`` (k
    independent normals in Z^k): the primitive columns of the inverse matrix; the i-th ray
    lies on every hyperplane but the i-th.

    >>> simplicial_rays([(1, 0), (1, 2)])
    [(2, -1), (0, 1)]
    """
    inv = linalg.inverse_rational(normals)
    k = len(normals)
    out = []
    for col in range(k):
        v = [inv[r][col] for r in range(k)]
        den = 1
        for x in v:
            den = lcm(den, x.denominator)
        out.append(primitive(int(x * den) for x in v))
    return out


def _dd_pointed(A: list[Vec], k: int, budget: Budget) -> list[Vec]:
    """Extreme rays of the pointed cone ``{y in Q^k : A y >= 0}``; ``A`` must have rank k."""
    if k == 0:
        return []
    # initial simplicial cone from k linearly independent rows
    basis: list[int] = []
    for i in range(len(A)):
        if linalg.rank([A[j] for j in basis] + [A[i]], k) > len(basis):
            basis.append(i)
            if len(basis) == k:
                break
    assert len(basis) == k, "inequality system of the pointed part must have full rank"
    rays: list[Vec] = simplicial_rays([A[j] for j in basis])
    bit = {j: 1 << pos for pos, j in enumerate(basis)}
    masks: list[int] = [sum(bit[basis[j]] for j in range(k) if j != c) for c in range(k)]
    rest = [i for i in range(len(A)) if i not in bit]
    nbits = k
    for i in rest:
        a = A[i]
        b = 1 << nbits
        nbits += 1
        vals = [dot(a, r) for r in rays]
        neg = [j for j, v in enumerate(vals) if v < 0]
        if not neg:
            masks = [m | b if v == 0 else m for m, v in zip(masks, vals)]
            continue
        pos = [j for j, v in enumerate(vals) if v > 0]
        # one unit per candidate pair, plus the rays actually scanned by the adjacency tests
        budget.tick(len(pos) * len(neg), "double description", f"{len(rays)} intermediate rays")
        scanned = 0
        new_rays: list[Vec] = []
        new_masks: list[int] = []
        for j, v in enumerate(vals):
            if v > 0:
                new_rays.append(rays[j])
                new_masks.append(masks[j])
            elif v == 0:
                new_rays.append(rays[j])
                new_masks.append(masks[j] | b)
        need = k - 2
        for p in pos:
            mp = masks[p]
            for q in neg:
                common = mp & masks[q]
                if _popcount(common) < need:
                    continue
                adjacent = True
                for t, mt in enumerate(masks):
                    if t != p and t != q and (mt & common) == common:
                        adjacent = False
                        break
                scanned += t + 1
                if not adjacent:
                    continue
                vp, vq = vals[p], vals[q]
                r = tuple(vp * y - vq * x for x, y in zip(rays[p], rays[q]))
                new_rays.append(primitive(r))
                new_masks.append(common | b)
        budget.tick(scanned, "double description", f"{len(rays)} intermediate rays")
        rays, masks = new_rays, new_masks
    return rays


def extreme_rays(ineqs: Iterable[Sequence[int]], eqs: Iterable[Sequence[int]], d: int,
                 budget: Budget | None = None) -> tuple[tuple[Vec, ...], tuple[Vec, ...]]:
    """Generators of ``{x in Q^d : <a, x> >= 0 for a in ineqs, <e, x> = 0 for e in eqs}``.

    Returns ``(rays, lineality)``: ``lineality`` is the HNF basis of the lineality lattice L,
    ``rays`` are the sorted generators of the extremal rays modulo L, each primitive in
    ``Z^d / L`` and reduced modulo the Hermite basis of L (``linalg.primitive_mod``).

    >>> extreme_rays([(1, 0), (0, 1)], [], 2)
    (((0, 1), (1, 0)), ())
    >>> extreme_rays([(1, 0, 0)], [(0, 0, 1)], 3)
    (((1, 0, 0),), ((0, 1, 0),))
    >>> extreme_rays([], [], 0)
    ((), ())
    """
    budget = ensure(budget)
    A = _clean_rows(ineqs, d, "inequality")
    E = _clean_rows(eqs, d, "equation")
    A = sorted(set(primitive(a) for a in A))
    L = linalg.kernel_basis(A + E, d)
    W = linalg.kernel_basis(E + list(L), d)
    k = len(W)
    if k == 0:
        return (), L
    Ay = sorted(set(primitive(r) for a in A
                    if any(r := tuple(dot(a, w) for w in W))))
    budget.tick(len(Ay) * k, "double description")
    ys = _dd_pointed(Ay, k, budget)
    rays = sorted(set(linalg.primitive_mod(linalg.vec_mat(y, W, d), L, d) for y in ys))
    return tuple(rays), L


# ---------------------------------------------------------------------------------------------
# construction


def _irredundant(cands: Sequence[Vec], other: Sequence[Vec], space: Sequence[Vec], d: int,
                 budget: Budget) -> tuple[Vec, ...]:
    """The canonical extremal members of a description, read off the other description.

    ``cands`` generate the cone (as rays, or as inequalities); ``other`` are the extreme rays
    of the other side (facets, or rays); ``space`` is the lattice to project out (the
    lineality, or the equations).  A candidate is extremal iff the set of members of ``other``
    on which it vanishes is maximal among the candidates' sets that are not everything: every
    extremal ray (facet) is spanned (cut out) by some candidate, and a candidate in the
    relative interior of a larger face (cutting out a smaller face) vanishes on strictly
    fewer.  This replaces a second double description, which can be much harder than the
    first (the facets of a cone with thousands of rays)."""
    full = (1 << len(other)) - 1
    budget.tick(len(cands) * len(other), "double description",
                f"{len(cands)} candidates against {len(other)} extreme rays")
    by_mask: dict[int, Vec] = {}
    for c in cands:
        m = 0
        for i, r in enumerate(other):
            if not dot(c, r):
                m |= 1 << i
        if m != full and m not in by_mask:
            by_mask[m] = c
    masks = list(by_mask)
    keep = set()
    for m in masks:
        if not any(m2 != m and m2 & m == m for m2 in masks):
            keep.add(linalg.primitive_mod(by_mask[m], space, d))
    return tuple(sorted(keep))


def _build(gens: list[Vec], lin: list[Vec], d: int, budget: Budget | None) -> Cone:
    budget = ensure(budget)
    facets, equations = extreme_rays(gens, lin, d, budget)
    lineality = linalg.kernel_basis(list(facets) + list(equations), d)
    rays = _irredundant(gens, facets, lineality, d, budget)
    return Cone(d, rays, lineality, facets, equations)


def cone_from_rays(gens: Iterable[Sequence[int]], d: int, lineality: Iterable[Sequence[int]] = (),
                   budget: Budget | None = None) -> Cone:
    """The cone ``cone(gens) + span(lineality)`` in Q^d (zero vectors are ignored; no
    generators give the zero cone).

    >>> c = cone_from_rays([(1, 0), (1, 1), (0, 1), (2, 2)], 2)
    >>> c.rays, c.facets
    (((0, 1), (1, 0)), ((0, 1), (1, 0)))
    >>> cone_from_rays([], 2).equations
    ((1, 0), (0, 1))
    """
    if d < 0:
        raise ValueError("negative dimension")
    return _build(_clean_rows(gens, d, "generator"), _clean_rows(lineality, d, "lineality vector"),
                  d, budget)


def cone_from_inequalities(ineqs: Iterable[Sequence[int]], eqs: Iterable[Sequence[int]], d: int,
                           budget: Budget | None = None) -> Cone:
    """The cone ``{x : <a, x> >= 0 for a in ineqs, <e, x> = 0 for e in eqs}``.

    >>> c = cone_from_inequalities([(1, 0, 0), (0, 1, 0), (0, 0, 1)], [(1, 1, -2)], 3)
    >>> c.rays, c.dim
    (((0, 2, 1), (2, 0, 1)), 2)
    """
    if d < 0:
        raise ValueError("negative dimension")
    budget = ensure(budget)
    ineqs = _clean_rows(ineqs, d, "inequality")
    rays, lin = extreme_rays(ineqs, eqs, d, budget)
    equations = linalg.kernel_basis(list(rays) + list(lin), d)
    facets = _irredundant(ineqs, rays, equations, d, budget)
    return Cone(d, rays, lin, facets, equations)


def zero_cone(d: int) -> Cone:
    """The cone {0} in Q^d.

    >>> zero_cone(2).dim
    0
    """
    return cone_from_rays([], d)


def full_space(d: int) -> Cone:
    """The whole space Q^d as a cone.

    >>> full_space(2).lineality
    ((1, 0), (0, 1))
    """
    return cone_from_inequalities([], [], d)


# ---------------------------------------------------------------------------------------------
# operations


def dual(c: Cone) -> Cone:
    """The dual cone ``{u : <u, v> >= 0 for all v in c}`` (in the dual lattice).

    >>> dual(cone_from_rays([(1, 0), (1, 2)], 2)).rays
    ((0, 1), (2, -1))
    """
    return Cone(c.ambient_dim, c.facets, c.equations, c.rays, c.lineality)


def _check_vec(c: Cone, v: Sequence, what: str = "vector") -> None:
    if len(v) != c.ambient_dim:
        raise ValueError(f"{what} {tuple(v)} has length {len(v)}, expected {c.ambient_dim}")


def contains(c: Cone, v: Sequence) -> bool:
    """Membership of ``v`` (ints or Fractions) in the cone.

    >>> c = cone_from_rays([(1, 0), (1, 2)], 2)
    >>> contains(c, (1, 1)), contains(c, (0, 1))
    (True, False)
    """
    _check_vec(c, v)
    return all(dot(e, v) == 0 for e in c.equations) and all(dot(u, v) >= 0 for u in c.facets)


def face(c: Cone, u: Sequence[int], budget: Budget | None = None) -> Cone:
    """The face ``{v in c : <u, v> = 0}``; ``u`` must lie in ``dual(c)``, otherwise
    ``ValueError`` names a ray (or lineality direction) where ``u`` is negative.

    >>> c = cone_from_rays([(1, 0, 0), (0, 1, 0), (1, 1, 4)], 3)
    >>> face(c, (0, 0, 1)).rays
    ((0, 1, 0), (1, 0, 0))
    >>> face(c, (1, 0, -1))
    Traceback (most recent call last):
    ...
    ValueError: (1, 0, -1) is not in the dual cone: its value on the ray (1, 1, 4) is -3 < 0
    """
    _check_vec(c, u, "functional")
    u = tuple(u)
    for l in c.lineality:
        val = dot(u, l)
        if val != 0:
            neg = l if val < 0 else tuple(-x for x in l)
            raise ValueError(f"{u} is not in the dual cone: its value on {neg}, which lies on "
                             f"a line inside the cone, is {-abs(val)} < 0")
    for r in c.rays:
        val = dot(u, r)
        if val < 0:
            raise ValueError(f"{u} is not in the dual cone: its value on the ray {r} is {val} < 0")
    return cone_from_rays([r for r in c.rays if dot(u, r) == 0], c.ambient_dim, c.lineality,
                          budget)


def facet_ray_incidence(c: Cone) -> tuple[frozenset[int], ...]:
    """For each facet (in order), the set of indices of the rays lying on it.

    >>> facet_ray_incidence(cone_from_rays([(1, 0), (0, 1)], 2))
    (frozenset({1}), frozenset({0}))
    """
    return tuple(frozenset(i for i, r in enumerate(c.rays) if dot(u, r) == 0) for u in c.facets)


def faces(c: Cone, budget: Budget | None = None) -> tuple[Cone, ...]:
    """All faces of the cone (including the cone and its minimal face, the lineality space),
    sorted by dimension, then by rays.

    >>> [f.dim for f in faces(cone_from_rays([(1, 0), (0, 1)], 2))]
    [0, 1, 1, 2]
    """
    budget = ensure(budget)
    inc = facet_ray_incidence(c)
    everything = frozenset(range(len(c.rays)))
    found = {everything}
    frontier = [everything]
    while frontier:
        nxt = []
        for s in frontier:
            for f in inc:
                t = s & f
                if t not in found:
                    budget.tick(1, "face enumeration")
                    found.add(t)
                    nxt.append(t)
        frontier = nxt
    out = []
    for s in found:
        if s == everything:
            out.append(c)
        else:
            out.append(cone_from_rays([c.rays[i] for i in sorted(s)], c.ambient_dim,
                                      c.lineality, budget))
    out.sort(key=lambda f: (f.dim, f.rays))
    return tuple(out)


def is_face(c: Cone, f: Cone) -> bool:
    """True iff ``f`` is a face of ``c``.

    >>> c = cone_from_rays([(1, 0), (0, 1)], 2)
    >>> is_face(c, cone_from_rays([(1, 0)], 2)), is_face(c, cone_from_rays([(1, 1)], 2))
    (True, False)
    """
    if f.ambient_dim != c.ambient_dim:
        return False
    if not all(contains(c, r) for r in f.rays):
        return False
    if not all(contains(c, l) and contains(c, tuple(-x for x in l)) for l in f.lineality):
        return False
    d = c.ambient_dim
    u = [0] * d
    for n in c.facets:
        if all(dot(n, r) == 0 for r in f.rays) and all(dot(n, l) == 0 for l in f.lineality):
            u = [a + b for a, b in zip(u, n)]
    return face(c, tuple(u)) == f


def intersection(a: Cone, b: Cone, budget: Budget | None = None) -> Cone:
    """The intersection of two cones in the same space.

    >>> a = cone_from_rays([(1, 0), (1, 2)], 2)
    >>> b = cone_from_rays([(0, 1), (1, 1)], 2)
    >>> intersection(a, b).rays
    ((1, 1), (1, 2))
    """
    if a.ambient_dim != b.ambient_dim:
        raise ValueError(f"cones in spaces of different dimensions {a.ambient_dim} and "
                         f"{b.ambient_dim}")
    return cone_from_inequalities(a.facets + b.facets, a.equations + b.equations, a.ambient_dim,
                                  budget)


def relative_interior_point(c: Cone) -> Vec:
    """An integer point of the relative interior: the sum of the rays (the zero vector when
    the cone is a linear space).

    >>> relative_interior_point(cone_from_rays([(1, 0), (1, 2)], 2))
    (2, 2)
    """
    v = [0] * c.ambient_dim
    for r in c.rays:
        v = [a + b for a, b in zip(v, r)]
    return tuple(v)


def is_in_interior(c: Cone, v: Sequence, relative: bool = True) -> bool:
    """True iff ``v`` is in the relative interior of ``c`` (strictly positive on every facet,
    zero on the equations).  With ``relative=False`` the topological interior in Q^d is meant
    (always False for a cone that is not full-dimensional).

    >>> c = cone_from_rays([(1, 0, 0), (0, 1, 0)], 3)
    >>> is_in_interior(c, (1, 1, 0)), is_in_interior(c, (1, 1, 0), relative=False)
    (True, False)
    """
    _check_vec(c, v)
    if not relative and not c.full:
        return False
    return all(dot(e, v) == 0 for e in c.equations) and all(dot(u, v) > 0 for u in c.facets)


def a_line_in(c: Cone) -> Vec | None:
    """A primitive vector spanning a line contained in the cone, or None if it is pointed.

    >>> a_line_in(cone_from_rays([(1, -1, 0), (-1, 1, 0), (0, 0, 1)], 3))
    (1, -1, 0)
    """
    return c.lineality[0] if c.lineality else None


def redundant_generators(gens: Sequence[Sequence[int]], d: int,
                         lineality: Iterable[Sequence[int]] = (),
                         budget: Budget | None = None, cone: Cone | None = None) -> list[int]:
    """Indices of the input generators that are not needed as extremal ray generators
    (see the module docstring for the precise rule).  Pass ``cone`` (the cone these
    generators span, e.g. from :func:`cone_from_rays`) to avoid computing it again.

    >>> redundant_generators([(1, 0), (1, 1), (0, 1), (2, 0), (0, 0)], 2)
    [1, 3, 4]
    """
    gens = [tuple(g) for g in gens]
    c = cone if cone is not None else cone_from_rays(gens, d, lineality, budget)

    def mask(v):
        return frozenset(i for i, u in enumerate(c.facets) if dot(u, v) == 0)

    ray_masks = {mask(r) for r in c.rays}
    seen = set()
    out = []
    for i, g in enumerate(gens):
        if any(g):
            m = mask(g)
            if m in ray_masks and m not in seen:
                seen.add(m)
                continue
        out.append(i)
    return out


def redundant_inequalities(ineqs: Sequence[Sequence[int]], eqs: Iterable[Sequence[int]], d: int,
                           budget: Budget | None = None, cone: Cone | None = None) -> list[int]:
    """Indices of the inequalities that do not define facets (see the module docstring:
    implicit equations are not reported, later duplicates are).  Pass ``cone`` (the cone
    they cut out) to avoid computing it again.

    >>> redundant_inequalities([(1, 0), (0, 1), (1, 1), (2, 0)], [], 2)
    [2, 3]
    >>> redundant_inequalities([(1, 0), (-1, 0), (0, 1)], [], 2)
    []
    """
    ineqs = [tuple(a) for a in ineqs]
    c = cone if cone is not None else cone_from_inequalities(ineqs, eqs, d, budget)
    facet_sets = set(facet_ray_incidence(c))
    seen = set()
    out = []
    for i, a in enumerate(ineqs):
        if any(a):
            t = frozenset(j for j, r in enumerate(c.rays) if dot(a, r) == 0)
            if len(t) == len(c.rays):
                continue  # implicit equation
            if t in facet_sets and t not in seen:
                seen.add(t)
                continue
        out.append(i)
    return out
