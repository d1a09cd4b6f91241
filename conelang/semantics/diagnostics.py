"""Diagnostics: what the checker says about a file, at a span, with a stable code.

Codes are stable (tests, editors and CI scripts may match on them); see DEVELOPERS.md for
the full list.
"""
from __future__ import annotations

from dataclasses import dataclass

Span = tuple[int, int]

ERROR, WARNING, INFORMATION, HINT = "error", "warning", "information", "hint"

class EvalError(Exception):
    """Evaluation of a definition failed; the diagnostic has already been reported."""

@dataclass(frozen=True)
class Related:
    """Another place that explains a diagnostic (e.g. the definition that is violated)."""
    span: Span
    message: str

@dataclass(frozen=True)
class Fix:
    """A text edit that repairs the problem: replace ``span`` by ``new_text``."""
    title: str
    span: Span
    new_text: str

@dataclass(frozen=True)
class Diagnostic:
    span: Span
    severity: str
    code: str
    message: str
    related: tuple[Related, ...] = ()
    unnecessary: bool = False
    fixes: tuple[Fix, ...] = ()

    @property
    def is_error(self) -> bool:
        return self.severity == ERROR

class Sink:
    """Collects diagnostics, dropping exact repeats."""

    def __init__(self):
        self.items: list[Diagnostic] = []
        self._seen: set = set()
        self.recording: list[Diagnostic] | None = None   # when a list: every add, repeats too

    def add(self, span: Span, severity: str, code: str, message: str, **kw) -> None:
        d = Diagnostic(span, severity, code, message, **kw)
        if self.recording is not None:
            self.recording.append(d)
        key = (span, code, message)
        if key in self._seen:
            return
        self._seen.add(key)
        self.items.append(d)

    def add_diagnostic(self, d: Diagnostic) -> None:
        """Add an existing diagnostic (e.g. one remembered from an earlier analysis).

        >>> s = Sink(); s.add_diagnostic(Diagnostic((0, 1), "error", "syntax", "x")); s.add((0, 1), "error", "syntax", "x")
        >>> len(s.items)
        1
        """
        if self.recording is not None:
            self.recording.append(d)
        key = (d.span, d.code, d.message)
        if key in self._seen:
            return
        self._seen.add(key)
        self.items.append(d)

    def error(self, span: Span, code: str, message: str, **kw) -> None:
        self.add(span, ERROR, code, message, **kw)

    def warning(self, span: Span, code: str, message: str, **kw) -> None:
        self.add(span, WARNING, code, message, **kw)

    def info(self, span: Span, code: str, message: str, **kw) -> None:
        self.add(span, INFORMATION, code, message, **kw)

def sort_key(d: Diagnostic):
    return (d.span[0], d.span[1], d.code)

def shifted(d: Diagnostic, delta: int) -> Diagnostic:
    """``d`` with its span, related spans and fix spans moved by ``delta`` characters.

    >>> shifted(Diagnostic((3, 5), "warning", "not-primitive", "m", fixes=(Fix("t", (3, 5), "x"),)), 10).fixes[0].span
    (13, 15)
    """
    def mv(sp):
        return (sp[0] + delta, sp[1] + delta)
    return Diagnostic(mv(d.span), d.severity, d.code, d.message,
                      tuple(Related(mv(r.span), r.message) for r in d.related), d.unnecessary,
                      tuple(Fix(f.title, mv(f.span), f.new_text) for f in d.fixes))

