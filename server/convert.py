"""Offsets ↔ LSP positions, in the position encoding agreed with the client.

LSP counts columns in UTF-16 code units unless the client and server agreed on UTF-8 or
UTF-32; :class:`conelang.syntax.text.LineIndex` counts characters.  Positions outside the
text are clamped (a bad position never fails a request).

>>> from conelang.syntax.text import LineIndex
>>> p = Positions(LineIndex("a𝔸b\\nc"), "utf-16")
>>> p.position(2), p.offset(0, 3)
((0, 3), 2)
>>> Positions(LineIndex("a𝔸b"), "utf-8").position(2)
(0, 5)
"""
from __future__ import annotations

from lsprotocol import types as T

from conelang.syntax.text import LineIndex


class Positions:
    def __init__(self, index: LineIndex, encoding: str = "utf-16"):
        self.index = index
        self.encoding = str(getattr(encoding, "value", encoding) or "utf-16")

    def _units(self, s: str) -> int:
        if self.encoding == "utf-8":
            return len(s.encode("utf-8", "surrogatepass"))
        if self.encoding == "utf-32":
            return len(s)
        return sum(2 if ord(c) > 0xFFFF else 1 for c in s)

    def position(self, offset: int) -> tuple[int, int]:
        line, col = self.index.position(offset)
        if self.encoding == "utf-32" or self.index.is_ascii:
            return line, col
        start = self.index.starts[line]
        prefix = self.index.text[start:start + col]
        return line, col if prefix.isascii() else self._units(prefix)

    def offset(self, line: int, column: int) -> int:
        ix = self.index
        line = int(line) if line is not None else 0
        column = int(column) if column is not None else 0
        if line < 0:
            return 0
        if line >= len(ix.starts):
            return len(ix.text)
        column = max(0, column)
        if self.encoding == "utf-32" or ix.is_ascii:
            return ix.offset(line, column)
        text = ix.line_text(line)
        units = 0
        for i, c in enumerate(text):
            if units >= column:
                return ix.starts[line] + i
            units += self._units(c)
        return ix.starts[line] + len(text)

    # lsprotocol objects
    def lsp_position(self, offset: int) -> T.Position:
        line, col = self.position(offset)
        return T.Position(line=line, character=col)

    def lsp_range(self, span) -> T.Range:
        return T.Range(start=self.lsp_position(span[0]), end=self.lsp_position(span[1]))

    def from_lsp(self, pos: T.Position) -> int:
        return self.offset(pos.line, pos.character)

    def span_of(self, rng: T.Range) -> tuple[int, int]:
        a, b = self.from_lsp(rng.start), self.from_lsp(rng.end)
        return (min(a, b), max(a, b))


# ---- answers of the IDE layer as protocol objects ------------------------------------------
SEVERITY = {"error": T.DiagnosticSeverity.Error, "warning": T.DiagnosticSeverity.Warning,
            "information": T.DiagnosticSeverity.Information, "hint": T.DiagnosticSeverity.Hint}
COMPLETION_KIND = {"keyword": T.CompletionItemKind.Keyword, "lattice": T.CompletionItemKind.Struct,
                   "cone": T.CompletionItemKind.Variable, "map": T.CompletionItemKind.Function,
                   "morphism": T.CompletionItemKind.Method, "characters": T.CompletionItemKind.EnumMember,
                   "fan": T.CompletionItemKind.Module, "polytope": T.CompletionItemKind.Class,
                   "property": T.CompletionItemKind.Property, "snippet": T.CompletionItemKind.Snippet}
SYMBOL_KIND = {"lattice": T.SymbolKind.Struct, "cone": T.SymbolKind.Variable, "map": T.SymbolKind.Function,
               "morphism": T.SymbolKind.Method, "characters": T.SymbolKind.EnumMember,
               "fan": T.SymbolKind.Module, "polytope": T.SymbolKind.Class}
FOLDING_KIND = {"comment": T.FoldingRangeKind.Comment, "region": T.FoldingRangeKind.Region}


def diagnostic(uri: str, d, pos: Positions) -> T.Diagnostic:
    related = [T.DiagnosticRelatedInformation(location=T.Location(uri=uri, range=pos.lsp_range(r.span)),
                                              message=r.message) for r in d.related] or None
    return T.Diagnostic(range=pos.lsp_range(d.span), message=d.message,
                        severity=SEVERITY.get(d.severity, T.DiagnosticSeverity.Error),
                        code=d.code, source="conelang", related_information=related,
                        tags=[T.DiagnosticTag.Unnecessary] if d.unnecessary else None)


def note(message: str) -> T.Diagnostic:
    """A remark of the server itself, at the start of the file."""
    start = T.Position(line=0, character=0)
    return T.Diagnostic(range=T.Range(start=start, end=start), message=message,
                        severity=T.DiagnosticSeverity.Information, code="server", source="conelang")


def completion_item(s) -> T.CompletionItem:
    return T.CompletionItem(label=s.label, kind=COMPLETION_KIND.get(s.kind), detail=s.detail or None,
                            insert_text=s.insert, sort_text=f"{s.sort}{s.label}")


def path_item(path: str, rng: T.Range) -> T.CompletionItem:
    """A file or folder offered inside the quotes of a ``use`` statement."""
    folder = path.endswith("/")
    return T.CompletionItem(label=path, kind=T.CompletionItemKind.Folder if folder else T.CompletionItemKind.File,
                            text_edit=T.TextEdit(range=rng, new_text=path), filter_text=path,
                            sort_text=("0" if folder else "1") + path)


def document_symbol(s, pos: Positions) -> T.DocumentSymbol:
    return T.DocumentSymbol(name=s.name, detail=s.detail, kind=SYMBOL_KIND.get(s.kind, T.SymbolKind.Variable),
                            range=pos.lsp_range(s.span), selection_range=pos.lsp_range(s.name_span))


def semantic_tokens(tokens, pos: Positions, types, modifiers) -> T.SemanticTokens:
    """(start, end, type, modifiers) tokens in the relative encoding of the protocol (a token
    over several lines is left out)."""
    type_ix = {t: i for i, t in enumerate(types)}
    mod_bits = {m: 1 << i for i, m in enumerate(modifiers)}
    data: list[int] = []
    prev_line = prev_col = 0
    for start, end, typ, mods in tokens:
        line, col = pos.position(start)
        line2, col2 = pos.position(end)
        if line2 != line:
            continue
        data += [line - prev_line, col - prev_col if line == prev_line else col, col2 - col,
                 type_ix[typ], sum(mod_bits[m] for m in mods)]
        prev_line, prev_col = line, col
    return T.SemanticTokens(data=data)


def whole_text_edit(old: str, new: str, pos: Positions) -> list[T.TextEdit]:
    """One edit turning ``old`` into ``new``: the part between their common prefix and suffix.

    >>> from conelang.syntax.text import LineIndex
    >>> (e,) = whole_text_edit("a b c", "a  x c", Positions(LineIndex("a b c")))
    >>> e.range.start.character, e.range.end.character, e.new_text
    (2, 3, ' x')
    """
    if new == old:
        return []
    n = min(len(old), len(new))
    a = 0
    while a < n and old[a] == new[a]:
        a += 1
    b = 0
    while b < n - a and old[len(old) - 1 - b] == new[len(new) - 1 - b]:
        b += 1
    return [T.TextEdit(range=pos.lsp_range((a, len(old) - b)), new_text=new[a:len(new) - b])]
