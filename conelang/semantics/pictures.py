"""What a picture of the facts needs beyond the facts: the exact planes, normals and
functionals the SVG renderer draws with (``conelang.render.svg`` only projects and writes).

They are computed from the JSON-ready facts (user coordinates, numbers or ``"p/q"``
strings), so a picture needs nothing but the document it draws; all arithmetic is exact.

>>> section_functional([(1, 0, 0), (0, 1, 0), (1, 1, 4)], [(0, 0, 1), (0, 4, -1), (4, 0, -1)])
((4, 4, -1), 4)
"""
from __future__ import annotations

from fractions import Fraction
from math import lcm

from ..geometry import linalg
from ..geometry.cone import cone_from_rays


def integral(v) -> tuple[int, ...]:
    """The primitive integer vector on the ray of a rational vector (zero stays zero).

    >>> integral(["1/2", 1, "3/4"]), integral([0, 0])
    ((2, 4, 3), (0, 0))
    """
    q = [Fraction(x) for x in v]
    den = lcm(1, *(x.denominator for x in q))
    ints = [int(x * den) for x in q]
    return linalg.primitive(ints) if any(ints) else tuple(ints)


def vector_sum(vectors, n: int) -> tuple[Fraction, ...]:
    """The sum of rational vectors of length ``n``.

    >>> vector_sum([(1, "1/2"), (2, 0)], 2)
    (Fraction(3, 1), Fraction(1, 2))
    """
    out = [Fraction(0)] * n
    for v in vectors:
        out = [a + Fraction(b) for a, b in zip(out, v)]
    return tuple(out)


def _dot(u, v):
    return sum(a * b for a, b in zip(u, v))


def window_radius(vectors, lo: int = 3, hi: int = 8) -> int:
    """The half-width R of the square window ``[-R, R]^2`` of a plane picture: just large
    enough for the vectors (the largest coordinate, rounded up), between ``lo`` and ``hi``.

    >>> window_radius([(1, 0), ("7/2", -1)]), window_radius([(1, 0)]), window_radius([(40, 1)])
    (4, 3, 8)
    """
    size = 0
    for v in vectors:
        for c in v:
            size = max(size, abs(Fraction(c)))
    return max(lo, min(hi, int(size) + (Fraction(size).denominator != 1)))


def section_functional(rays, facets):
    """The plane ``<w, x> = level`` of the picture of a pointed 3-dimensional cone: when one
    functional takes the same value on every ray generator (a Q-Gorenstein cone), ``w`` is
    it, made primitive, and ``level`` that value, so the corners lie in the section and it is
    the polytope conv(rays); otherwise ``w`` is the primitive sum of the facet normals
    (positive on σ ∖ 0) and ``level`` 1.

    >>> c = cone_from_rays([(1, 0, 1), (0, 1, 1), (-1, 0, 1), (0, -1, 2)], 3)
    >>> section_functional(c.rays, c.facets)      # no common value: the sum of the normals
    ((0, 1, 2), 1)
    """
    ints = [integral(r) for r in rays]
    m = linalg.solve_rational(ints, [1] * len(ints), 3) if ints else None
    if m is not None:
        w = integral(m)
        return w, _dot(w, ints[0])
    return integral(vector_sum(facets, 3)), 1


def plane_cone_normals(gens):
    """Inner normals of a pointed plane cone spanned by ``gens`` (None if degenerate): those
    of its two extreme generators, which have all others on one side.

    >>> plane_cone_normals([(1, 0), (1, 1), (0, 1)])
    [(0, 1), (1, 0)]
    """
    best = None
    for a in gens:
        for b in gens:
            d = a[0] * b[1] - a[1] * b[0]
            if d > 0 and all(a[0] * g[1] - a[1] * g[0] >= 0 and g[0] * b[1] - g[1] * b[0] >= 0 for g in gens):
                best = (a, b)
    if best is None:
        return None
    a, b = best
    return [(-a[1], a[0]), (b[1], -b[0])]


def positive_functional(rays):
    """A rational w with <w, v> > 0 for every ray of a 3-dimensional fan (exact), or None
    when the rays lie in no open half-space.

    >>> positive_functional([(1, 0, 1), (0, 1, 1)])
    (Fraction(1, 1), Fraction(1, 1), Fraction(3, 1))
    >>> positive_functional([(1, 0, 0), (-1, 0, 0)]) is None
    True
    """
    c = cone_from_rays([integral(r) for r in rays], 3)
    if not c.pointed:
        return None
    if c.dim < 3:
        w = vector_sum(c.facets, 3) if c.facets else tuple(Fraction(x) for x in c.rays[0])
        # add a multiple of the rays' span direction so that w is positive on the rays
        w = tuple(a + b for a, b in zip(w, vector_sum(c.rays, 3)))
    else:
        w = vector_sum(c.facets, 3)
    if all(_dot(w, [Fraction(x) for x in r]) > 0 for r in rays):
        return w
    return None


def _rationals(v) -> tuple[Fraction, ...]:
    return tuple(Fraction(x) for x in v)


def mat_vec(v, rows):
    """v · rows (v a row vector)."""
    return tuple(sum(Fraction(a) * Fraction(r[j]) for a, r in zip(v, rows)) for j in range(len(rows[0])))


def inverse2(B):
    (a, b), (c, d) = [_rationals(r) for r in B]
    det = a * d - b * c
    return ((d / det, -b / det), (-c / det, a / det))


def lattice_points_in(radius: int, normals, equations, basis) -> list[tuple[tuple, tuple]]:
    """(lattice coordinates, user coordinates) of the points of Z^2 in ``[-radius, radius]^2``
    with ``<n, x> >= 0`` and ``<e, x> = 0`` (normals in dual lattice coordinates)."""
    out = []
    for a in range(-radius, radius + 1):
        for b in range(-radius, radius + 1):
            x = (a, b)
            if all(_dot(u, x) >= 0 for u in normals) and all(_dot(e, x) == 0 for e in equations):
                out.append((x, mat_vec(x, basis)))
    return out


def support_points(rays, cones, radius: int) -> list[tuple[int, int]]:
    """The points of Z^2 in ``[-radius, radius]^2`` that lie in some cone of a plane fan
    (cones as 0-based ray indices; exact, by the signs of determinants).

    >>> len(support_points([(1, 0), (0, 1)], [[0, 1]], 1)), support_points([(1, 1)], [[0]], 1)
    (4, [(0, 0), (1, 1)])
    """
    def det(a, b):
        return a[0] * b[1] - a[1] * b[0]

    gens = [[_rationals(rays[i]) for i in c] for c in cones]
    normals = [plane_cone_normals(g) if len(g) >= 2 else None for g in gens]
    out = []
    for x in range(-radius, radius + 1):
        for y in range(-radius, radius + 1):
            p = (x, y)
            for g, nm in zip(gens, normals):
                if len(g) == 1:
                    hit = det(g[0], p) == 0 and _dot(g[0], p) >= 0
                else:
                    hit = nm is not None and all(_dot(n, p) >= 0 for n in nm)
                if hit or p == (0, 0):
                    out.append(p)
                    break
    return out
