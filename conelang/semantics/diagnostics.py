"""Diagnostics: what the checker says about a file, at a span, with a stable code.

Codes are stable (tests, editors and CI scripts may match on them); see DEVELOPERS.md for
the full list.
"""
from __future__ import annotations

from dataclasses import dataclass

Span = tuple[int, int]

ERROR, WARNING, INFORMATION, HINT = "error", "warning", "information", "hint"


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

    def add(self, span: Span, severity: str, code: str, message: str, **kw) -> None:
        key = (span, code, message)
        if key in self._seen:
            return
        self._seen.add(key)
        self.items.append(Diagnostic(span, severity, code, message, **kw))

    def error(self, span: Span, code: str, message: str, **kw) -> None:
        self.add(span, ERROR, code, message, **kw)

    def warning(self, span: Span, code: str, message: str, **kw) -> None:
        self.add(span, WARNING, code, message, **kw)

    def info(self, span: Span, code: str, message: str, **kw) -> None:
        self.add(span, INFORMATION, code, message, **kw)


def sort_key(d: Diagnostic):
    return (d.span[0], d.span[1], d.code)
