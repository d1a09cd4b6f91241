"""Names of one ``.cone`` file: what each statement defines, what each name use means, the
files ``use`` statements bring names from, cycles of definitions, and an order to evaluate in.

:class:`Names` is built once per text (cheap: no value is computed) and read by the evaluator,
the expectation checker and the editor.

>>> from conelang.syntax.parser import parse
>>> from conelang.syntax.text import LineIndex
>>> from conelang.semantics.diagnostics import Sink
>>> text = "lattice N = Z^2\\ncone c in N { rays (1,0) }\\ncone d = dual c\\nexpect e pointed"
>>> n = Names(parse(text), LineIndex(text), Sink())
>>> n.kind_of("c"), sorted(n.deps["d"]), n.topological_order(), [d.code for d in n.sink.items]
('cone', ['c'], ['N', 'c', 'd'], ['unknown-name'])
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass

from ..syntax import ast as A
from . import imports as I
from .diagnostics import Related

KIND_ARTICLE = {"lattice": "a lattice", "cone": "a cone", "map": "a map", "morphism": "a morphism",
                "characters": "a list of characters", "fan": "a fan",
                "polytope": "a polytope"}


@dataclass(frozen=True)
class Ref:
    """One use of a name: where, what kind is expected there, and (if known) what it means."""
    name: A.Name
    expected: str | None         # kind expected at this place (None: any kind)
    target: str | None           # the defined name it resolves to, or None when unknown
    owner: str | None            # the definition this use belongs to (None for expectations)


class Names:
    def __init__(self, module, index, sink, resolver=None):
        """``resolver(path)``: the :class:`~conelang.semantics.imports.Resolved` file (or an
        :class:`~conelang.semantics.imports.ImportFailure`) that a ``use "path"`` names; without
        one, every ``use`` statement is an error."""
        self.module = module
        self.index = index
        self.sink = sink
        self.resolver = resolver
        # names that statements which failed to parse were going to define: their uses are not
        # reported again (the syntax error is the one mistake)
        self.unparsed = {err.defines for err in module.errors if err.defines}
        self.defs: dict[str, A.Definition] = {}
        self.expects: list[A.Expect] = []
        self.uses: list[A.UseStmt] = []
        self.used_files: dict[A.UseStmt, I.Resolved] = {}   # the files the use statements name
        self.blind = False           # a `use` of every name failed: unknown names are not reported
        self.refs: list[Ref] = []
        self.deps: dict[str, set[str]] = {}
        self.used: dict[str, list[str]] = {}        # definition -> every name its statement uses
        self.in_cycle: set[str] = set()
        self._collect()
        self._resolve()
        self._find_cycles()

    # ------------------------------------------------------------------ names
    def _collect(self) -> None:
        for st in self.module.statements:
            if isinstance(st, A.Expect):
                self.expects.append(st)
            elif isinstance(st, A.UseStmt):
                self.uses.append(st)
                for entry in self._use_file(st):
                    self._define(entry)
            else:
                self._define(st)
    def _define(self, st) -> None:
        name = st.name.text
        first = self.defs.get(name)
        if first is None:
            self.defs[name] = st
            return
        if isinstance(first, I.Imported) or isinstance(st, I.Imported):
            if (isinstance(first, I.Imported) and isinstance(st, I.Imported)
                    and (first.source_uri, first.source_name) == (st.source_uri, st.source_name)):
                return                   # the same definition brought in twice
            self.sink.error(st.name.span, "import-clash", I.clash_message(name, first, st),
                            related=(Related(first.name.span, f"'{name}' is first {I.verb(first)} here"),))
            return
        line = self.index.position(first.name.span[0])[0] + 1
        self.sink.error(st.name.span, "duplicate-name",
                        f"'{name}' is already defined on line {line}",
                        related=(Related(first.name.span, f"first definition of '{name}'"),))
    def _use_file(self, st: A.UseStmt) -> list:
        """The entries a ``use`` statement brings in (reporting what goes wrong on its path)."""
        if self.resolver is None:
            got = I.ImportFailure("import-not-found",
                                  f"cannot read \"{st.path}\" here: other files are only read for a file on disk")
        else:
            got = self.resolver(st.path)
        if isinstance(got, I.ImportFailure):
            self.sink.error(st.path_span, got.code, got.message)
            if st.items is None:
                self.blind = True
            else:
                self.unparsed.update(item.local.text for item in st.items)
            return []
        self.used_files[st] = got
        return I.imported_entries(self, st, got)
    def kind_of(self, name: str) -> str | None:
        st = self.defs.get(name)
        return st.kind if st is not None else None
    def _use(self, name: A.Name, expected: str | None, owner: str | None) -> None:
        if owner is not None:
            self.used.setdefault(owner, []).append(name.text)
        target = name.text if name.text in self.defs else None
        self.refs.append(Ref(name, expected, target, owner))
        if target is None and (name.text in self.unparsed or self.blind):
            return
        if target is None:
            close = difflib.get_close_matches(name.text, [n for n in self.defs
                                                          if expected is None or self.kind_of(n) == expected], n=1)
            hint = f"; did you mean '{close[0]}'?" if close else ""
            if not close and expected == "lattice":
                hint = self._dual_hint(name.text)
            what = f" {expected}" if expected else ""
            self.sink.error(name.span, "unknown-name", f"unknown{what} '{name.text}'{hint}")
            return
        kind = self.kind_of(target)
        if expected is not None and kind != expected:
            self.sink.error(name.span, "wrong-kind",
                            f"'{name.text}' is {KIND_ARTICLE[kind]}, but {KIND_ARTICLE[expected]} is expected here",
                            related=(Related(self.defs[target].name.span, f"'{name.text}' is defined here"),))
            return
        if owner is not None:
            self.deps.setdefault(owner, set()).add(target)
    def _dual_hint(self, text: str) -> str:
        """For an unknown lattice such as ``M``: how the dual of a defined lattice is written
        (``M`` → ``dual N``, ``M1`` → ``dual N1``, or the one lattice of the file)."""
        lattices = [n for n, st in self.defs.items() if st.kind == "lattice"]
        partner = "N" + text[1:] if text[:1] == "M" else None
        if partner not in lattices:
            partner = lattices[0] if len(lattices) == 1 else None
        if partner is None:
            return ""
        return f"; the dual lattice of {partner} is written 'dual {partner}'"
    def _lattice_uses(self, expr, owner) -> None:
        if isinstance(expr, A.LatticeName):
            self._use(expr.name, "lattice", owner)
        elif isinstance(expr, A.DualLattice):
            self._lattice_uses(expr.inner, owner)
    def _cone_uses(self, expr, owner) -> None:
        if isinstance(expr, A.ConeRef):
            self._use(expr.name, "cone", owner)
        elif isinstance(expr, (A.DualCone, A.FaceCone)):
            self._cone_uses(expr.inner, owner)
        elif isinstance(expr, A.MeetCone):
            self._cone_uses(expr.left, owner)
            self._cone_uses(expr.right, owner)
        elif isinstance(expr, (A.ImageCone, A.PreimageCone)):
            self._use(expr.map, "map", owner)
            self._cone_uses(expr.inner, owner)
        elif isinstance(expr, A.ConeOver):
            self._use(expr.polytope, "polytope", owner)
    def _polytope_uses(self, expr, owner) -> None:
        if isinstance(expr, A.PolytopeRef):
            self._use(expr.name, "polytope", owner)
        elif isinstance(expr, (A.PolarPolytope, A.PolytopeFace, A.Dilation)):
            self._polytope_uses(expr.inner, owner)
        elif isinstance(expr, A.PolytopeBinary):
            self._polytope_uses(expr.left, owner)
            self._polytope_uses(expr.right, owner)
    def _resolve(self) -> None:
        for st in self.module.statements:
            if isinstance(st, A.UseStmt):
                continue
            owner = None if isinstance(st, A.Expect) else st.name.text
            if owner is not None and self.defs.get(owner) is not st:
                owner = None  # a duplicate: its uses are still resolved, but it defines nothing
            if isinstance(st, A.LatticeStmt):
                if not isinstance(st.body, A.Overlattice):
                    self._lattice_uses(st.body, owner)
            elif isinstance(st, (A.ConeDef, A.CharactersStmt, A.FanDef, A.PolytopeDef)):
                self._lattice_uses(st.lattice, owner)
            elif isinstance(st, A.ConeLet):
                self._cone_uses(st.expr, owner)
            elif isinstance(st, A.MapStmt):
                self._lattice_uses(st.source, owner)
                self._lattice_uses(st.target, owner)
            elif isinstance(st, A.MorphismDef):
                self._use(st.map, "map", owner)
                self._use(st.source, "cone", owner)
                self._use(st.target, "cone", owner)
            elif isinstance(st, A.MorphismCompose):
                for p in st.parts:
                    self._use(p, "morphism", owner)
            elif isinstance(st, A.FanResolve):
                self._use(st.cone, "cone", owner)
            elif isinstance(st, A.PolytopeLet):
                self._polytope_uses(st.expr, owner)
            elif isinstance(st, A.FanOfPolytope):
                self._use(st.polytope, "polytope", owner)
            elif isinstance(st, A.FanSubdivide):
                self._use(st.base, None, owner)
            elif isinstance(st, A.Expect):
                self._use(st.subject, None, None)
                if st.cone is not None:
                    self._cone_uses(st.cone, None)
    def _find_cycles(self) -> None:
        """Tarjan's strongly connected components on the dependency graph."""
        index: dict[str, int] = {}
        low: dict[str, int] = {}
        stack: list[str] = []
        on_stack: set[str] = set()
        counter = [0]
        components: list[list[str]] = []

        def visit(v: str) -> None:
            work = [(v, iter(sorted(self.deps.get(v, ()))))]
            index[v] = low[v] = counter[0]
            counter[0] += 1
            stack.append(v)
            on_stack.add(v)
            while work:
                node, it = work[-1]
                advanced = False
                for w in it:
                    if w not in index:
                        index[w] = low[w] = counter[0]
                        counter[0] += 1
                        stack.append(w)
                        on_stack.add(w)
                        work.append((w, iter(sorted(self.deps.get(w, ())))))
                        advanced = True
                        break
                    if w in on_stack:
                        low[node] = min(low[node], index[w])
                if advanced:
                    continue
                work.pop()
                if work:
                    low[work[-1][0]] = min(low[work[-1][0]], low[node])
                if low[node] == index[node]:
                    comp = []
                    while True:
                        w = stack.pop()
                        on_stack.discard(w)
                        comp.append(w)
                        if w == node:
                            break
                    components.append(comp)

        for v in sorted(self.defs):
            if v not in index:
                visit(v)
        for comp in components:
            if len(comp) == 1 and comp[0] not in self.deps.get(comp[0], ()):
                continue
            members = sorted(comp, key=lambda n: self.defs[n].span[0])
            self.in_cycle.update(members)
            chain = " → ".join(members + [members[0]])
            for n in members:
                self.sink.error(self.defs[n].name.span, "cycle",
                                f"the definition of '{n}' depends on itself: {chain}")
    def topological_order(self) -> list[str]:
        """Definitions with what they use first (iteratively: long chains need no deep recursion)."""
        order, state = [], {}
        for root in self.defs:
            if root in state:
                continue
            stack = [(root, iter(sorted(self.deps.get(root, ()))))]
            state[root] = 1
            while stack:
                node, it = stack[-1]
                for w in it:
                    if w not in state:
                        state[w] = 1
                        stack.append((w, iter(sorted(self.deps.get(w, ())))))
                        break
                else:
                    stack.pop()
                    state[node] = 2
                    order.append(node)
        return order
