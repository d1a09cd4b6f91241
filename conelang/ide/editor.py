"""Editor questions about one file, as pure functions of an :class:`Analysis` and an offset.

:class:`conelang.ide.host.AnalysisHost` answers with these; the language server only converts
offsets to protocol positions.  Nothing here does I/O.  Results are plain values (tuples,
small frozen dataclasses, strings) so that they can cross a process boundary.

>>> from conelang.semantics.analysis import Analysis
>>> a = Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }\\nexpect c ")
>>> [s.label for s in completions(a, len(a.text))][:3]
['pointed', 'full', 'simplicial']
"""
from __future__ import annotations

import re
from dataclasses import dataclass

from ..geometry import linalg
from ..geometry.budget import Cancelled
from ..semantics import values as V
from ..semantics.diagnostics import Diagnostic
from ..semantics.forms import fmt_vec as _fmt
from ..semantics.imports import Imported
from ..syntax import ast as A
from ..syntax.format import KEYWORDS, SECTION_KEYWORDS, STATEMENT_KEYWORDS, tokenize

NAME_RE = re.compile(r"[A-Za-z_][A-Za-z0-9_]*\Z")


# ---- small result types ------------------------------------------------------------------
@dataclass(frozen=True)
class Suggestion:
    """A completion: ``kind`` is a kind of object, ``keyword``, ``property`` or ``snippet``."""
    label: str
    kind: str
    detail: str = ""
    insert: str | None = None      # text to insert when it differs from the label
    sort: str = "1"                # lower sorts first


@dataclass(frozen=True)
class Edit:
    span: tuple[int, int]
    new_text: str


@dataclass(frozen=True)
class Action:
    """A code action: ``kind`` is ``quickfix`` or ``refactor``."""
    title: str
    kind: str
    edits: tuple[Edit, ...]
    diagnostic: Diagnostic | None = None
    preferred: bool = False


@dataclass(frozen=True)
class Symbol:
    name: str
    kind: str
    detail: str
    span: tuple[int, int]
    name_span: tuple[int, int]


class RenameError(ValueError):
    """A rename that is refused; the message says why."""


KIND_OF_KEYWORD = {"lattice": "lattice", "cone": "cone", "map": "map", "morphism": "morphism",
                   "characters": "characters", "fan": "fan", "polytope": "polytope"}


# ---- hover -----------------------------------------------------------------------------------
def _vector_at(a, offset: int):
    """(statement, section keyword, index in section, vector node) of the vector under offset."""
    st = a.statement_at(offset)
    if isinstance(st, A.ConeDef):
        for sec in st.sections:
            for i, v in enumerate(sec.vectors):
                if v.span[0] <= offset < v.span[1] or (offset == v.span[1] and v.span[1] > v.span[0]):
                    return st, sec, i, v
    elif isinstance(st, A.FanDef):
        for i, v in enumerate(st.rays):
            if v.span[0] <= offset <= v.span[1]:
                return st, None, i, v
    return None




def _vector_hover(a, offset: int):
    hit = _vector_at(a, offset)
    if hit is None:
        return None
    st, sec, i, v = hit
    name = st.name.text
    src = _fmt(v.entries)
    value = a.value(name) if a.defs.get(name) is st else None
    if isinstance(st, A.FanDef):
        if value is None:
            return (f"ray `{src}` of the fan `{name}` (the fan has errors)", v.span)
        x = value.space.to_coords(v.entries)
        return (f"ray `{src}` of the fan `{name}`: " + _primitive_text(value.space, x), v.span)
    kw = sec.keyword.text
    if value is None:
        return (f"{kw[:-1] if kw != 'rays' else 'ray'} `{src}` of `{name}` (the cone has errors)", v.span)
    space = value.space if kw == "rays" else value.space.dual()
    x = space.to_coords(v.entries)
    if x is None or not any(x):
        return (f"`{src}` in `{name}`", v.span)
    if kw == "rays":       # the redundant entries were found while evaluating the cone
        extremal = "**extremal**" if i not in value.redundant else "**not extremal** (redundant)"
        if not value.cone.pointed:
            extremal += f"; the cone is not pointed (lineality space of dimension {value.cone.lineality_dim})"
        return (f"ray `{src}` of `{name}`: {_primitive_text(value.space, x)} · {extremal}", v.span)
    if kw == "halfspaces":
        facet = "**cuts out a facet**" if i not in value.redundant else "**redundant** (cuts out no facet)"
        return (f"inequality ⟨`{src}`, v⟩ ≥ 0 of `{name}`: {_primitive_text(space, x)} · {facet}", v.span)
    return (f"equation ⟨`{src}`, v⟩ = 0 of `{name}`: {_primitive_text(space, x)}", v.span)


def _primitive_text(space: V.Space, x) -> str:
    if x is None:
        return f"not in the lattice {space.label}"
    g = linalg.gcd_vec(x)
    if g <= 1:
        return "**primitive**"
    prim = space.from_coords(tuple(c // g for c in x))
    return f"**not primitive** (the primitive vector on this ray is `{_fmt(prim)}`)"


def _property_hover(a, offset: int):
    from ..semantics.properties import REGISTRY
    for ex in a.expects:
        if ex.prop is not None and ex.prop.span[0] <= offset <= ex.prop.span[1]:
            kind = a.kind_of(ex.subject.text)
            p = REGISTRY.get((kind, ex.prop.text)) if kind else None
            if p is None:
                return None
            return (f"property `{p.name}` of a {p.kind} ({p.type}): {p.doc}", ex.prop.span)
    return None


def object_markdown(a, name: str, heavy: bool = True, equations: bool = True) -> str | None:
    """Markdown for the definition ``name``: its computed facts (see render.markdown).

    >>> from conelang.semantics.analysis import Analysis
    >>> print(object_markdown(Analysis("lattice N = Z^3"), "N"))
    ### lattice `N` — rank 3
    """
    from ..render.markdown import render_object
    from ..semantics.facts import object_facts
    if name not in a.defs:
        return None
    facts = object_facts(a, name, heavy, equations)
    if facts is None:
        return f"`{name}`: {a.kind_of(name)} (has errors)"
    md = render_object(name, facts, level=3)
    if facts["kind"] == "cone":
        dual_lat = facts["lattice"][5:] if facts["lattice"].startswith("dual ") else "dual " + facts["lattice"]
        gens = " ".join(_fmt(f) for f in facts["facets"]) or "nothing"
        lines = " ".join(_fmt(e) for e in facts["linear_equations"])
        md += (f"\n\ndual cone σ^∨ in `{dual_lat}`: generated by `{gens}` (the facet normals)"
               + (f" and the lines through `{lines}`" if lines else ""))
    return md


def hover(a, offset: int, heavy: bool = True):
    """(markdown, span) for the name, vector or property under ``offset``; None elsewhere."""
    found = _vector_hover(a, offset) or _property_hover(a, offset) or _use_hover(a, offset)
    if found is not None:
        return found
    hit = a.node_at(offset)
    if hit is None or hit[1] is None:
        return None
    return (object_markdown(a, hit[1], heavy), hit[2])


def _use_hover(a, offset: int):
    """On the path of a ``use`` statement: the file and the names it brings, with their kinds.

    >>> from conelang.semantics.analysis import Analysis
    >>> from conelang.semantics.imports import Resolved
    >>> shared = Analysis("lattice N = Z^2\\ncone wedge in N { rays (1,0) (1,2) }")
    >>> a = Analysis('use "shared.cone"', resolver=lambda p: Resolved("mem://s", p, shared))
    >>> print(_use_hover(a, 6)[0])
    `shared.cone` brings 2 names: `N` (lattice), `wedge` (cone)
    """
    for st in a.uses:
        lo, hi = st.path_span
        if lo <= offset <= hi and st in a.used_files:
            names = [(n, e.kind) for n, e in a.defs.items() if isinstance(e, Imported) and e.use is st]
            listed = ", ".join(f"`{n}` ({kind})" if n == e_src else f"`{n}` ({kind}, `{e_src}` there)"
                               for (n, kind), e_src in zip(names, (a.defs[n].source_name for n, _ in names)))
            count = f"{len(names)} name{'s' * (len(names) != 1)}"
            return (f"`{st.path}` brings {count}" + (f": {listed}" if names else ""), st.path_span)
    return None


def hover_pending(a, offset: int) -> str | None:
    """What the heavy hover at ``offset`` computes beyond the cheap one, or None when the
    cheap hover is already complete.

    >>> from conelang.semantics.analysis import Analysis
    >>> a = Analysis("lattice N = Z^2\\ncone w in N { rays (1,0) (1,2) }")
    >>> hover_pending(a, 22), hover_pending(a, 9)
    ('Hilbert basis of the dual of w, its binomial equations and invariants', None)
    """
    if _vector_at(a, offset) is not None or _property_hover(a, offset) is not None:
        return None
    hit = a.node_at(offset)
    if hit is None or hit[1] is None or a.value(hit[1]) is None:
        return None
    name = hit[1]
    kind = a.kind_of(name)
    if kind == "cone":
        return f"Hilbert basis of the dual of {name}, its binomial equations and invariants"
    if kind == "characters":
        return f"the monoid generated by {name} and its binomial equations"
    if kind == "morphism":
        return f"the pullbacks and the torus map of {name}"
    if kind == "fan":
        return f"the invariants of the fan {name}"
    if kind == "polytope":
        return f"the lattice points, h*-vector and Ehrhart polynomial of {name}"
    return None


# ---- completion ------------------------------------------------------------------------------
def _names(a, kind: str | None, sort: str = "0") -> list[Suggestion]:
    out = []
    for n, st in a.defs.items():
        if kind is None or st.kind == kind:
            out.append(Suggestion(n, st.kind, _detail(st, a.text), sort=sort))
    return out


def _kw(*words, sort: str = "2") -> list[Suggestion]:
    return [Suggestion(w, "keyword", sort=sort) for w in words]


def _detail(st, text: str, limit: int = 60) -> str:
    """The definition's source after its name, on one line (``in N { rays (1,0) … }``)."""
    body = " ".join(text[st.name.span[1]:st.span[1]].split())
    if len(body) > limit:
        body = body[:limit - 1] + "…"
    return f"{st.kind} {body}".strip()


def _in_comment_or_string(line: str) -> bool:
    quote = False
    for ch in line:
        if ch == '"':
            quote = not quote
        elif ch == "#" and not quote:
            return True
    return quote


def _cone_expr_items(a, toks: list[str]) -> list[Suggestion]:
    """Completions inside a cone expression whose tokens so far are ``toks``."""
    last = toks[-1] if toks else None
    if last is None or last in ("&", "(", "dual", "face", "==", "="):
        out = _names(a, "cone")
        if last not in ("face",):
            out += _names(a, "map", sort="1")
        out += _kw("dual", "face")
        if last == "=":
            out += _kw("over", sort="3")
        return out
    if last == "over":
        return _names(a, "polytope")
    if len(toks) >= 2 and toks[-2] == "face":
        return _kw("at", sort="0")
    return []


_USE_PATH = re.compile(r'^\s*use\s+"([^"]*)$')


def use_path_prefix(text: str, offset: int) -> tuple[str, int] | None:
    """When ``offset`` is inside the quotes of a ``use`` statement: the path typed so far and
    the offset where it starts (just after the opening quote); else None.  The listing of
    the files that may follow is I/O (see ``conelang.project.FileLoader.cone_paths``).

    >>> use_path_prefix('lattice N = Z^2\\nuse "sub/sh', 27)
    ('sub/sh', 21)
    >>> use_path_prefix('use "a.cone" (N)', 14) is None
    True
    """
    offset = max(0, min(offset, len(text)))
    line_start = text.rfind("\n", 0, offset) + 1
    m = _USE_PATH.match(text[line_start:offset])
    if m is None:
        return None
    return m.group(1), line_start + m.start(1)


def completions(a, offset: int) -> list[Suggestion]:
    """What may be typed at ``offset``: keywords at a statement start, names of the kind
    expected at that place, property names after ``expect NAME``.  The statement being
    typed is found by :func:`_statement_so_far`; each statement keyword has its own step
    (``_STATEMENT_ITEMS``).

    >>> from conelang.semantics.analysis import Analysis
    >>> a = Analysis("lattice N = Z^2\\nlattice P = Z^1\\ncone c in ")
    >>> [s.label for s in completions(a, len(a.text)) if s.kind == "lattice"]
    ['N', 'P']
    """
    found = _statement_so_far(a.text, offset)
    if found is None:
        return []
    at_line_start, kw, rest = found
    statement_kw = _kw(*STATEMENT_KEYWORDS, sort="3")
    if kw is None:
        return statement_kw
    step = _STATEMENT_ITEMS.get(kw)
    out = step(a, kw, rest, rest[-1] if rest else None) if step else []
    return out + statement_kw if at_line_start else out


def _statement_so_far(text: str, offset: int):
    """``(at_line_start, keyword, tokens after it)`` of the statement before the word at
    ``offset`` (keyword None before any statement), or None inside a comment or a string."""
    offset = max(0, min(offset, len(text)))
    ws = offset
    while ws > 0 and (text[ws - 1].isalnum() or text[ws - 1] == "_"):
        ws -= 1
    line_start = text.rfind("\n", 0, ws) + 1
    before_on_line = text[line_start:ws]
    if _in_comment_or_string(before_on_line):
        return None
    toks = [t.text for t in tokenize(text[:ws]) if t.type not in ("WS", "NEWLINE", "COMMENT")]
    k = max((i for i, t in enumerate(toks) if t in STATEMENT_KEYWORDS), default=None)
    if k is None:
        return not before_on_line.strip(), None, []
    return not before_on_line.strip(), toks[k], toks[k + 1:]


_STANDARD = "the standard lattice Z^d"


def _expect_items(a, kw, rest, last) -> list[Suggestion]:
    from ..semantics.properties import BOOL, properties_for
    if not rest:
        return _names(a, None)
    kind = a.kind_of(rest[0])
    if len(rest) == 1:
        if kind is None:
            return []
        out = [Suggestion(p.name, "property", f"{p.type} — {p.doc}", sort="0") for p in properties_for(kind)]
        out += _kw("not", sort="1")
        if kind == "cone":
            out += [Suggestion("==", "keyword", "equality of cones", sort="1")]
        return out
    if len(rest) == 2 and last == "not":
        return [Suggestion(p.name, "property", p.doc, sort="0") for p in properties_for(kind) if p.type == BOOL] \
            if kind is not None else []
    if rest[1] == "==":
        return _cone_expr_items(a, rest[1:])
    return []


def _polytope_items(a, kw, rest, last) -> list[Suggestion]:
    if last == "in":
        return _names(a, "lattice") + _kw("dual") + [Suggestion("Z^", "snippet", _STANDARD, sort="1")]
    if last == "{":
        return _kw("vertices", "halfspaces", sort="0")
    if len(rest) >= 2 and rest[1] == "=" and last in ("=", "+", "*", "(", ",", "polar", "face", "hull"):
        return _names(a, "polytope") + (_kw("polar", "face", "hull") if last != "hull" else [])
    return []


def _lattice_items(a, kw, rest, last) -> list[Suggestion]:
    if last in ("=", "dual", "("):
        return _names(a, "lattice") + [Suggestion("Z^", "snippet", _STANDARD, sort="0")] + _kw("dual")
    return []


def _fan_expr_items(a, rest, last) -> list[Suggestion]:
    """After ``fan NAME =``: the ways to make a fan from other objects."""
    if last == "=":
        return _kw("resolve", "normal", "over", "star", "refine", sort="0")
    if last in ("normal", "over"):
        return _names(a, "polytope")
    if last in ("star", "refine"):
        return _names(a, "cone") + _names(a, "fan")
    if len(rest) == 4 and rest[2] in ("star", "refine"):
        return _kw("at" if rest[2] == "star" else "by", sort="0")
    if last in ("resolve", "crepant"):
        return _names(a, "cone") + (_kw("crepant", sort="1") if last == "resolve" else [])
    return []


def _section_items(kw, last) -> list[Suggestion]:
    """Inside the braces of a cone, map or fan, after ``{``, a vector or a section word."""
    if last in SECTION_KEYWORDS:
        return []
    if kw == "cone":
        return _kw("rays", "halfspaces", "equations", sort="0")
    if kw == "map" and last == "{":
        return _kw("images", "rows", sort="0")
    if kw == "fan":
        return _kw("rays", sort="0") if last == "{" else _kw("cones", sort="0")
    return []


def _braced_items(a, kw, rest, last) -> list[Suggestion]:
    """Statements with a lattice and a braced body: cone, characters, fan, map."""
    inside = "{" in rest and "}" not in rest
    if kw == "cone" and len(rest) >= 2 and rest[1] == "=":
        return _cone_expr_items(a, rest[1:])
    if kw == "fan" and len(rest) >= 2 and rest[1] == "=":
        return _fan_expr_items(a, rest, last)
    if not inside and "{" not in rest and last in ("in", "of", ":", "->", "→", "dual", "("):
        out = _names(a, "lattice") + _kw("dual")
        if last in ("in", "of", ":", "->", "→"):
            out.append(Suggestion("Z^", "snippet", _STANDARD, sort="1"))
        return out
    if inside and last in ("{", ")", "]") + tuple(SECTION_KEYWORDS):
        return _section_items(kw, last)
    if len(rest) == 1 and kw in ("cone", "fan"):
        return _kw("in", sort="0")
    if len(rest) == 1 and kw == "characters":
        return _kw("of", sort="0")
    return []


def _morphism_items(a, kw, rest, last) -> list[Suggestion]:
    if last == "=":
        return _names(a, "map") + _names(a, "morphism", sort="1")
    if last in (":", "->", "→") and ":" in rest:
        return _names(a, "cone")
    if last in ("∘", "after"):
        return _names(a, "morphism")
    return []


_STATEMENT_ITEMS = {"expect": _expect_items, "polytope": _polytope_items, "lattice": _lattice_items,
                    "cone": _braced_items, "characters": _braced_items, "fan": _braced_items,
                    "map": _braced_items, "morphism": _morphism_items}


# ---- code actions ----------------------------------------------------------------------------
def _deletion_span(text: str, span: tuple[int, int]) -> tuple[int, int]:
    """Widen a deletion so no double blank or stray comma is left behind.

    >>> t = "rays (1,0) (1,1) (0,1) }"
    >>> [t[slice(*_deletion_span(t, sp))] for sp in [(11, 16), (17, 22)]]
    ['(1,1) ', ' (0,1)']
    """
    s, e = span
    j = e
    while j < len(text) and text[j] in " \t":
        j += 1
    if j < len(text) and text[j] == ",":
        j += 1
        while j < len(text) and text[j] in " \t":
            j += 1
    if j > e and j < len(text) and text[j] not in "\n)}":
        return (s, j)
    i = s
    while i > 0 and text[i - 1] in " \t":
        i -= 1
    return (i, e)


def code_fixes(a, start: int, end: int) -> list[Action]:
    """Quick fixes of the diagnostics that touch ``[start, end]``.

    >>> from conelang.semantics.analysis import Analysis
    >>> a = Analysis("lattice N = Z^2\\ncone c in N { rays (2,0) (0,1) }")
    >>> [(x.title, x.edits[0].new_text) for x in code_fixes(a, 36, 36)]
    [('replace by (1, 0)', '(1, 0)')]
    """
    out = []
    for d in a.diagnostics(expectations=False):
        if d.span[1] < start or d.span[0] > end or not d.fixes:
            continue
        for fix in d.fixes:
            span = fix.span if fix.new_text else _deletion_span(a.text, fix.span)
            out.append(Action(fix.title, "quickfix", (Edit(span, fix.new_text),), d, preferred=len(d.fixes) == 1))
    return out


def pin_target(a, offset: int) -> str | None:
    """The definition whose results 'pin' would write at ``offset``: the object under the
    cursor (its definition, a use, or an ``expect`` about it) when ``expect`` knows
    properties of its kind.

    >>> from conelang.semantics.analysis import Analysis
    >>> a = Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) }\\nexpect c pointed")
    >>> pin_target(a, 9), pin_target(a, 22), pin_target(a, len(a.text) - 2)
    (None, 'c', 'c')
    """
    hit = a.node_at(offset)
    name = hit[1] if hit is not None else None
    if name is None:
        st = a.statement_at(offset)
        if isinstance(st, A.Expect):
            name = st.subject.text
        elif st is not None and A.is_definition(st):
            name = st.name.text
    from ..semantics.properties import properties_for
    if name is None or a.defs.get(name) is None or not properties_for(a.kind_of(name)):
        return None
    return name


PIN_ORDER = ("pointed", "full", "simplicial", "dim", "rays", "facets", "smooth", "gorenstein",
             "qgorenstein", "index", "generators", "equations", "multiplicity", "class_group", "normal")


def pin_lines(a, name: str) -> list[str]:
    """``expect`` lines that state the current results of ``name`` (heavy: computes them).

    >>> from conelang.semantics.analysis import Analysis
    >>> a = Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }\\nexpect c dim = 2")
    >>> pin_lines(a, "c")[:4]
    ['expect c pointed', 'expect c full', 'expect c simplicial', 'expect c rays = 2']
    """
    from ..semantics.properties import BOOL, properties_for, show_result
    kind = a.kind_of(name)
    value = a.value(name)
    if value is None:
        return []
    have = {ex.prop.text for ex in a.expects if ex.subject.text == name and ex.prop is not None}
    rank = {p: i for i, p in enumerate(PIN_ORDER)}
    props = sorted(properties_for(kind), key=lambda p: rank.get(p.name, len(rank)))
    lines = []
    results = {}
    for p in props:
        if p.name in have:
            continue
        try:
            got = p.compute(a, value)
        except Cancelled:
            raise
        except Exception:          # not defined here (not pointed, over budget, not available)
            continue
        results[p.name] = got
        if p.type == BOOL:
            if p.name == "qgorenstein" and results.get("gorenstein"):
                continue     # implied by gorenstein
            lines.append(f"expect {name} {'' if got else 'not '}{p.name}")
        elif got is not None and not (isinstance(got, tuple) and len(got) > PIN_LONGEST_LIST):
            # (None: e.g. no index for a cone that is not Q-Gorenstein; a long list, say the
            # ages of a group of order 997, would bury the other lines)
            lines.append(f"expect {name} {p.name} = {show_result(got)}")
    return lines


PIN_LONGEST_LIST = 16


def pin_results(a, name: str) -> Edit | None:
    """The edit that inserts :func:`pin_lines` right after the definition of ``name`` (and
    after the ``expect`` lines about it that directly follow it)."""
    st = a.defs.get(name)
    if st is None:
        return None
    lines = pin_lines(a, name)
    if not lines:
        return None
    text = a.text
    end = st.span[1]
    following = sorted((ex for ex in a.expects if ex.span[0] >= end), key=lambda e: e.span[0])
    for ex in following:
        gap = text[end:ex.span[0]]
        if ex.subject.text != name or gap.count("\n") > 1 or any(
                ln.split("#", 1)[0].strip() for ln in gap.splitlines()):
            break
        end = ex.span[1]
    nl = text.find("\n", end)
    if nl < 0:
        return Edit((len(text), len(text)), "\n" + "\n".join(lines) + "\n")
    return Edit((nl + 1, nl + 1), "\n".join(lines) + "\n")


# ---- inlay hints -----------------------------------------------------------------------------
def inlay_hints(a, heavy: bool = True) -> list[tuple[int, str]]:
    """(offset, label) after each cone definition, e.g. ``dim 3 · pointed · 5 generators``.

    >>> from conelang.semantics.analysis import Analysis
    >>> inlay_hints(Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }"), heavy=False)
    [(48, 'dim 2 · pointed · simplicial')]
    """
    from ..render.common import cone_summary
    out = []
    for name, st in a.defs.items():
        if st.kind != "cone":
            continue
        value = a.value(name)
        if value is None:
            continue
        c = value.cone
        o = {"dim": c.dim, "pointed": c.pointed, "simplicial": c.simplicial}
        if heavy and c.pointed:
            o["variety"] = _summary_variety(a, c)
        out.append((st.span[1], cone_summary(o)))
    return out


def _summary_variety(a, c) -> dict | None:
    def guard(fn):
        try:
            return fn()
        except Cancelled:
            raise
        except Exception:
            return None
    gens = guard(lambda: a.engine.coordinates(c))
    if gens is None:
        return None
    gi = guard(lambda: a.engine.invariant("gorenstein_index", c))
    return {"generators": gens, "smooth": guard(lambda: a.engine.invariant("is_smooth", c)),
            "gorenstein": gi == 1, "gorenstein_index": gi}


# ---- semantic tokens -------------------------------------------------------------------------
TOKEN_TYPE_OF_KIND = {"lattice": "type", "cone": "variable", "map": "function", "morphism": "method",
                      "characters": "enumMember", "fan": "namespace", "polytope": "variable"}
TOKEN_TYPES = ("keyword", "type", "variable", "function", "method", "enumMember", "namespace",
               "property", "number", "string", "comment", "operator")
TOKEN_MODIFIERS = ("declaration", "defaultLibrary")


def semantic_tokens(a) -> list[tuple[int, int, str, tuple[str, ...]]]:
    """(start, end, token type, modifiers) for names (by kind), keywords, numbers, strings,
    comments and operators, in file order.

    >>> from conelang.semantics.analysis import Analysis
    >>> [(t[2], t[3]) for t in semantic_tokens(Analysis("lattice N = Z^2 # x"))][:3]
    [('keyword', ()), ('type', ('declaration',)), ('operator', ())]
    """
    kinds: dict[int, tuple[str, bool]] = {}
    for st in a.module.statements:
        if A.is_definition(st):
            kinds[st.name.span[0]] = (st.kind, True)
    for st in a.defs.values():
        if isinstance(st, Imported) and st.name.span != st.use.path_span:   # a name in a use list
            kinds[st.name.span[0]] = (st.kind, True)
    for ref in a.refs:
        if ref.target is not None and a.kind_of(ref.target):
            kinds[ref.name.span[0]] = (a.kind_of(ref.target), False)
    props = {ex.prop.span[0] for ex in a.expects if ex.prop is not None}
    out = []
    toks = tokenize(a.text)
    for i, t in enumerate(toks):
        if t.type == "COMMENT":
            out.append((t.start, t.end, "comment", ()))
        elif t.type == "STRING":
            out.append((t.start, t.end, "string", ()))
        elif t.type == "INT":
            out.append((t.start, t.end, "number", ()))
        elif t.type == "OP" and t.text not in "(){}[],":
            out.append((t.start, t.end, "operator", ()))
        elif t.type == "NAME":
            if t.text in KEYWORDS:
                out.append((t.start, t.end, "keyword", ()))
            elif t.start in kinds:
                kind, decl = kinds[t.start]
                out.append((t.start, t.end, TOKEN_TYPE_OF_KIND[kind], ("declaration",) if decl else ()))
            elif t.start in props:
                out.append((t.start, t.end, "property", ()))
            elif t.text == "Z" and _next_code(toks, i) == "^":
                out.append((t.start, t.end, "type", ("defaultLibrary",)))
    return out


def _next_code(toks, i) -> str | None:
    for t in toks[i + 1:]:
        if t.type not in ("WS", "NEWLINE", "COMMENT"):
            return t.text
    return None


# ---- outline, folding, rename ----------------------------------------------------------------
def outline(module: A.Module, text: str) -> list[Symbol]:
    """The definitions of a parsed file, in order (no evaluation: cheap enough for a
    workspace of files)."""
    return [Symbol(st.name.text, st.kind, _detail(st, text), st.span, st.name.span)
            for st in module.statements if A.is_definition(st)]


def outline_of_text(text: str) -> list[Symbol]:
    """:func:`outline` of unparsed text.

    >>> [(s.name, s.kind) for s in outline_of_text("lattice N = Z^2\\ncone c in N { rays }")]
    [('N', 'lattice'), ('c', 'cone')]
    """
    from ..syntax.parser import parse
    return outline(parse(text), text)


def fuzzy_match(query: str, name: str) -> bool:
    """Case-insensitive subsequence match (``wdg`` matches ``wedge``).

    >>> fuzzy_match("wdg", "wedge"), fuzzy_match("x", "wedge"), fuzzy_match("", "a")
    (True, False, True)
    """
    it = iter(name.lower())
    return all(ch in it for ch in query.lower())


def workspace_symbols(files, query: str, limit: int = 500) -> list[tuple[str, Symbol, str]]:
    """(file key, symbol, text) for the definitions in ``files`` (pairs key, text) whose
    names match ``query``."""
    out = []
    for key, text in files:
        for s in outline_of_text(text):
            if fuzzy_match(query, s.name):
                out.append((key, s, text))
                if len(out) >= limit:
                    return out
    return out


def folding_ranges(a) -> list[tuple[int, int, str]]:
    """(first line, last line, kind) of statements spanning several lines, of ``{ }`` blocks
    that open below their statement, and of runs of two or more comment lines (0-based).

    >>> from conelang.semantics.analysis import Analysis
    >>> folding_ranges(Analysis("# a\\n# b\\ncone c in N {\\n  rays (1,0)\\n}"))
    [(0, 1, 'comment'), (2, 4, 'region')]
    """
    ix = a.index
    out = []
    spans = [st.span for st in a.module.statements] + [e.statement_span for e in a.module.errors]
    for s, e in sorted(spans):
        l1, l2 = ix.position(s)[0], ix.position(max(s, e - 1))[0]
        if l2 > l1:
            out.append((l1, l2, "region"))
        piece = a.text[s:e]
        b = piece.find("{")
        if b >= 0:
            lb = ix.position(s + b)[0]
            if lb > l1 and l2 > lb:
                out.append((lb, l2, "region"))
    run = None
    for line in range(ix.line_count):
        is_comment = ix.line_text(line).lstrip().startswith("#")
        if is_comment:
            run = (run[0], line) if run else (line, line)
        if not is_comment or line == ix.line_count - 1:
            if run and run[1] > run[0]:
                out.append((run[0], run[1], "comment"))
            if not is_comment:
                run = None
    return sorted(out)


def prepare_rename(a, offset: int):
    """(span, name) of the defined name under ``offset`` that can be renamed, or None."""
    hit = a.node_at(offset)
    if hit is None or hit[1] is None or hit[1] not in a.defs:
        return None
    return hit[2], hit[1]


def rename(a, offset: int, new_name: str) -> list[Edit]:
    """Edits renaming the name under ``offset`` everywhere in the file (definition, uses,
    expectations, and uses inside statements that do not parse yet).

    >>> from conelang.semantics.analysis import Analysis
    >>> a = Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) }\\nexpect c pointed")
    >>> [e.span for e in rename(a, 8, "M")]
    [(8, 9), (26, 27)]
    >>> rename(a, 8, "cone")
    Traceback (most recent call last):
    ...
    conelang.ide.editor.RenameError: 'cone' is a keyword
    """
    hit = prepare_rename(a, offset)
    if hit is None:
        raise RenameError("no defined name here")
    return rename_name(a, hit[1], new_name)


def rename_name(a, old: str, new_name: str) -> list[Edit]:
    """:func:`rename` of the name ``old`` of this file (a definition, or a name a ``use``
    statement brings in: then its place in the use list, if it is written there, and its uses)."""
    if not NAME_RE.match(new_name or ""):
        raise RenameError(f"'{new_name}' is not a valid name (letters, digits and _, not starting with a digit)")
    if new_name in KEYWORDS:
        raise RenameError(f"'{new_name}' is a keyword")
    if new_name == old:
        return []
    if new_name in a.defs:
        other = a.defs[new_name]
        line = a.index.position(other.name.span[0])[0] + 1
        how = "already used from another file" if isinstance(other, Imported) else "already defined"
        raise RenameError(f"'{new_name}' is {how} on line {line}")
    entry = a.defs[old]
    spans = set()
    if not isinstance(entry, Imported) or entry.name.span != entry.use.path_span:
        spans.add(entry.name.span)        # the definition, or the name in the list of a use statement
    for st in a.module.statements:
        if A.is_definition(st) and st.name.text == old:
            spans.add(st.name.span)          # duplicates of the definition too
    spans.update(r.name.span for r in a.refs if r.target == old)
    for err in a.module.errors:
        s, e = err.statement_span
        for t in tokenize(a.text[s:e]):
            if t.type == "NAME" and t.text == old:
                spans.add((s + t.start, s + t.end))
    return [Edit(sp, new_name) for sp in sorted(spans)]
