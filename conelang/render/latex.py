"""LaTeX output of the computed facts (``conelang show FILE --format latex``), for papers.

:func:`render` returns a fragment to ``\\input`` into a paper (it needs ``amsmath`` and
``amssymb``); ``render(doc, whole_document=True)`` (``conelang show --format latex
--whole-document``) wraps it in a complete ``article``.  Long lists of vectors and of
coordinates are set as ``align*`` displays with a few entries per line, so they break across
lines; internal names (``open_embedding``) are written as words in prose.  Everything taken from the file (names, the file
name, messages) is escaped; polynomials such as ``z1*z3 - z2^2`` become ``z_{1} z_{3} -
z_{2}^{2}``; rational coordinates become ``\\tfrac{p}{q}``; abelian groups such as
``Z^2 + Z/3`` become ``\\mathbb{Z}^{2} \\oplus \\mathbb{Z}/3``.

>>> print(escape_text("a_b & 50% of {x} ≥ σ"))
a\\_b \\& 50\\% of \\{x\\} $\\geq$ $\\sigma$
>>> poly("z1*z3 - z2^2"), poly("t1*t2^-1")
('z_{1} z_{3} - z_{2}^{2}', 't_{1} t_{2}^{-1}')
>>> group("Z^2 + Z/3"), vector([1, "-1/2"])
('\\\\mathbb{Z}^{2} \\\\oplus \\\\mathbb{Z}/3', '(1, -\\\\tfrac{1}{2})')
"""
from __future__ import annotations

import re
from fractions import Fraction

from . import layer
from .common import missing_equations

PREAMBLE = r"""\documentclass{article}
\usepackage{amsmath,amssymb}
\allowdisplaybreaks
\begin{document}
"""

_TEXT_ESCAPES = {
    "\\": r"\textbackslash{}", "{": r"\{", "}": r"\}", "$": r"\$", "&": r"\&", "#": r"\#",
    "^": r"\textasciicircum{}", "_": r"\_", "%": r"\%", "~": r"\textasciitilde{}",
    "<": r"\textless{}", ">": r"\textgreater{}", "|": r"\textbar{}",
}

_UNICODE = {
    "σ": r"\sigma", "τ": r"\tau", "ρ": r"\rho", "χ": r"\chi", "Σ": r"\Sigma", "λ": r"\lambda",
    "μ": r"\mu", "ζ": r"\zeta", "α": r"\alpha", "β": r"\beta", "γ": r"\gamma", "δ": r"\delta",
    "ε": r"\varepsilon", "π": r"\pi", "ν": r"\nu", "ω": r"\omega", "Δ": r"\Delta",
    "≥": r"\geq", "≤": r"\leq", "≠": r"\neq", "→": r"\to", "↦": r"\mapsto", "∘": r"\circ",
    "·": r"\cdot", "∩": r"\cap", "∪": r"\cup", "∖": r"\setminus", "⊂": r"\subset",
    "⊆": r"\subseteq", "∈": r"\in", "∉": r"\notin", "×": r"\times", "∨": r"{}^\vee",
    "⊕": r"\oplus", "≅": r"\cong", "∞": r"\infty", "²": r"{}^2", "³": r"{}^3", "⁻": r"{}^{-}",
    "¹": r"{}^1", "−": "-", "≡": r"\equiv", "∼": r"\sim", "⟨": r"\langle", "⟩": r"\rangle",
}

_TEXT_UNICODE = {"–": "--", "—": "---", "“": "``", "”": "''", "‘": "`", "’": "'", "…": r"\dots{}",
                 "é": r"\'e", "ö": r"\"o", "ü": r"\"u", "ä": r"\"a", "\u00a0": "~"}


def escape_text(s: str) -> str:
    """Escape arbitrary text for LaTeX text mode (special characters, common Unicode)."""
    out = []
    for ch in str(s):
        if ch in _TEXT_ESCAPES:
            out.append(_TEXT_ESCAPES[ch])
        elif ch in _UNICODE:
            out.append(f"${_UNICODE[ch]}$")
        elif ch in _TEXT_UNICODE:
            out.append(_TEXT_UNICODE[ch])
        elif ord(ch) < 32:
            out.append(" ")
        elif ord(ch) > 126:
            out.append(rf"\symbol{{{ord(ch)}}}" if ord(ch) < 256 else "?")
        else:
            out.append(ch)
    return "".join(out)


def name(s: str) -> str:
    """A name from the file, in text mode."""
    return r"\texttt{" + escape_text(s) + "}"


def mname(s: str) -> str:
    """A name from the file, in math mode."""
    return r"\text{" + name(s) + "}"


def number(x) -> str:
    """An exact number: ``3``, ``-\\tfrac{1}{2}``."""
    q = Fraction(x)
    if q.denominator == 1:
        return str(q.numerator)
    sign = "-" if q < 0 else ""
    return rf"{sign}\tfrac{{{abs(q.numerator)}}}{{{q.denominator}}}"


def vector(v) -> str:
    return "(" + ", ".join(number(x) for x in v) + ")"


def vectors(vs, empty: str = r"\varnothing") -> str:
    return r",\allowbreak\ ".join(vector(v) for v in vs) if vs else empty


LONG = 60          # characters of coordinates above which a list is displayed over several lines


def _source_length(items) -> int:
    return sum(len(re.sub(r"\\[A-Za-z]+|[{}]", "", x)) + 2 for x in items)


def display_list(lead: str, items: list[str], per_line: int = 4) -> list[str]:
    """``lead`` followed by the math ``items``: inline when short, else an ``align*`` with
    ``per_line`` items a line (so a long Hilbert basis breaks across lines).

    >>> display_list("rays", ["(1, 0)", "(0, 1)"])
    ['rays $(1, 0), (0, 1)$']
    >>> print("\\n".join(display_list("points", [f"({i}, 1)" for i in range(12)], 4)))
    points
    \\begin{align*}
    &(0, 1), (1, 1), (2, 1), (3, 1), \\\\
    &(4, 1), (5, 1), (6, 1), (7, 1), \\\\
    &(8, 1), (9, 1), (10, 1), (11, 1)
    \\end{align*}
    """
    if _source_length(items) <= LONG:
        return [f"{lead} $" + ", ".join(items) + "$"]
    rows = [", ".join(items[i:i + per_line]) for i in range(0, len(items), per_line)]
    return [lead, r"\begin{align*}", ", \\\\\n".join("&" + r for r in rows), r"\end{align*}"]


def words(s: str) -> str:
    """An internal name (``open_embedding``) as words in prose, escaped: ``open embedding``."""
    return escape_text(str(s).replace("_", " "))


_POLY_OK = re.compile(r"^[A-Za-z0-9*^+\-() /]*$")


def poly(s: str) -> str:
    """A monomial or binomial from the facts, in math mode."""
    if not _POLY_OK.match(s):
        return r"\text{" + escape_text(s) + "}"
    s = re.sub(r"([A-Za-z])(\d+)", r"\1_{\2}", s)
    s = re.sub(r"\^\(?(-?\d+)\)?", r"^{\1}", s)
    s = s.replace("*", " ")
    return re.sub(r"\s+", " ", s).strip()


def group(s) -> str:
    """An abelian group string (``"Z^2 + Z/3"``, ``"0"``) in math mode."""
    if s is None:
        return r"\text{unknown}"
    parts = []
    for term in str(s).replace(" ", "").split("+"):
        if term == "Z":
            parts.append(r"\mathbb{Z}")
        elif re.fullmatch(r"Z\^\d+", term):
            parts.append(rf"\mathbb{{Z}}^{{{term[2:]}}}")
        elif re.fullmatch(r"Z/\d+", term):
            parts.append(rf"\mathbb{{Z}}/{term[2:]}")
        elif term == "0":
            parts.append("0")
        else:
            parts.append(r"\text{" + escape_text(term) + "}")
    return r" \oplus ".join(parts)


def yesno(b) -> str:
    return "unknown" if b is None else ("yes" if b else "no")


LONG_EQUATION = 70     # characters of an equation (commands left out) above which it is broken over lines


def _align(lines: list[str]) -> list[str]:
    """An ``align*`` environment with one equation per line (``lhs & rhs``); an equation too
    long for one line is set after it as a ``multline*``, broken between factors.

    >>> long = "w_{1} &\\\\mapsto " + " ".join(f"z_{{{i}}}^{{{i}}}" for i in range(1, 17))
    >>> print("\\n".join(_align(["a &= 0", long])))
    \\begin{align*}
    a &= 0
    \\end{align*}
    \\begin{multline*}
    w_{1} \\mapsto z_{1}^{1} z_{2}^{2} z_{3}^{3} z_{4}^{4} z_{5}^{5} z_{6}^{6} z_{7}^{7} z_{8}^{8} \\\\
    z_{9}^{9} z_{10}^{10} z_{11}^{11} z_{12}^{12} z_{13}^{13} z_{14}^{14} z_{15}^{15} \\\\
    z_{16}^{16}
    \\end{multline*}
    """
    out, run = [], []
    for x in lines + [None]:                   # the order of the equations is kept
        if x is not None and _source_length([x]) <= LONG_EQUATION:
            run.append(x)
            continue
        if run:
            out += [r"\begin{align*}", " \\\\\n".join(run), r"\end{align*}"]
            run = []
        if x is not None:
            out += [r"\begin{multline*}", " \\\\\n".join(_break(x.replace("&", ""), 50)), r"\end{multline*}"]
    return out


def _break(math: str, width: int) -> list[str]:
    """Split a long formula at spaces (between factors, before a sign) into pieces of about
    ``width`` characters of source; braces are never split."""
    pieces, cur, depth = [], "", 0
    for tok in re.split(r"( )", math):
        depth += tok.count("{") - tok.count("}")
        if tok == " " and depth == 0 and _source_length([cur]) >= width:
            pieces.append(cur.strip())
            cur = ""
            continue
        cur += tok
    if cur.strip():
        pieces.append(cur.strip())
    return pieces


def _cfrac(bs) -> str:
    if len(bs) == 1:
        return str(bs[0])
    return f"{bs[0]} - \\cfrac{{1}}{{{_cfrac(bs[1:])}}}"


# ---------------------------------------------------------------------------------------------
# objects


def _cone(n: str, o: dict) -> list[str]:
    L = [rf"\subsection*{{Cone {name(n)} in {name(o['lattice'])}}}"]
    flags = [f"dimension {o['dim']} in rank {o['ambient_dim']}",
             "pointed" if o["pointed"] else "not pointed"]
    if o.get("simplicial"):
        flags.append("simplicial")
    L.append(escape_text(", ".join(flags)) + ".")
    L.append(r"\begin{itemize}")
    lin = ""
    if o["lineality"]:
        lin = r" + \operatorname{span}\bigl(" + vectors(o["lineality"]) + r"\bigr)"
    if _source_length([vector(r) for r in o["rays"] + o["lineality"]]) <= LONG:
        L.append(r"\item rays: $\sigma = \operatorname{cone}\bigl(" + vectors(o["rays"], "") + r"\bigr)" + lin + "$")
    else:
        L += display_list(r"\item rays of $\sigma$:", [vector(r) for r in o["rays"]])
        if o["lineality"]:
            L += display_list(r"\item and the lineality space spanned by", [vector(r) for r in o["lineality"]])
    L += display_list(r"\item inner facet normals (in the dual lattice):", [vector(r) for r in o["facets"]]
                      or [r"\varnothing"])
    if o["linear_equations"]:
        L += display_list(r"\item equations of the linear span:", [vector(r) for r in o["linear_equations"]])
    if "hilbert_basis" in o:
        L += display_list(r"\item Hilbert basis of $\sigma \cap N$:", [vector(r) for r in o["hilbert_basis"]]
                          or [r"\varnothing"])
    L.append(r"\end{itemize}")
    var = o.get("variety")
    if var:
        r = var["embedding_dimension"]
        L.append(rf"The affine toric variety $U_{{\sigma}} = \operatorname{{Spec}} \mathbb{{C}}[\sigma^\vee \cap M]"
                 rf" \subseteq \mathbb{{C}}^{{{r}}}$ has dimension {var['dimension']} and coordinates")
        coords = [rf"z_{{{i}}} = \chi^{{{vector(g)}}}" for i, g in enumerate(var["generators"], 1)]
        if _source_length(coords) <= LONG:
            L.append(r"\[ " + r",\quad ".join(coords) + r" \]")
        else:
            L += display_list("", coords, per_line=3)[1:]
        if "equations" not in var:
            L.append(f"(equations: {missing_equations(o)}).")
        elif var["equations"]:
            L.append("with the equations")
            L += _align([f"{poly(e)} &= 0" for e in var["equations"]])
        else:
            L.append(r"and no equations.")
        inv = [f"smooth: {yesno(var.get('smooth'))}", f"Gorenstein: {yesno(var.get('gorenstein'))}"]
        gi = var.get("gorenstein_index")
        inv.append("Gorenstein index: " + (str(gi) if gi is not None else "none (not $\\mathbb{Q}$-Gorenstein)"))
        if var.get("class_group") is not None:
            inv.append(rf"class group $\operatorname{{Cl}}(U_\sigma) \cong {group(var['class_group'])}$")
        if "multiplicity" in var:
            inv.append(f"multiplicity {var['multiplicity']}")
        L.append("; ".join(inv) + ".")
        L.extend(_layer_par(layer.cone_lines(var)))
    return L


def _lattice(n: str, o: dict) -> list[str]:
    L = [rf"\subsection*{{Lattice {name(n)}}}", rf"${mname(n)} \cong \mathbb{{Z}}^{{{o['rank']}}}$"
         + (r", with basis $" + vectors(o["basis"]) + "$" if "basis" in o else "") + "."]
    return L


def _map(n: str, o: dict) -> list[str]:
    rows = r" \\ ".join(" & ".join(number(x) for x in r) for r in o["rows"])
    L = [rf"\subsection*{{Map {name(n)}}}",
         rf"\[ {mname(n)} \colon {mname(o['source'])} \to {mname(o['target'])}, \qquad "
         rf"\begin{{pmatrix}} {rows} \end{{pmatrix}} \]"]
    flags = [f"{k}: {yesno(o[k])}" for k in ("injective", "surjective") if k in o]
    if flags:
        L.append(escape_text(", ".join(flags)) + ".")
    L.extend(_layer_par(layer.map_lines(o)))
    return L


def _layer_par(lines: list[str]) -> list[str]:
    """Sentences of render.layer as LaTeX paragraphs."""
    return ["", *(escape_text(x[:1].upper() + x[1:]) + "." for x in lines)] if lines else []


def _morphism(n: str, o: dict) -> list[str]:
    L = [rf"\subsection*{{Morphism {name(n)} $= {mname(o['map'])} \colon {mname(o['source'])} \to "
         rf"{mname(o['target'])}$}}"]
    if o.get("violation"):
        L.append("Not a morphism: " + escape_text(o["violation"]))
    if o.get("kinds"):
        L.append(words(", ".join(o["kinds"])) + ".")
    if o.get("pullbacks"):
        L.append("Pullbacks of the coordinates of the target:")
        L += _align([rf"w_{{{j}}} &\mapsto {poly(p)}" for j, p in enumerate(o["pullbacks"], 1)])
    if o.get("torus"):
        L.append(r"On the tori: $t \mapsto \bigl(" + ", ".join(poly(t) for t in o["torus"]) + r"\bigr)$.")
    return L


def _characters(n: str, o: dict) -> list[str]:
    L = [rf"\subsection*{{Characters {name(n)} of {name(o['lattice'])}}}",
         r"$" + vectors(o["characters"]) + "$."]
    if "normal" in o:
        L.append(f"Normal: {yesno(o['normal'])}.")
        if o.get("holes"):
            L.append(r"Holes (in the saturation, not in the monoid): $" + vectors(o["holes"]) + "$.")
        if o.get("equations"):
            L.append("Equations of the orbit closure:")
            L += _align([f"{poly(e)} &= 0" for e in o["equations"]])
    return L


def _fan(n: str, o: dict) -> list[str]:
    L = [rf"\subsection*{{Fan {name(n)} in {name(o['lattice'])}}}"]
    if o.get("resolves"):
        L.append(f"A smooth refinement of the cone {name(o['resolves'])}"
                 + (f" ({escape_text(o['resolution'])})" if o.get("resolution") else "") + ".")
    L.append(r"\begin{itemize}")
    L.append(r"\item rays: $" + r",\allowbreak\ ".join(f"v_{{{i}}} = {vector(r)}" for i, r in enumerate(o["rays"], 1))
             + "$" if o["rays"] else r"\item no rays")
    cones = o["maximal_cones"] if "maximal_cones" in o else o["cones"]
    L.append(r"\item maximal cones: $" + (r",\allowbreak\ ".join(
        r"\operatorname{cone}(" + ", ".join(f"v_{{{i}}}" for i in c) + ")" if c else r"\{0\}" for c in cones)
        or r"\{0\}") + "$")
    flags = [f"{k}: {yesno(o[k])}" for k in ("valid", "complete", "smooth", "simplicial") if k in o]
    if flags:
        L.append(r"\item " + escape_text(", ".join(flags)))
    for p in o.get("problems", []):
        L.append(r"\item not a fan: " + escape_text(p["message"]) + f" ({name(p['code'])})")
    if "orbits" in o:
        L.append(r"\item torus orbits of dimension $0, \dots, " + str(len(o["orbits"]) - 1) + "$: "
                 + ", ".join(map(str, o["orbits"])))
    if "picard_group" in o:
        L.append(rf"\item $\operatorname{{Pic}}(X_\Sigma) \cong {group(o['picard_group'])}$, "
                 rf"$\operatorname{{Cl}}(X_\Sigma) \cong {group(o['class_group'])}$"
                 + (rf", $[\operatorname{{Cl}} : \operatorname{{Pic}}] = {o['picard_index']}$"
                    if o.get("picard_index") is not None else ""))
    si = o.get("self_intersections")
    if si and any(x is not None for x in si):
        L.append(r"\item self-intersections: $" + ", ".join(f"D_{{{i}}}^2 = {x}" for i, x in enumerate(si, 1)
                                                             if x is not None) + "$")
    if o.get("continued_fraction"):
        nn, q = o["cyclic_quotient"]
        cf = o["continued_fraction"]
        L.append(rf"\item a cyclic quotient singularity of type $\tfrac{{1}}{{{nn}}}(1, {q})$, with "
                 rf"$\dfrac{{{nn}}}{{{q}}} = [{', '.join(map(str, cf))}] = {_cfrac(cf)}$")
    if "crepant_rays" in o:
        L.append(r"\item crepant partial resolution (lattice points at height one): rays $"
                 + vectors(o["crepant_rays"]) + f"$; smooth: {yesno(o.get('crepant_smooth'))}")
    L.append(r"\end{itemize}")
    charts = o.get("charts") or []
    if charts:
        L.append("Affine charts:")
        lines = []
        for ch in charts:
            label = r"U_{\operatorname{cone}(" + ", ".join(f"v_{{{i}}}" for i in ch["cone"]) + ")}"
            coords = ", ".join(rf"z_{{{i}}} = \chi^{{{vector(g)}}}" for i, g in enumerate(ch["generators"], 1))
            eqs = ", ".join(f"{poly(e)} = 0" for e in ch["equations"]) or r"\text{no equations}"
            lines.append(rf"{label} &: {coords}; \quad {eqs}")
        L += _align(lines)
    L.extend(_layer_par(layer.fan_lines(o)))
    return L


def _polytope(n: str, o: dict) -> list[str]:
    from .polytope import latex_lines
    return latex_lines(n, o, mname, vector, vectors, number)


_KINDS = {"cone": _cone, "lattice": _lattice, "map": _map, "morphism": _morphism,
          "characters": _characters, "fan": _fan, "polytope": _polytope}


def object_lines(n: str, o: dict) -> list[str]:
    """The lines of one object's facts (none for an unknown kind)."""
    fn = _KINDS.get(o.get("kind"))
    if fn is None:
        return []
    L = fn(n, o)
    for err in o.get("errors", []):
        L.append(r"\emph{Not computed:} " + escape_text(err) + r"\par")
    return L


def render_object(n: str, o: dict) -> str:
    """The facts of one object as a fragment (the Python API's ``_repr_latex_``)."""
    return "\n".join(object_lines(n, o)) + "\n"


def render_body(doc: dict) -> str:
    """The body of the document (no preamble)."""
    L = [r"\section*{" + escape_text(doc.get("file", "")) + "}"]
    for n, o in doc.get("objects", {}).items():
        lines = object_lines(n, o)
        if lines:
            L += lines + [""]
    diags = doc.get("diagnostics", [])
    if diags:
        L.append(r"\subsection*{Diagnostics}")
        L.append(r"\begin{itemize}")
        for d in diags:
            L.append(rf"\item line {d['line']}, column {d['column']}: {escape_text(d['severity'])}: "
                     rf"{escape_text(d['message'])} ({name(d['code'])})")
        L.append(r"\end{itemize}")
    return "\n".join(L) + "\n"


def render(doc: dict, whole_document: bool = False) -> str:
    """The facts of every object as a fragment to ``\\input`` (needs ``amsmath``, ``amssymb``),
    or, with ``whole_document``, as a complete document."""
    head = f"% facts computed by conelang from {escape_text(doc.get('file', ''))}\n"
    if not whole_document:
        return head + "% a fragment to \\input; it needs \\usepackage{amsmath,amssymb}\n" + render_body(doc)
    return head + PREAMBLE + render_body(doc) + "\\end{document}\n"
