"""Names that other files define, brought in by ``use`` statements.

An analysis never reads a file: it asks a *resolver* (given by the host, which asks its
loader) for the analysis of the file a ``use`` statement names.  The resolver answers with a
:class:`Resolved` (the other file's analysis, shared by every file that uses it, so a shared
definition is computed once) or an :class:`ImportFailure` (a diagnostic code and message: the
file is missing or unreadable, outside the project root, or part of a cycle of files).

Each name brought in becomes an :class:`Imported` entry of the analysis's ``defs``: it has the
kind of the definition in the other file, its value is that definition's value, and its
diagnostics stay with the other file.

Public names are those not starting with ``_``; only names a file *defines* are exported (a
name it uses from a third file is not passed on).

>>> class One:            # a resolver that knows one file
...     def __init__(self): self.other = Analysis("lattice N = Z^2\\ncone _c in N { rays (1,0) }")
...     def __call__(self, path): return Resolved("mem://shared.cone", "shared.cone", self.other)
>>> from conelang.semantics.analysis import Analysis
>>> a = Analysis('use "shared.cone" (N)\\ncone w in N { rays (1,0) (1,2) }', resolver=One())
>>> [d.code for d in a.diagnostics()], a.kind_of("N"), a.value("w").cone.rays
([], 'lattice', ((1, 0), (1, 2)))
>>> b = Analysis('use "shared.cone" (_c)', resolver=One())
>>> [(d.code, d.message) for d in b.diagnostics()]
[('import-unknown-name', "'_c' is private to shared.cone (names starting with '_' are not exported)")]
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass

from ..syntax import ast as A


@dataclass(frozen=True, eq=False)
class Resolved:
    """The file a ``use`` statement names: its URI, how to name it in messages, its analysis."""
    uri: str
    label: str
    analysis: object


@dataclass(frozen=True)
class ImportFailure:
    """A ``use`` statement whose file cannot be used: the diagnostic to report on its path."""
    code: str                     # import-not-found, import-outside-root, import-cycle
    message: str


@dataclass(frozen=True, eq=False)
class Imported:
    """A name defined in another file, as an entry of ``Analysis.defs``.

    ``name`` is the local name and where it is written in this file: the alias or the listed
    name, or the quoted path when the statement brings every public name."""
    name: A.Name
    use: A.UseStmt
    source: object                # the Analysis of the other file
    source_uri: str
    source_label: str
    source_name: str

    @property
    def kind(self) -> str:
        return self.source.defs[self.source_name].kind

    @property
    def span(self) -> A.Span:
        return self.use.span

    @property
    def origin(self):
        """The definition in the other file (its ``name.span`` is an offset in that file)."""
        return self.source.defs[self.source_name]


def public_names(analysis) -> list[str]:
    """The names a file exports, in file order: those it defines, not starting with ``_``."""
    return [n for n, st in analysis.defs.items() if not isinstance(st, Imported) and not n.startswith("_")]


def imported_entries(analysis, st: A.UseStmt, resolved: Resolved) -> list[Imported]:
    """The entries ``st`` brings in from ``resolved``; reports unknown and private names on the
    analysis's sink (and marks them, so their uses are not reported again)."""
    other = resolved.analysis
    label = resolved.label
    if st.items is None:
        return [Imported(A.Name(n, st.path_span), st, other, resolved.uri, label, n) for n in public_names(other)]
    out = []
    for item in st.items:
        src = item.name.text
        entry = other.defs.get(src)
        if entry is None or isinstance(entry, Imported) or src.startswith("_"):
            analysis.unparsed.add(item.local.text)
            analysis.sink.error(item.name.span, "import-unknown-name", unknown_name_message(other, src, label))
            continue
        out.append(Imported(item.local, st, other, resolved.uri, label, src))
    return out


def unknown_name_message(other, name: str, label: str) -> str:
    entry = other.defs.get(name)
    if isinstance(entry, Imported):
        return (f"'{name}' is not defined in {label}: it is used there from {entry.source_label}; "
                f"use it from that file")
    if entry is not None and name.startswith("_"):
        return f"'{name}' is private to {label} (names starting with '_' are not exported)"
    close = difflib.get_close_matches(name, public_names(other), n=1)
    hint = f"; did you mean '{close[0]}'?" if close else ""
    return f"'{name}' is not defined in {label}{hint}"


def clash_message(name: str, first, second) -> str:
    """A name defined twice where at least one of the two comes from a ``use`` statement."""
    def where(e):
        return f"from {e.source_label}" if isinstance(e, Imported) else "in this file"
    used = second if isinstance(second, Imported) else first       # the one to rename
    return (f"'{name}' is both {verb(first)} {where(first)} and {verb(second)} {where(second)}; "
            f"rename one, e.g. use \"{used.use.path}\" ({used.source_name} as {name}_2)")


def verb(e) -> str:
    """How a name came to be: "used" (from another file) or "defined" (here)."""
    return "used" if isinstance(e, Imported) else "defined"
