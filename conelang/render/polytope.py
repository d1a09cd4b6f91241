"""Renderings of a polytope's facts (kind ``"polytope"``): text, Markdown (also the hover),
LaTeX and SVG panels.  The other renderers call these for that kind."""
from __future__ import annotations

from fractions import Fraction

from ..semantics.forms import fmt_number
from .common import vec, vecs, yesno


def _halfspace(f: dict) -> str:
    return f"<{vec(f['normal'])}, x> >= {-f['offset']}"


def _poly(coeffs, var: str = "n") -> str:
    """``[1, "3/2", "1/2"]`` → ``1/2 n^2 + 3/2 n + 1``."""
    terms = []
    for k in range(len(coeffs) - 1, -1, -1):
        c = Fraction(coeffs[k])
        if c == 0:
            continue
        mono = "" if k == 0 else (var if k == 1 else f"{var}^{k}")
        coef = fmt_number(c) if (k == 0 or c != 1) else ""
        terms.append((coef + (" " if coef and mono else "") + mono) or "1")
    return " + ".join(terms).replace("+ -", "- ") or "0"


def summary(o: dict) -> str:
    parts = [f"dim {o['dim']}", f"{len(o['vertices'])} vertices"]
    if "lattice_points" in o:
        parts.append(f"{o['lattice_points']} lattice points ({o['interior_points']} interior)")
    if "volume" in o:
        parts.append(f"normalized volume {o['volume']}")
    if o.get("reflexive"):
        parts.append("reflexive")
    elif o.get("gorenstein_index"):
        parts.append(f"Gorenstein of index {o['gorenstein_index']}")
    return " · ".join(parts)


def text_lines(name: str, o: dict) -> list[str]:
    L = [f"polytope {name} in {o['lattice']}: {summary(o)}",
         f"  vertices: {vecs(o['vertices'])}",
         "  facets: " + (", ".join(_halfspace(f) for f in o["facets"]) or "none")]
    if o["equations"]:
        L.append("  affine hull: " + ", ".join(f"<{vec(f['normal'])}, x> = {-f['offset']}" for f in o["equations"]))
    if "f_vector" in o:
        L.append(f"  f-vector: {vec(o['f_vector'])}")
    if "h_star" in o:
        L.append(f"  h*-vector: {vec(o['h_star'])}")
        L.append(f"  Ehrhart polynomial: L(n) = {_poly(o['ehrhart'])}")
    if "points" in o:
        L.append(f"  lattice points: {vecs(o['points'])}")
        L.append(f"  interior points: {vecs(o['interior'])}")
    L.append(f"  reflexive: {yesno(o['reflexive'])}, Gorenstein index: "
             f"{o['gorenstein_index'] if o['gorenstein_index'] is not None else 'none (not Gorenstein)'}")
    return L


def hilbert_text(hs: dict) -> str:
    from collections import Counter
    den = " ".join(("(1 - t)" if e == 1 else f"(1 - t^{e})") + (f"^{k}" if k > 1 else "")
                   for e, k in sorted(Counter(hs["denominator"]).items()))
    num = _poly(hs["numerator"], "t")
    out = f"({num}) / {den}" if hs["denominator"] else num
    return f"{out}, multiplicity {hs['multiplicity']}, grading {vec(hs['grading'])}"


def markdown_lines(name: str, o: dict, h: str) -> list[str]:
    L = [f"{h} polytope `{name}` in `{o['lattice']}`", f"*{summary(o)}*", "", "| | |\n|---|---|",
         f"| vertices | `{vecs(o['vertices'])}` |",
         "| facets | " + (", ".join(f"`{_halfspace(f)}`" for f in o["facets"]) or "none") + " |"]
    if o["equations"]:
        L.append("| affine hull | " + ", ".join(f"`<{vec(f['normal'])}, x> = {-f['offset']}`" for f in o["equations"]) + " |")
    if "f_vector" in o:
        L.append(f"| f-vector | `{vec(o['f_vector'])}` |")
    if "h_star" in o:
        L.append(f"| h*-vector | `{vec(o['h_star'])}` |")
        L.append(f"| Ehrhart polynomial | `L(n) = {_poly(o['ehrhart'])}` |")
        L.append(f"| lattice points | {o['lattice_points']} ({o['interior_points']} interior, "
                 f"{o['boundary_points']} on the boundary) |")
    if o.get("points") and len(o["points"]) <= 60:
        L.append(f"| points | `{vecs(o['points'])}` |")
    L.append(f"| reflexive | {yesno(o['reflexive'])} |")
    L.append(f"| Gorenstein index | {o['gorenstein_index'] if o['gorenstein_index'] is not None else 'none'} |")
    return L


def latex_lines(name: str, o: dict, mname, vector, vectors, number) -> list[str]:
    L = [rf"\subsection*{{Polytope ${mname(name)}$}}", r"\begin{itemize}",
         rf"\item vertices: ${vectors(o['vertices'])}$",
         r"\item facets: $" + (r",\ ".join(rf"\langle {vector(f['normal'])}, x\rangle \ge {number(-f['offset'])}"
                                         for f in o["facets"]) or r"\varnothing") + "$"]
    if "f_vector" in o:
        L.append(rf"\item $f$-vector: ${vector(o['f_vector'])}$")
    if "h_star" in o:
        L.append(rf"\item $h^*$-vector: ${vector(o['h_star'])}$")
        terms = []
        for k in range(len(o["ehrhart"]) - 1, -1, -1):
            c = o["ehrhart"][k]
            if Fraction(c) != 0:
                coef = "" if (k and Fraction(c) == 1) else number(c)
                terms.append(coef + ("" if k == 0 else ("n" if k == 1 else f"n^{{{k}}}")))
        L.append(r"\item Ehrhart polynomial: $L(n) = " + (" + ".join(terms).replace("+ -", "- ") or "0") + "$")
        L.append(rf"\item {o['lattice_points']} lattice points, {o['interior_points']} interior; "
                 rf"normalized volume {o['volume']}")
    L.append(rf"\item reflexive: {yesno(o['reflexive'])}; Gorenstein index: "
             + (str(o["gorenstein_index"]) if o["gorenstein_index"] is not None else "none"))
    L.append(r"\end{itemize}")
    return L


# ---- SVG ----------------------------------------------------------------------------------
def _edges(o: dict) -> list[tuple[int, int]]:
    """Pairs of vertices spanning an edge: the facets through both meet in no other vertex."""
    V = [tuple(Fraction(x) for x in v) for v in o["vertices"]]
    F = [(tuple(Fraction(x) for x in f["normal"]), Fraction(f["offset"])) for f in o["facets"]]
    on = [frozenset(k for k, (u, c) in enumerate(F) if sum(a * b for a, b in zip(u, v)) + c == 0) for v in V]
    out = []
    for i in range(len(V)):
        for j in range(i + 1, len(V)):
            common = on[i] & on[j]
            if len(common) >= o["dim"] - 1 and not any(common <= on[k] for k in range(len(V)) if k not in (i, j)):
                out.append((i, j))
    return out


_PROJECT = ((1.0, 0.0, -0.42), (0.0, 1.0, -0.30))   # an oblique projection of 3-space


def svg_panels(name: str, o: dict, Panel, size: int, margin: int, f) -> list:
    """A panel for a polygon (with its lattice points, interior ones filled) or a 3-dimensional
    polytope (its edges and lattice points under a fixed oblique projection)."""
    n = o["ambient_dim"]
    if n not in (2, 3) or not o["vertices"]:
        return []
    proj = (lambda p: (float(Fraction(p[0])), float(Fraction(p[1])))) if n == 2 else \
        (lambda p: tuple(sum(r[k] * float(Fraction(p[k])) for k in range(3)) for r in _PROJECT))
    pts2 = [proj(v) for v in o["vertices"]] + [proj(p) for p in o.get("points", [])]
    xs, ys = [p[0] for p in pts2], [p[1] for p in pts2]
    span = max(max(xs) - min(xs), max(ys) - min(ys), 1.0)
    s = (size - 2 * margin) / span
    cx, cy = (max(xs) + min(xs)) / 2, (max(ys) + min(ys)) / 2

    def xy(p):
        a, b = proj(p)
        return size / 2 + s * (a - cx), size / 2 - s * (b - cy)

    sub = f"{o.get('lattice_points', '?')} lattice points, {o.get('interior_points', '?')} interior"
    if n == 3:
        sub += "; oblique projection"
    panel = Panel(f"polytope {name} in {o['lattice']}", sub)
    edges = _edges(o)
    if n == 2 and o["dim"] == 2:
        # the vertices in cyclic order along the edges
        order, seen = [0], {0}
        while len(order) < len(o["vertices"]):
            last = order[-1]
            nxt = next((j for a, b in edges for j in ((b,) if a == last else (a,) if b == last else ())
                        if j not in seen), None)
            if nxt is None:
                break
            order.append(nxt)
            seen.add(nxt)
        poly = " ".join(f"{f(x)},{f(y)}" for x, y in (xy(o["vertices"][i]) for i in order))
        panel.body.append(f'<polygon class="region" points="{poly}"/>')
    for i, j in edges:
        (x1, y1), (x2, y2) = xy(o["vertices"][i]), xy(o["vertices"][j])
        panel.body.append(f'<line class="cone-edge" x1="{f(x1)}" y1="{f(y1)}" x2="{f(x2)}" y2="{f(y2)}"/>')
    interior = {tuple(p) for p in o.get("interior", [])}
    for p in o.get("points", []):
        x, y = xy(p)
        fill = "#2b5797" if tuple(p) in interior else "white"
        panel.body.append(f'<circle cx="{f(x)}" cy="{f(y)}" r="3" fill="{fill}" stroke="#2b5797" '
                          f'data-point="{vec(p)}"/>')
    for v in o["vertices"]:
        x, y = xy(v)
        panel.body.append(f'<circle class="ray-generator" cx="{f(x)}" cy="{f(y)}" r="4" data-vertex="{vec(v)}"/>')
    return [panel]
