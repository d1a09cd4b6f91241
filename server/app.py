"""The conelang language server (LSP over stdio, pygls 2).

The handlers are thin: they turn positions into offsets, ask :class:`conelang.ide.host.AnalysisHost`
(cheap questions, on the event loop) or the worker process (heavy ones: expectations, Hilbert
bases, equations, invariants; see :mod:`conelang.server.worker`), and turn the answers back into
protocol objects.  Every handler is wrapped so that one bad request never takes the server
down.

Settings (``initializationOptions`` of the client, all optional)::

    {"budget": 20000000,        # work budget per heavy computation, or "none"
     "debounce": 0.15,          # seconds to wait after an edit before checking the file
     "hoverWait": 0.8,          # seconds a hover waits for the worker before saying "computing…"
     "diagnosticsWait": 0.3,    # seconds the cheap diagnostics wait for the full ones
     "allowOutsideRoot": false} # `use` may name files outside the project root

The same settings may come later with ``workspace/didChangeConfiguration`` (under a
``conelang`` key, or at the top level).

Projects of many files: the host reads the files ``use`` statements name through a
:class:`conelang.project.FileLoader` (open documents win over the disk); the worker gets the
texts of the files a job's file uses with every job (see :mod:`conelang.server.worker`); the
workspace's ``.cone`` files, and the files to check again when one changes, are in
:mod:`conelang.server.workspace`.
"""
from __future__ import annotations

import asyncio
import functools
import hashlib
import inspect
import logging
import os
import sys
from collections import OrderedDict
from pathlib import Path
from urllib.parse import unquote, urlparse

from lsprotocol import types as T
from pygls.exceptions import JsonRpcException
from pygls.lsp.server import LanguageServer
from pygls.protocol import LanguageServerProtocol

import conelang
from conelang.ide import editor
from conelang.geometry import budget as gbudget
from conelang.ide import AnalysisHost
from conelang.project import FileLoader
from conelang.syntax import ast as A

from .convert import Positions
from .worker import HeavyWorker, JobCancelled, WorkerFailed
from .workspace import FILE_OPERATIONS, Workspace

log = logging.getLogger("conelang.server")

SEVERITY = {"error": T.DiagnosticSeverity.Error, "warning": T.DiagnosticSeverity.Warning,
            "information": T.DiagnosticSeverity.Information, "hint": T.DiagnosticSeverity.Hint}
COMPLETION_KIND = {"keyword": T.CompletionItemKind.Keyword, "lattice": T.CompletionItemKind.Struct,
                   "cone": T.CompletionItemKind.Variable, "map": T.CompletionItemKind.Function,
                   "morphism": T.CompletionItemKind.Method, "characters": T.CompletionItemKind.EnumMember,
                   "fan": T.CompletionItemKind.Module, "polytope": T.CompletionItemKind.Class, "property": T.CompletionItemKind.Property,
                   "snippet": T.CompletionItemKind.Snippet}
SYMBOL_KIND = {"lattice": T.SymbolKind.Struct, "cone": T.SymbolKind.Variable, "map": T.SymbolKind.Function,
               "morphism": T.SymbolKind.Method, "characters": T.SymbolKind.EnumMember,
               "fan": T.SymbolKind.Module, "polytope": T.SymbolKind.Class}
PIN_COMMAND = "conelang.pinResults"
LEGEND = T.SemanticTokensLegend(token_types=list(editor.TOKEN_TYPES), token_modifiers=list(editor.TOKEN_MODIFIERS))


def fingerprint(text: str) -> str:
    return hashlib.blake2b(text.encode("utf-8", "surrogatepass"), digest_size=16).hexdigest()


class _Dropped:
    """A request that could not be read; it has been answered with an error already."""
    jsonrpc = "dropped"


class ConeProtocol(LanguageServerProtocol):
    """pygls' protocol, except that a request whose params do not fit the method gets an
    error response (instead of no response at all, which would leave the client waiting)."""

    def structure_message(self, data):
        try:
            return super().structure_message(data)
        except JsonRpcException as exc:
            if isinstance(data, dict) and "id" in data and "method" in data:
                try:
                    self._send_response(data["id"], error=T.ResponseError(
                        code=exc.code, message=f"invalid request {data.get('method')!r}: {exc.message}"))
                except Exception:
                    log.exception("cannot answer a malformed request")
                return _Dropped()
            raise


class ConeServer(LanguageServer):
    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT):
        super().__init__("conelang", conelang.__version__, protocol_cls=ConeProtocol)
        self.budget_limit = budget_limit
        self.loader = FileLoader()
        self.host = AnalysisHost(budget_limit, loader=self.loader)
        self.files = Workspace(self)
        self.worker: HeavyWorker | None = None
        self.debounce = 0.15
        self.hover_wait = 0.8
        self.diagnostics_wait = 0.3
        self.versions: dict[str, int | None] = {}
        self.tasks: dict[str, asyncio.Task] = {}
        self.cache: OrderedDict = OrderedDict()
        self.last_full: dict[str, tuple[str, list, list]] = {}   # uri -> (text, diagnostics, expect spans)

    # -- helpers ---------------------------------------------------------------------------
    def configure(self, options) -> bool:
        """Apply the settings in ``options``; True when the rules for reading other files
        changed (then every file must be checked again)."""
        if not isinstance(options, dict):
            return False
        changed = False
        if "allowOutsideRoot" in options:
            allow = bool(options["allowOutsideRoot"])
            if allow != self.loader.allow_outside_root:
                self.loader.allow_outside_root = allow
                self.host.forget_files()
                if self.worker is not None:
                    self.worker.allow_outside_root = allow
                changed = True
        if "budget" in options:
            b = options["budget"]
            self.budget_limit = None if b in (None, "none", "unlimited") else int(b)
            self.host.budget_limit = self.budget_limit
        for key, attr in (("debounce", "debounce"), ("hoverWait", "hover_wait"),
                          ("diagnosticsWait", "diagnostics_wait")):
            if key in options:
                setattr(self, attr, max(0.0, float(options[key])))
        return changed

    def start_worker(self) -> None:
        if self.worker is None:
            self.worker = HeavyWorker(self.budget_limit, allow_outside_root=self.loader.allow_outside_root)
            self.worker.start()
            self.worker.submit("ping", "", "", key="")

    def encoding(self) -> str:
        try:
            return str(self.workspace.position_encoding.value)
        except Exception:
            return "utf-16"

    def positions(self, uri: str) -> Positions:
        return Positions(self.host.line_index(uri), self.encoding())

    def offset(self, uri: str, pos: T.Position) -> int:
        return self.positions(uri).from_lsp(pos)

    def cache_get(self, key):
        if key in self.cache:
            self.cache.move_to_end(key)
            return self.cache[key]
        return None

    def cache_put(self, key, value) -> None:
        self.cache[key] = value
        self.cache.move_to_end(key)
        while len(self.cache) > 512:
            self.cache.popitem(last=False)

    def used_texts(self, uri: str) -> dict[str, str | None]:
        """The texts of the files ``uri`` uses (directly or through others), as the host sees
        them: what a worker job about ``uri`` needs besides its own text."""
        return {u: self.host.source(u) for u in self.host.used_files(uri)}

    def state_key(self, uri: str, files: dict | None = None) -> str:
        """The fingerprint of what the answers about ``uri`` depend on: its text and the texts
        of the files it uses."""
        files = self.used_texts(uri) if files is None else files
        parts = [self.host.text(uri)]
        for u in sorted(files):
            parts += [u, "\x00" if files[u] is None else files[u]]
        return fingerprint("\x01".join(parts)) if len(parts) > 1 else fingerprint(parts[0])

    def heavy(self, kind: str, uri: str, *args, interactive: bool = False):
        """Submit a heavy job for the current text of ``uri`` (and of the files it uses):
        (key, asyncio future)."""
        self.start_worker()
        text = self.host.text(uri)
        files = self.used_texts(uri)
        key = self.state_key(uri, files)
        fut = asyncio.wrap_future(self.worker.submit(kind, uri, text, *args, key=key, interactive=interactive,
                                                     files=files))
        fut.add_done_callback(_consume)       # a result nobody waits for any more is not an error
        return key, fut

    def forget_closed(self, uri: str) -> None:
        """``uri`` is not open and its diagnostics are no longer wanted (closed or deleted)."""
        task = self.tasks.pop(uri, None)
        if task is not None:
            task.cancel()
        self.last_full.pop(uri, None)
        self.text_document_publish_diagnostics(T.PublishDiagnosticsParams(uri=uri, diagnostics=[]))

    def locations(self, hits) -> list[T.Location]:
        """LSP locations of (uri, span) pairs, each in its own file."""
        out = []
        for u, span in hits:
            out.append(T.Location(uri=u, range=self.positions(u).lsp_range(span)))
        return out

    def workspace_edit(self, edits: dict[str, list]) -> T.WorkspaceEdit:
        """Edits per file as a WorkspaceEdit: ``documentChanges`` (with the versions of the
        open files) when the client takes them, else ``changes``."""
        per_file = {u: [T.TextEdit(range=self.positions(u).lsp_range(e.span), new_text=e.new_text) for e in es]
                    for u, es in edits.items()}
        if _capability(self, "workspace", "workspace_edit", "document_changes"):
            return T.WorkspaceEdit(document_changes=[
                T.TextDocumentEdit(text_document=T.OptionalVersionedTextDocumentIdentifier(
                    uri=u, version=self.versions.get(u) if u in self.host.texts else None), edits=es)
                for u, es in per_file.items()])
        return T.WorkspaceEdit(changes=per_file)

    def ensure_text(self, uri: str) -> None:
        """Make sure the host has the text of ``uri`` (opened documents always do; a file that
        is not open is read by the host's loader; anything else, e.g. an unsaved buffer never
        opened, through the workspace when possible)."""
        if uri in self.host.texts or self.host.source(uri) is not None:
            return
        try:
            doc = self.workspace.get_text_document(uri)
            text = doc.source
        except Exception:
            text = ""
        self.host.apply_change(uri, text)

    # -- diagnostics ---------------------------------------------------------------------
    def lsp_diagnostic(self, uri: str, d, pos: Positions) -> T.Diagnostic:
        related = [T.DiagnosticRelatedInformation(location=T.Location(uri=uri, range=pos.lsp_range(r.span)),
                                                  message=r.message) for r in d.related] or None
        return T.Diagnostic(range=pos.lsp_range(d.span), message=d.message,
                            severity=SEVERITY.get(d.severity, T.DiagnosticSeverity.Error),
                            code=d.code, source="conelang", related_information=related,
                            tags=[T.DiagnosticTag.Unnecessary] if d.unnecessary else None)

    def publish(self, uri: str, diags) -> None:
        pos = self.positions(uri)
        items = [self.lsp_diagnostic(uri, d, pos) for d in diags]
        self.text_document_publish_diagnostics(
            T.PublishDiagnosticsParams(uri=uri, diagnostics=items, version=self.versions.get(uri)))

    def schedule(self, uri: str, delay: float) -> None:
        old = self.tasks.pop(uri, None)
        if old is not None and not old.done():
            old.cancel()
        self.tasks[uri] = asyncio.ensure_future(self.diagnose(uri, delay))

    async def diagnose(self, uri: str, delay: float) -> None:
        """Publish the diagnostics of ``uri`` after ``delay`` seconds (the debounce).

        The worker computes all of them (expectations included).  After an edit the event loop
        does not analyse the file meanwhile: on two cores that only slowed the worker down (on
        the first check of a file it does, since the worker starts cold).  When the
        worker takes longer than ``diagnostics_wait`` (a heavy expectation), the cheap
        diagnostics are computed here and published first, with the previous results of the
        unchanged expectations carried over, and the full ones replace them when they come."""
        text = None
        try:
            if delay:
                await asyncio.sleep(delay)
            text = self.host.text(uri)
            key = self.state_key(uri)
            cached = self.cache_get(("diagnostics", key))
            if cached is not None:
                self.publish(uri, cached)
                return
            key, fut = self.heavy("diagnostics", uri)
            # the first check of a file: its worker analysis starts cold and is slow, so the
            # cheap part is done here meanwhile, ready when diagnostics_wait runs out
            cheap = self.host.diagnostics(uri, expectations=False) if uri not in self.last_full else None
            try:
                full = await asyncio.wait_for(asyncio.shield(fut), self.diagnostics_wait)
            except asyncio.TimeoutError:
                if cheap is None:
                    cheap = self.host.diagnostics(uri, expectations=False)
                self.publish(uri, cheap + self.carried_over(uri, cheap))
                full = await asyncio.shield(fut)
            if self.state_key(uri) != key:
                return
            self.cache_put(("diagnostics", key), full)
            self.publish(uri, full)
            self.last_full[uri] = (text, full, None)     # expectation spans: when first needed
            self.host.analysis(uri)     # parse and resolve now, while idle: the next request is quick
            _settle_garbage()
        except asyncio.CancelledError:
            raise
        except JobCancelled:
            return
        except WorkerFailed as exc:
            if text is not None and self.host.text(uri) == text:
                note = _note((0, 0), "server", f"expectations were not checked: {exc}")
                self.publish(uri, self.host.diagnostics(uri, expectations=False) + [note])
        except Exception:
            log.exception("diagnostics of %s failed", uri)

    def carried_over(self, uri: str, cheap) -> list:
        """The previous results of unchanged ``expect`` statements, moved to where they are
        now, so that they do not flicker while the new results are computed."""
        prev = self.last_full.get(uri)
        if prev is None:
            return []
        old_text, old_diags, old_expects = prev
        if old_expects is None:
            from conelang.syntax.parser import parse
            old_expects = [(old_text[e.span[0]:e.span[1]], e.span) for e in parse(old_text).statements
                           if isinstance(e, A.Expect)]
            self.last_full[uri] = (old_text, old_diags, old_expects)
        a = self.host.analysis(uri)
        free: dict[str, list] = {}
        for e in a.expects:
            free.setdefault(a.text[e.span[0]:e.span[1]], []).append(e.span)
        moved = {}
        for src, span in old_expects:
            if free.get(src):
                moved[span] = free[src].pop(0)
        have = {(d.code, d.message) for d in cheap}
        out = []
        for d in old_diags:
            for old_span, new_span in moved.items():
                if old_span[0] <= d.span[0] and d.span[1] <= old_span[1] and (d.code, d.message) not in have:
                    shift = new_span[0] - old_span[0]
                    out.append(_shifted(d, shift))
                    break
        return out


def _settle_garbage() -> None:
    """At a quiet moment (the diagnostics were just published): collect the young garbage
    (a few ms), then hide the survivors from the collector.  Otherwise the objects that the
    analyses keep (typed statements, remembered results) grow the oldest generation, and a
    full collection over them blocks the event loop for 50-120 ms at a random moment.  What
    is frozen is still freed when no longer referenced; only reference cycles among frozen
    objects would never be collected, and an analysis makes none (they are freed by reference
    counting)."""
    import gc
    gc.collect(1)
    gc.freeze()


def _consume(fut) -> None:
    if not fut.cancelled():
        fut.exception()


def _shifted(d, shift: int):
    from dataclasses import replace
    return replace(d, span=(d.span[0] + shift, d.span[1] + shift), related=(), fixes=(),
                   message=d.message + " (from the previous check; checking again…)")


def _note(span, code, message):
    from conelang.semantics.diagnostics import Diagnostic
    return Diagnostic(span, "information", code, message)


server = None  # the running server (set by create_server)


def safe(default=None):
    """Wrap a handler: any exception is logged and ``default`` is answered instead, except
    deliberate protocol errors (e.g. a refused rename), which reach the client."""
    def wrap(fn):
        if inspect.iscoroutinefunction(fn):
            @functools.wraps(fn)
            async def run(ls, *args, **kw):
                try:
                    return await fn(ls, *args, **kw)
                except (JsonRpcException, asyncio.CancelledError):
                    raise
                except Exception:
                    log.exception("%s failed", fn.__name__)
                    return default() if callable(default) else default
        else:
            @functools.wraps(fn)
            def run(ls, *args, **kw):
                try:
                    return fn(ls, *args, **kw)
                except JsonRpcException:
                    raise
                except Exception:
                    log.exception("%s failed", fn.__name__)
                    return default() if callable(default) else default
        return run
    return wrap


def create_server(budget_limit: int | None = gbudget.DEFAULT_LIMIT) -> ConeServer:
    ls = ConeServer(budget_limit)

    # -- life cycle ----------------------------------------------------------------------
    @ls.feature(T.INITIALIZE)
    @safe()
    def initialize(ls: ConeServer, params: T.InitializeParams):
        ls.configure(params.initialization_options)
        ls.start_worker()

    @ls.feature(T.INITIALIZED)
    @safe()
    async def initialized(ls: ConeServer, params: T.InitializedParams):
        try:
            ls.files.scan(_folder_uris(ls))
        except Exception:
            log.exception("listing the workspace's files failed")
        _warm_up(ls)     # after the answer to initialize: that answer's types are then known too
        await ls.files.register_watcher()

    @ls.feature(T.WORKSPACE_DID_CHANGE_WORKSPACE_FOLDERS)
    @safe()
    def folders_changed(ls: ConeServer, params: T.DidChangeWorkspaceFoldersParams):
        ls.files.scan(_folder_uris(ls))

    @ls.feature(T.WORKSPACE_DID_CHANGE_CONFIGURATION)
    @safe()
    def configuration_changed(ls: ConeServer, params: T.DidChangeConfigurationParams):
        settings = params.settings
        if isinstance(settings, dict) and isinstance(settings.get("conelang"), dict):
            settings = settings["conelang"]
        if ls.configure(settings):
            ls.cache.clear()
            for uri in list(ls.host.texts) + [u for u in ls.last_full if u not in ls.host.texts]:
                ls.schedule(uri, 0.0)

    @ls.feature(T.WORKSPACE_DID_CHANGE_WATCHED_FILES)
    @safe()
    def watched_files_changed(ls: ConeServer, params: T.DidChangeWatchedFilesParams):
        ls.files.on_watched_files(params)

    @ls.feature(T.WORKSPACE_DID_CREATE_FILES, FILE_OPERATIONS)
    @safe()
    def files_created(ls: ConeServer, params: T.CreateFilesParams):
        for f in params.files or []:
            ls.files.on_disk(f.uri, "created")

    @ls.feature(T.WORKSPACE_DID_DELETE_FILES, FILE_OPERATIONS)
    @safe()
    def files_deleted(ls: ConeServer, params: T.DeleteFilesParams):
        for f in params.files or []:
            ls.files.on_disk(f.uri, "deleted")

    @ls.feature(T.WORKSPACE_DID_RENAME_FILES, FILE_OPERATIONS)
    @safe()
    def files_renamed(ls: ConeServer, params: T.RenameFilesParams):
        for f in params.files or []:
            ls.files.on_disk(f.old_uri, "deleted")
            ls.files.on_disk(f.new_uri, "created")

    @ls.feature(T.SHUTDOWN)
    @safe()
    def shutdown(ls: ConeServer, params):
        if ls.worker is not None:
            ls.worker.stop()

    @ls.feature(T.EXIT)
    @safe()
    def exit_(ls: ConeServer, params):
        if ls.worker is not None:
            ls.worker.stop()

    # -- documents -------------------------------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_DID_OPEN)
    @safe()
    def did_open(ls: ConeServer, params: T.DidOpenTextDocumentParams):
        uri = params.text_document.uri
        ls.versions[uri] = params.text_document.version
        ls.host.apply_change(uri, params.text_document.text)
        ls.files.add(uri)
        ls.schedule(uri, 0.0)
        ls.files.changed(uri)           # its open text may differ from the disk the others read

    @ls.feature(T.TEXT_DOCUMENT_DID_CHANGE)
    @safe()
    def did_change(ls: ConeServer, params: T.DidChangeTextDocumentParams):
        uri = params.text_document.uri
        ls.versions[uri] = params.text_document.version
        text = ls.workspace.get_text_document(uri).source
        ls.host.apply_change(uri, text)
        if ls.worker is not None:
            ls.worker.cancel_stale(uri, ls.state_key(uri))
        ls.schedule(uri, ls.debounce)
        ls.files.changed(uri)

    @ls.feature(T.TEXT_DOCUMENT_DID_SAVE)
    @safe()
    def did_save(ls: ConeServer, params: T.DidSaveTextDocumentParams):
        uri = params.text_document.uri
        ls.host.invalidate(uri)          # the disk text is the saved one (the open text still wins)
        ls.files.changed(uri)

    @ls.feature(T.TEXT_DOCUMENT_DID_CLOSE)
    @safe()
    def did_close(ls: ConeServer, params: T.DidCloseTextDocumentParams):
        uri = params.text_document.uri
        task = ls.tasks.pop(uri, None)
        if task is not None:
            task.cancel()
        if ls.worker is not None:
            ls.worker.cancel_stale(uri, None)
            ls.worker.submit("forget", uri, "", key="")
        ls.host.remove(uri)
        ls.versions.pop(uri, None)
        ls.last_full.pop(uri, None)
        ls.text_document_publish_diagnostics(T.PublishDiagnosticsParams(uri=uri, diagnostics=[]))
        ls.files.changed(uri, 0.0)       # the files that use it read the disk version now

    # -- hover -----------------------------------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_HOVER)
    @safe()
    async def hover(ls: ConeServer, params: T.HoverParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        pos = ls.positions(uri)
        offset = pos.from_lsp(params.position)
        light = ls.host.hover(uri, offset, heavy=False)
        if light is None:
            return None
        md, span = light
        rng = pos.lsp_range(span)
        pending = ls.host.hover_pending(uri, offset)
        if pending is not None:
            name = ls.host.analysis(uri).node_at(offset)[1]
            key = ls.state_key(uri)
            full = ls.cache_get(("markdown", key, name))
            if full is None:
                # the full facts, and before them (queued in front) everything but the equations
                _, fut = ls.heavy("markdown", uri, name, interactive=True)
                _, quick = ls.heavy("markdown_quick", uri, name, interactive=True)
                try:
                    full = await asyncio.wait_for(asyncio.shield(fut), ls.hover_wait)
                    ls.cache_put(("markdown", key, name), full)
                except asyncio.TimeoutError:
                    if quick.done() and not quick.cancelled() and quick.exception() is None:
                        md = quick.result() + "\n\n*computing… (the binomial equations)*"
                    else:
                        md += f"\n\n*computing… ({pending})*"
                except JobCancelled:
                    md += "\n\n*the computation was interrupted by an edit; hover again*"
                except WorkerFailed as exc:
                    md += f"\n\n*not computed: {exc}*"
            if full is not None:
                md = full
        return T.Hover(contents=T.MarkupContent(kind=T.MarkupKind.Markdown, value=md), range=rng)

    # -- navigation ------------------------------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_DEFINITION)
    @safe()
    def definition(ls: ConeServer, params: T.DefinitionParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        hit = ls.host.definition_location(uri, ls.offset(uri, params.position))
        return ls.locations([hit])[0] if hit is not None else None

    @ls.feature(T.TEXT_DOCUMENT_REFERENCES)
    @safe(list)
    def references(ls: ConeServer, params: T.ReferenceParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        include = params.context.include_declaration if params.context else True
        return ls.locations(ls.host.references_everywhere(uri, ls.offset(uri, params.position), include,
                                                          ls.files.candidates()))

    @ls.feature(T.TEXT_DOCUMENT_DOCUMENT_HIGHLIGHT)
    @safe(list)
    def highlight(ls: ConeServer, params: T.DocumentHighlightParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        pos = ls.positions(uri)
        spans = ls.host.references(uri, pos.from_lsp(params.position), True)
        return [T.DocumentHighlight(range=pos.lsp_range(s)) for s in spans]

    @ls.feature(T.TEXT_DOCUMENT_PREPARE_RENAME)
    @safe()
    def prepare_rename(ls: ConeServer, params: T.PrepareRenameParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        hit = ls.host.prepare_rename(uri, ls.offset(uri, params.position))
        if hit is None:
            return None
        span, name = hit
        return T.PrepareRenamePlaceholder(range=ls.positions(uri).lsp_range(span), placeholder=name)

    @ls.feature(T.TEXT_DOCUMENT_RENAME, T.RenameOptions(prepare_provider=True))
    @safe()
    def rename(ls: ConeServer, params: T.RenameParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        try:
            edits = ls.host.rename_everywhere(uri, ls.offset(uri, params.position), params.new_name,
                                              ls.files.candidates())
        except editor.RenameError as exc:
            raise JsonRpcException(str(exc), code=-32803) from None   # RequestFailed
        return ls.workspace_edit(edits)

    @ls.feature(T.TEXT_DOCUMENT_DOCUMENT_SYMBOL)
    @safe(list)
    def document_symbols(ls: ConeServer, params: T.DocumentSymbolParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        pos = ls.positions(uri)
        return [T.DocumentSymbol(name=s.name, detail=s.detail, kind=SYMBOL_KIND.get(s.kind, T.SymbolKind.Variable),
                                 range=pos.lsp_range(s.span), selection_range=pos.lsp_range(s.name_span))
                for s in ls.host.outline(uri)]

    @ls.feature(T.WORKSPACE_SYMBOL)
    @safe(list)
    def workspace_symbols(ls: ConeServer, params: T.WorkspaceSymbolParams):
        out = []
        for uri, text in ls.files.texts():
            for _, s, _ in editor.workspace_symbols([(uri, text)], params.query or ""):
                pos = Positions(_index(text), ls.encoding())
                out.append(T.SymbolInformation(name=s.name, kind=SYMBOL_KIND.get(s.kind, T.SymbolKind.Variable),
                                               location=T.Location(uri=uri, range=pos.lsp_range(s.name_span)),
                                               container_name=Path(unquote(urlparse(uri).path)).name))
                if len(out) >= 500:
                    return out
        return out

    @ls.feature(T.TEXT_DOCUMENT_FOLDING_RANGE)
    @safe(list)
    def folding(ls: ConeServer, params: T.FoldingRangeParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        kinds = {"comment": T.FoldingRangeKind.Comment, "region": T.FoldingRangeKind.Region}
        return [T.FoldingRange(start_line=s, end_line=e, kind=kinds[k]) for s, e, k in ls.host.folding_ranges(uri)]

    # -- completion ------------------------------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_COMPLETION,
                T.CompletionOptions(trigger_characters=[" ", "(", ":", ">", "&", "=", '"', "/"]))
    @safe(lambda: T.CompletionList(is_incomplete=False, items=[]))
    def completion(ls: ConeServer, params: T.CompletionParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        offset = ls.offset(uri, params.position)
        paths = ls.host.use_path_completions(uri, offset)
        if paths is not None:                       # inside the quotes of a use statement
            start, found = paths
            rng = T.Range(start=ls.positions(uri).lsp_position(start), end=params.position)
            return T.CompletionList(is_incomplete=False, items=[
                T.CompletionItem(label=p, kind=T.CompletionItemKind.Folder if p.endswith("/") else T.CompletionItemKind.File,
                                 text_edit=T.TextEdit(range=rng, new_text=p), filter_text=p,
                                 sort_text=("0" if p.endswith("/") else "1") + p)
                for p in found])
        ctx = params.context
        if ctx is not None and ctx.trigger_kind == T.CompletionTriggerKind.TriggerCharacter and ctx.trigger_character in ('"', "/"):
            return T.CompletionList(is_incomplete=False, items=[])       # only paths follow these
        if ctx is not None and ctx.trigger_kind == T.CompletionTriggerKind.TriggerCharacter and ctx.trigger_character == " ":
            text = ls.host.text(uri)
            if not text[text.rfind("\n", 0, offset) + 1:offset].strip():
                return T.CompletionList(is_incomplete=False, items=[])   # indenting, not asking
        items = []
        for s in ls.host.completions(uri, offset):
            items.append(T.CompletionItem(label=s.label, kind=COMPLETION_KIND.get(s.kind), detail=s.detail or None,
                                          insert_text=s.insert, sort_text=f"{s.sort}{s.label}"))
        return T.CompletionList(is_incomplete=False, items=items)

    # -- code actions ----------------------------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_CODE_ACTION,
                T.CodeActionOptions(code_action_kinds=[T.CodeActionKind.QuickFix, T.CodeActionKind.Refactor],
                                    resolve_provider=True))
    @safe(list)
    def code_action(ls: ConeServer, params: T.CodeActionParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        pos = ls.positions(uri)
        start, end = pos.span_of(params.range)
        only = list(params.context.only or []) if params.context else []

        def wanted(kind) -> bool:
            return not only or any(str(kind.value).startswith(str(getattr(o, "value", o))) for o in only)

        out = []
        if wanted(T.CodeActionKind.QuickFix):
            for act in ls.host.code_fixes(uri, start, end):
                out.append(T.CodeAction(
                    title=act.title, kind=T.CodeActionKind.QuickFix, is_preferred=act.preferred or None,
                    diagnostics=[ls.lsp_diagnostic(uri, act.diagnostic, pos)] if act.diagnostic else None,
                    edit=T.WorkspaceEdit(changes={uri: [T.TextEdit(range=pos.lsp_range(e.span), new_text=e.new_text)
                                                        for e in act.edits]})))
        name = ls.host.pin_target(uri, start)
        if name is not None and wanted(T.CodeActionKind.Refactor):
            title = f"Pin the current results of '{name}' as expect lines"
            if _supports_resolve(ls):
                out.append(T.CodeAction(title=title, kind=T.CodeActionKind.Refactor,
                                        data={"uri": uri, "name": name}))
            else:
                out.append(T.CodeAction(title=title, kind=T.CodeActionKind.Refactor,
                                        command=T.Command(title=title, command=PIN_COMMAND, arguments=[uri, name])))
        return out

    @ls.feature(T.CODE_ACTION_RESOLVE)
    @safe(lambda: None)
    async def code_action_resolve(ls: ConeServer, action: T.CodeAction):
        data = action.data or {}
        uri, name = data.get("uri"), data.get("name")
        if uri and name:
            edit = await pin_edit(ls, uri, name)
            if edit is not None:
                action.edit = edit
        return action

    @ls.command(PIN_COMMAND)
    @safe()
    async def pin_command(ls, *args):
        if len(args) < 2:
            return None
        uri, name = str(args[0]), str(args[1])
        edit = await pin_edit(ls, uri, name)
        if edit is None:
            ls.window_show_message(T.ShowMessageParams(type=T.MessageType.Info,
                                                       message=f"no results to pin for '{name}'"))
            return None
        result = await ls.workspace_apply_edit_async(T.ApplyWorkspaceEditParams(edit=edit, label="pin results"))
        return getattr(result, "applied", None)

    # -- inlay hints and semantic tokens -----------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_INLAY_HINT, T.InlayHintOptions(resolve_provider=False))
    @safe(list)
    async def inlay_hints(ls: ConeServer, params: T.InlayHintParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        key = ls.state_key(uri)
        hints = ls.cache_get(("inlay", key))
        if hints is None:
            _, fut = ls.heavy("inlay", uri)
            try:
                hints = await asyncio.wait_for(asyncio.shield(fut), ls.hover_wait)
                ls.cache_put(("inlay", key), hints)
            except (asyncio.TimeoutError, JobCancelled, WorkerFailed):
                hints = ls.host.inlay_hints(uri, heavy=False)
                if not fut.done() and _supports_inlay_refresh(ls):
                    fut.add_done_callback(lambda f: _refresh_inlays(ls, f))
        pos = ls.positions(uri)
        lo, hi = pos.span_of(params.range)
        return [T.InlayHint(position=pos.lsp_position(off), label=label, padding_left=True)
                for off, label in hints if lo <= off <= hi]

    @ls.feature(T.TEXT_DOCUMENT_SEMANTIC_TOKENS_FULL, LEGEND)
    @safe(lambda: T.SemanticTokens(data=[]))
    def semantic_tokens(ls: ConeServer, params: T.SemanticTokensParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        pos = ls.positions(uri)
        types = {t: i for i, t in enumerate(editor.TOKEN_TYPES)}
        mods = {m: 1 << i for i, m in enumerate(editor.TOKEN_MODIFIERS)}
        data: list[int] = []
        prev_line = prev_col = 0
        for start, end, typ, modifiers in ls.host.semantic_tokens(uri):
            line, col = pos.position(start)
            line2, col2 = pos.position(end)
            if line2 != line:
                continue
            data += [line - prev_line, col - prev_col if line == prev_line else col, col2 - col,
                     types[typ], sum(mods[m] for m in modifiers)]
            prev_line, prev_col = line, col
        return T.SemanticTokens(data=data)

    # -- formatting ------------------------------------------------------------------------
    @ls.feature(T.TEXT_DOCUMENT_FORMATTING)
    @safe(list)
    def formatting(ls: ConeServer, params: T.DocumentFormattingParams):
        uri = params.text_document.uri
        ls.ensure_text(uri)
        old = ls.host.text(uri)
        new = ls.host.format(uri)
        if new == old:
            return []
        a = 0
        while a < min(len(old), len(new)) and old[a] == new[a]:
            a += 1
        b = 0
        while b < min(len(old), len(new)) - a and old[len(old) - 1 - b] == new[len(new) - 1 - b]:
            b += 1
        pos = ls.positions(uri)
        return [T.TextEdit(range=pos.lsp_range((a, len(old) - b)), new_text=new[a:len(new) - b])]

    return ls


async def pin_edit(ls: ConeServer, uri: str, name: str):
    ls.ensure_text(uri)
    for _ in range(3):                      # the text may change while we compute
        key, fut = ls.heavy("pin", uri, name, interactive=True)
        try:
            edit = await asyncio.shield(fut)
        except JobCancelled:
            continue
        except WorkerFailed:
            return None
        if ls.state_key(uri) != key:
            continue
        if edit is None:
            return None
        pos = ls.positions(uri)
        return T.WorkspaceEdit(changes={uri: [T.TextEdit(range=pos.lsp_range(edit.span), new_text=edit.new_text)]})
    return None


_WARM_TEXT = ("lattice N = Z^2\ncone c in N { rays (1,0) (1,2) (2,4) }\ncone d = dual c\n"
              "map f : N -> N { rows (1,0) (0,1) }\nexpect c dim = 2\nexpect c ")


def _warm_up(ls: ConeServer) -> None:
    """Pay the one-time costs at start-up instead of in the first requests: the parser tables,
    the lazily imported modules, and the protocol converter's (de)serialisers of each message
    type we answer (generated on first use: 10-30 ms each).  Then move everything alive so far
    out of the garbage collector's sight (``gc.freeze``): a full collection over the ~70 000
    objects of the imported libraries blocked the event loop for 45-85 ms."""
    import gc
    import json
    try:
        host = AnalysisHost(ls.budget_limit)
        uri = "warm-up:///w.cone"
        host.apply_change(uri, _WARM_TEXT)
        host.diagnostics(uri, expectations=False)
        for off in (17, 33, 60):
            host.hover(uri, off, heavy=False)
        host.completions(uri, len(_WARM_TEXT))
        host.semantic_tokens(uri)
        host.format(uri)
        host.outline(uri)
        host.folding_ranges(uri)
        host.code_fixes(uri, 0, len(_WARM_TEXT))
        conv = ls.protocol._converter
        doc = {"uri": "file:///w.cone"}
        rng = {"start": {"line": 0, "character": 0}, "end": {"line": 1, "character": 0}}
        pos = {"line": 1, "character": 2}
        requests = {
            T.TEXT_DOCUMENT_DID_OPEN: {"textDocument": {**doc, "languageId": "cone", "version": 1, "text": ""}},
            T.TEXT_DOCUMENT_DID_CHANGE: {"textDocument": {**doc, "version": 2}, "contentChanges": [{"text": ""}]},
            T.TEXT_DOCUMENT_DID_CLOSE: {"textDocument": doc},
            T.TEXT_DOCUMENT_HOVER: {"textDocument": doc, "position": pos},
            T.TEXT_DOCUMENT_COMPLETION: {"textDocument": doc, "position": pos, "context": {"triggerKind": 1}},
            T.TEXT_DOCUMENT_DEFINITION: {"textDocument": doc, "position": pos},
            T.TEXT_DOCUMENT_REFERENCES: {"textDocument": doc, "position": pos, "context": {"includeDeclaration": True}},
            T.TEXT_DOCUMENT_DOCUMENT_HIGHLIGHT: {"textDocument": doc, "position": pos},
            T.TEXT_DOCUMENT_SEMANTIC_TOKENS_FULL: {"textDocument": doc},
            T.TEXT_DOCUMENT_FORMATTING: {"textDocument": doc, "options": {"tabSize": 2, "insertSpaces": True}},
            T.TEXT_DOCUMENT_DOCUMENT_SYMBOL: {"textDocument": doc},
            T.TEXT_DOCUMENT_FOLDING_RANGE: {"textDocument": doc},
            T.TEXT_DOCUMENT_INLAY_HINT: {"textDocument": doc, "range": rng},
            T.TEXT_DOCUMENT_CODE_ACTION: {"textDocument": doc, "range": rng, "context": {"diagnostics": []}},
        }
        # the converter forgets its generated functions each time it meets a new type, so go
        # over all of them twice: the second pass leaves every function in place
        for method, params in [*requests.items()] * 2:
            conv.structure({"jsonrpc": "2.0", "id": 0, "method": method, "params": params},
                           T.METHOD_TO_TYPES[method][0])
        r = T.Range(start=T.Position(line=0, character=0), end=T.Position(line=0, character=1))
        loc = T.Location(uri="file:///w.cone", range=r)
        results = {
            T.TEXT_DOCUMENT_HOVER: T.Hover(contents=T.MarkupContent(kind=T.MarkupKind.Markdown, value="x"), range=r),
            T.TEXT_DOCUMENT_COMPLETION: T.CompletionList(is_incomplete=False, items=[T.CompletionItem(
                label="x", kind=T.CompletionItemKind.Keyword, detail="x", insert_text="x", sort_text="1x")]),
            T.TEXT_DOCUMENT_DEFINITION: loc,
            T.TEXT_DOCUMENT_REFERENCES: [loc],
            T.TEXT_DOCUMENT_DOCUMENT_HIGHLIGHT: [T.DocumentHighlight(range=r)],
            T.TEXT_DOCUMENT_SEMANTIC_TOKENS_FULL: T.SemanticTokens(data=[0, 0, 1, 0, 0]),
            T.TEXT_DOCUMENT_FORMATTING: [T.TextEdit(range=r, new_text="x")],
            T.TEXT_DOCUMENT_DOCUMENT_SYMBOL: [T.DocumentSymbol(name="x", detail="x", kind=T.SymbolKind.Variable,
                                                               range=r, selection_range=r)],
            T.TEXT_DOCUMENT_FOLDING_RANGE: [T.FoldingRange(start_line=0, end_line=1, kind=T.FoldingRangeKind.Region)],
            T.TEXT_DOCUMENT_INLAY_HINT: [T.InlayHint(position=r.start, label="x", padding_left=True)],
            T.TEXT_DOCUMENT_CODE_ACTION: [T.CodeAction(title="x", kind=T.CodeActionKind.QuickFix, is_preferred=True,
                                                       edit=T.WorkspaceEdit(changes={"file:///w.cone": [
                                                           T.TextEdit(range=r, new_text="")]}))],
        }
        from pygls.protocol.json_rpc import JsonRPCResponseMessage   # what answers are sent as
        diag = T.Diagnostic(range=r, message="x", severity=T.DiagnosticSeverity.Warning, code="x", source="conelang",
                            related_information=[T.DiagnosticRelatedInformation(location=loc, message="x")],
                            tags=[T.DiagnosticTag.Unnecessary])
        json.dumps(conv.unstructure(T.PublishDiagnosticsNotification(
            method=T.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS, jsonrpc="2.0",
            params=T.PublishDiagnosticsParams(uri="file:///w.cone", diagnostics=[diag], version=1))))
        for _ in range(2):
            for result in results.values():
                json.dumps(conv.unstructure(JsonRPCResponseMessage(id=0, result=result, jsonrpc="2.0")))
            json.dumps(conv.unstructure(T.PublishDiagnosticsNotification(
                method=T.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS, jsonrpc="2.0",
                params=T.PublishDiagnosticsParams(uri="file:///w.cone", diagnostics=[diag], version=1))))
    except Exception:
        log.exception("warm-up failed (harmless)")
    gc.collect()
    gc.freeze()


def _index(text: str):
    from conelang.syntax.text import LineIndex
    return LineIndex(text)


def _capability(ls, *path):
    obj = ls.client_capabilities
    for p in path:
        obj = getattr(obj, p, None)
        if obj is None:
            return None
    return obj


def _supports_resolve(ls) -> bool:
    props = _capability(ls, "text_document", "code_action", "resolve_support", "properties")
    return bool(props) and "edit" in props


def _supports_inlay_refresh(ls) -> bool:
    return bool(_capability(ls, "workspace", "inlay_hint", "refresh_support"))


def _refresh_inlays(ls, fut) -> None:
    try:
        if not fut.cancelled() and fut.exception() is None:
            ls.workspace_inlay_hint_refresh(None)
    except Exception:
        log.exception("inlay hint refresh failed")


def _folder_uris(ls) -> list[str]:
    """The URIs of the workspace folders (the root URI for a client without folders)."""
    roots = []
    try:
        roots = [f.uri for f in ls.workspace.folders.values()]
        if not roots and ls.workspace.root_uri:
            roots = [ls.workspace.root_uri]
    except Exception:
        pass
    return roots


def main(argv=None) -> None:
    """Run the language server on stdio."""
    logging.basicConfig(level=os.environ.get("CONELANG_LOG", "WARNING"), stream=sys.stderr,
                        format="conelang-server %(levelname)s %(message)s")
    ls = create_server()
    try:
        ls.start_io()
    finally:
        if ls.worker is not None:
            ls.worker.stop()
