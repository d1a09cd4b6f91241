"""Parse ``.cone`` text into the typed tree of :mod:`conelang.syntax.ast`.

The file is split at statement keywords (they are reserved words, so they can only start a
statement); each statement is parsed on its own by the LALR parser built from
``grammar/conelang.lark``.  A syntax error therefore costs one statement, never the file.

>>> m = parse("lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }")
>>> [type(s).__name__ for s in m.statements], m.errors
(['LatticeStmt', 'ConeDef'], [])
"""
from __future__ import annotations

import functools
import re
from fractions import Fraction
from importlib import resources

from lark import Lark, Token, Tree
from lark.exceptions import UnexpectedCharacters, UnexpectedInput, UnexpectedToken

from ..cache import ContentCache
from . import ast as A
from .text import closest_word

STATEMENT_KEYWORDS = ("lattice", "cone", "map", "morphism", "characters", "fan", "polytope", "expect", "use")
KEYWORDS = STATEMENT_KEYWORDS + ("dual", "face", "at", "in", "of", "not", "rays", "halfspaces",
                                 "equations", "images", "rows", "cones", "resolve", "crepant", "after",
                                 "vertices", "polar", "hull", "over", "grading",
                                 "star", "refine", "by", "as")

_SCAN = re.compile(r'#[^\n]*|"[^"\n]*"?|//[^\n]*|[A-Za-z_][A-Za-z0-9_]*')
# a word that starts a line and is followed by a name, as a statement keyword is: when it is a
# misspelled statement keyword (``cnoe a in N``), or when the name is followed by what follows
# the name of a definition (``in``, ``=``, ``:``, ``of``), the file is split there too, so the
# mistake costs its own statement only and not the one before (strings and comments never
# span lines)
_LINE_START_WORD = re.compile(r'^[ \t]*([A-Za-z_][A-Za-z0-9_]*)(?=[ \t]+[A-Za-z_][A-Za-z0-9_]*'
                              r'([ \t]+(?:in|of)\b|[ \t]*[=:](?!=))?)', re.M)
_FIRST_TWO_WORDS = re.compile(r'([A-Za-z_][A-Za-z0-9_]*)\s+([A-Za-z_][A-Za-z0-9_]*)')
_YES_NO = {"yes", "no", "true", "false", "True", "False"}
_READABLE = {
    "NAME": "a name", "INT": "a whole number", "STRING": "a quoted string", "SIGN": "a sign",
    "$END": "end of statement", "ARROW": "'->'", "INVERSE": "'^-1'", "EQEQ": "'=='",
    "COMPOSE": "'∘'", "GEQ": "'>='",
}


@functools.cache
def grammar_text() -> str:
    return resources.files("conelang.grammar").joinpath("conelang.lark").read_text("utf-8")


@functools.cache
def _parser() -> Lark:
    return Lark(grammar_text(), parser="lalr", propagate_positions=True, maybe_placeholders=False)


# parse trees by statement text: the typed statements below are what an edit reuses; a tree is
# needed again only when its statement could not be built (or its typed nodes were evicted), so
# few trees are kept
_TREES = ContentCache("parse trees", 2_000)
# typed statements by their text, with the offset they were built at: nodes are immutable, so a
# statement that did not change is shared between successive parses of an edited file, and one
# that only moved (an edit above it) is a shifted copy, which is much cheaper than building it
_BUILT = ContentCache("typed statements", 50_000)


def clear_caches() -> None:
    """Forget the remembered parse trees and typed statements (the next parse builds all).

    >>> clear_caches(); parse("lattice N = Z^2").statements[0].name.text
    'N'
    """
    _TREES.clear()
    _BUILT.clear()


def _parse_piece(piece: str) -> Tree:
    """Parse one statement's text, remembering the tree: when a file is edited, every statement
    but the edited one is found here (positions in the tree are relative to the piece)."""
    tree = _TREES.get(piece)
    if tree is None:
        tree = _parser().parse(piece)
        _TREES.put(piece, tree)
    return tree


def split_statements(text: str) -> list[tuple[int, int]]:
    """Offsets ``(start, end)`` of the pieces of ``text`` that each start at a statement keyword.

    A leading piece that does not start with a keyword is returned too (it is an error unless
    it holds only blanks and comments).

    A word that starts a line, is followed by a name and is one typo away from a statement
    keyword starts a piece too (see ``_LINE_START_WORD``).

    >>> split_statements("cone a = b  # cone\\nexpect a pointed")
    [(0, 19), (19, 35)]
    >>> split_statements("lattice N = Z^2\\ncnoe a in N { rays (1,0) }")
    [(0, 16), (16, 42)]
    """
    return _split(text)[0]


def _split(text: str) -> tuple[list[tuple[int, int]], list[tuple[int, int]]]:
    """The pieces of ``split_statements`` and the spans of ``//`` comments (an error: comments
    start with ``#``)."""
    starts, slashes = [], []
    for m in _SCAN.finditer(text):
        word = m.group(0)
        if word in STATEMENT_KEYWORDS:
            starts.append(m.start())
        elif word.startswith("//"):
            slashes.append(m.span())
    typos = [m.start(1) for m in _LINE_START_WORD.finditer(text)
             if m.group(1) not in KEYWORDS
             and (m.group(2) is not None or closest_word(m.group(1), STATEMENT_KEYWORDS))
             and not _asks_for_more(text[:m.start(1)])]
    if typos:
        starts = sorted(set(starts).union(typos))
    pieces = []
    if not starts or text[:starts[0]].strip() and _has_code(text[:starts[0]]):
        pieces.append((0, starts[0] if starts else len(text)))
    for i, s in enumerate(starts):
        pieces.append((s, starts[i + 1] if i + 1 < len(starts) else len(text)))
    return [p for p in pieces if _has_code(text[p[0]:p[1]])], slashes


_LAST_CODE = re.compile(r'(?:"[^"\n]*"|[^"#\n])*')
_CONTINUES = ("=", ",", "(", "{", "[", "+", "-", "*", "/", ">", ":", "&", "|", "∘", "^", "<")


def _asks_for_more(before: str) -> bool:
    """True when the code before a line cannot end a statement (it ends in a keyword or an
    operator), so the line continues that statement and never starts a new one.

    >>> _asks_for_more("expect  # the wedge\\n"), _asks_for_more("lattice N = Z^2\\n")
    (True, False)
    """
    for line in reversed(before.splitlines()):
        code = _LAST_CODE.match(line).group(0).rstrip()
        if code:
            last = re.search(r'[A-Za-z_][A-Za-z0-9_]*$', code)
            if last:
                return last.group(0) in KEYWORDS
            return code.endswith(_CONTINUES)
    return False


def _has_code(piece: str) -> bool:
    return any(line.split("#", 1)[0].strip() for line in piece.splitlines())


def parse(text: str) -> A.Module:
    """Parse a whole file; statements that fail to parse become :class:`ast.SyntaxError_`.

    A ``//`` comment is reported and then read as a comment, so the statement around it still
    parses; a statement that fails records the name it was going to define (``defines``), so
    that its uses are not reported as unknown names too.

    >>> m = parse("lattice N = Z^2  // the plane\\ncnoe c in N { rays (1,0) }")
    >>> [type(s).__name__ for s in m.statements], [(e.message, e.defines) for e in m.errors]
    (['LatticeStmt'], [("comments start with '#', not '//'", None), ("'cnoe' does not start a statement; did you mean 'cone'?", 'c')])
    """
    module = A.Module()
    pieces, slashes = _split(text)
    for lo, hi in slashes:
        module.errors.append(A.SyntaxError_("comments start with '#', not '//'", (lo, hi), (lo, hi)))
        text = text[:lo] + "#" * (hi - lo) + text[hi:]
    for start, end in pieces:
        piece = text[start:end]
        typo = _not_a_statement(piece, start)
        if typo is not None:
            module.errors.append(typo)
            continue
        hit = _BUILT.get(piece)
        if hit is not None:              # the same statement: reuse its nodes, shifted if it moved
            built, at = hit
            if at != start:
                built = shift_node(built, start - at)
                _BUILT.put(piece, (built, start))
            module.statements.append(built)
            continue
        try:
            tree = _parse_piece(piece)
        except UnexpectedInput as exc:
            module.errors.append(_syntax_error(exc, piece, start))
            continue
        except RecursionError:
            module.errors.append(A.SyntaxError_("statement is nested too deeply", (start, end), (start, end),
                                                _defined_name(piece)))
            continue
        try:
            built = _Builder(start).statement(tree.children[0])
            module.statements.append(built)
            _BUILT.put(piece, (built, start))
        except _BuildError as exc:
            module.errors.append(A.SyntaxError_(exc.message, exc.span, (start, end), _defined_name(piece)))
        except RecursionError:
            module.errors.append(A.SyntaxError_("statement is nested too deeply", (start, end), (start, end),
                                                _defined_name(piece)))
    return module


def _defined_name(piece: str, keyword: str | None = None) -> str | None:
    """The name a definition ``piece`` (``cone c …``) defines, read without parsing; None for an
    expectation or when the second word is not a name.  ``keyword`` replaces a misspelled one.

    >>> _defined_name("cone c in N {"), _defined_name("expect c smooth"), _defined_name("fan = x")
    ('c', None, None)
    """
    m = _FIRST_TWO_WORDS.match(piece.lstrip())
    if m is None or m.group(2) in KEYWORDS:
        return None
    kw = keyword or m.group(1)
    return m.group(2) if kw in STATEMENT_KEYWORDS and kw not in ("expect", "use") else None


def _not_a_statement(piece: str, base: int) -> A.SyntaxError_ | None:
    """The error for a piece that starts with a word that is not a statement keyword."""
    lead = len(piece) - len(piece.lstrip())
    m = re.match(r"[A-Za-z_][A-Za-z0-9_]*", piece[lead:])
    if m is None or m.group(0) in STATEMENT_KEYWORDS:
        return None
    word, at = m.group(0), base + lead
    guess = closest_word(word, STATEMENT_KEYWORDS)
    if guess is not None:
        message = f"'{word}' does not start a statement; did you mean '{guess}'?"
    else:
        message = f"'{word}' does not start a statement: a statement starts with " + \
            _join_or([f"'{k}'" for k in STATEMENT_KEYWORDS])
    shaped = re.match(r"[A-Za-z_]\w*\s+([A-Za-z_]\w*)(\s+(in|of)\b|\s*[=:](?!=))", piece[lead:])
    defines = _defined_name(piece[lead:], guess) if guess else shaped and shaped.group(1)
    return A.SyntaxError_(message, (at, at + len(word)), (base, _trimmed_end(piece, base)),
                          defines if defines not in KEYWORDS else None)


def shift_node(node, delta: int):
    """A copy of the typed node ``node`` with every span moved by ``delta`` characters.

    >>> m = parse("cone c = dual d")
    >>> shift_node(m.statements[0], 10).expr.inner.name
    Name(text='d', span=(24, 25))
    """
    cls = type(node)
    new = object.__new__(cls)
    d = new.__dict__
    for key, val in node.__dict__.items():
        if key == "span" or key.endswith("_span"):       # span, statement_span, path_span
            val = (val[0] + delta, val[1] + delta)
        elif type(val) in _NODE_TYPES:
            val = shift_node(val, delta)
        elif type(val) is tuple and val:
            first = type(val[0])
            if first in _NODE_TYPES:
                val = tuple(shift_node(v, delta) for v in val)
            elif key == "indices":              # IndexList: (index, span) pairs
                val = tuple((i, (sp[0] + delta, sp[1] + delta)) for i, sp in val)
        d[key] = val
    return new


_NODE_TYPES = frozenset(c for c in vars(A).values()
                        if isinstance(c, type) and hasattr(c, "__dataclass_fields__") and c is not A.Module)


# ---- errors ----------------------------------------------------------------------------
def _describe_terminal(name: str) -> str:
    if name in _READABLE:
        return _READABLE[name]
    try:
        term = _parser().get_terminal(name)
        if term.pattern.type == "str":
            return f"'{term.pattern.value}'"
    except KeyError:
        pass
    return name.lower()


def _trimmed_end(piece: str, base: int) -> int:
    code_end = 0
    offset = 0
    for line in piece.splitlines(keepends=True):
        code = line.split("#", 1)[0].rstrip()
        if code:
            code_end = offset + len(code)
        offset += len(line)
    return base + code_end


def _syntax_error(exc: UnexpectedInput, piece: str, base: int) -> A.SyntaxError_:
    stmt_span = (base, _trimmed_end(piece, base))
    if isinstance(exc, UnexpectedCharacters):
        pos = base + exc.pos_in_stream
        ch = piece[exc.pos_in_stream]
        return A.SyntaxError_(f"unexpected character {ch!r}", (pos, pos + 1), stmt_span)
    expected = sorted({_describe_terminal(t) for t in getattr(exc, "expected", ()) or ()})
    want = ("; expected " + _join_or(expected)) if expected else ""
    defines = _defined_name(piece)
    if isinstance(exc, UnexpectedToken) and exc.token.type != "$END":
        tok = exc.token
        pos = base + tok.start_pos
        hint = _token_hint(tok, exc, piece)
        return A.SyntaxError_(f"unexpected {tok.value!r}{hint or want}", (pos, pos + max(1, len(tok.value))),
                              stmt_span, defines)
    end = stmt_span[1]
    keyword = piece.split(None, 1)[0] if piece.split() else "statement"
    return A.SyntaxError_(f"the {keyword} statement ends too early{want}", (max(base, end - 1), end),
                          stmt_span, defines)


def _token_hint(tok: Token, exc: UnexpectedToken, piece: str) -> str:
    """A did-you-mean for a misspelled keyword (``rasy``), or how yes/no properties are
    written (``expect c smooth = yes``); empty when there is none."""
    words = []
    for t in getattr(exc, "expected", ()) or ():
        d = _describe_terminal(t)
        if d.startswith("'") and d[1:2].isalpha():
            words.append(d[1:-1])
    guess = closest_word(str(tok.value), sorted(words)) if tok.type == "NAME" else None
    if guess is not None:
        return f"; did you mean '{guess}'?"
    m = re.match(r"\s*expect\s+(\w+)\s+(\w+)\s*=", piece)
    if m is not None and str(tok.value) in _YES_NO:
        subject, prop = m.groups()
        return (f"; a yes/no property is written 'expect {subject} {prop}' "
                f"or 'expect {subject} not {prop}'")
    return ""


def _join_or(items: list[str]) -> str:
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + " or " + items[-1]


class _BuildError(Exception):
    def __init__(self, message: str, span):
        self.message, self.span = message, span


# ---- parse tree → typed tree -----------------------------------------------------------
class _Builder:
    """Maps one statement's parse tree to typed nodes, shifting spans by ``base``."""

    def __init__(self, base: int):
        self.base = base

    def span(self, node) -> A.Span:
        if isinstance(node, Token):
            return (self.base + node.start_pos, self.base + node.end_pos)
        return (self.base + node.meta.start_pos, self.base + node.meta.end_pos)

    def tok(self, token: Token) -> A.Name:
        return A.Name(str(token), self.span(token))

    def name(self, tree: Tree) -> A.Name:
        return self.tok(tree.children[0])

    # numbers and vectors
    def number(self, tree: Tree) -> A.Number:
        parts = [c for c in tree.children]
        sign = 1
        if parts and parts[0].type == "SIGN":
            sign = -1 if parts[0] == "-" else 1
            parts = parts[1:]
        num = int(parts[0])
        den = int(parts[1]) if len(parts) > 1 else 1
        if den == 0:
            raise _BuildError("division by zero in a number", self.span(tree))
        return A.Number(Fraction(sign * num, den), self.span(tree))

    def vector(self, tree: Tree) -> A.Vector:
        return A.Vector(tuple(self.number(c).value for c in tree.children if isinstance(c, Tree)), self.span(tree))

    def vectors(self, tree: Tree) -> tuple[A.Vector, ...]:
        return tuple(self.vector(c) for c in tree.children if isinstance(c, Tree))

    # lattices
    def lattice(self, tree: Tree):
        kind = tree.data
        if kind == "lattice_name":
            return A.LatticeName(self.name(tree.children[0]), self.span(tree))
        if kind == "standard":
            symbol = self.name(tree.children[0])
            if symbol.text != "Z":
                raise _BuildError(f"a standard lattice is written Z^d, not {symbol.text}^d", symbol.span)
            return A.StandardLattice(symbol, int(tree.children[1]), self.span(tree))
        if kind == "dual_lattice":
            return A.DualLattice(self.lattice(tree.children[1]), self.span(tree))
        if kind == "overlattice":
            base = self.lattice(tree.children[0])
            glue = []
            for g in tree.children[1:]:
                coef = Fraction(1)
                kids = [c for c in g.children if isinstance(c, Tree)]
                if kids[0].data == "number":
                    coef = self.number(kids[0]).value
                    kids = kids[1:]
                glue.append(A.Glue(coef, self.vector(kids[0]), self.span(g)))
            return A.Overlattice(base, tuple(glue), self.span(tree))
        raise _BuildError(f"unexpected lattice form {kind}", self.span(tree))

    # cones
    def cone_expr(self, tree: Tree):
        kind, ch, sp = tree.data, tree.children, self.span(tree)
        if kind == "cone_ref":
            return A.ConeRef(self.name(ch[0]), sp)
        if kind == "dual":
            return A.DualCone(self.cone_expr(ch[1]), sp)
        if kind == "face":
            return A.FaceCone(self.cone_expr(ch[1]), self.vector(ch[3]), sp)
        if kind == "meet":
            return A.MeetCone(self.cone_expr(ch[0]), self.cone_expr(ch[1]), sp)
        if kind == "image":
            return A.ImageCone(self.name(ch[0]), self.cone_expr(ch[1]), sp)
        if kind == "preimage":
            return A.PreimageCone(self.name(ch[0]), self.cone_expr(ch[2]), sp)
        if kind == "cone_over":
            return A.ConeOver(self.name(ch[1]), sp)
        raise _BuildError(f"unexpected cone expression {kind}", sp)

    def section(self, tree: Tree) -> A.Section:
        return A.Section(self.tok(tree.children[0]), self.vectors(tree.children[1]), self.span(tree))

    # polytopes
    def poly_section(self, tree: Tree) -> A.PolySection:
        kw, body = tree.children[0], tree.children[1]
        if tree.data == "vertices_section":
            return A.PolySection(self.tok(kw), self.vectors(body), (), self.span(tree))
        spaces = tuple(A.Halfspace(self.vector(h.children[0]), self.number(h.children[2]), self.span(h))
                       for h in body.children if isinstance(h, Tree))
        return A.PolySection(self.tok(kw), (), spaces, self.span(tree))

    def poly_expr(self, tree: Tree):
        kind, ch, sp = tree.data, tree.children, self.span(tree)
        if kind == "polytope_ref":
            return A.PolytopeRef(self.name(ch[0]), sp)
        if kind == "polar":
            return A.PolarPolytope(self.poly_expr(ch[1]), sp)
        if kind == "poly_face":
            return A.PolytopeFace(self.poly_expr(ch[1]), self.vector(ch[3]), sp)
        if kind == "dilation":
            return A.Dilation(int(ch[0]), self.poly_expr(ch[1]), sp)
        if kind in ("minkowski", "poly_product"):
            op = "sum" if kind == "minkowski" else "product"
            return A.PolytopeBinary(op, self.poly_expr(ch[0]), self.poly_expr(ch[1]), sp)
        if kind == "hull":
            parts = [c for c in ch if isinstance(c, Tree)]
            return A.PolytopeBinary("hull", self.poly_expr(parts[0]), self.poly_expr(parts[1]), sp)
        raise _BuildError(f"unexpected polytope expression {kind}", sp)

    def statement(self, tree: Tree):
        kind, ch, sp = tree.data, tree.children, self.span(tree)
        kw = self.tok(ch[0])
        if kind == "polytope_def":
            return A.PolytopeDef(kw, self.name(ch[1]), self.lattice(ch[3]),
                                 tuple(self.poly_section(s) for s in ch[4:]), sp)
        if kind == "polytope_let":
            return A.PolytopeLet(kw, self.name(ch[1]), self.poly_expr(ch[2]), sp)
        if kind == "fan_face":
            return A.FanOfPolytope(kw, self.name(ch[1]), self.name(ch[3]), "face", sp)
        if kind == "fan_normal":
            word = self.name(ch[2])
            if word.text != "normal":
                raise _BuildError(f"unexpected {word.text!r}; expected 'normal P', 'over P' or 'resolve σ'",
                                  word.span)
            return A.FanOfPolytope(kw, self.name(ch[1]), self.name(ch[3]), "normal", sp)
        if kind == "lattice_stmt":
            return A.LatticeStmt(kw, self.name(ch[1]), self.lattice(ch[2]), sp)
        if kind == "cone_def":
            return A.ConeDef(kw, self.name(ch[1]), self.lattice(ch[3]),
                             tuple(self.section(s) for s in ch[4:]), sp)
        if kind == "cone_let":
            return A.ConeLet(kw, self.name(ch[1]), self.cone_expr(ch[2]), sp)
        if kind == "map_stmt":
            return A.MapStmt(kw, self.name(ch[1]), self.lattice(ch[2]), self.lattice(ch[4]),
                             self.section(ch[5]), sp)
        if kind == "morphism_def":
            return A.MorphismDef(kw, self.name(ch[1]), self.name(ch[2]), self.name(ch[3]), self.name(ch[5]), sp)
        if kind == "morphism_compose":
            parts = tuple(self.name(c) for c in ch[2:] if isinstance(c, Tree))
            return A.MorphismCompose(kw, self.name(ch[1]), parts, sp)
        if kind == "characters_stmt":
            return A.CharactersStmt(kw, self.name(ch[1]), self.lattice(ch[3]), self.vectors(ch[4]), sp)
        if kind == "fan_def":
            rays = self.vectors(ch[5])
            cones = []
            for il in ch[7:]:
                idx = tuple((int(t), self.span(t)) for t in il.children if isinstance(t, Token) and t.type == "INT")
                cones.append(A.IndexList(idx, self.span(il)))
            return A.FanDef(kw, self.name(ch[1]), self.lattice(ch[3]), rays, tuple(cones), sp)
        if kind == "fan_resolve":
            crepant = any(isinstance(c, Token) and c.type == "CREPANT" for c in ch)
            return A.FanResolve(kw, self.name(ch[1]), self.name(ch[-1]), sp, crepant)
        if kind in ("fan_star", "fan_refine"):
            names = [c for c in ch if isinstance(c, Tree) and c.data == "name"]
            if kind == "fan_star":
                vecs = tuple(self.vector(c) for c in ch if isinstance(c, Tree) and c.data == "vector")
            else:
                vecs = self.vectors(ch[-1])
            return A.FanSubdivide(kw, self.name(names[0]), self.name(names[1]), vecs, sp, kind == "fan_star")
        if kind == "expect_flag":
            negated = any(isinstance(c, Token) and c.type == "NOT" for c in ch)
            names = [c for c in ch if isinstance(c, Tree)]
            return A.Expect(kw, self.name(names[0]), negated, self.name(names[1]), None, None, sp)
        if kind == "expect_value":
            value_tree = ch[3]
            if isinstance(value_tree, Tree) and value_tree.data == "number":
                value = self.number(value_tree)
            elif isinstance(value_tree, Tree) and value_tree.data == "vector":
                value = self.vector(value_tree)
            else:
                tok = value_tree.children[0]
                value = A.StringValue(str(tok)[1:-1], self.span(tok))
            return A.Expect(kw, self.name(ch[1]), False, self.name(ch[2]), value, None, sp)
        if kind == "use_stmt":
            tok = ch[1]
            items = None
            if len(ch) > 2 and ch[2] is not None:
                items = []
                for it in ch[2:]:
                    if not isinstance(it, Tree):
                        continue
                    names = [self.name(c) for c in it.children if isinstance(c, Tree)]
                    items.append(A.UseItem(names[0], names[1] if len(names) > 1 else None, self.span(it)))
                items = tuple(items)
            return A.UseStmt(kw, str(tok)[1:-1], self.span(tok), items, sp)
        if kind == "expect_equal":
            return A.Expect(kw, self.name(ch[1]), False, None, None, self.cone_expr(ch[3]), sp)
        raise _BuildError(f"unexpected statement {kind}", sp)
