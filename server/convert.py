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
