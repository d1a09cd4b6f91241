"""The one analysis entry point shared by the command line and the language server.

The host keeps the text of each open file and answers questions in files and offsets; it
does no I/O.  Analyses are cached per text, and heavy results per mathematical value (see
:mod:`conelang.semantics.engine`).  The editor questions (hover, completion, code actions,
inlay hints, semantic tokens, outline, folding, rename, formatting) are pure functions of the
text and an offset, in :mod:`conelang.editor`; the language server only converts positions.

>>> h = AnalysisHost()
>>> h.apply_change("mem://a.cone", "lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }")
>>> h.definition("mem://a.cone", 26)   # the lattice name in 'in N'
(8, 9)
"""
from __future__ import annotations

from .geometry import budget as gbudget
from .semantics.analysis import Analysis
from .semantics.diagnostics import Diagnostic
from .semantics.engine import Engine
from .semantics.facts import object_facts
from .syntax import ast as A
from .syntax.text import LineIndex
from . import editor


def diagnostic_json(d: Diagnostic, index) -> dict:
    l1, c1 = index.position(d.span[0])
    l2, c2 = index.position(d.span[1])
    return {"line": l1 + 1, "column": c1 + 1, "end_line": l2 + 1, "end_column": c2 + 1,
            "severity": d.severity, "code": d.code, "message": d.message}


class AnalysisHost:
    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT, cancel=None, progress=None):
        """``cancel``: an object with ``is_set()`` (a threading or multiprocessing Event, or the
        language server's per-job flag) that stops heavy computations when set.  ``progress``:
        called as ``progress(what, budget)`` when a heavy computation starts (``what`` names the
        computation; ``budget.used`` grows while it runs) and ``progress(name, None)`` when the
        facts of the definition ``name`` are about to be computed."""
        self.budget_limit = budget_limit
        self.cancel = cancel
        self.progress = progress
        self.texts: dict[str, str] = {}
        self._analyses: dict[str, Analysis] = {}
        self._indexes: dict[str, LineIndex] = {}

    # -- files ---------------------------------------------------------------------------
    def apply_change(self, uri: str, text: str) -> None:
        if self.texts.get(uri) != text:
            self.texts[uri] = text
            self._analyses.pop(uri, None)
            self._indexes.pop(uri, None)

    def remove(self, uri: str) -> None:
        self.texts.pop(uri, None)
        self._analyses.pop(uri, None)
        self._indexes.pop(uri, None)

    def forget_analysis(self, uri: str) -> None:
        """Drop the cached analysis of ``uri`` (e.g. after a cancelled computation)."""
        self._analyses.pop(uri, None)

    def text(self, uri: str) -> str:
        return self.texts.get(uri, "")

    def line_index(self, uri: str) -> LineIndex:
        """Lines of the current text of ``uri``, without analysing it (offsets ↔ positions).

        >>> h = AnalysisHost(); h.apply_change("m", "a\\nbc")
        >>> h.line_index("m").position(3)
        (1, 1)
        """
        a = self._analyses.get(uri)
        if a is not None:
            return a.index
        ix = self._indexes.get(uri)
        if ix is None:
            ix = self._indexes[uri] = LineIndex(self.texts.get(uri, ""))
        return ix

    def analysis(self, uri: str, engine: Engine | None = None) -> Analysis:
        a = self._analyses.get(uri)
        if a is None:
            a = Analysis(self.texts.get(uri, ""), engine or Engine(self.budget_limit, self.cancel, self.progress))
            self._analyses[uri] = a
        return a

    # -- questions -----------------------------------------------------------------------
    def diagnostics(self, uri: str, expectations: bool = True) -> list[Diagnostic]:
        return self.analysis(uri).diagnostics(expectations)

    def document(self, uri: str, label: str | None = None, names: list[str] | None = None,
                 heavy: bool = True) -> dict:
        """The JSON document of docs/language.md: file, diagnostics, objects."""
        a = self.analysis(uri)
        diags = a.diagnostics(True)
        objects = {}
        for name, st in a.defs.items():
            if names and name not in names:
                continue
            if self.progress is not None:
                self.progress(name, None)
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

    # -- editor questions (see conelang.editor; every answer is a pure function of the text) --
    def hover(self, uri: str, offset: int, heavy: bool = True) -> tuple[str, tuple] | None:
        """Markdown about the name or vector under ``offset`` and the span it covers.

        With ``heavy=False`` only what is cheap to compute is shown (no Hilbert bases,
        equations or invariants).

        >>> h = AnalysisHost()
        >>> h.apply_change("m", "lattice N = Z^2\\ncone c in N { rays (2,0) (1,3) }")
        >>> print(h.hover("m", 36, heavy=False)[0])   # on the vector (2,0)
        ray `(2, 0)` of `c`: **not primitive** (the primitive vector on this ray is `(1, 0)`) · **extremal**
        """
        return editor.hover(self.analysis(uri), offset, heavy)

    def hover_pending(self, uri: str, offset: int) -> str | None:
        """What a heavy hover at ``offset`` still has to compute (None: the hover is cheap)."""
        return editor.hover_pending(self.analysis(uri), offset)

    def object_markdown(self, uri: str, name: str, heavy: bool = True, equations: bool = True) -> str | None:
        return editor.object_markdown(self.analysis(uri), name, heavy, equations)

    def completions(self, uri: str, offset: int) -> list:
        return editor.completions(self.analysis(uri), offset)

    def code_fixes(self, uri: str, start: int, end: int) -> list:
        return editor.code_fixes(self.analysis(uri), start, end)

    def pin_target(self, uri: str, offset: int) -> str | None:
        return editor.pin_target(self.analysis(uri), offset)

    def pin_results(self, uri: str, name: str):
        return editor.pin_results(self.analysis(uri), name)

    def inlay_hints(self, uri: str, heavy: bool = True) -> list:
        return editor.inlay_hints(self.analysis(uri), heavy)

    def semantic_tokens(self, uri: str) -> list:
        return editor.semantic_tokens(self.analysis(uri))

    def outline(self, uri: str) -> list:
        return editor.outline(self.analysis(uri).module, self.text(uri))

    def folding_ranges(self, uri: str) -> list:
        return editor.folding_ranges(self.analysis(uri))

    def prepare_rename(self, uri: str, offset: int):
        return editor.prepare_rename(self.analysis(uri), offset)

    def rename(self, uri: str, offset: int, new_name: str) -> list:
        return editor.rename(self.analysis(uri), offset, new_name)

    def format(self, uri: str) -> str:
        from .syntax.format import format_text
        return format_text(self.text(uri))
