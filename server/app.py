"""The conelang language server (LSP over stdio, pygls 2): the handlers.

Each handler is a few lines at module level: positions to offsets, a question to the IDE layer
(:class:`conelang.ide.AnalysisHost`), the answer as protocol objects (:mod:`.convert`).  The
event loop only asks what needs no value — syntax, names, kinds, completion, tokens, outline,
folding, formatting, definition, references, rename; everything that needs a value (diagnostics
beyond syntax and names, hovers, inlay hints, quick fixes, pinned results) is computed by the
worker process (:mod:`.worker`) and awaited (:mod:`.requests`; when files are checked and what is
shown meanwhile: :mod:`.scheduling`).  Every handler is wrapped so that one bad request never
takes the server down.

Settings (``initializationOptions`` of the client, all optional)::

    {"budget": 20000000,        # work budget per heavy computation, or "none"
     "debounce": 0.15,          # seconds to wait after an edit before checking the file
     "hoverWait": 0.8,          # seconds a hover waits for the worker before saying "computing…"
     "diagnosticsWait": 0.3,    # seconds the loop's own diagnostics wait for the worker's
     "allowOutsideRoot": false, # `use` may name files outside the project root
     "monitorLoop": false}      # record how long the event loop is blocked (conelang.serverStats)

The same settings may come later with ``workspace/didChangeConfiguration`` (under a
``conelang`` key, or at the top level).  Files of a project: see :mod:`.workspace`.
"""
from __future__ import annotations

import asyncio
import functools
import inspect
import logging
import os
import sys
from pathlib import Path
from urllib.parse import unquote, urlparse

from lsprotocol import types as T
from pygls.exceptions import JsonRpcException
from pygls.lsp.server import LanguageServer
from pygls.protocol import LanguageServerProtocol

import conelang
from conelang.geometry import budget as gbudget
from conelang.ide import AnalysisHost, editor
from conelang.project import FileLoader
from conelang.syntax.text import LineIndex

from . import convert, requests
from .convert import Positions
from .scheduling import Jobs, LoopMonitor
from .warmup import warm_up
from .workspace import FILE_OPERATIONS, Workspace

log = logging.getLogger("conelang.server")

PIN_COMMAND = "conelang.pinResults"
STATS_COMMAND = "conelang.serverStats"
LEGEND = T.SemanticTokensLegend(token_types=list(editor.TOKEN_TYPES), token_modifiers=list(editor.TOKEN_MODIFIERS))
SETTINGS = (("debounce", "debounce"), ("hoverWait", "hover_wait"), ("diagnosticsWait", "diagnostics_wait"))


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
        self.geometry_on_loop = 0        # heavy computations started in this process: should stay 0
        self.host = AnalysisHost(budget_limit, loader=self.loader, progress=self._computed_here)
        self.files = Workspace(self)
        self.jobs = Jobs(self)
        self.monitor = LoopMonitor()
        self.debounce, self.hover_wait, self.diagnostics_wait = 0.15, 0.8, 0.3
        self.versions: dict[str, int | None] = {}

    def _computed_here(self, what, budget) -> None:
        if budget is not None:
            self.geometry_on_loop += 1
            log.warning("computed on the event loop: %s", what)

    def configure(self, options) -> bool:
        """Apply the settings in ``options``; True when the rules for reading other files
        changed (then every file must be checked again)."""
        if not isinstance(options, dict):
            return False
        changed = "allowOutsideRoot" in options and bool(options["allowOutsideRoot"]) != self.loader.allow_outside_root
        if changed:
            self.loader.allow_outside_root = bool(options["allowOutsideRoot"])
            self.host.forget_files()
            if self.jobs.worker is not None:
                self.jobs.worker.allow_outside_root = self.loader.allow_outside_root
        if "budget" in options:
            b = options["budget"]
            self.budget_limit = self.host.budget_limit = None if b in (None, "none", "unlimited") else int(b)
        for key, attr in SETTINGS:
            if key in options:
                setattr(self, attr, max(0.0, float(options[key])))
        if options.get("monitorLoop"):
            self.monitor.start()
        return changed

    # -- positions and protocol objects ----------------------------------------------------
    def encoding(self) -> str:
        try:
            return str(self.workspace.position_encoding.value)
        except Exception:
            return "utf-16"

    def positions(self, uri: str) -> Positions:
        return Positions(self.host.line_index(uri), self.encoding())

    def at(self, params) -> tuple[str, int]:
        """(uri, offset) of a request about a position (the text is made available first)."""
        uri = params.text_document.uri
        self.files.ensure_text(uri)
        return uri, self.positions(uri).from_lsp(params.position)

    def publish(self, uri: str, diags, note: str | None = None) -> None:
        pos = self.positions(uri)
        items = [convert.diagnostic(uri, d, pos) for d in diags] + ([convert.note(note)] if note else [])
        self.text_document_publish_diagnostics(
            T.PublishDiagnosticsParams(uri=uri, diagnostics=items, version=self.versions.get(uri)))

    def locations(self, hits) -> list[T.Location]:
        """LSP locations of (uri, span) pairs, each in its own file."""
        return [T.Location(uri=u, range=self.positions(u).lsp_range(span)) for u, span in hits]

    def workspace_edit(self, edits: dict[str, list]) -> T.WorkspaceEdit:
        """Edits per file as a WorkspaceEdit: ``documentChanges`` (with the versions of the
        open files) when the client takes them, else ``changes``."""
        per_file = {u: [T.TextEdit(range=self.positions(u).lsp_range(e.span), new_text=e.new_text) for e in es]
                    for u, es in edits.items()}
        if not self.capability("workspace", "workspace_edit", "document_changes"):
            return T.WorkspaceEdit(changes=per_file)
        return T.WorkspaceEdit(document_changes=[
            T.TextDocumentEdit(text_document=T.OptionalVersionedTextDocumentIdentifier(
                uri=u, version=self.versions.get(u) if self.host.is_open(u) else None), edits=es)
            for u, es in per_file.items()])

    def capability(self, *path):
        obj = self.client_capabilities
        for p in path:
            obj = getattr(obj, p, None)
            if obj is None:
                return None
        return obj

    def supports_resolve(self) -> bool:
        props = self.capability("text_document", "code_action", "resolve_support", "properties")
        return bool(props) and "edit" in props

    def supports_inlay_refresh(self) -> bool:
        return bool(self.capability("workspace", "inlay_hint", "refresh_support"))


# ---- the handlers --------------------------------------------------------------------------
HANDLERS: list[tuple[str, object, object]] = []     # (method, options, wrapped handler)
COMMANDS: list[tuple[str, object]] = []


def safe(default=None):
    """Wrap a handler: any exception is logged and ``default`` is answered instead, except
    deliberate protocol errors (e.g. a refused rename), which reach the client."""
    def answer():
        return default() if callable(default) else default

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
                    return answer()
        else:
            @functools.wraps(fn)
            def run(ls, *args, **kw):
                try:
                    return fn(ls, *args, **kw)
                except JsonRpcException:
                    raise
                except Exception:
                    log.exception("%s failed", fn.__name__)
                    return answer()
        return run
    return wrap


def handler(method: str, options=None, default=None):
    """Register the decorated function as the handler of ``method`` (see :func:`create_server`)."""
    def wrap(fn):
        HANDLERS.append((method, options, safe(default)(fn)))
        return fn
    return wrap


def command(name: str):
    def wrap(fn):
        COMMANDS.append((name, safe()(fn)))
        return fn
    return wrap


# -- life cycle
@handler(T.INITIALIZE)
def initialize(ls: ConeServer, params: T.InitializeParams):
    ls.configure(params.initialization_options)
    ls.jobs.start()


@handler(T.INITIALIZED)
async def initialized(ls: ConeServer, params: T.InitializedParams):
    try:
        ls.files.scan(ls.files.folder_uris())
    except Exception:
        log.exception("listing the workspace's files failed")
    warm_up(ls)     # after the answer to initialize: that answer's types are then known too
    await ls.files.register_watcher()


@handler(T.WORKSPACE_DID_CHANGE_WORKSPACE_FOLDERS)
def folders_changed(ls: ConeServer, params: T.DidChangeWorkspaceFoldersParams):
    ls.files.scan(ls.files.folder_uris())


@handler(T.WORKSPACE_DID_CHANGE_CONFIGURATION)
def configuration_changed(ls: ConeServer, params: T.DidChangeConfigurationParams):
    settings = params.settings
    if isinstance(settings, dict) and isinstance(settings.get("conelang"), dict):
        settings = settings["conelang"]
    if ls.configure(settings):
        ls.jobs.cache.clear()
        for uri in dict.fromkeys([u for u, _ in ls.host.open_files()] + ls.jobs.checked()):
            ls.jobs.schedule(uri, 0.0)


@handler(T.WORKSPACE_DID_CHANGE_WATCHED_FILES)
def watched_files_changed(ls: ConeServer, params: T.DidChangeWatchedFilesParams):
    ls.files.on_watched_files(params)


@handler(T.WORKSPACE_DID_CREATE_FILES, FILE_OPERATIONS)
def files_created(ls: ConeServer, params: T.CreateFilesParams):
    for f in params.files or []:
        ls.files.on_disk(f.uri, "created")


@handler(T.WORKSPACE_DID_DELETE_FILES, FILE_OPERATIONS)
def files_deleted(ls: ConeServer, params: T.DeleteFilesParams):
    for f in params.files or []:
        ls.files.on_disk(f.uri, "deleted")


@handler(T.WORKSPACE_DID_RENAME_FILES, FILE_OPERATIONS)
def files_renamed(ls: ConeServer, params: T.RenameFilesParams):
    for f in params.files or []:
        ls.files.on_disk(f.old_uri, "deleted")
        ls.files.on_disk(f.new_uri, "created")


@handler(T.SHUTDOWN)
def shutdown(ls: ConeServer, params):
    ls.jobs.stop()


@handler(T.EXIT)
def exit_(ls: ConeServer, params):
    ls.jobs.stop()


# -- documents
@handler(T.TEXT_DOCUMENT_DID_OPEN)
def did_open(ls: ConeServer, params: T.DidOpenTextDocumentParams):
    uri = params.text_document.uri
    ls.versions[uri] = params.text_document.version
    ls.host.apply_change(uri, params.text_document.text)
    ls.files.add(uri)
    ls.jobs.schedule(uri, 0.0)
    ls.files.changed(uri)           # its open text may differ from the disk the others read


@handler(T.TEXT_DOCUMENT_DID_CHANGE)
def did_change(ls: ConeServer, params: T.DidChangeTextDocumentParams):
    uri = params.text_document.uri
    ls.versions[uri] = params.text_document.version
    ls.host.apply_change(uri, ls.workspace.get_text_document(uri).source)
    ls.jobs.text_changed(uri, ls.debounce)
    ls.files.changed(uri)


@handler(T.TEXT_DOCUMENT_DID_SAVE)
def did_save(ls: ConeServer, params: T.DidSaveTextDocumentParams):
    ls.host.invalidate(params.text_document.uri)   # the disk text is the saved one (the open text still wins)
    ls.files.changed(params.text_document.uri)


@handler(T.TEXT_DOCUMENT_DID_CLOSE)
def did_close(ls: ConeServer, params: T.DidCloseTextDocumentParams):
    uri = params.text_document.uri
    ls.versions.pop(uri, None)
    ls.host.remove(uri)
    ls.jobs.closed(uri, forget=True)
    ls.files.changed(uri, 0.0)       # the files that use it read the disk version now


# -- answers that need values (computed by the worker)
@handler(T.TEXT_DOCUMENT_HOVER)
async def hover(ls: ConeServer, params: T.HoverParams):
    uri, offset = ls.at(params)
    pos = ls.positions(uri)
    got = await requests.hover(ls, uri, offset)
    if got is None:
        return None
    return T.Hover(contents=T.MarkupContent(kind=T.MarkupKind.Markdown, value=got[0]), range=pos.lsp_range(got[1]))


@handler(T.TEXT_DOCUMENT_INLAY_HINT, T.InlayHintOptions(resolve_provider=False), default=list)
async def inlay_hints(ls: ConeServer, params: T.InlayHintParams):
    uri = params.text_document.uri
    ls.files.ensure_text(uri)
    pos = ls.positions(uri)
    lo, hi = pos.span_of(params.range)
    return [T.InlayHint(position=pos.lsp_position(off), label=label, padding_left=True)
            for off, label in await requests.inlay_hints(ls, uri) if lo <= off <= hi]


@handler(T.TEXT_DOCUMENT_CODE_ACTION,
         T.CodeActionOptions(code_action_kinds=[T.CodeActionKind.QuickFix, T.CodeActionKind.Refactor],
                             resolve_provider=True), default=list)
async def code_action(ls: ConeServer, params: T.CodeActionParams):
    uri = params.text_document.uri
    ls.files.ensure_text(uri)
    pos = ls.positions(uri)
    start, end = pos.span_of(params.range)
    only = [str(getattr(o, "value", o)) for o in (params.context.only or [])] if params.context else []
    wanted = lambda kind: not only or any(str(kind.value).startswith(o) for o in only)   # noqa: E731
    name = ls.host.pin_target(uri, start) if wanted(T.CodeActionKind.Refactor) else None
    fixes = await requests.quick_fixes(ls, uri, start, end) if wanted(T.CodeActionKind.QuickFix) else []
    return [_quick_fix(uri, act, pos) for act in fixes] + ([_pin_action(ls, uri, name)] if name else [])


def _quick_fix(uri: str, act, pos: Positions) -> T.CodeAction:
    return T.CodeAction(
        title=act.title, kind=T.CodeActionKind.QuickFix, is_preferred=act.preferred or None,
        diagnostics=[convert.diagnostic(uri, act.diagnostic, pos)] if act.diagnostic else None,
        edit=T.WorkspaceEdit(changes={uri: [T.TextEdit(range=pos.lsp_range(e.span), new_text=e.new_text)
                                            for e in act.edits]}))


def _pin_action(ls: ConeServer, uri: str, name: str) -> T.CodeAction:
    title = f"Pin the current results of '{name}' as expect lines"
    if ls.supports_resolve():
        return T.CodeAction(title=title, kind=T.CodeActionKind.Refactor, data={"uri": uri, "name": name})
    return T.CodeAction(title=title, kind=T.CodeActionKind.Refactor,
                        command=T.Command(title=title, command=PIN_COMMAND, arguments=[uri, name]))


async def _pin_workspace_edit(ls: ConeServer, uri: str, name: str):
    ls.files.ensure_text(uri)
    edit = await requests.pin_edit(ls, uri, name)
    if edit is None:
        return None
    return T.WorkspaceEdit(changes={uri: [T.TextEdit(range=ls.positions(uri).lsp_range(edit.span),
                                                     new_text=edit.new_text)]})


@handler(T.CODE_ACTION_RESOLVE)
async def code_action_resolve(ls: ConeServer, action: T.CodeAction):
    data = action.data or {}
    if data.get("uri") and data.get("name"):
        action.edit = await _pin_workspace_edit(ls, data["uri"], data["name"]) or action.edit
    return action


@command(PIN_COMMAND)
async def pin_command(ls: ConeServer, *args):
    if len(args) < 2:
        return None
    uri, name = str(args[0]), str(args[1])
    edit = await _pin_workspace_edit(ls, uri, name)
    if edit is None:
        ls.window_show_message(T.ShowMessageParams(type=T.MessageType.Info, message=f"no results to pin for '{name}'"))
        return None
    result = await ls.workspace_apply_edit_async(T.ApplyWorkspaceEditParams(edit=edit, label="pin results"))
    return getattr(result, "applied", None)


@command(STATS_COMMAND)
def stats_command(ls: ConeServer, *args):
    """A test and benchmark hook: what ran where (the loop's blocking when ``monitorLoop`` is on;
    ``reset`` as first argument starts a new measurement)."""
    worker = ls.jobs.worker
    return {"geometry_on_loop": ls.geometry_on_loop, "loop": ls.monitor.stats(reset=bool(args and args[0] == "reset")),
            "worker_jobs": worker.jobs_run if worker else 0, "worker_restarts": worker.restarts if worker else 0}


# -- answers of the loop (no value needed)
@handler(T.TEXT_DOCUMENT_DEFINITION)
def definition(ls: ConeServer, params: T.DefinitionParams):
    hit = ls.host.definition_location(*ls.at(params))
    return ls.locations([hit])[0] if hit is not None else None


@handler(T.TEXT_DOCUMENT_REFERENCES, default=list)
def references(ls: ConeServer, params: T.ReferenceParams):
    include = params.context.include_declaration if params.context else True
    return ls.locations(ls.host.references_everywhere(*ls.at(params), include, ls.files.candidates()))


@handler(T.TEXT_DOCUMENT_DOCUMENT_HIGHLIGHT, default=list)
def highlight(ls: ConeServer, params: T.DocumentHighlightParams):
    uri, offset = ls.at(params)
    pos = ls.positions(uri)
    return [T.DocumentHighlight(range=pos.lsp_range(s)) for s in ls.host.references(uri, offset, True)]


@handler(T.TEXT_DOCUMENT_PREPARE_RENAME)
def prepare_rename(ls: ConeServer, params: T.PrepareRenameParams):
    uri, offset = ls.at(params)
    hit = ls.host.prepare_rename(uri, offset)
    return None if hit is None else T.PrepareRenamePlaceholder(range=ls.positions(uri).lsp_range(hit[0]),
                                                               placeholder=hit[1])


@handler(T.TEXT_DOCUMENT_RENAME, T.RenameOptions(prepare_provider=True))
def rename(ls: ConeServer, params: T.RenameParams):
    uri, offset = ls.at(params)
    try:
        edits = ls.host.rename_everywhere(uri, offset, params.new_name, ls.files.candidates())
    except editor.RenameError as exc:
        raise JsonRpcException(str(exc), code=-32803) from None   # RequestFailed
    return ls.workspace_edit(edits)


@handler(T.TEXT_DOCUMENT_DOCUMENT_SYMBOL, default=list)
def document_symbols(ls: ConeServer, params: T.DocumentSymbolParams):
    uri = params.text_document.uri
    ls.files.ensure_text(uri)
    pos = ls.positions(uri)
    return [convert.document_symbol(s, pos) for s in ls.host.outline(uri)]


@handler(T.WORKSPACE_SYMBOL, default=list)
def workspace_symbols(ls: ConeServer, params: T.WorkspaceSymbolParams):
    out = []
    for uri, text in ls.files.texts():
        for _, s, _ in editor.workspace_symbols([(uri, text)], params.query or ""):
            rng = Positions(LineIndex(text), ls.encoding()).lsp_range(s.name_span)
            out.append(T.SymbolInformation(name=s.name, kind=convert.SYMBOL_KIND.get(s.kind, T.SymbolKind.Variable),
                                           location=T.Location(uri=uri, range=rng),
                                           container_name=Path(unquote(urlparse(uri).path)).name))
            if len(out) >= 500:
                return out
    return out


@handler(T.TEXT_DOCUMENT_FOLDING_RANGE, default=list)
def folding(ls: ConeServer, params: T.FoldingRangeParams):
    ls.files.ensure_text(params.text_document.uri)
    return [T.FoldingRange(start_line=s, end_line=e, kind=convert.FOLDING_KIND[k])
            for s, e, k in ls.host.folding_ranges(params.text_document.uri)]


@handler(T.TEXT_DOCUMENT_COMPLETION, T.CompletionOptions(trigger_characters=[" ", "(", ":", ">", "&", "=", '"', "/"]),
         default=lambda: T.CompletionList(is_incomplete=False, items=[]))
def completion(ls: ConeServer, params: T.CompletionParams):
    uri, offset = ls.at(params)
    paths = ls.host.use_path_completions(uri, offset)
    if paths is not None:                       # inside the quotes of a use statement
        rng = T.Range(start=ls.positions(uri).lsp_position(paths[0]), end=params.position)
        return T.CompletionList(is_incomplete=False, items=[convert.path_item(p, rng) for p in paths[1]])
    ctx = params.context
    trigger = ctx.trigger_character if ctx is not None and ctx.trigger_kind == T.CompletionTriggerKind.TriggerCharacter else None
    text = ls.host.text(uri)
    if trigger in ('"', "/") or (trigger == " " and not text[text.rfind("\n", 0, offset) + 1:offset].strip()):
        return T.CompletionList(is_incomplete=False, items=[])     # only paths follow; or indenting, not asking
    return T.CompletionList(is_incomplete=False, items=[convert.completion_item(s) for s in ls.host.completions(uri, offset)])


@handler(T.TEXT_DOCUMENT_SEMANTIC_TOKENS_FULL, LEGEND, default=lambda: T.SemanticTokens(data=[]))
def semantic_tokens(ls: ConeServer, params: T.SemanticTokensParams):
    uri = params.text_document.uri
    ls.files.ensure_text(uri)
    return convert.semantic_tokens(ls.host.semantic_tokens(uri), ls.positions(uri), editor.TOKEN_TYPES,
                                   editor.TOKEN_MODIFIERS)


@handler(T.TEXT_DOCUMENT_FORMATTING, default=list)
def formatting(ls: ConeServer, params: T.DocumentFormattingParams):
    uri = params.text_document.uri
    ls.files.ensure_text(uri)
    return convert.whole_text_edit(ls.host.text(uri), ls.host.format(uri), ls.positions(uri))


def create_server(budget_limit: int | None = gbudget.DEFAULT_LIMIT) -> ConeServer:
    ls = ConeServer(budget_limit)
    for method, options, fn in HANDLERS:
        (ls.feature(method, options) if options is not None else ls.feature(method))(fn)
    for name, fn in COMMANDS:
        ls.command(name)(fn)
    return ls


def main(argv=None) -> None:
    """Run the language server on stdio."""
    logging.basicConfig(level=os.environ.get("CONELANG_LOG", "WARNING"), stream=sys.stderr,
                        format="conelang-server %(levelname)s %(message)s")
    ls = create_server()
    try:
        ls.start_io()
    finally:
        ls.jobs.stop()
