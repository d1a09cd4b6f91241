"""Lattice polytopes in Z^d (lattice coordinates), exact, through the cone over them.

A :class:`Polytope` ``P`` is stored with its vertices and its *homogenization*, the cone
``C(P) = cone((v, 1) : v vertex)`` in ``Z^(d+1)``, built by the double description of
:mod:`conelang.geometry.cone`.  A facet of ``C(P)`` with primitive normal ``(u, c)`` is the
facet ``<u, x> >= -c`` of ``P`` (``u`` is then primitive: it takes the integer value ``-c``
on the lattice vertices of the facet); the equations of ``C(P)`` are those of the affine hull.

Counting is done without enumerating a box: the lattice points of ``C(P)`` of height ``n`` are
the points of ``n P``, and ``C(P)`` is split into *half-open* simplicial cones (Köppe and
Verdoolaege, "Computing parametric rational generating functions with a primal Barvinok
algorithm", Electron. J. Combin. 15 (2008), Theorem 3: for a point ``q`` in general position,
drop from each simplicial cone of a triangulation the facets whose hyperplane separates it
from ``q``; the half-open cones partition ``C(P)``).  Each half-open simplicial cone is the
disjoint union of the translates of its half-open fundamental parallelepiped by the monoid of
its generators, so the parallelepiped points counted by height are the h*-vector (Stanley,
"Decompositions of rational convex polytopes", Ann. Discrete Math. 6 (1980)); the Ehrhart
polynomial is ``L(n) = Σ_j h*_j C(n + e - j, e)`` for ``P`` of dimension ``e``.  The same
decomposition with a grading ``w`` gives the Hilbert series of any pointed cone monoid.

>>> P = polytope_from_points([(1, 0), (0, 1), (-1, -1)], 2)
>>> P.vertices, P.facets
(((-1, -1), (0, 1), (1, 0)), (((-1, -1), 1), ((-1, 2), 1), ((2, -1), 1)))
>>> h_star(P), ehrhart(P), is_reflexive(P)
((1, 1, 1), (Fraction(1, 1), Fraction(3, 2), Fraction(3, 2)), True)
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from itertools import product as _cartesian
from math import comb, factorial, lcm
from typing import Iterable, Sequence

from . import cone as gcone
from . import linalg
from .budget import Budget, ensure
from .cone import Cone
from .linalg import Vec, dot, primitive
from .monoid import parallelepiped_points, pointed_model, triangulate

QVec = tuple[Fraction, ...]

__all__ = [
    "Polytope", "polytope_from_points", "redundant_points", "Polyhedron", "polyhedron_from_halfspaces",
    "origin_in_interior", "polar_vertices", "dilate", "face", "minkowski_sum", "product",
    "convex_hull", "half_open_triangulation", "half_open_parallelepiped", "HilbertSeries",
    "hilbert_series", "h_star", "ehrhart", "lattice_points", "interior_points", "normalized_volume",
    "f_vector", "is_reflexive", "gorenstein_index", "normal_fan", "face_fan",
    "lattice_points_bruteforce", "contains", "in_interior", "default_grading",
]


@dataclass(frozen=True)
class Polytope:
    """A lattice polytope: sorted vertices and the cone over it (see the module docstring).

    >>> P = polytope_from_points([(0, 0), (2, 0), (0, 2), (1, 1)], 2)
    >>> P.vertices, P.dim, P.full
    (((0, 0), (0, 2), (2, 0)), 2, True)
    """

    ambient_dim: int
    vertices: tuple[Vec, ...]
    cone: Cone

    @property
    def dim(self) -> int:
        return self.cone.dim - 1

    @property
    def full(self) -> bool:
        return self.cone.full

    @property
    def facets(self) -> tuple[tuple[Vec, int], ...]:
        """Pairs ``(u, c)``: the facet ``<u, x> >= -c`` (``u`` primitive, in the span); a point
        has none (the facet of the ray over it is the empty face).

        >>> polytope_from_points([(2, 3)], 2).facets
        ()
        """
        d = self.ambient_dim
        if self.dim == 0:
            return ()
        return tuple((f[:d], f[d]) for f in self.cone.facets)

    @property
    def equations(self) -> tuple[tuple[Vec, int], ...]:
        """Pairs ``(e, c)``: the affine hull is ``<e, x> + c = 0`` for all of them."""
        d = self.ambient_dim
        return tuple((f[:d], f[d]) for f in self.cone.equations)


def _lift(v: Sequence[int]) -> Vec:
    return tuple(v) + (1,)


def polytope_from_points(points: Iterable[Sequence[int]], d: int, budget: Budget | None = None) -> Polytope:
    """The convex hull of integer points (at least one).

    >>> polytope_from_points([(0,), (3,), (1,)], 1).vertices
    ((0,), (3,))
    """
    pts = [tuple(int(x) for x in p) for p in points]
    if not pts:
        raise ValueError("the convex hull of no points is empty")
    c = gcone.cone_from_rays([_lift(p) for p in pts], d + 1, budget=budget)
    return Polytope(d, tuple(sorted(r[:d] for r in c.rays)), c)


def redundant_points(points: Sequence[Sequence[int]], P: Polytope) -> list[int]:
    """Indices of the given points that are not vertices of their hull, or repeat one.

    >>> pts = [(0, 0), (2, 0), (1, 0), (0, 2), (0, 0)]
    >>> redundant_points(pts, polytope_from_points(pts, 2))
    [2, 4]
    """
    return gcone.redundant_generators([_lift(p) for p in points], P.ambient_dim + 1, cone=P.cone)


@dataclass(frozen=True)
class Polyhedron:
    """What a list of halfspaces cuts out: ``vertices`` (rational), or why it is no polytope
    (``empty``; ``direction``: a recession direction when unbounded), and the redundant rows."""
    vertices: tuple[QVec, ...]
    empty: bool
    direction: Vec | None
    redundant: tuple[int, ...]


def polyhedron_from_halfspaces(rows: Sequence[tuple[Sequence[int], int]], d: int,
                               budget: Budget | None = None) -> Polyhedron:
    """The set ``{x : <u, x> >= -c}`` for the pairs ``(u, c)`` (integers).

    >>> polyhedron_from_halfspaces([((1, 0), 0), ((0, 1), 0), ((-1, -1), 1)], 2).vertices
    ((Fraction(0, 1), Fraction(0, 1)), (Fraction(0, 1), Fraction(1, 1)), (Fraction(1, 1), Fraction(0, 1)))
    >>> polyhedron_from_halfspaces([((1, 0), 0), ((0, 1), 0)], 2).direction
    (0, 1)
    >>> polyhedron_from_halfspaces([((1,), -2), ((-1,), 1)], 1).empty
    True
    """
    hom = [tuple(u) + (c,) for u, c in rows] + [(0,) * d + (1,)]
    c = gcone.cone_from_inequalities(hom, [], d + 1, budget=budget)
    redundant = tuple(i for i in gcone.redundant_inequalities(hom, [], d + 1, cone=c) if i < len(rows))
    if all(r[d] == 0 for r in c.rays):
        return Polyhedron((), True, None, redundant)
    if c.lineality:
        return Polyhedron((), False, c.lineality[0][:d], redundant)
    rec = [r[:d] for r in c.rays if r[d] == 0]
    if rec:
        return Polyhedron((), False, rec[0], redundant)
    verts = sorted(tuple(Fraction(x, r[d]) for x in r[:d]) for r in c.rays)
    return Polyhedron(tuple(verts), False, None, redundant)


def contains(P: Polytope, x: Sequence) -> bool:
    """Membership of a point (ints or Fractions).

    >>> contains(polytope_from_points([(0, 0), (2, 0), (0, 2)], 2), (1, 1))
    True
    """
    return gcone.contains(P.cone, tuple(x) + (1,))


def in_interior(P: Polytope, x: Sequence) -> bool:
    """Membership in the relative interior.

    >>> T = polytope_from_points([(0, 0), (3, 0), (0, 3)], 2)
    >>> in_interior(T, (1, 1)), in_interior(T, (1, 0))
    (True, False)
    """
    y = tuple(x) + (1,)
    return all(dot(e, y) == 0 for e in P.cone.equations) and all(dot(u, y) > 0 for u in P.cone.facets)


# ---------------------------------------------------------------------------------------------
# derived polytopes


def origin_in_interior(P: Polytope) -> bool:
    """True iff 0 is an interior point (P full-dimensional).

    >>> origin_in_interior(polytope_from_points([(1, 0), (0, 1), (-1, -1)], 2))
    True
    """
    return P.full and all(c > 0 for _, c in P.facets)


def polar_vertices(P: Polytope) -> tuple[QVec, ...]:
    """The vertices ``u / c`` of the polar ``{y : <y, x> >= -1 on P}`` (0 must be interior).

    >>> polar_vertices(polytope_from_points([(1, 0), (0, 1), (-1, -1)], 2))
    ((Fraction(-1, 1), Fraction(-1, 1)), (Fraction(-1, 1), Fraction(2, 1)), (Fraction(2, 1), Fraction(-1, 1)))
    """
    if not origin_in_interior(P):
        raise ValueError("the polar needs the origin in the interior")
    return tuple(sorted(tuple(Fraction(x, c) for x in u) for u, c in P.facets))


def dilate(P: Polytope, k: int, budget: Budget | None = None) -> Polytope:
    """``k P`` for an integer ``k >= 0``.

    >>> dilate(polytope_from_points([(0,), (1,)], 1), 3).vertices
    ((0,), (3,))
    """
    return polytope_from_points([tuple(k * x for x in v) for v in P.vertices], P.ambient_dim, budget)


def face(P: Polytope, u: Sequence[int], budget: Budget | None = None) -> Polytope:
    """The face where the functional ``u`` takes its minimum on P.

    >>> face(polytope_from_points([(0, 0), (1, 0), (0, 1)], 2), (0, 1)).vertices
    ((0, 0), (1, 0))
    """
    low = min(dot(u, v) for v in P.vertices)
    return polytope_from_points([v for v in P.vertices if dot(u, v) == low], P.ambient_dim, budget)


def minkowski_sum(P: Polytope, Q: Polytope, budget: Budget | None = None) -> Polytope:
    """``P + Q = {p + q}``, the hull of the sums of vertices.

    >>> I = polytope_from_points([(0, 0), (1, 0)], 2); J = polytope_from_points([(0, 0), (0, 1)], 2)
    >>> minkowski_sum(I, J).vertices
    ((0, 0), (0, 1), (1, 0), (1, 1))
    """
    ensure(budget).tick(len(P.vertices) * len(Q.vertices), "Minkowski sum")
    pts = {tuple(a + b for a, b in zip(v, w)) for v in P.vertices for w in Q.vertices}
    return polytope_from_points(sorted(pts), P.ambient_dim, budget)


def product(P: Polytope, Q: Polytope, budget: Budget | None = None) -> Polytope:
    """``P × Q`` in ``Z^(d + e)``.

    >>> I = polytope_from_points([(0,), (1,)], 1)
    >>> product(I, I).vertices
    ((0, 0), (0, 1), (1, 0), (1, 1))
    """
    ensure(budget).tick(len(P.vertices) * len(Q.vertices), "product of polytopes")
    pts = [v + w for v in P.vertices for w in Q.vertices]
    return polytope_from_points(pts, P.ambient_dim + Q.ambient_dim, budget)


def convex_hull(P: Polytope, Q: Polytope, budget: Budget | None = None) -> Polytope:
    """The convex hull of ``P ∪ Q``.

    >>> convex_hull(polytope_from_points([(0,)], 1), polytope_from_points([(4,)], 1)).vertices
    ((0,), (4,))
    """
    return polytope_from_points(P.vertices + Q.vertices, P.ambient_dim, budget)


# ---------------------------------------------------------------------------------------------
# half-open decomposition


def _lex_sign(a: Sequence[int], q0: Sequence[int]) -> int:
    """Sign of ``<a, q0 + ε e_1 + ε² e_2 + …>`` for infinitesimal ε (a ≠ 0): the point in general
    position of Köppe–Verdoolaege, without choosing numbers."""
    s = dot(a, q0)
    if s == 0:
        s = next(x for x in a if x)
    return 1 if s > 0 else -1


def _opposite_normals(gens: Sequence[Vec]) -> tuple[Vec, ...]:
    """For linearly independent ``g_1..g_k`` spanning Q^k: primitive ``a_i`` with ``<a_i, g_j> = 0``
    for j ≠ i and ``<a_i, g_i> > 0`` (the inner normal of the facet opposite ``g_i``)."""
    inv = linalg.inverse_rational(gens)          # gens · inv = I: column i is dual to g_i
    k = len(gens)
    out = []
    for i in range(k):
        col = [inv[r][i] for r in range(k)]
        den = lcm(*(x.denominator for x in col))
        out.append(primitive(tuple(int(x * den) for x in col)))
    return tuple(out)


def half_open_triangulation(c: Cone, budget: Budget | None = None
                            ) -> tuple[tuple[tuple[Vec, ...], tuple[bool, ...]], ...]:
    """A pointed full-dimensional cone as a disjoint union of half-open simplicial cones:
    pairs ``(generators, excluded)``, ``excluded[i]`` meaning the facet opposite ``g_i`` is left
    out.  Boundary facets of ``c`` are never left out.

    >>> sq = gcone.cone_from_rays([(0, 0, 1), (1, 0, 1), (0, 1, 1), (1, 1, 1)], 3)
    >>> [ex for _, ex in half_open_triangulation(sq)]
    [(False, True, False), (False, False, False)]
    """
    if not (c.pointed and c.full):
        raise ValueError("a half-open triangulation needs a pointed full-dimensional cone")
    k = c.ambient_dim
    q0 = tuple(sum(r[j] for r in c.rays) for j in range(k))
    out = []
    for simplex in triangulate(c, budget):
        gens = tuple(c.rays[i] for i in simplex)
        normals = _opposite_normals(gens)
        out.append((gens, tuple(_lex_sign(a, q0) < 0 for a in normals)))
    return tuple(out)


def half_open_parallelepiped(gens: Sequence[Vec], excluded: Sequence[bool],
                             budget: Budget | None = None) -> tuple[Vec, ...]:
    """The lattice points ``Σ λ_i g_i`` with ``0 <= λ_i < 1``, except ``0 < λ_i <= 1`` where
    ``excluded[i]``: one point for each class of ``Z^k`` modulo the generators.

    >>> sorted(half_open_parallelepiped([(1, 0), (1, 2)], [False, True]))
    [(1, 1), (1, 2)]
    """
    k = len(gens)
    volume = abs(linalg.det(gens))
    # refuse up front: the enumeration would hold |det| points
    ensure(budget).check(volume * 2 * k * k, "lattice point count", f"a simplex of normalized volume {volume}")
    normals = _opposite_normals(gens)
    drop = [i for i, e in enumerate(excluded) if e]
    out = []
    for x in parallelepiped_points(gens, budget, "lattice point count"):
        y = list(x)
        for i in drop:
            if dot(normals[i], x) == 0:
                y = [a + b for a, b in zip(y, gens[i])]
        out.append(tuple(y))
    return tuple(out)


def _pieces(c: Cone, budget: Budget | None):
    """The half-open simplicial pieces of a pointed cone, in the coordinates of its pointed
    full-dimensional model: ``(model, generators, excluded, parallelepiped points)``."""
    model = pointed_model(c)
    if model.cone.ambient_dim == 0:
        yield model, (), (), ((),)
        return
    for gens, ex in half_open_triangulation(model.cone, budget):
        yield model, gens, ex, half_open_parallelepiped(gens, ex, budget)


# ---------------------------------------------------------------------------------------------
# polynomials (coefficient tuples, constant term first)


def _poly_mul(a: Sequence, b: Sequence) -> list:
    out = [0] * (len(a) + len(b) - 1)
    for i, x in enumerate(a):
        if x:
            for j, y in enumerate(b):
                out[i + j] += x * y
    return out


def _poly_divide_exact(a: Sequence[int], b: Sequence[int]) -> list[int] | None:
    """``a / b`` for ``b`` with leading coefficient 1 when the division is exact, else None."""
    a = list(a)
    if len(a) < len(b):
        return None if any(a) else [0]
    q = [0] * (len(a) - len(b) + 1)
    for i in range(len(q) - 1, -1, -1):
        coef = a[i + len(b) - 1]
        q[i] = coef
        if coef:
            for j, y in enumerate(b):
                a[i + j] -= coef * y
    return q if not any(a) else None


def _trim(p: Sequence) -> tuple:
    p = list(p)
    while len(p) > 1 and p[-1] == 0:
        p.pop()
    return tuple(p)


def _geometric(step: int, top: int) -> list[int]:
    """``1 + t^step + … + t^(top - step)`` = ``(1 - t^top) / (1 - t^step)``."""
    out = [0] * (top - step + 1)
    for i in range(0, top, step):
        out[i] = 1
    return out


def _interpolate(xs: Sequence[int], ys: Sequence[int]) -> tuple[Fraction, ...]:
    """The polynomial of degree < len(xs) through the points (Lagrange), exact."""
    total = [Fraction(0)] * len(xs)
    for i, (xi, yi) in enumerate(zip(xs, ys)):
        basis, den = [Fraction(1)], 1
        for j, xj in enumerate(xs):
            if j != i:
                basis = _poly_mul(basis, [Fraction(-xj), Fraction(1)])
                den *= xi - xj
        for k, b in enumerate(basis):
            total[k] += b * yi / den
    return _trim(total)


# ---------------------------------------------------------------------------------------------
# Hilbert series of cone monoids


@dataclass(frozen=True)
class HilbertSeries:
    """``Σ_n #{x ∈ C ∩ Z^d : <w, x> = n} t^n = numerator(t) / Π_i (1 - t^{denominator[i]})``.

    ``quasi_polynomial`` lists, for each residue r modulo ``period``, the polynomial (constant
    term first) that counts the points of degree n ≡ r for every n >= ``valid_from``;
    ``multiplicity`` = numerator(1) / Π denominator: (dim - 1)! times the leading coefficient,
    the normalized volume of the slice ``C ∩ {w = 1}``.
    """
    grading: Vec
    numerator: tuple[int, ...]
    denominator: tuple[int, ...]
    quasi_polynomial: tuple[tuple[Fraction, ...], ...]
    period: int
    valid_from: int
    multiplicity: Fraction

    def coefficients(self, n: int) -> tuple[int, ...]:
        """The number of points of degree 0, 1, …, n from the series.

        >>> hilbert_series(gcone.cone_from_rays([(1, 0), (0, 1)], 2), (1, 1)).coefficients(3)
        (1, 2, 3, 4)
        """
        s = [self.numerator[i] if i < len(self.numerator) else 0 for i in range(n + 1)]
        for e in self.denominator:
            for i in range(e, n + 1):
                s[i] += s[i - e]
        return tuple(s)


def _series_numerator(c: Cone, w: Sequence[int], budget: Budget | None) -> tuple[list[int], list[int]]:
    """The numerator over ``(1 - t^L)^k`` (L the lcm of the generator degrees) and ``[L]*k``."""
    parts, top = [], 1
    for model, gens, ex, pts in _pieces(c, budget):
        wm = tuple(dot(w, s) for s in model.section)
        degs = [dot(wm, g) for g in gens]
        if any(e <= 0 for e in degs):
            raise ValueError("the grading must be positive on every ray")
        hist = [0] * (max((dot(wm, p) for p in pts), default=0) + 1)
        for p in pts:
            hist[dot(wm, p)] += 1
        parts.append((hist, degs))
        for e in degs:
            top = lcm(top, e)
    k = len(parts[0][1])
    ensure(budget).check(top * top * k + top * k * len(parts), "Hilbert series",
                         f"the ray degrees have least common multiple {top}")
    num = [0]
    for hist, degs in parts:
        term = hist
        for e in degs:
            term = _poly_mul(term, _geometric(e, top))
        num = [(num[i] if i < len(num) else 0) + (term[i] if i < len(term) else 0)
               for i in range(max(len(num), len(term)))]
    return num, [top] * k


def _reduce(num: list[int], den: list[int]) -> tuple[list[int], list[int]]:
    """Replace factors ``1 - t^L`` by ``1 - t^e`` (e | L, smallest first) while the numerator
    is divisible by ``(1 - t^L) / (1 - t^e)``."""
    den = list(den)
    for i, top in enumerate(den):
        for e in range(1, top):
            if top % e:
                continue
            q = _poly_divide_exact(num, _geometric(e, top))
            if q is not None:
                num, den[i] = q, e
                break
    return list(_trim(num)), sorted(den)


def hilbert_series(c: Cone, w: Sequence[int], budget: Budget | None = None) -> HilbertSeries:
    """The Hilbert series of the monoid ``c ∩ Z^d`` graded by ``w`` (positive on the rays).

    The cone over the segment [0, 2] (the monoid of the quadratic Veronese in two variables):

    >>> H = hilbert_series(gcone.cone_from_rays([(0, 1), (2, 1)], 2), (0, 1))
    >>> H.numerator, H.denominator, H.quasi_polynomial, H.multiplicity
    ((1, 1), (1, 1), ((Fraction(1, 1), Fraction(2, 1)),), Fraction(2, 1))

    The same monoid graded by (1, 1): the rays have degrees 1 and 3, the count is a
    quasi-polynomial of period 3:

    >>> H = hilbert_series(gcone.cone_from_rays([(0, 1), (2, 1)], 2), (1, 1))
    >>> H.coefficients(6), H.period
    ((1, 1, 2, 3, 3, 4, 5), 3)
    """
    if not c.pointed:
        raise ValueError("a cone with lineality has no Hilbert series")
    w = tuple(w)
    if any(dot(w, r) <= 0 for r in c.rays):
        raise ValueError("the grading must be positive on every ray")
    num, den = _reduce(*_series_numerator(c, w, budget))
    k = len(den)
    period = 1
    for e in den:
        period = lcm(period, e)
    start = max(0, len(num) - 1 - sum(den) + 1)
    start += (-start) % period
    counts = HilbertSeries(w, tuple(num), tuple(den), (), period, start, Fraction(0)).coefficients(
        start + period * max(k, 1))
    quasi = []
    for r in range(period):
        xs = [start + r + period * m for m in range(max(k, 1))]
        quasi.append(_interpolate(xs, [counts[x] for x in xs]))
    mult = Fraction(sum(num))
    for e in den:
        mult /= e
    return HilbertSeries(w, tuple(num), tuple(den), tuple(quasi), period, start, mult)


def default_grading(c: Cone, hilbert_basis: Sequence[Vec] | None = None) -> Vec:
    """The grading used when none is given: the integral ``w`` with ``w = 1`` on every Hilbert
    basis element when there is one (the monoid is generated in degree one), otherwise the
    sum of the primitive facet normals divided by its content (positive on every nonzero point).

    >>> default_grading(gcone.cone_from_rays([(0, 1), (2, 1)], 2), [(0, 1), (1, 1), (2, 1)])
    (0, 1)
    >>> default_grading(gcone.cone_from_rays([(1, 0), (1, 3)], 2), [(1, 0), (1, 1), (1, 2), (1, 3)])
    (1, 0)
    >>> default_grading(gcone.cone_from_rays([(1, 0), (1, 2)], 2), [(1, 0), (1, 1), (1, 2)])
    (1, 0)
    >>> default_grading(gcone.cone_from_rays([(2, -1), (0, 1)], 2), [(0, 1), (1, 0), (2, -1)])
    (1, 1)
    """
    from .monoid import grading
    if hilbert_basis:
        w = linalg.solve_integer(list(hilbert_basis), [1] * len(hilbert_basis), c.ambient_dim)
        if w is not None and all(dot(w, r) > 0 for r in c.rays):
            return tuple(w)
    return primitive(grading(c))


# ---------------------------------------------------------------------------------------------
# counting lattice points of polytopes

LIST_LIMIT = 2000      # lattice points listed at most (the count is always exact)


@dataclass(frozen=True)
class LatticeData:
    """One pass over the half-open parallelepipeds of the cone over P: the h*-vector (trailing
    zeros dropped) and the lattice points of P (None when there are more than the limit)."""
    h_star: tuple[int, ...]
    points: tuple[Vec, ...] | None


def lattice_data(P: Polytope, limit: int = LIST_LIMIT, budget: Budget | None = None) -> LatticeData:
    """h* and the lattice points of P, from a half-open triangulation of the cone over P (no
    box is enumerated).  Every lattice point lies in exactly one half-open piece: at height 1
    it is a parallelepiped point of height 1, or a generator of a piece that leaves out no facet.

    >>> D = lattice_data(polytope_from_points([(0, 0), (2, 0), (0, 2)], 2))
    >>> D.h_star, D.points
    ((1, 3), ((0, 0), (0, 1), (0, 2), (1, 0), (1, 1), (2, 0)))
    """
    d = P.ambient_dim
    hist = [0] * (P.dim + 1)
    pts: list[Vec] | None = []
    for model, gens, ex, par in _pieces(P.cone, budget):
        height = tuple(s[d] for s in model.section)
        found = [p for p in par if dot(height, p) == 1]
        for p in par:
            hist[dot(height, p)] += 1
        if not any(ex):
            found.extend(gens)
        if pts is not None:
            pts.extend(model.lift(p)[:d] for p in found)
            if len(pts) > limit:
                pts = None
    return LatticeData(_trim(hist), tuple(sorted(pts)) if pts is not None else None)


def h_star(P: Polytope, budget: Budget | None = None) -> tuple[int, ...]:
    """The h*-vector (δ-vector): ``Σ_n L(n) t^n = h*(t) / (1 - t)^(dim + 1)``.

    A tetrahedron of volume 5 with no lattice points but its vertices (Reeve's kind):

    >>> h_star(polytope_from_points([(0, 0, 0), (1, 0, 0), (0, 1, 0), (1, 1, 5)], 3))
    (1, 0, 4)
    """
    return lattice_data(P, 0, budget).h_star


def ehrhart_from_h_star(h: Sequence[int], e: int) -> tuple[Fraction, ...]:
    """``L(n) = Σ_j h*_j C(n + e - j, e)`` as coefficients in n (constant term first).

    >>> ehrhart_from_h_star((1, 1), 2)
    (Fraction(1, 1), Fraction(2, 1), Fraction(1, 1))
    """
    total = [Fraction(0)] * (e + 1)
    for j, hj in enumerate(h):
        if not hj:
            continue
        term = [Fraction(hj, factorial(e))]
        for m in range(e):                         # C(n + e - j, e) = Π_{m<e} (n + e - j - m) / e!
            term = _poly_mul(term, [Fraction(e - j - m), Fraction(1)])
        for i, x in enumerate(term):
            total[i] += x
    return tuple(total)


def ehrhart(P: Polytope, budget: Budget | None = None) -> tuple[Fraction, ...]:
    """The Ehrhart polynomial ``L(n) = #(nP ∩ Z^d)``, constant term first.

    >>> ehrhart(polytope_from_points([(0, 0), (1, 0), (0, 1), (1, 1)], 2))
    (Fraction(1, 1), Fraction(2, 1), Fraction(1, 1))
    """
    return ehrhart_from_h_star(h_star(P, budget), P.dim)


def evaluate(poly: Sequence[Fraction], n: int) -> Fraction:
    """The value of a polynomial (constant term first) at n.

    >>> evaluate((Fraction(1), Fraction(2), Fraction(1)), -2)
    Fraction(1, 1)
    """
    out = Fraction(0)
    for c in reversed(poly):
        out = out * n + c
    return out


def lattice_points(P: Polytope, budget: Budget | None = None) -> int:
    """The number of lattice points, ``L(1) = (dim + 1) h*_0 + h*_1``.

    >>> lattice_points(polytope_from_points([(0, 0), (4, 0), (0, 4)], 2))
    15
    """
    h = h_star(P, budget)
    return (P.dim + 1) * h[0] + (h[1] if len(h) > 1 else 0)


def interior_points(P: Polytope, budget: Budget | None = None) -> int:
    """The number of lattice points in the relative interior: ``h*_dim`` (Ehrhart–Macdonald
    reciprocity: it is ``(-1)^dim L(-1)``).

    >>> interior_points(polytope_from_points([(0, 0), (4, 0), (0, 4)], 2))
    3
    """
    h = h_star(P, budget)
    return h[P.dim] if len(h) > P.dim else 0


def normalized_volume(P: Polytope, budget: Budget | None = None) -> int:
    """``dim! · vol(P)`` in the lattice of the affine hull, ``= h*(1)``: the sum of the
    determinants of a triangulation of the cone over P (no point is enumerated).

    >>> normalized_volume(polytope_from_points([(0, 0), (2, 0), (0, 1)], 2))
    2
    >>> normalized_volume(dilate(polytope_from_points([(0, 0), (1, 0), (0, 1)], 2), 10**9))
    1000000000000000000
    """
    model = pointed_model(P.cone)
    if model.cone.ambient_dim <= 1:
        return 1
    return sum(abs(linalg.det([model.cone.rays[i] for i in simplex]))
               for simplex in triangulate(model.cone, budget))


def lattice_points_bruteforce(P: Polytope) -> tuple[Vec, ...]:
    """The lattice points of P by testing every point of the bounding box (the baseline).

    >>> lattice_points_bruteforce(polytope_from_points([(0, 0), (2, 1)], 2))
    ((0, 0), (2, 1))
    """
    d = P.ambient_dim
    ranges = [range(min(v[i] for v in P.vertices), max(v[i] for v in P.vertices) + 1) for i in range(d)]
    return tuple(x for x in _cartesian(*ranges) if contains(P, x))


# ---------------------------------------------------------------------------------------------
# combinatorics and invariants


def f_vector(P: Polytope, budget: Budget | None = None) -> tuple[int, ...]:
    """``(f_0, …, f_{dim-1})``: the numbers of faces of each dimension below dim P.

    >>> f_vector(polytope_from_points([(0, 0, 0), (1, 0, 0), (0, 1, 0), (0, 0, 1)], 3))
    (4, 6, 4)
    """
    counts = [0] * P.dim
    for f in gcone.faces(P.cone, budget):
        if 1 <= f.dim <= P.dim:
            counts[f.dim - 1] += 1
    return tuple(counts)


def is_reflexive(P: Polytope) -> bool:
    """Full-dimensional with every facet ``<u, x> >= -1`` (u primitive): 0 is the only interior
    point and the polar is a lattice polytope (Batyrev).

    >>> is_reflexive(polytope_from_points([(1, 0), (0, 1), (-1, 0), (0, -1)], 2))
    True
    >>> is_reflexive(polytope_from_points([(2, 0), (0, 2), (-2, 0), (0, -2)], 2))
    False
    """
    return P.full and all(c == 1 for _, c in P.facets)


def gorenstein_index(P: Polytope) -> int | None:
    """The least r such that ``r P`` is reflexive up to a lattice translation: the height r of
    the integer point ``(m, r)`` taking the value 1 on every facet of the cone over P (the
    Gorenstein point of a Gorenstein cone); None when there is none (P not Gorenstein).

    >>> gorenstein_index(polytope_from_points([(0, 0), (1, 0), (0, 1)], 2))
    3
    >>> gorenstein_index(polytope_from_points([(0, 0), (2, 0), (0, 1)], 2))
    2
    >>> gorenstein_index(polytope_from_points([(0, 0), (3, 0), (0, 1)], 2)) is None
    True
    """
    rows = list(P.cone.facets) + list(P.cone.equations)
    rhs = [1] * len(P.cone.facets) + [0] * len(P.cone.equations)
    x = linalg.solve_integer(rows, rhs, P.ambient_dim + 1)
    return None if x is None else x[P.ambient_dim]


def normal_fan(P: Polytope) -> tuple[tuple[Vec, ...], tuple[tuple[int, ...], ...]]:
    """The inner normal fan (in the dual lattice) of a full-dimensional P: rays the facet
    normals, one maximal cone per vertex (the normals of the facets containing it).

    >>> normal_fan(polytope_from_points([(0, 0), (1, 0), (0, 1)], 2))
    (((-1, -1), (0, 1), (1, 0)), ((1, 2), (0, 2), (0, 1)))
    """
    if not P.full:
        raise ValueError("the normal fan needs a full-dimensional polytope")
    rays = tuple(u for u, _ in P.facets)
    cones = tuple(tuple(i for i, (u, c) in enumerate(P.facets) if dot(u, v) + c == 0) for v in P.vertices)
    return rays, cones


def face_fan(P: Polytope) -> tuple[tuple[Vec, ...], tuple[tuple[int, ...], ...]]:
    """The face fan (the cones over the facets) of P with 0 in its interior: rays through the
    vertices (primitive), one maximal cone per facet.

    >>> face_fan(polytope_from_points([(2, 0), (0, 1), (-1, -1)], 2))
    (((-1, -1), (0, 1), (1, 0)), ((1, 2), (0, 2), (0, 1)))
    """
    if not origin_in_interior(P):
        raise ValueError("the face fan needs the origin in the interior")
    order = sorted(range(len(P.vertices)), key=lambda i: primitive(P.vertices[i]))
    rays = tuple(primitive(P.vertices[i]) for i in order)
    cones = tuple(tuple(j for j, i in enumerate(order) if dot(u, P.vertices[i]) + c == 0) for u, c in P.facets)
    return rays, cones
