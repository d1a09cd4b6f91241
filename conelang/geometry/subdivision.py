"""Star subdivisions of fans at chosen vectors (pure, lattice coordinates).

The star subdivision of a fan Σ at a primitive vector v of its support replaces every cone σ
containing v by the cones ``cone(τ, v)`` for the faces τ of σ not containing v (Cox–Little–
Schenck §3.3, Fulton §2.4 (from memory)); it suffices to take the facets τ of σ with
``<u_τ, v> > 0``, as the other faces are faces of those.  Since v ∉ span(τ) for such a facet,
the rays of ``cone(τ, v)`` are those of τ and v.  A refinement by a list of vectors is the
result of the star subdivisions at them, one after the other, in the order given.

>>> star_subdivision([(1, 0), (0, 1)], [(0, 1)], 2, (1, 1))
(((1, 0), (0, 1), (1, 1)), ((0, 2), (1, 2)))
"""
from __future__ import annotations

from typing import Sequence

from .budget import Budget, ensure
from .cone import cone_from_rays, contains
from .linalg import Vec, dot

__all__ = ["star_subdivision", "refine", "cone_containing"]


def cone_containing(rays: Sequence[Vec], cones: Sequence[Sequence[int]], d: int, v: Sequence[int]) -> int | None:
    """The index of the first cone that contains v, or None (v outside the support).

    >>> cone_containing([(1, 0), (0, 1), (-1, 0)], [(0, 1), (1, 2)], 2, (0, -1)) is None
    True
    """
    for k, c in enumerate(cones):
        if contains(cone_from_rays([rays[i] for i in c], d), v):
            return k
    return None


def star_subdivision(rays: Sequence[Vec], cones: Sequence[Sequence[int]], d: int, v: Sequence[int],
                     budget: Budget | None = None) -> tuple[tuple[Vec, ...], tuple[tuple[int, ...], ...]]:
    """``(rays, cones)`` of the star subdivision at the primitive vector ``v`` (the new ray is
    last; nothing changes when v is already a ray).  The cones are sorted index tuples.

    The blow-up of C^3 at the origin:

    >>> r, c = star_subdivision([(1, 0, 0), (0, 1, 0), (0, 0, 1)], [(0, 1, 2)], 3, (1, 1, 1))
    >>> c
    ((0, 1, 3), (0, 2, 3), (1, 2, 3))
    """
    budget = ensure(budget)
    rays = tuple(tuple(r) for r in rays)
    v = tuple(v)
    if v in rays:
        return rays, tuple(tuple(sorted(c)) for c in cones)
    new = len(rays)
    out: set[tuple[int, ...]] = set()
    for c in cones:
        budget.tick(len(c) * d, "star subdivision")
        geo = cone_from_rays([rays[i] for i in c], d)
        if not contains(geo, v):
            out.add(tuple(sorted(c)))
            continue
        for u in geo.facets:
            if dot(u, v) > 0:
                out.add(tuple(sorted([i for i in c if dot(u, rays[i]) == 0] + [new])))
        if not geo.facets:           # a ray (or the zero cone): v on it means v is that ray
            out.add(tuple(sorted(c)))
    maximal = [c for c in out if not any(set(c) < set(o) for o in out)]
    return rays + (v,), tuple(sorted(maximal))


def refine(rays: Sequence[Vec], cones: Sequence[Sequence[int]], d: int, vectors: Sequence[Sequence[int]],
           budget: Budget | None = None) -> tuple[tuple[Vec, ...], tuple[tuple[int, ...], ...]]:
    """Star subdivisions at ``vectors`` in order.

    >>> refine([(1, 0), (0, 1)], [(0, 1)], 2, [(1, 1), (1, 2)])[1]
    ((0, 2), (1, 3), (2, 3))
    """
    rays, cones = tuple(tuple(r) for r in rays), tuple(tuple(c) for c in cones)
    for v in vectors:
        rays, cones = star_subdivision(rays, cones, d, v, budget)
    return rays, cones
