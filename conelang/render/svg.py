"""Pictures of cones and fans: ``conelang show FILE --format svg``.

:func:`render` turns the facts document (see :mod:`conelang.semantics.facts`) into one SVG
document.  Each drawable object gets a row of panels; rows are stacked:

* a cone in a lattice of rank 2: the cone (shaded, clipped to the window ``[-R, R]^2`` of
  user coordinates), its rays, its lattice points in the window and its Hilbert basis
  (ringed); a second panel shows the dual cone with its lattice points and the Hilbert basis
  of the dual monoid (the coordinates z_i of U_σ).  A cone of an overlattice whose lattice is
  in the document (with its ``basis``) is drawn in the lattice's own coordinates instead, so
  its points are the integer grid (``data-point`` keeps the user coordinates);
* a cone in a lattice of rank 3: the cross-section ``σ ∩ {<w, x> = 1}`` for ``w`` = the sum
  of the inner facet normals (an interior vector of the dual, positive on σ ∖ 0), projected
  exactly to an orthogonal rational basis of ``w^⊥``, with the rays as vertices and the
  Hilbert basis elements ``h`` drawn at ``h / <w, h>``; the dual cone likewise;
* a morphism into a plane cone: the target cone with the image of the source cone over it;
* a fan in rank 2: its cones (alternately shaded), rays numbered as in the file, and the
  lattice points of its support in the window (for a lattice Z^2); a fan in
  rank 3 whose rays lie in an open half-space (e.g. a resolution of a cone): the
  cross-section of all its cones.

The geometry is computed exactly (Fractions); only the final SVG coordinates are decimals.
Lattice points and Hilbert basis elements carry their exact user coordinates in a
``data-point`` attribute (``"1,-2"``, ``"1/3,2/3"``), so the picture can be checked.

>>> doc = {"file": "x.cone", "diagnostics": [], "objects": {"c": {
...     "kind": "cone", "lattice": "N", "ambient_dim": 2, "dim": 2, "pointed": True,
...     "rays": [[0, 1], [2, -1]], "lineality": [], "facets": [[1, 0], [1, 2]],
...     "linear_equations": [], "hilbert_basis": [[2, -1], [1, 0], [0, 1]],
...     "lattice_window": 3, "lattice_points": [[0, 0], [0, 1], [1, 0]],
...     "dual_lattice_points": [[0, 0], [1, 0]]}}}
>>> out = render(doc)
>>> out.startswith("<svg"), out.count('class="lattice-point"')   # 3 in σ, 2 in σ^∨
(True, 5)
"""
from __future__ import annotations

from fractions import Fraction
from math import sqrt
from xml.sax.saxutils import escape

from ..semantics.forms import fmt_number, fmt_vec
from ..semantics.pictures import (inverse2, lattice_points_in, mat_vec, plane_cone_normals, positive_functional,
                                  section_functional, support_points, window_radius)

PANEL = 300          # drawing area of a panel (square), in SVG units
TITLE = 34           # room for the title above a panel
GAP = 16
MARGIN = 18

FILLS = ("#cfe0f5", "#f6d8b8", "#d4ecd0", "#eed3ea", "#f3efc0", "#d2eeee")

STYLE = """
.title { font-weight: bold; font-size: 13px; }
.subtitle { font-size: 11px; fill: #444; }
.frame { fill: white; stroke: #bbb; }
.axis { stroke: #ccc; stroke-width: 1; }
.tick { stroke: #ddd; stroke-width: 1; }
.region { fill: #cfe0f5; fill-opacity: 0.8; stroke: none; }
.cone-edge { stroke: #2b5797; stroke-width: 2; fill: none; }
.ray { stroke: #2b5797; stroke-width: 2; }
.ray-label { font-size: 10px; fill: #2b5797; }
.lattice-point { fill: #333; }
.hilbert-basis { fill: none; stroke: #c0392b; stroke-width: 2; }
.ray-generator { fill: #2b5797; }
.image-generator { fill: #b35900; }
.section { stroke: #2b5797; stroke-width: 1.5; fill-opacity: 0.85; }
.note { font-size: 11px; fill: #666; }
"""


# ---------------------------------------------------------------------------------------------
# small exact helpers


def _q(x) -> Fraction:
    return Fraction(x)


def _qv(v) -> tuple[Fraction, ...]:
    return tuple(Fraction(x) for x in v)


def _dot(u, v):
    return sum(a * b for a, b in zip(u, v))


def _exact(v) -> str:
    """The exact coordinates as written in the facts: ``"1,-2"``, ``"1/3,2/3"``."""
    return ",".join(fmt_number(x) for x in v)


def _f(x: float) -> str:
    return f"{x:.2f}".rstrip("0").rstrip(".") if abs(x) > 1e-9 else "0"


def _vec_text(v) -> str:
    return fmt_vec(v)


def _clip(poly, a, b, c):
    """Sutherland–Hodgman: the part of a convex polygon (float points) with a·x + b·y >= c."""
    out = []
    n = len(poly)
    for i in range(n):
        p, q = poly[i], poly[(i + 1) % n]
        fp = a * p[0] + b * p[1] - c
        fq = a * q[0] + b * q[1] - c
        if fp >= 0:
            out.append(p)
        if (fp >= 0) != (fq >= 0):
            t = fp / (fp - fq)
            out.append((p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])))
    return out


# ---------------------------------------------------------------------------------------------
# labels that never overlap


LABEL_H = 11         # height of a label (font-size 10 plus a little), in SVG units
LABEL_W = 6          # width of one character (an upper bound for the 10px sans-serif font)


class Labels:
    """Places the labels of one panel so that no two overlap: each label tries a few positions
    around its point and takes the first whose box is inside the panel and meets no placed
    box; a label with no free position is left out (thinned) and its text kept as the
    ``<title>`` of an invisible mark, so it still shows on hover."""

    OFFSETS = ((5, -5), (5, 13), (-5, -5), (-5, 13), (5, -16), (5, 24), (-5, -16), (-5, 24))

    def __init__(self):
        self.boxes: list[tuple[float, float, float, float]] = []

    @staticmethod
    def _meets(a, b) -> bool:
        return a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]

    def place(self, x: float, y: float, text: str, cls: str = "ray-label") -> str:
        w = LABEL_W * len(text)
        for dx, dy in self.OFFSETS:
            left = x + dx if dx > 0 else x + dx - w
            box = (left, y + dy - LABEL_H + 2, left + w, y + dy + 2)
            if box[0] < 0 or box[2] > PANEL or box[1] < 0 or box[3] > PANEL:
                continue
            if any(self._meets(box, b) for b in self.boxes):
                continue
            self.boxes.append(box)
            return f'<text class="{cls}" x="{_f(left)}" y="{_f(y + dy)}">{escape(text)}</text>'
        return (f'<circle class="thinned-label" cx="{_f(x)}" cy="{_f(y)}" r="4" fill-opacity="0">'
                f'<title>{escape(text)}</title></circle>')


def label_boxes(svg_text: str) -> list[list[tuple[float, float, float, float]]]:
    """The boxes of the labels of each panel of a rendered picture (for tests), in the same
    estimate :class:`Labels` uses."""
    import re
    out = []
    for panel in svg_text.split('<g class="panel"')[1:]:
        boxes = []
        for m in re.finditer(r'<text class="ray-label" x="([-\d.]+)" y="([-\d.]+)">([^<]*)</text>', panel):
            x, y = float(m.group(1)), float(m.group(2))
            n = len(m.group(3).replace("&amp;", "&").replace("&lt;", "<").replace("&gt;", ">"))
            boxes.append((x, y - LABEL_H + 2, x + LABEL_W * n, y + 2))
        out.append(boxes)
    return out


# ---------------------------------------------------------------------------------------------
# panels


class Panel:
    """One square drawing with a title; ``body`` is a list of SVG element strings in panel
    coordinates (origin top-left of the drawing area)."""

    def __init__(self, title: str, subtitle: str = ""):
        self.title = title
        self.subtitle = subtitle
        self.body: list[str] = []

    def svg(self, x: float, y: float) -> str:
        parts = [f'<g class="panel" transform="translate({_f(x)},{_f(y)})">',
                 f'<text class="title" x="0" y="14">{escape(self.title)}</text>']
        if self.subtitle:
            parts.append(f'<text class="subtitle" x="0" y="28">{escape(self.subtitle)}</text>')
        parts.append(f'<g transform="translate(0,{TITLE})">')
        parts.append(f'<rect class="frame" x="0" y="0" width="{PANEL}" height="{PANEL}"/>')
        parts.extend(self.body)
        parts.append("</g></g>")
        return "\n".join(parts)


class Plane:
    """Maps user coordinates in the window ``[-R, R]^2`` to panel coordinates."""

    def __init__(self, radius: float):
        self.R = radius
        self.s = (PANEL / 2 - MARGIN) / radius

    def xy(self, p) -> tuple[float, float]:
        return PANEL / 2 + self.s * float(p[0]), PANEL / 2 - self.s * float(p[1])

    def pt(self, p) -> str:
        x, y = self.xy(p)
        return f"{_f(x)},{_f(y)}"

    def box(self) -> list[tuple[float, float]]:
        R = self.R
        return [(-R, -R), (R, -R), (R, R), (-R, R)]

    def to_edge(self, v) -> tuple[float, float]:
        """The point where the ray through v leaves the window."""
        m = max(abs(float(v[0])), abs(float(v[1])))
        return (float(v[0]) * self.R / m, float(v[1]) * self.R / m)


def _axes(plane: Plane) -> list[str]:
    R = int(plane.R)
    out = []
    for k in range(-R, R + 1):
        if k:
            out.append(_line(plane, (k, -R), (k, R), "tick"))
            out.append(_line(plane, (-R, k), (R, k), "tick"))
    out.append(_line(plane, (-R, 0), (R, 0), "axis"))
    out.append(_line(plane, (0, -R), (0, R), "axis"))
    return out


def _line(plane: Plane, p, q, cls: str) -> str:
    (x1, y1), (x2, y2) = plane.xy(p), plane.xy(q)
    return f'<line class="{cls}" x1="{_f(x1)}" y1="{_f(y1)}" x2="{_f(x2)}" y2="{_f(y2)}"/>'


def _polygon(plane: Plane, poly, cls: str, fill: str | None = None) -> str:
    style = f' style="fill:{fill}"' if fill else ""
    return f'<polygon class="{cls}"{style} points="{" ".join(plane.pt(p) for p in poly)}"/>'


def _region(plane: Plane, normals, equations) -> list[tuple[float, float]]:
    """The window clipped to ``{<n, x> >= 0}`` and ``{<e, x> = 0}`` (float polygon; may be
    degenerate for a cone that is not full-dimensional)."""
    poly = plane.box()
    for n in normals:
        poly = _clip(poly, float(n[0]), float(n[1]), 0.0)
    for e in equations:
        poly = _clip(poly, float(e[0]), float(e[1]), 0.0)
        poly = _clip(poly, -float(e[0]), -float(e[1]), 0.0)
    return poly


def _points(plane: Plane, pts, cls: str, r: float) -> list[str]:
    out = []
    for p in pts:
        if max(abs(Fraction(c)) for c in p) > plane.R:
            continue
        x, y = plane.xy(_qv(p))
        out.append(f'<circle class="{cls}" cx="{_f(x)}" cy="{_f(y)}" r="{r}" data-point="{_exact(p)}"/>')
    return out


def _rays(plane: Plane, rays, labels=None, placer: Labels | None = None) -> list[str]:
    placer = placer or Labels()
    out = []
    for i, r in enumerate(rays):
        q = _qv(r)
        if not any(q):
            continue
        end = plane.to_edge(q)
        out.append(_line(plane, (0, 0), end, "ray"))
        x, y = plane.xy(end)
        text = labels[i] if labels else _vec_text(r)
        out.append(placer.place(x, y, text))
    return out


def _cone_panel_2d(title: str, subtitle: str, radius: int, rays, lineality, normals, equations,
                   points, basis) -> Panel:
    panel = Panel(title, subtitle)
    plane = Plane(radius)
    panel.body += _axes(plane)
    poly = _region(plane, normals, equations)
    if len(poly) >= 3:
        panel.body.append(_polygon(plane, poly, "region"))
    if lineality:
        # the boundary of a cone with a line is made of lines of the lineality space; the
        # generators of the pointed part (a representative modulo the lineality) are no edges,
        # so they are drawn as marked points only
        both = [l for l in lineality] + [[-Fraction(x) for x in l] for l in lineality]
        panel.body += _rays(plane, both)
        panel.body += _points(plane, rays, "ray-generator", 3.5)
    else:
        panel.body += _rays(plane, rays)
    panel.body += _points(plane, points, "lattice-point", 2.5)
    panel.body += _points(plane, basis, "hilbert-basis", 5.5)
    return panel


# ---------------------------------------------------------------------------------------------
# cross-sections in rank 3


def _section_frame(w):
    """An orthogonal rational basis (b1, b2) of w^⊥ (w a nonzero rational 3-vector)."""
    w = _qv(w)
    cands = [(w[1], -w[0], 0), (w[2], 0, -w[0]), (0, w[2], -w[1])]
    cands = [c for c in cands if any(c)]
    b1 = cands[0]
    b2 = None
    for c in cands[1:] + [tuple(w[(i + 1) % 3] * b1[(i + 2) % 3] - w[(i + 2) % 3] * b1[(i + 1) % 3]
                                for i in range(3))]:
        t = _dot(c, b1) / _dot(b1, b1)
        cand = tuple(x - t * y for x, y in zip(c, b1))
        if any(cand):
            b2 = cand
            break
    return b1, b2


def section_coordinates(points, w):
    """Exact coordinates ``(s, t)`` of ``p / <w, p>`` in the basis of :func:`_section_frame`
    for each point (Fractions, with respect to the orthogonal basis b1, b2), and the float
    scale factors ``|b1|, |b2|`` turning them into Euclidean coordinates.

    >>> cs, _ = section_coordinates([(1, 0, 1), (0, 1, 1)], (0, 0, 1))
    >>> [tuple(str(x) for x in c) for c in cs]
    [('1', '0'), ('0', '1')]
    """
    b1, b2 = _section_frame(w)
    out = []
    for p in points:
        p = _qv(p)
        h = _dot(w, p)
        x = tuple(c / h for c in p)
        out.append((_dot(x, b1) / _dot(b1, b1), _dot(x, b2) / _dot(b2, b2)))
    return out, (sqrt(float(_dot(b1, b1))), sqrt(float(_dot(b2, b2))))


def _section_panel(title: str, subtitle: str, vertices, labels, w, extra=(), polygons=None,
                   fills=None) -> Panel:
    """Panel with the section of cone(vertices) (or of each cone in ``polygons``, lists of
    vertex indices) by <w, x> = 1; ``extra`` are points drawn as Hilbert basis marks."""
    panel = Panel(title, subtitle)
    allpts = list(vertices) + list(extra)
    coords, (n1, n2) = section_coordinates(allpts, w)
    xy = [(float(s) * n1, float(t) * n2) for s, t in coords]
    xs = [p[0] for p in xy] or [0.0]
    ys = [p[1] for p in xy] or [0.0]
    cx, cy = (max(xs) + min(xs)) / 2, (max(ys) + min(ys)) / 2
    span = max(max(xs) - min(xs), max(ys) - min(ys), 1e-9)
    scale = (PANEL - 2 * MARGIN - 40) / span

    def at(i):
        x, y = xy[i]
        return PANEL / 2 + scale * (x - cx), PANEL / 2 - scale * (y - cy)

    def ordered(idx):
        mx = sum(xy[i][0] for i in idx) / len(idx)
        my = sum(xy[i][1] for i in idx) / len(idx)
        from math import atan2
        return sorted(idx, key=lambda i: atan2(xy[i][1] - my, xy[i][0] - mx))

    groups = polygons if polygons is not None else [list(range(len(vertices)))]
    for k, g in enumerate(groups):
        if not g:
            continue
        g = ordered(list(g))
        pts = " ".join(f"{_f(at(i)[0])},{_f(at(i)[1])}" for i in g)
        fill = (fills or FILLS)[k % len(fills or FILLS)]
        if len(g) >= 3:
            panel.body.append(f'<polygon class="section" style="fill:{fill}" points="{pts}"/>')
        elif len(g) == 2:
            panel.body.append(f'<polyline class="section" style="fill:none" points="{pts}"/>')
    placer = Labels()
    for i, v in enumerate(vertices):
        x, y = at(i)
        panel.body.append(f'<circle class="ray-generator" cx="{_f(x)}" cy="{_f(y)}" r="3.5" '
                          f'data-point="{_exact(v)}"/>')
        panel.body.append(placer.place(x, y, labels[i]))
    for j, p in enumerate(extra):
        x, y = at(len(vertices) + j)
        panel.body.append(f'<circle class="hilbert-basis" cx="{_f(x)}" cy="{_f(y)}" r="5" '
                          f'data-point="{_exact(p)}"/>')
    return panel


def _note_panel(title: str, text: str) -> Panel:
    p = Panel(title)
    y = 40
    for line in _wrap(text, 46):
        p.body.append(f'<text class="note" x="12" y="{y}">{escape(line)}</text>')
        y += 16
    return p


def _wrap(text: str, width: int) -> list[str]:
    out, cur = [], ""
    for word in text.split():
        if cur and len(cur) + 1 + len(word) > width:
            out.append(cur)
            cur = word
        else:
            cur = f"{cur} {word}" if cur else word
    if cur:
        out.append(cur)
    return out


# ---------------------------------------------------------------------------------------------
# objects


def _marks(plane: Plane, pairs, cls: str, r: float) -> list[str]:
    """Circles at lattice coordinates, labelled (``data-point``) with user coordinates."""
    out = []
    for pos, user in pairs:
        if max(abs(_q(c)) for c in pos) > plane.R:
            continue
        x, y = plane.xy(_qv(pos))
        out.append(f'<circle class="{cls}" cx="{_f(x)}" cy="{_f(y)}" r="{r}" data-point="{_exact(user)}"/>')
    return out


def _overlattice_panel(title, subtitle, rays, lineality, normals, equations, basis, ringed, labels):
    """A plane cone of an overlattice drawn in the lattice's own coordinates (its basis
    ``basis`` in user coordinates): its points are the integer grid; the marks keep their user
    coordinates in ``data-point`` and the ray labels are written in user coordinates."""
    inv = inverse2(basis)
    to_c = lambda v: mat_vec(v, inv)                      # noqa: E731  user -> coordinates
    to_dc = lambda u: mat_vec(u, list(zip(*basis)))       # noqa: E731  dual user -> dual coords
    rays_c = [to_c(r) for r in rays]
    lin_c = [to_c(l) for l in lineality]
    normals_c = [to_dc(u) for u in normals]
    eqs_c = [to_dc(e) for e in equations]
    ringed_c = [(to_c(h), h) for h in ringed]
    radius = window_radius(rays_c + [c for c, _ in ringed_c])
    panel = Panel(title, subtitle)
    plane = Plane(radius)
    panel.body += _axes(plane)
    poly = _region(plane, normals_c, eqs_c)
    if len(poly) >= 3:
        panel.body.append(_polygon(plane, poly, "region"))
    placer = Labels()
    edges = (lin_c + [tuple(-x for x in l) for l in lin_c]) if lin_c else rays_c
    edge_labels = ([_vec_text(l) for l in lineality] + [_vec_text([-_q(x) for x in l]) for l in lineality]
                   if lin_c else labels)
    panel.body += _rays(plane, edges, edge_labels, placer)
    if lin_c:
        panel.body += _marks(plane, list(zip(rays_c, rays)), "ray-generator", 3.5)
    panel.body += _marks(plane, lattice_points_in(int(radius), normals_c, eqs_c, basis), "lattice-point", 2.5)
    panel.body += _marks(plane, ringed_c, "hilbert-basis", 5.5)
    return panel


def _overlattice_panels(name: str, o: dict, basis) -> list[Panel]:
    var = o.get("variety") or {}
    dual_basis_vectors = [tuple(r) for r in inverse2(basis)]            # columns: the dual basis
    dual_basis = [tuple(dual_basis_vectors[j][i] for j in range(2)) for i in range(2)]
    lin = o["lineality"]
    p1 = _overlattice_panel(f"cone {name} in {o['lattice']}",
                            "in the coordinates of the lattice basis; ringed: Hilbert basis",
                            o["rays"], lin, o["facets"], o["linear_equations"], basis,
                            o.get("hilbert_basis", []), [_vec_text(r) for r in o["rays"]])
    dual_normals = list(o["rays"]) + list(lin) + [[-_q(x) for x in l] for l in lin]
    p2 = _overlattice_panel(f"dual of {name}", "in the dual basis; ringed: the coordinates z_i of U_σ",
                            o["facets"], o["linear_equations"], dual_normals, [], dual_basis,
                            var.get("generators", []), [_vec_text(u) for u in o["facets"]])
    return [p1, p2]


def cone_panels(name: str, o: dict, basis=None) -> list[Panel]:
    n = o["ambient_dim"]
    lattice = o["lattice"]
    var = o.get("variety") or {}
    dual_basis = var.get("generators", [])
    if n == 2 and basis:
        return _overlattice_panels(name, o, basis)
    if n == 2:
        radius = o.get("lattice_window") or window_radius(o["rays"] + o.get("hilbert_basis", []) + o["facets"])
        p1 = _cone_panel_2d(f"cone {name} in {lattice}", "σ, its lattice points and Hilbert basis (ringed)",
                            radius, o["rays"], o["lineality"], o["facets"], o["linear_equations"],
                            o.get("lattice_points", []), o.get("hilbert_basis", []))
        # the dual: rays = facets, lineality = equations; normals = rays (and ± lineality)
        dual_normals = list(o["rays"]) + [l for l in o["lineality"]] + [[-Fraction(x) for x in l] for l in o["lineality"]]
        p2 = _cone_panel_2d(f"dual of {name}", "σ^∨ ∩ M; ringed: the coordinates z_i of U_σ",
                            radius, o["facets"], o["linear_equations"], dual_normals, [],
                            o.get("dual_lattice_points", []), dual_basis)
        return [p1, p2]
    if n == 3:
        if not o.get("pointed") or not o["rays"]:
            return [_note_panel(f"cone {name} in {lattice}",
                                "this cone is not pointed (or is zero): it has no bounded cross-section")]
        if not o["facets"]:
            return [_note_panel(f"cone {name} in {lattice}", "a single ray: its cross-section is a point")]
        w, level = section_functional(o["rays"], o["facets"])
        hb = list(o.get("hilbert_basis", []))          # the corners too: they are in it
        p1 = _section_panel(f"cone {name} in {lattice}",
                            f"section by <{_vec_text(w)}, x> = {level}; ringed: Hilbert basis",
                            o["rays"], [_vec_text(r) for r in o["rays"]], w, hb)
        panels = [p1]
        if o.get("full") and o["facets"]:
            w2, level2 = section_functional(o["facets"], o["rays"])
            panels.append(_section_panel(f"dual of {name}",
                                         f"section by <x, {_vec_text(w2)}> = {level2}; ringed: z_i of U_σ",
                                         o["facets"], [_vec_text(u) for u in o["facets"]], w2, list(dual_basis)))
        return panels
    return []


def fan_panels(name: str, o: dict, standard: bool = True) -> list[Panel]:
    rays = o["rays"]
    if not rays:
        return []
    n = len(rays[0])
    cones = [[i - 1 for i in c] for c in (o.get("maximal_cones") or o["cones"])]
    used = {i for c in cones for i in c}
    cones += [[i] for i in range(len(rays)) if i not in used]
    title = f"fan {name} in {o['lattice']}"
    sub = f"a resolution of {o['resolves']}" if o.get("resolves") else ""
    if o.get("valid") is False:
        sub = "not a fan: the listed cones overlap or are not cones of a fan"
    labels = [f"{i + 1}" for i in range(len(rays))]
    if n == 2:
        radius = window_radius(rays)
        panel = Panel(title, sub)
        plane = Plane(radius)
        panel.body += _axes(plane)
        for k, c in enumerate(cones):
            if len(c) >= 2:
                normals = plane_cone_normals([_qv(rays[i]) for i in c])
                if normals is not None:
                    poly = _region(plane, normals, [])
                    if len(poly) >= 3:
                        panel.body.append(_polygon(plane, poly, "region", FILLS[k % len(FILLS)]))
        if standard:
            panel.body += _points(plane, support_points(rays, cones, int(radius)), "lattice-point", 2)
        panel.body += _rays(plane, rays, [f"{i + 1}: {_vec_text(r)}" for i, r in enumerate(rays)])
        for i, r in enumerate(rays):
            if max(abs(Fraction(c)) for c in r) <= radius:
                x, y = plane.xy(_qv(r))
                panel.body.append(f'<circle class="ray-generator" cx="{_f(x)}" cy="{_f(y)}" r="3.5" '
                                  f'data-point="{_exact(r)}"/>')
        return [panel]
    if n == 3:
        w = positive_functional(rays)
        if w is None:
            return [_note_panel(title, "the rays of this fan do not lie in an open half-space, so no single "
                                       "plane section shows it (e.g. a complete fan)")]
        return [_section_panel(title, (sub + "; " if sub else "") + f"section by <{_vec_text(w)}, x> = 1",
                               rays, labels, w, polygons=cones)]
    return []


def morphism_panels(name: str, o: dict, objects: dict) -> list[Panel]:
    """A morphism whose target is a plane cone: the target cone τ shaded, and the image f(σ)
    of the source cone (the cone of the images of its rays and of ± its lineality) shaded over
    it with its edges drawn, so one sees where σ lands in τ.  Needs the map, source and target
    in the document (with user coordinates); otherwise nothing is drawn."""
    f, src, tgt = (objects.get(o.get(k)) or {} for k in ("map", "source", "target"))
    if not (f.get("kind") == "map" and src.get("kind") == "cone" and tgt.get("kind") == "cone"):
        return []
    if tgt.get("ambient_dim") != 2 or o.get("compatible") is False:
        return []
    rows = [_qv(r) for r in f["rows"]]
    image = lambda v: tuple(_dot(r, _qv(v)) for r in rows)      # noqa: E731
    gens = [image(v) for v in src["rays"]]
    gens += [image(l) for l in src["lineality"]] + [tuple(-x for x in image(l)) for l in src["lineality"]]
    gens = [g for g in gens if any(g)]
    radius = window_radius(tgt["rays"] + [list(g) for g in gens])
    panel = Panel(f"morphism {name}: {o['map']}({o['source']}) in {o['target']}",
                  f"shaded: {o['target']}; darker: the image of {o['source']}")
    plane = Plane(radius)
    panel.body += _axes(plane)
    poly = _region(plane, tgt["facets"], tgt["linear_equations"])
    if len(poly) >= 3:
        panel.body.append(_polygon(plane, poly, "region"))
    normals = plane_cone_normals(gens) if len(gens) >= 2 else None
    if normals is not None:
        poly = _region(plane, normals, [])
        if len(poly) >= 3:
            panel.body.append(_polygon(plane, poly, "region", FILLS[1]))
    placer = Labels()
    panel.body += _rays(plane, gens, [f"{o['map']}{_vec_text(v)}" for v in
                                      list(src["rays"]) + list(src["lineality"]) * 2][:len(gens)], placer)
    panel.body += _points(plane, gens, "image-generator", 3)
    return [panel]


def render(doc: dict) -> str:
    """One SVG document with a row of panels per drawable object (see the module docstring)."""
    rows: list[list[Panel]] = []
    skipped = []
    for name, o in doc.get("objects", {}).items():
        panels = object_panels(name, o, doc["objects"])
        if panels:
            rows.append(panels)
        elif o.get("kind") in ("cone", "fan"):
            skipped.append(name)
    if not rows:
        note = "nothing to draw: pictures are made for cones and fans in lattices of rank 2 and 3"
        rows.append([_note_panel(doc.get("file", ""), note)])
    return _document(rows, doc.get("file", ""), skipped)


def object_panels(name: str, o: dict, objects: dict) -> list[Panel]:
    """The row of panels of one object (empty when it has no picture); ``objects`` holds the
    other objects of its document (the lattice of a cone, the cones of a morphism)."""
    kind = o.get("kind")
    if kind == "cone":
        lat = objects.get(o.get("lattice"), {})
        basis = lat.get("basis") if lat.get("kind") == "lattice" and "dual_of" not in lat else None
        return cone_panels(name, o, basis)
    if kind == "morphism":
        return morphism_panels(name, o, objects)
    if kind == "fan":
        lat = objects.get(o.get("lattice"), {})
        return fan_panels(name, o, standard=("basis" not in lat if lat.get("kind") == "lattice"
                                             else str(o.get("lattice", "")).startswith("Z^")))
    if kind == "polytope":
        from .polytope import svg_panels
        return svg_panels(name, o, Panel, PANEL, MARGIN, _f)
    return []


def render_object(doc: dict, name: str) -> str | None:
    """The picture of the object ``name`` of ``doc`` alone, or None when it has none (the
    Python API's ``_repr_svg_``)."""
    o = doc.get("objects", {}).get(name)
    panels = object_panels(name, o, doc["objects"]) if o is not None else []
    return _document([panels], name, []) if panels else None


def _document(rows: list[list[Panel]], title: str, skipped: list[str]) -> str:
    width = max(len(r) for r in rows) * (PANEL + GAP) + GAP
    height = len(rows) * (PANEL + TITLE + GAP) + GAP + (20 if skipped else 0)
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
             f'viewBox="0 0 {width} {height}" font-family="sans-serif" font-size="11">',
             f"<title>{escape(str(title))}</title>",
             f"<style>{STYLE}</style>",
             f'<rect x="0" y="0" width="{width}" height="{height}" fill="white"/>']
    y = GAP
    for row in rows:
        x = GAP
        for p in row:
            parts.append(p.svg(x, y))
            x += PANEL + GAP
        y += PANEL + TITLE + GAP
    if skipped:
        parts.append(f'<text class="note" x="{GAP}" y="{y + 4}">'
                     f'{escape("not drawn (rank other than 2 or 3): " + ", ".join(skipped))}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
