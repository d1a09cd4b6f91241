"""The one analysis entry point shared by the command line and the language server.

The host keeps the text of each open file and answers questions in files and offsets; it
does no I/O.  Analyses are cached per text, and heavy results per mathematical value (see
:mod:`conelang.semantics.engine`).

>>> h = AnalysisHost()
>>> h.apply_change("mem://a.cone", "lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }")
>>> h.definition("mem://a.cone", 43)   # the lattice name in 'in N'
(8, 9)
"""
from __future__ import annotations

from .geometry import budget as gbudget
from .semantics.analysis import Analysis
from .semantics.diagnostics import Diagnostic
from .semantics.engine import Engine
from .semantics.facts import object_facts
from .syntax import ast as A


def diagnostic_json(d: Diagnostic, index) -> dict:
    l1, c1 = index.position(d.span[0])
    l2, c2 = index.position(d.span[1])
    return {"line": l1 + 1, "column": c1 + 1, "end_line": l2 + 1, "end_column": c2 + 1,
            "severity": d.severity, "code": d.code, "message": d.message}


class AnalysisHost:
    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT):
        self.budget_limit = budget_limit
        self.texts: dict[str, str] = {}
        self._analyses: dict[str, Analysis] = {}

    # -- files ---------------------------------------------------------------------------
    def apply_change(self, uri: str, text: str) -> None:
        if self.texts.get(uri) != text:
            self.texts[uri] = text
            self._analyses.pop(uri, None)

    def remove(self, uri: str) -> None:
        self.texts.pop(uri, None)
        self._analyses.pop(uri, None)

    def analysis(self, uri: str, engine: Engine | None = None) -> Analysis:
        a = self._analyses.get(uri)
        if a is None:
            a = Analysis(self.texts.get(uri, ""), engine or Engine(self.budget_limit))
            self._analyses[uri] = a
        return a

    # -- questions -----------------------------------------------------------------------
    def diagnostics(self, uri: str, expectations: bool = True) -> list[Diagnostic]:
        return self.analysis(uri).diagnostics(expectations)

    def document(self, uri: str, label: str | None = None, names: list[str] | None = None,
                 heavy: bool = True) -> dict:
        """The JSON document of LANGUAGE.md: file, diagnostics, objects."""
        a = self.analysis(uri)
        diags = a.diagnostics(True)
        objects = {}
        for name, st in a.defs.items():
            if names and name not in names:
                continue
            facts = object_facts(a, name, heavy)
            if facts is not None:
                objects[name] = facts
        # facts may add diagnostics (e.g. budgets) — read them again
        diags = sorted(a.sink.items, key=lambda d: (d.span, d.code))
        return {"file": label or uri, "diagnostics": [diagnostic_json(d, a.index) for d in diags],
                "objects": objects}

    def definition(self, uri: str, offset: int):
        a = self.analysis(uri)
        hit = a.node_at(offset)
        if hit is None or hit[1] is None:
            return None
        st = a.defs.get(hit[1])
        return st.name.span if st is not None else None

    def references(self, uri: str, offset: int, include_definition: bool = True) -> list:
        a = self.analysis(uri)
        hit = a.node_at(offset)
        if hit is None or hit[1] is None:
            return []
        name = hit[1]
        spans = [r.name.span for r in a.refs if r.target == name]
        if include_definition and name in a.defs:
            spans.insert(0, a.defs[name].name.span)
        return spans

    def symbols(self, uri: str) -> list[tuple[str, str, tuple, tuple]]:
        """(name, kind, statement span, name span) for every definition, in file order."""
        a = self.analysis(uri)
        return [(st.name.text, st.kind, st.span, st.name.span)
                for st in a.module.statements if not isinstance(st, A.Expect)]

    def hover(self, uri: str, offset: int) -> tuple[str, tuple] | None:
        """Markdown about the name under ``offset`` and the span it covers."""
        from .render.markdown import render_object
        a = self.analysis(uri)
        hit = a.node_at(offset)
        if hit is None or hit[1] is None:
            return None
        name = hit[1]
        a.evaluate_all()
        facts = object_facts(a, name, heavy=True)
        if facts is None:
            return (f"`{name}`: {a.kind_of(name)} (has errors)", hit[2])
        return (render_object(name, facts, level=3), hit[2])
