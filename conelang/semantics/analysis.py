"""Analysis of one ``.cone`` file: names, kinds, dimensions, evaluation and diagnostics.

:class:`Analysis` is a small façade, built from text and then read-only: parsing, then the
names of :mod:`conelang.semantics.names` (eager, cheap), the evaluator of
:mod:`conelang.semantics.evaluate` (each definition evaluated lazily on first use and
memoised), and the expectation checker of :mod:`conelang.semantics.properties`;
heavy facts (Hilbert bases, equations, invariants) go through :mod:`conelang.semantics.engine`,
which caches them by the mathematical value, so an edit recomputes only what changed.

>>> a = Analysis("lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }\\nexpect c dim = 2")
>>> [d.code for d in a.diagnostics()]
[]
>>> a.value("c").cone.rays
((1, 0), (1, 2))
"""
from __future__ import annotations

from ..syntax import ast as A
from ..syntax.parser import parse
from ..syntax.text import LineIndex
from . import imports as I
from .diagnostics import Diagnostic, Sink, sort_key
from .engine import Engine
from .evaluate import Evaluator, clear_memo  # noqa: F401 (clear_memo: part of this module's API)
from .forms import fmt_vec  # noqa: F401 (read from here by older callers)
from ..geometry.budget import Cancelled
from .names import KIND_ARTICLE, Names, Ref  # noqa: F401 (part of this module's API)
from .properties import check_expect


class Analysis:
    def __init__(self, text: str, engine: Engine | None = None, resolver=None):
        """``resolver(path)``: the :class:`~conelang.semantics.imports.Resolved` file (or an
        :class:`~conelang.semantics.imports.ImportFailure`) that a ``use "path"`` names; without
        one, every ``use`` statement is an error."""
        self.text = text
        self.index = LineIndex(text)
        self.module = parse(text)
        self.engine = engine or Engine()
        self.sink = Sink()
        for err in self.module.errors:
            self.sink.error(err.span, "syntax", err.message)
        self.names = Names(self.module, self.index, self.sink, resolver)
        self.evaluator = Evaluator(self.names, self.engine, self.sink, text)
        n = self.names
        # the names of the file, read by the checker, the facts and the editor
        self.defs, self.expects, self.uses, self.refs = n.defs, n.expects, n.uses, n.refs
        self.deps, self.in_cycle, self.unparsed, self.used_files = n.deps, n.in_cycle, n.unparsed, n.used_files
        self.kind_of = n.kind_of
        self.topological_order = n.topological_order
        # evaluation
        self.value = self.evaluator.value
        self.cone_expr = self.evaluator.cone_expr
        self.evaluate_all = self.evaluator.evaluate_all

    # ------------------------------------------------------------------ expectations
    def check_expectations(self) -> None:
        for ex in self.expects:
            try:
                check_expect(self, ex)
            except Cancelled:
                raise
            except Exception as exc:  # one broken check must not hide the others
                self.sink.error(ex.span, "internal-error",
                                f"internal error while checking this expectation: {type(exc).__name__}: {exc}")
    def diagnostics(self, expectations: bool = True) -> list[Diagnostic]:
        """All diagnostics of the file, sorted by position."""
        self.evaluate_all()
        if expectations:
            self.check_expectations()
        return sorted(self.sink.items, key=sort_key)
    # ------------------------------------------------------------------ queries by offset
    def node_at(self, offset: int):
        """The name use or definition name at ``offset`` (for hover, definition, rename)."""
        for st in self.module.statements:
            if A.is_definition(st) and st.name.span[0] <= offset <= st.name.span[1]:
                return ("def", st.name.text, st.name.span)
        for st in self.defs.values():
            if isinstance(st, I.Imported) and st.name.span != st.use.path_span \
                    and st.name.span[0] <= offset <= st.name.span[1]:
                return ("def", st.name.text, st.name.span)
        for ref in self.refs:
            if ref.name.span[0] <= offset <= ref.name.span[1]:
                return ("ref", ref.target, ref.name.span)
        return None
    def statement_at(self, offset: int):
        for st in self.module.statements:
            if st.span[0] <= offset <= st.span[1]:
                return st
        return None
