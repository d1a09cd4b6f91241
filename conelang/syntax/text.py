"""Offsets, lines and columns.

>>> ix = LineIndex("ab\\ncd")
>>> ix.position(4)
(1, 1)
>>> ix.offset(1, 1)
4
"""
from __future__ import annotations

import bisect


class LineIndex:
    """Maps character offsets to 0-based (line, column) and back; also UTF-16 columns (LSP)."""

    def __init__(self, text: str):
        self.text = text
        self.starts = starts = [0]
        find = text.find
        i = find("\n")
        while i >= 0:
            starts.append(i + 1)
            i = find("\n", i + 1)

    @property
    def is_ascii(self) -> bool:
        """True when the text is ASCII: then columns in characters, UTF-16 and UTF-8 agree.

        >>> LineIndex("ab").is_ascii, LineIndex("é").is_ascii
        (True, False)
        """
        a = self.__dict__.get("_ascii")
        if a is None:
            a = self._ascii = self.text.isascii()
        return a

    def position(self, offset: int) -> tuple[int, int]:
        offset = max(0, min(offset, len(self.text)))
        line = bisect.bisect_right(self.starts, offset) - 1
        return line, offset - self.starts[line]

    def offset(self, line: int, column: int) -> int:
        if line < 0:
            return 0
        if line >= len(self.starts):
            return len(self.text)
        start = self.starts[line]
        end = self.starts[line + 1] - 1 if line + 1 < len(self.starts) else len(self.text)
        return min(start + max(column, 0), end)

    def line_text(self, line: int) -> str:
        start = self.starts[line]
        end = self.starts[line + 1] - 1 if line + 1 < len(self.starts) else len(self.text)
        return self.text[start:end]

    # --- UTF-16 (the LSP default position encoding) ---
    def position_utf16(self, offset: int) -> tuple[int, int]:
        line, col = self.position(offset)
        prefix = self.text[self.starts[line]:self.starts[line] + col]
        return line, sum(2 if ord(c) > 0xFFFF else 1 for c in prefix)

    def offset_utf16(self, line: int, column: int) -> int:
        if line < 0:
            return 0
        if line >= len(self.starts):
            return len(self.text)
        text = self.line_text(line)
        units = 0
        for i, c in enumerate(text):
            if units >= column:
                return self.starts[line] + i
            units += 2 if ord(c) > 0xFFFF else 1
        return self.starts[line] + len(text)

    @property
    def line_count(self) -> int:
        return len(self.starts)


def edit_distance(a: str, b: str) -> int:
    """Edits (insert, delete, substitute, swap two neighbours) that turn ``a`` into ``b``:
    the optimal string alignment distance (Damerau's typing errors).

    >>> edit_distance("cnoe", "cone"), edit_distance("rasy", "rays"), edit_distance("map", "fan")
    (1, 1, 2)
    """
    prev2, prev = None, list(range(len(b) + 1))
    for i, ca in enumerate(a, 1):
        cur = [i] + [0] * len(b)
        for j, cb in enumerate(b, 1):
            cur[j] = min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (ca != cb))
            if i > 1 and j > 1 and ca == b[j - 2] and a[i - 2] == cb:
                cur[j] = min(cur[j], prev2[j - 2] + 1)
        prev2, prev = prev, cur
    return prev[-1]


def closest_word(word: str, candidates) -> str | None:
    """The candidate a typo ``word`` most likely meant: within one edit for words of up to four
    letters, two edits for longer ones (ties: the first candidate); None when nothing is close.

    >>> closest_word("gorenstien", ["gorenstein", "generators"]), closest_word("x", ["cone"])
    ('gorenstein', None)
    >>> closest_word("halfspace", ["rays", "halfspaces"])
    'halfspaces'
    """
    best, best_d = None, None
    for c in candidates:
        if c == word:
            return c
        d = edit_distance(word.lower(), c)
        if d <= (1 if min(len(word), len(c)) <= 4 else 2) and (best_d is None or d < best_d):
            best, best_d = c, d
    return best
