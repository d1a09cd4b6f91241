"""The canonical layout of ``.cone`` files (``conelang format`` and the editor's formatting).

Rules (whitespace only — tokens, numbers and comments are kept as written):

* one statement starts a line; blank lines between statements and comments are kept, but
  never more than one in a row, and none at the start or end of the file;
* inside a statement single spaces, except: none inside ``( )`` and ``[ ]``, none before
  ``,`` ``)`` ``]``, none around ``^`` and ``/``, none after a sign, none between a map and
  its argument (``f(c)``, ``f^-1(c)``);
* commas between vectors, inside ``[ ]`` index lists and before a closing ``)`` are
  dropped; the commas between coordinates are kept: ``(1, -2, 3/2)``;
* a statement with a ``{ }`` block stays on one line when it fits in :data:`WIDTH` columns
  and has no comment inside; otherwise the block is laid out one section a line, indented by
  two spaces, wrapped at :data:`WIDTH` with a continuation indent of four, and ``}`` alone;
* a comment after code on a line stays after that code (two spaces before ``#``); a comment
  on a line of its own stays on a line of its own;
* a file with a syntax error is returned unchanged.

Formatting is idempotent: ``format_text(format_text(t)) == format_text(t)``.

>>> print(format_text("lattice N=Z^2\\ncone c in N{rays(1,0),(1 ,2)}   # c\\n\\n\\n\\nexpect c dim=2"), end="")
lattice N = Z^2
cone c in N { rays (1, 0) (1, 2) }  # c
<BLANKLINE>
expect c dim = 2
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

WIDTH = 100
"""Longest line a ``{ }`` statement may keep on one line (and the wrapping width)."""

from .parser import KEYWORDS as _PARSER_KEYWORDS
from .parser import STATEMENT_KEYWORDS

KEYWORDS = frozenset(_PARSER_KEYWORDS)
SECTION_KEYWORDS = frozenset(("rays", "halfspaces", "equations", "images", "rows", "cones", "vertices", "grading"))

_TOKEN = re.compile(r"""
    (?P<COMMENT>\#[^\n]*)
  | (?P<STRING>"[^"\n]*"?)
  | (?P<NEWLINE>\n)
  | (?P<WS>[ \t\r\f]+)
  | (?P<NAME>[A-Za-z_][A-Za-z0-9_]*)
  | (?P<INT>[0-9]+)
  | (?P<OP>\^-1|->|→|==|>=|≥|∘|[(){}\[\],=:^+\-/&*])
  | (?P<ERROR>.)
""", re.VERBOSE | re.DOTALL)


@dataclass
class Token:
    """One lexical token: ``type`` is COMMENT, STRING, NEWLINE, WS, NAME, INT, OP or ERROR."""
    type: str
    text: str
    start: int

    @property
    def end(self) -> int:
        return self.start + len(self.text)


def tokenize(text: str) -> list[Token]:
    """All tokens of ``text``, whitespace and comments included (never fails).

    >>> [(t.type, t.text) for t in tokenize("f^-1(c) # x") if t.type != "WS"]
    [('NAME', 'f'), ('OP', '^-1'), ('OP', '('), ('NAME', 'c'), ('OP', ')'), ('COMMENT', '# x')]
    """
    return [Token(m.lastgroup, m.group(), m.start()) for m in _TOKEN.finditer(text)]


# ---- the code tokens of a file, with their comments attached ---------------------------------
@dataclass
class _Code:
    text: str
    type: str
    leading: list[str] = field(default_factory=list)    # own-line comments just before it
    trailing: list[str] = field(default_factory=list)   # comments after it on its line


@dataclass
class _Comment:
    """A top-level comment on a line of its own."""
    text: str


@dataclass
class _Statement:
    tokens: list[_Code]


def _items(text: str):
    """Top-level items (statements and own-line comments), each with the number of blank
    lines before it; None when the text has characters the language does not know."""
    toks = tokenize(text)
    if any(t.type == "ERROR" for t in toks):
        return None
    items: list[tuple[int, object]] = []
    newlines = 0            # newlines since the last code token or comment
    line_has_code = False
    current: _Statement | None = None
    pending: list[str] = []  # own-line comments waiting for the next code token of a statement
    pending_blank: list[int] = []

    def flush_pending_as_top_level():
        for c, b in zip(pending, pending_blank):
            items.append((b, _Comment(c)))
        pending.clear()
        pending_blank.clear()

    for t in toks:
        if t.type == "NEWLINE":
            newlines += 1
            line_has_code = False
            continue
        if t.type == "WS":
            continue
        blank = max(0, newlines - 1)
        if t.type == "COMMENT":
            c = t.text.rstrip()
            if line_has_code and current is not None and current.tokens:
                current.tokens[-1].trailing.append(c)
            elif line_has_code:
                items.append((0, _Comment(c)))   # cannot happen: code always belongs to a statement
            else:
                pending.append(c)
                pending_blank.append(blank)
            newlines = 0
            continue
        # a code token
        if t.type == "NAME" and t.text in STATEMENT_KEYWORDS:
            flush_pending_as_top_level()
            current = _Statement([])
            items.append((blank, current))
        elif current is None:
            return None          # code before the first statement: not a valid file
        code = _Code(t.text, t.type)
        code.leading.extend(pending)
        pending.clear()
        pending_blank.clear()
        current.tokens.append(code)
        newlines = 0
        line_has_code = True
    # own-line comments after the last code token belong to the top level; a comment that
    # ended up "inside" the last statement but after its last token does too
    flush_pending_as_top_level()
    return items


# ---- spacing ---------------------------------------------------------------------------------
def _drop_commas(tokens: list[_Code]) -> list[_Code]:
    """Remove the commas the layout does not keep, moving their comments to a neighbour."""
    out: list[_Code] = []
    depth = 0            # parenthesis depth
    bracket = False
    for i, t in enumerate(tokens):
        if t.text == "(":
            depth += 1
        elif t.text == ")":
            depth = max(0, depth - 1)
        elif t.text == "[":
            bracket = True
        elif t.text == "]":
            bracket = False
        if t.text == ",":
            nxt = tokens[i + 1].text if i + 1 < len(tokens) else ""
            if bracket or depth == 0 or nxt == ")":
                if out and not t.leading:
                    out[-1].trailing.extend(t.trailing)
                    carry = []
                else:                      # keep the comments in their order
                    carry = t.leading + t.trailing
                if i + 1 < len(tokens):
                    tokens[i + 1].leading[:0] = carry
                continue
        out.append(t)
    for i, t in enumerate(out[:-1]):
        if len(t.trailing) > 1:           # comments on lines of their own after the first
            out[i + 1].leading[:0] = t.trailing[1:]
            del t.trailing[1:]
    return out


def _is_sign(prev: _Code | None, tok: _Code) -> bool:
    if tok.text == "-":
        return True
    if tok.text == "+":
        return prev is None or not (prev.type == "INT" or prev.text == ")"
                                    or (prev.type == "NAME" and prev.text not in KEYWORDS))
    return False


def _space(prevprev: _Code | None, prev: _Code | None, tok: _Code) -> bool:
    """Whether one space separates ``prev`` and ``tok`` on a line."""
    if prev is None:
        return False
    p, t = prev.text, tok.text
    if t in (")", "]", ",") or p in ("(", "["):
        return False
    if t in ("^", "^-1", "/") or p in ("^", "/"):
        return False
    if _is_sign(prevprev, prev):
        return False
    if t == "(" and ((prev.type == "NAME" and (p not in KEYWORDS or p == "hull")) or p == "^-1"):
        return False
    return True


def _inline(tokens: list[_Code], prev: _Code | None = None, prevprev: _Code | None = None) -> str:
    out = []
    for t in tokens:
        if out and _space(prevprev, prev, t):
            out.append(" ")
        out.append(t.text)
        prevprev, prev = prev, t
    return "".join(out)


class _Printer:
    """Puts tokens on lines: comments force line breaks, lines never end in blanks."""

    def __init__(self):
        self.lines: list[str] = []
        self.cur: str | None = None
        self.start_indent = 0      # indentation of the next line that starts a unit
        self.cont_indent = 4       # indentation of a continuation line
        self.prev: _Code | None = None
        self.prevprev: _Code | None = None

    def newline(self) -> None:
        if self.cur is not None:
            self.lines.append(self.cur.rstrip())
            self.cur = None
            self.start_indent = self.cont_indent

    def begin(self, indent: int, cont: int) -> None:
        """Start a new unit (a header, a section, the closing brace) on a fresh line."""
        self.newline()
        self.start_indent, self.cont_indent = indent, cont

    def token(self, t: _Code) -> None:
        for c in t.leading:
            indent = self.start_indent if self.cur is None else self.cont_indent
            self.newline()
            self.lines.append(" " * indent + c)
        if self.cur is None:
            self.cur = " " * self.start_indent + t.text
        else:
            self.cur += (" " if _space(self.prevprev, self.prev, t) else "") + t.text
        self.prevprev, self.prev = self.prev, t
        for c in t.trailing:
            if self.cur is None:           # a second comment after the same token
                self.lines.append(" " * self.cont_indent + c)
                continue
            self.cur += "  " + c
            self.newline()

    def width_after(self, text: str) -> int:
        if self.cur is None:
            return self.start_indent + len(text)
        return len(self.cur) + 1 + len(text)


def _has_comments(tokens: list[_Code]) -> bool:
    return any(t.leading or t.trailing for t in tokens)


def _split_body(body: list[_Code]) -> list[tuple[_Code | None, list[list[_Code]]]]:
    """Sections of a ``{ }`` block: (keyword or None, items), an item being a vector, an
    index list or a lone token."""
    sections: list[tuple[_Code | None, list[list[_Code]]]] = []
    i = 0
    while i < len(body):
        t = body[i]
        if t.type == "NAME" and t.text in SECTION_KEYWORDS:
            sections.append((t, []))
            i += 1
            continue
        if not sections:
            sections.append((None, []))
        if t.text in ("(", "["):
            close = ")" if t.text == "(" else "]"
            depth, j = 0, i
            while j < len(body):
                if body[j].text == t.text:
                    depth += 1
                elif body[j].text == close:
                    depth -= 1
                    if depth == 0:
                        break
                j += 1
            sections[-1][1].append(body[i:j + 1])
            i = j + 1
        else:
            sections[-1][1].append([t])
            i += 1
    return sections


def _format_statement(tokens: list[_Code]) -> list[str]:
    tokens = _drop_commas(tokens)
    last = tokens[-1]
    inner_comments = _has_comments(tokens[:-1]) or bool(last.leading)
    brace = next((i for i, t in enumerate(tokens) if t.text == "{"), None)
    one_line = _inline(tokens)
    if brace is None or tokens[-1].text != "}" or (not inner_comments and len(one_line) <= WIDTH):
        if not inner_comments:
            return [one_line + "".join("  " + c for c in last.trailing)]
        p = _Printer()
        p.begin(0, 4)
        for t in tokens:
            p.token(t)
        p.newline()
        return p.lines
    p = _Printer()
    p.begin(0, 4)
    for t in tokens[:brace + 1]:
        p.token(t)
    for keyword, items in _split_body(tokens[brace + 1:-1]):
        p.begin(2, 4 if keyword is not None else 2)
        if keyword is not None:
            p.token(keyword)
        for item in items:
            text = _inline(item, p.prev, p.prevprev)
            if (p.cur is not None and p.cur.strip() and not _has_comments(item[:1])
                    and p.width_after(text) > WIDTH and p.cur.strip() != (keyword.text if keyword else "")):
                p.newline()
            for t in item:
                p.token(t)
    close = tokens[-1]
    p.begin(2, 4)
    for c in close.leading:
        p.lines.append("  " + c)
    p.begin(0, 4)
    p.token(_Code(close.text, close.type, [], close.trailing))
    p.newline()
    return p.lines


def _normal_form(text: str, items=None):
    """The tokens that formatting must keep, in order (commas, blanks and the comments'
    trailing spaces do not count); ``items``: ``_items(text)`` when already at hand."""
    if items is None:
        items = _items(text)
    if items is None:
        return None
    out = []
    for _, item in items:
        if isinstance(item, _Comment):
            out.append(("#", item.text))
            continue
        for t in _drop_commas([_Code(c.text, c.type, list(c.leading), list(c.trailing)) for c in item.tokens]):
            out.extend(("#", c) for c in t.leading)
            out.append((t.type, t.text))
            out.extend(("#", c) for c in t.trailing)
    return out


def format_text(text: str) -> str:
    """The canonical layout of ``text``; ``text`` itself when it has a syntax error.

    >>> format_text("cone c in N { rays (1,0) ")   # unfinished: left alone
    'cone c in N { rays (1,0) '
    >>> format_text("expect  c   not pointed   # yes\\n")
    'expect c not pointed  # yes\\n'
    """
    from .parser import parse
    if parse(text).errors:
        return text
    items = _items(text)
    if items is None:
        return text
    want = _normal_form(text, items)      # before the layout touches the tokens
    newline = "\r\n" if "\r\n" in text else "\n"
    lines: list[str] = []
    for blank, item in items:
        if lines and blank:
            lines.append("")
        if isinstance(item, _Comment):
            lines.append(item.text)
        else:
            lines.extend(_format_statement(item.tokens))
    out = newline.join(lines) + newline if lines else ""
    # a formatter must never change what a file says: check before answering
    if _normal_form(out) != want or parse(out).errors:
        return text
    return out


def needs_formatting(text: str) -> bool:
    """True when :func:`format_text` would change ``text``.

    >>> needs_formatting("lattice N = Z^2\\n"), needs_formatting("lattice N=Z^2")
    (False, True)
    """
    return format_text(text) != text
