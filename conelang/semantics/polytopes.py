"""Evaluation of the polytope statements, ``cone … = over P``, ``fan … = normal P / over P`` and
the ``grading`` section of a cone, with their diagnostics.  Called by
:class:`conelang.semantics.analysis.Analysis`; the mathematics is in
:mod:`conelang.geometry.polytope`.

Coordinates: a polytope in ``N`` is stored in the lattice coordinates of N (like cones); the
product ``P * Q`` and the cone over P live in the direct sum of the lattices (``N × M``,
``N × Z``), whose lattice coordinates are those of the factors one after the other.

>>> from conelang.semantics.analysis import Analysis
>>> a = Analysis("polytope P in Z^2 { vertices (1,0) (0,1) (-1,-1) }\\npolytope Q = polar P")
>>> a.value("Q").polytope.vertices, [d.code for d in a.diagnostics()]
(((-1, -1), (-1, 2), (2, -1)), [])
"""
from __future__ import annotations

import dataclasses
from fractions import Fraction

from ..geometry import lattice as glat
from ..geometry import linalg
from ..geometry import polytope as gpoly
from ..syntax import ast as A
from . import values as V
from .diagnostics import Fix
from .forms import fmt_number, fmt_vec

PolytopeStatements = (A.PolytopeDef, A.PolytopeLet, A.FanOfPolytope)


def sum_space(spaces, key: str) -> V.Space:
    """The direct sum of lattices: its basis is the block diagonal of the factors' bases (in
    user coordinates), so its lattice coordinates are the factors' coordinates in turn.

    >>> s = sum_space([V.Space("Z^2", glat.standard(2)), V.Space("Z^1", glat.standard(1))], "Z^2 × Z")
    >>> s.rank, s.is_standard
    (3, True)
    """
    n = sum(s.rank for s in spaces)
    if all(s.is_standard for s in spaces):
        return V.Space(key, glat.standard(n))
    rows, at = [], 0
    for s in spaces:
        for b in s.coordinate_basis:
            rows.append(tuple([Fraction(0)] * at + list(b) + [Fraction(0)] * (n - at - s.rank)))
        at += s.rank
    return V.Space(key, glat.Lattice(n, tuple(rows)))


# ---- statements -------------------------------------------------------------------------
def evaluate(a, st):
    if isinstance(st, A.PolytopeDef):
        return polytope_def(a, st)
    if isinstance(st, A.PolytopeLet):
        return polytope_expr(a, st.expr)
    return fan_of_polytope(a, st)


def polytope_def(a, st: A.PolytopeDef) -> V.PolytopeValue:
    space = a.space(st.lattice)
    seen: dict[str, A.PolySection] = {}
    for sec in st.sections:
        kw = sec.keyword.text
        if kw in seen:
            a.fail(sec.keyword.span, "duplicate-section", f"'{kw}' is given twice in this polytope")
        seen[kw] = sec
    if len(seen) == 2:
        a.fail(seen["halfspaces"].keyword.span, "mixed-description",
                "a polytope is given either by vertices or by halfspaces, not both")
    if not seen:
        a.fail(st.name.span, "missing-description", f"polytope '{st.name.text}' needs 'vertices …' or 'halfspaces …'")
    if "vertices" in seen:
        return _by_vertices(a, st, space, seen["vertices"])
    return _by_halfspaces(a, st, space, seen["halfspaces"])


def _by_vertices(a, st, space: V.Space, sec: A.PolySection) -> V.PolytopeValue:
    if not sec.vectors:
        a.fail(sec.span, "empty-polytope", f"polytope '{st.name.text}' has no vertices: it is empty")
    pts = a.vectors(sec.vectors, space, "vertex", allow_zero=True)
    coords = [x for _, x in pts]
    P = a.engine.cached("polytope_from_points", gpoly.polytope_from_points, tuple(coords), space.rank)
    for i in gpoly.redundant_points(coords, P):
        node = pts[i][0]
        a.sink.warning(node.span, "redundant-vertex",
                       f"the point {fmt_vec(node.entries)} is not a vertex of polytope '{st.name.text}' "
                       "(it lies in the hull of the others, or repeats one)", unnecessary=True,
                       fixes=(Fix(f"remove the redundant point {fmt_vec(node.entries)}", node.span, ""),))
    return V.PolytopeValue(space, P)


def _by_halfspaces(a, st, space: V.Space, sec: A.PolySection) -> V.PolytopeValue:
    d = space.rank
    normals = a.vectors([h.normal for h in sec.halfspaces], space.dual(), "halfspace normal")
    rows = []
    for (_, u), h in zip(normals, sec.halfspaces):
        c = -h.bound.value                                   # <u, x> >= b  is  <u, x> + c >= 0
        den = c.denominator
        rows.append((tuple(den * x for x in u), int(c * den)))
    if not rows:
        a.fail(sec.span, "unbounded-polytope", "no halfspaces: they cut out the whole space, which is unbounded")
    res = a.engine.cached("polyhedron_from_halfspaces", gpoly.polyhedron_from_halfspaces, tuple(rows), d)
    if res.empty:
        a.fail(sec.keyword.span, "empty-polytope", f"the halfspaces of '{st.name.text}' have no common point: it is empty")
    if res.direction is not None:
        a.fail(sec.keyword.span, "unbounded-polytope",
                f"the halfspaces of '{st.name.text}' cut out an unbounded set: it contains every point "
                f"x + t·{fmt_vec(space.from_coords(res.direction))} (t >= 0) of its points x")
    for v in res.vertices:
        if any(x.denominator != 1 for x in v):
            user = space.from_coords(v) if space.is_standard else _rational_user(space, v)
            tight = [f"{fmt_vec(h.normal.entries)} >= {fmt_number(h.bound.value)}" for (u, c), h in zip(rows, sec.halfspaces)
                     if sum(Fraction(x) * y for x, y in zip(v, u)) + c == 0]
            a.fail(sec.keyword.span, "not-lattice-polytope",
                    f"the halfspaces of '{st.name.text}' cut out a polytope with the vertex {fmt_vec(user)}, "
                    f"which is not in {space.label} (where {' and '.join(tight)} meet): it is not a lattice polytope")
    for i in res.redundant:
        h = sec.halfspaces[i]
        src = f"{fmt_vec(h.normal.entries)} >= {fmt_number(h.bound.value)}"
        a.sink.warning(h.span, "redundant-inequality",
                       f"the halfspace {src} is redundant: it does not cut out a facet", unnecessary=True,
                       fixes=(Fix(f"remove the redundant halfspace {src}", h.span, ""),))
    P = gpoly.polytope_from_points([tuple(int(x) for x in v) for v in res.vertices], d)
    return V.PolytopeValue(space, P)



def _rational_user(space: V.Space, v) -> tuple:
    """User coordinates of a rational point given in lattice coordinates."""
    basis = space.coordinate_basis
    return tuple(sum(Fraction(v[i]) * basis[i][j] for i in range(space.rank)) for j in range(space.rank))


# ---- expressions ------------------------------------------------------------------------
def polytope_expr(a, expr) -> V.PolytopeValue:
    if isinstance(expr, A.PolytopeRef):
        return a.need(expr.name)
    if isinstance(expr, A.PolarPolytope):
        return _polar(a, expr)
    if isinstance(expr, A.PolytopeFace):
        inner = polytope_expr(a, expr.inner)
        (_, u), = a.vectors([expr.functional], inner.space.dual(), "functional", allow_zero=True)
        return V.PolytopeValue(inner.space, a.engine.cached("polytope_face", gpoly.face, inner.polytope, u))
    if isinstance(expr, A.Dilation):
        inner = polytope_expr(a, expr.inner)
        return V.PolytopeValue(inner.space, a.engine.cached("dilate", gpoly.dilate, inner.polytope, expr.factor))
    left, right = polytope_expr(a, expr.left), polytope_expr(a, expr.right)
    if expr.op == "product":
        space = sum_space([left.space, right.space], f"{left.space.label} × {right.space.label}")
        return V.PolytopeValue(space, a.engine.cached("polytope_product", gpoly.product, left.polytope, right.polytope))
    if left.space != right.space:
        what = "add" if expr.op == "sum" else "take the hull of"
        a.fail(expr.span, "lattice-mismatch",
                f"cannot {what} a polytope in {left.space.label} and one in {right.space.label}")
    fn = gpoly.minkowski_sum if expr.op == "sum" else gpoly.convex_hull
    return V.PolytopeValue(left.space, a.engine.cached("polytope_" + expr.op, fn, left.polytope, right.polytope))


def _origin_problem(value: V.PolytopeValue) -> str:
    """Why 0 is not an interior point of a polytope (assumes it is not)."""
    P, s = value.polytope, value.space
    if not P.full:
        return f"it has dimension {P.dim} in a lattice of rank {s.rank}, so it has no interior"
    u, c = next((u, c) for u, c in P.facets if c <= 0)
    where = "on" if c == 0 else "outside"
    return f"the origin lies {where} its facet <{fmt_vec(s.dual().from_coords(u))}, x> >= {fmt_number(-c)}"


def _polar(a, expr: A.PolarPolytope) -> V.PolytopeValue:
    inner = polytope_expr(a, expr.inner)
    P, space = inner.polytope, inner.space
    if not gpoly.origin_in_interior(P):
        a.fail(expr.span, "origin-not-interior",
                f"the polar needs the origin in the interior of the polytope, but {_origin_problem(inner)}")
    dual = space.dual()
    verts = gpoly.polar_vertices(P)
    for v in verts:
        if any(x.denominator != 1 for x in v):
            user = dual.from_coords(v) if dual.is_standard else _rational_user(dual, v)
            a.fail(expr.span, "polar-not-lattice",
                    f"the polar is not a lattice polytope: its vertex {fmt_vec(user)} is not in {dual.label}")
    pts = tuple(tuple(int(x) for x in v) for v in verts)
    return V.PolytopeValue(dual, a.engine.cached("polytope_from_points", gpoly.polytope_from_points, pts, space.rank))


def cone_over(a, expr: A.ConeOver) -> V.ConeValue:
    p = a.need(expr.polytope)
    space = sum_space([p.space, V.Space("Z^1", glat.standard(1))], f"{p.space.label} × Z")
    return V.ConeValue(space, p.polytope.cone)


def fan_of_polytope(a, st: A.FanOfPolytope) -> V.FanValue:
    p = a.need(st.polytope)
    if st.which == "normal":
        if not p.polytope.full:
            a.fail(st.polytope.span, "not-full-dimensional",
                    f"'{st.polytope.text}' has dimension {p.polytope.dim} in a lattice of rank {p.space.rank}: "
                    "its normal fan is not pointed")
        rays, cones = gpoly.normal_fan(p.polytope)
        return V.FanValue(p.space.dual(), rays, cones)
    if not gpoly.origin_in_interior(p.polytope):
        a.fail(st.polytope.span, "origin-not-interior",
                f"the face fan needs the origin in the interior of '{st.polytope.text}', but {_origin_problem(p)}")
    rays, cones = gpoly.face_fan(p.polytope)
    return V.FanValue(p.space, rays, cones)


# ---- the grading section of a cone ------------------------------------------------------
def with_grading(a, st: A.ConeDef, value: V.ConeValue) -> V.ConeValue:
    """Attach the ``grading (w)`` section (checked: one vector of the dual lattice, positive on
    every ray of a pointed cone) to a cone value."""
    secs = [s for s in st.sections if s.keyword.text == "grading"]
    if not secs:
        return value
    sec = secs[0]
    if len(secs) > 1:
        a.fail(secs[1].keyword.span, "duplicate-section", "'grading' is given twice in this cone")
    if len(sec.vectors) != 1:
        a.fail(sec.span, "bad-grading", f"a grading is one vector of {value.space.dual().label}, "
                                         f"{len(sec.vectors)} given")
    (node, w), = a.vectors(sec.vectors, value.space.dual(), "grading", allow_zero=True)
    c = value.cone
    if c.lineality:
        a.fail(node.span, "bad-grading", "a cone that contains a line has no grading positive on it")
    for r in c.rays:
        val = linalg.dot(w, r)
        if val <= 0:
            a.fail(node.span, "bad-grading",
                    f"a grading must be positive on every ray, but <{fmt_vec(node.entries)}, "
                    f"{fmt_vec(value.space.from_coords(r))}> = {val}")
    return dataclasses.replace(value, grading=w)
