"""The one analysis entry point shared by the command line and the language server.

The host keeps the text of each open file and answers questions in files and offsets; it
does no I/O.  Analyses are cached per text, and heavy results per mathematical value (see
:mod:`conelang.semantics.engine`).  The editor questions (hover, completion, code actions,
inlay hints, semantic tokens, outline, folding, rename, formatting) are pure functions of the
text and an offset, in :mod:`conelang.ide.editor`; the language server only converts positions.

>>> h = AnalysisHost()
>>> h.apply_change("mem://a.cone", "lattice N = Z^2\\ncone c in N { rays (1,0) (1,2) }")
>>> h.definition("mem://a.cone", 26)   # the lattice name in 'in N'
(8, 9)
"""
from __future__ import annotations

import os

from ..geometry import budget as gbudget
from ..project import uri_to_path
from ..semantics.analysis import Analysis
from ..semantics.diagnostics import Diagnostic, sort_key
from ..semantics.engine import Engine
from ..semantics.facts import object_facts
from ..semantics.imports import Imported, ImportFailure, Resolved
from ..syntax import ast as A
from ..syntax.text import LineIndex
from . import editor


def diagnostic_json(d: Diagnostic, index) -> dict:
    """A diagnostic as the JSON document writes it (1-based lines and columns)."""
    l1, c1 = index.position(d.span[0])
    l2, c2 = index.position(d.span[1])
    return {"line": l1 + 1, "column": c1 + 1, "end_line": l2 + 1, "end_column": c2 + 1,
            "severity": d.severity, "code": d.code, "message": d.message}


def diagnostic_line(path: str, d: dict) -> str:
    """The one-line form of a diagnostic (a :func:`diagnostic_json` dict) that ``check`` and
    ``show`` print, ``path:line:col: severity: message [code]``.

    >>> diagnostic_line("a.cone", {"line": 2, "column": 5, "severity": "error", "message": "no", "code": "syntax"})
    'a.cone:2:5: error: no [syntax]'
    """
    return f"{path}:{d['line']}:{d['column']}: {d['severity']}: {d['message']} [{d['code']}]"


class AnalysisHost:
    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT, cancel=None, progress=None,
                 loader=None):
        """``cancel``: an object with ``is_set()`` (a threading or multiprocessing Event, or the
        language server's per-job flag) that stops heavy computations when set.  ``progress``:
        called as ``progress(what, budget)`` when a heavy computation starts (``what`` names the
        computation; ``budget.used`` grows while it runs) and ``progress(name, None)`` when the
        facts of the definition ``name`` are about to be computed.  ``loader``: reads the files
        that ``use`` statements name (:class:`conelang.project.FileLoader`); without one, a
        ``use`` statement is an error.  Open files (``apply_change``) win over the loader's."""
        self.budget_limit = budget_limit
        self.cancel = cancel
        self.progress = progress
        self.texts: dict[str, str] = {}
        self._analyses: dict[str, Analysis] = {}
        self._static: dict[str, list[Diagnostic]] = {}   # uri -> its diagnostics found before any evaluation
        self._indexes: dict[str, LineIndex] = {}
        self.loader = loader
        self._disk: dict[str, object] = {}           # texts (or failures) read by the loader
        self._graph: dict[str, tuple[str, list]] = {}   # uri -> (text, the uris its use statements name)
        self._importers: dict[str, set[str]] = {}    # uri -> uris whose cached analysis uses it
        self._released: dict[str, None] = {}          # see release(), oldest first

    # -- files ---------------------------------------------------------------------------
    def apply_change(self, uri: str, text: str) -> None:
        before = self.texts.get(uri, self._disk.get(uri))
        self.texts[uri] = text
        if before != text:
            self._drop(uri)

    def remove(self, uri: str) -> None:
        """Close ``uri``: from now on the files that use it read it from disk."""
        if self.texts.pop(uri, None) is not None:
            self._disk.pop(uri, None)        # read before it was opened: the disk may have changed since
            self._drop(uri)

    def invalidate(self, uri: str) -> None:
        """``uri`` changed on disk: read it again when it is next needed."""
        self._disk.pop(uri, None)
        self._drop(uri)

    def release(self, uri: str, keep: int = 64) -> None:
        """Batch is done with ``uri``: its analysis stays cached while another cached analysis
        uses it, or among the last ``keep`` released files (a file checked before the files that
        use it is then analysed once, not twice); older ones are forgotten."""
        if uri in self.texts:
            self._disk.setdefault(uri, self.texts.pop(uri))
        self._released.pop(uri, None)
        self._released[uri] = None
        while len(self._released) > keep:
            old = next(iter(self._released))
            del self._released[old]
            if not any(u in self._analyses for u in self._importers.get(old, ())):
                for cache in (self._disk, self._analyses, self._static, self._indexes, self._graph, self._importers):
                    cache.pop(old, None)

    def _drop(self, uri: str) -> None:
        """Forget what was computed from the text of ``uri``, and the analyses of every file
        that uses it (directly or through other files)."""
        todo, seen = [uri], set()
        while todo:
            u = todo.pop()
            if u in seen:
                continue
            seen.add(u)
            self._analyses.pop(u, None)
            self._static.pop(u, None)
            self._indexes.pop(u, None)
            todo.extend(self._importers.pop(u, ()))
            todo.extend(v for v, (_, targets) in list(self._graph.items()) if u in targets)

    def forget_files(self) -> None:
        """Forget every file read by the loader and every analysis (the open texts stay), e.g.
        after the loader's rules changed (``allow_outside_root``)."""
        for cache in (self._disk, self._analyses, self._static, self._indexes, self._graph, self._importers):
            cache.clear()

    def used_files(self, uri: str) -> list[str]:
        """The files ``uri`` uses, directly or through other files (not ``uri`` itself),
        nearest first; a file that cannot be read is listed, the files it would use are not."""
        seen, order, todo = {uri}, [], [uri]
        while todo:
            nxt = []
            for u in todo:
                for v in self._uses_of(u):
                    if v not in seen:
                        seen.add(v)
                        order.append(v)
                        nxt.append(v)
            todo = nxt
        return order

    def source(self, uri: str) -> str | None:
        """The text the analysis of ``uri`` reads: the open one, else the loader's (None when
        it cannot be read)."""
        if uri in self.texts:
            return self.texts[uri]
        if self.loader is None:
            return None
        got = self._source(uri)
        return got if isinstance(got, str) else None

    def use_path_completions(self, uri: str, offset: int):
        """Inside the quotes of a ``use`` statement: (offset where the path starts, the paths
        the loader offers there); else None."""
        hit = editor.use_path_prefix(self.text(uri), offset)
        if hit is None:
            return None
        prefix, start = hit
        return start, (self.loader.cone_paths(uri, prefix) if self.loader is not None else [])

    def dependents(self, uri: str, candidates=()) -> list[str]:
        """The files that use ``uri``, directly or through other files: among the files this host
        knows and ``candidates`` (say, every ``.cone`` file of the editor's workspace)."""
        known = set(self.texts) | set(self._graph) | set(self._analyses) | set(candidates)
        out = [u for u in sorted(known) if u != uri and self._path_between(u, uri) is not None]
        return out

    # -- use statements (the loader does the reading; see conelang.project) --------------
    def _source(self, uri: str, path: str | None = None):
        """The text of ``uri``: the open one, or what the loader reads (an ImportFailure when it
        cannot)."""
        if uri in self.texts:
            return self.texts[uri]
        got = self._disk.get(uri)
        if got is None:
            if self.loader is None:
                return ImportFailure("import-not-found", f"cannot read \"{path or uri}\" here")
            got = self.loader.load(uri, path or uri)
            if not isinstance(got, ImportFailure):      # a failure is not kept: it is cheap to try again
                self._disk[uri] = got
        return got

    def _uses_of(self, uri: str) -> list[str]:
        """The files the use statements of ``uri`` name (those that can be located)."""
        text = self._source(uri)
        if isinstance(text, ImportFailure):
            return []
        hit = self._graph.get(uri)
        if hit is not None and hit[0] == text:
            return hit[1]
        targets = []
        if self.loader is not None and "use" in text:
            from ..syntax.parser import parse
            for st in parse(text).statements:
                if isinstance(st, A.UseStmt):
                    got = self.loader.locate(uri, st.path)
                    if isinstance(got, str):
                        targets.append(got)
        self._graph[uri] = (text, targets)
        return targets

    def _path_between(self, start: str, goal: str) -> list[str] | None:
        """A chain of files ``start → … → goal`` along use statements, or None."""
        parent, todo = {start: None}, [start]
        while todo:
            u = todo.pop()
            if u == goal:
                chain = []
                while u is not None:
                    chain.append(u)
                    u = parent[u]
                return chain[::-1]
            for v in self._uses_of(u):
                if v not in parent:
                    parent[v] = u
                    todo.append(v)
        return None

    def _resolver(self, uri: str):
        def resolve(path: str):
            if self.loader is None:
                return ImportFailure("import-not-found",
                                     f"cannot read \"{path}\" here: other files are only read for a file on disk")
            target = self.loader.locate(uri, path)
            if isinstance(target, ImportFailure):
                return target
            # recorded before the checks below: a file that is missing or part of a cycle now
            # may be readable later, and then this analysis must be made again
            self._importers.setdefault(target, set()).add(uri)
            chain = self._path_between(target, uri)
            if chain is not None:
                names = [self._label(u) for u in [uri] + chain]
                return ImportFailure("import-cycle", "files that use each other: " + " → ".join(names))
            text = self._source(target, path)
            if isinstance(text, ImportFailure):
                return text
            return Resolved(target, path, self.analysis(target))
        return resolve

    def _label(self, uri: str) -> str:
        """The file name of ``uri`` for messages (the uri itself when it names no file)."""
        return os.path.basename(uri_to_path(uri) or "") or uri

    def forget_analysis(self, uri: str) -> None:
        """Drop the cached analysis of ``uri`` (e.g. after a cancelled computation)."""
        self._analyses.pop(uri, None)
        self._static.pop(uri, None)

    def text(self, uri: str) -> str:
        """The text of ``uri`` the host analyses: the open one, else the loader's ("" when
        there is none)."""
        if uri in self.texts:
            return self.texts[uri]
        return self.source(uri) or ""

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
            text = self.texts.get(uri) if uri in self.texts else self._source(uri)
            ix = self._indexes[uri] = LineIndex(text if isinstance(text, str) else "")
        return ix

    def analysis(self, uri: str, engine: Engine | None = None) -> Analysis:
        a = self._analyses.get(uri)
        if a is None:
            text = self._source(uri) if (uri not in self.texts and self.loader is not None) else self.texts.get(uri, "")
            if isinstance(text, ImportFailure):
                text = ""
            a = Analysis(text, engine or Engine(self.budget_limit, self.cancel, self.progress),
                         resolver=self._resolver(uri))
            self._analyses[uri] = a
            self._static[uri] = sorted(a.sink.items, key=sort_key)   # nothing is evaluated yet
        return a

    # -- questions -----------------------------------------------------------------------
    def diagnostics(self, uri: str, expectations: bool = True) -> list[Diagnostic]:
        return self.analysis(uri).diagnostics(expectations)

    def static_diagnostics(self, uri: str) -> list[Diagnostic]:
        """The diagnostics found without computing any value: syntax, names, kinds, cycles and
        ``use`` statements (cheap: parsing and name resolution only, for an editor's event loop;
        :meth:`diagnostics` adds what evaluation finds).

        >>> h = AnalysisHost(); h.apply_change("m", "lattice N = Z^2\\ncone c in N { rays (2,0) }\\nexpect d pointed")
        >>> [d.code for d in h.static_diagnostics("m")], [d.code for d in h.diagnostics("m")]
        (['unknown-name'], ['not-primitive', 'unknown-name'])
        """
        self.analysis(uri)
        return list(self._static[uri])

    def statement_sources(self, uri: str) -> list[tuple[str, tuple[int, int]]]:
        """(source text, span) of every statement of ``uri`` that parses, in file order (no
        evaluation): what an editor needs to move the results of unchanged statements after an
        edit."""
        a = self.analysis(uri)
        return [(a.text[st.span[0]:st.span[1]], st.span) for st in a.module.statements]

    def name_at(self, uri: str, offset: int) -> tuple[str, str | None, tuple[int, int]] | None:
        """(name, kind, span) of the name under ``offset`` (a definition or a use; kind None when
        the name is unknown), without evaluating anything."""
        a = self.analysis(uri)
        hit = a.node_at(offset)
        if hit is None or hit[1] is None:
            return None
        return hit[1], a.kind_of(hit[1]), hit[2]

    def is_open(self, uri: str) -> bool:
        """Whether ``uri`` has a text given by :meth:`apply_change` (an open document)."""
        return uri in self.texts

    def open_files(self) -> list[tuple[str, str]]:
        """(uri, text) of the open documents."""
        return list(self.texts.items())

    def diagnostic_lines(self, uri: str, label: str | None = None) -> list[tuple[str, str]]:
        """(severity, line) for each diagnostic of ``uri``, as ``conelang check`` prints them."""
        a = self.analysis(uri)
        return [(d.severity, diagnostic_line(label or uri, diagnostic_json(d, a.index)))
                for d in self.diagnostics(uri)]

    def document(self, uri: str, label: str | None = None, names: list[str] | None = None,
                 heavy: bool = True) -> dict:
        """The JSON document of docs/language.md: file, diagnostics, objects."""
        a = self.analysis(uri)
        diags = a.diagnostics(True)
        objects = {}
        for name, st in a.defs.items():
            if names and name not in names or isinstance(st, Imported):   # an imported file's own
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

    # -- questions across files (a name brought in by `use` leads to the file defining it) --
    def _origin(self, uri: str, offset: int):
        """(uri, name) of the definition that the name under ``offset`` means, or None."""
        a = self.analysis(uri)
        hit = a.node_at(offset)
        if hit is None or hit[1] is None or hit[1] not in a.defs:
            return None
        entry = a.defs[hit[1]]
        if isinstance(entry, Imported):
            return entry.source_uri, entry.source_name
        return uri, hit[1]

    def _users(self, origin_uri: str, name: str, candidates=()):
        """(uri, analysis, local name, entry) for every file that brings ``name`` of
        ``origin_uri`` in with a use statement."""
        for u in self.dependents(origin_uri, candidates):
            a = self.analysis(u)
            for local, e in a.defs.items():
                if isinstance(e, Imported) and (e.source_uri, e.source_name) == (origin_uri, name):
                    yield u, a, local, e

    def _use_target(self, uri: str, offset: int):
        """On the path of a use statement: (the file it names, (0, 0)); on a name of its list
        (``wedge`` in ``(wedge as w)``): (that file, the span of the definition); else None."""
        a = self.analysis(uri)
        for st in a.uses:
            got = a.used_files.get(st)
            if got is None or not st.span[0] <= offset <= st.span[1]:
                continue
            if st.path_span[0] <= offset <= st.path_span[1]:
                return got.uri, (0, 0)
            for item in st.items or ():
                entry = got.analysis.defs.get(item.name.text)
                if item.name.span[0] <= offset <= item.name.span[1] and entry is not None and A.is_definition(entry):
                    return got.uri, entry.name.span
        return None

    def definition_location(self, uri: str, offset: int):
        """(uri, span) of the definition of the name under ``offset``, in whichever file (on
        the path of a use statement: the start of the file it names)."""
        got = self._origin(uri, offset)
        if got is None:
            return self._use_target(uri, offset)
        origin_uri, name = got
        return origin_uri, self.analysis(origin_uri).defs[name].name.span

    def references_everywhere(self, uri: str, offset: int, include_definition: bool = True,
                              candidates=()) -> list[tuple[str, tuple]]:
        """(uri, span) of every use of the name under ``offset``: in the file defining it and
        in the files that use it (those this host knows, and ``candidates``)."""
        got = self._origin(uri, offset)
        if got is None:
            return []
        origin_uri, name = got
        a0 = self.analysis(origin_uri)
        out = [(origin_uri, a0.defs[name].name.span)] if include_definition else []
        out += [(origin_uri, r.name.span) for r in a0.refs if r.target == name]
        for u, a, local, e in self._users(origin_uri, name, candidates):
            if e.name.span != e.use.path_span:
                out.append((u, e.name.span if e.name.text == name else
                            next(i.name.span for i in e.use.items if i.local.text == local)))
            out += [(u, r.name.span) for r in a.refs if r.target == local]
        return out

    def rename_everywhere(self, uri: str, offset: int, new_name: str, candidates=()) -> dict[str, list]:
        """Edits per file renaming the name under ``offset`` in every file that means it.  A
        local alias (``use "f.cone" (wedge as w)``) is renamed in its own file only; otherwise
        the definition is renamed in its file and in every file that uses it, the names in use
        lists included (an alias elsewhere keeps its local name).  Raises
        :class:`conelang.ide.editor.RenameError` when the new name clashes in any of them."""
        a = self.analysis(uri)
        hit = editor.prepare_rename(a, offset)
        if hit is None:
            raise editor.RenameError("no defined name here")
        entry = a.defs[hit[1]]
        if isinstance(entry, Imported) and entry.name.text != entry.source_name:
            return {uri: editor.rename_name(a, hit[1], new_name)}
        origin_uri, name = (entry.source_uri, entry.source_name) if isinstance(entry, Imported) else (uri, hit[1])
        edits = {origin_uri: editor.rename_name(self.analysis(origin_uri), name, new_name)}
        for u, ua, local, e in self._users(origin_uri, name, candidates):
            if local != name:                  # brought in under an alias: only the listed name
                item = next(i for i in e.use.items if i.local.text == local)
                edits.setdefault(u, []).append(editor.Edit(item.name.span, new_name))
            else:
                edits.setdefault(u, []).extend(editor.rename_name(ua, local, new_name))
        return {u: sorted(es, key=lambda e: e.span) for u, es in edits.items() if es}

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

    def defined_names(self, uri: str) -> dict[str, str | None]:
        """Every name ``uri`` can use: None for its own definitions, the path of the file
        defining it for a name a ``use`` statement brings in."""
        return {n: (st.source_label if isinstance(st, Imported) else None)
                for n, st in self.analysis(uri).defs.items()}

    def symbols(self, uri: str) -> list[tuple[str, str, tuple, tuple]]:
        """(name, kind, statement span, name span) for every definition, in file order."""
        a = self.analysis(uri)
        return [(st.name.text, st.kind, st.span, st.name.span)
                for st in a.module.statements if A.is_definition(st)]

    # -- editor questions (see conelang.ide.editor; every answer is a pure function of the text) --
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
        from ..syntax.format import format_text
        return format_text(self.text(uri))
