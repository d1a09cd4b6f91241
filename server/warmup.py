"""Pay the one-time costs of the server's event loop at start-up instead of in the first requests.

Three kinds: the parser tables and the modules the loop's questions import lazily (asked of a
throw-away host, with the questions the loop answers itself: no value is computed here either);
the protocol converter's (de)serialisers of each message type we read and answer (generated on
first use: 10-30 ms each); and the garbage collector: everything alive after the warm-up is moved
out of its sight (``gc.freeze``), since a full collection over the ~70 000 objects of the
imported libraries blocked the event loop for 45-85 ms.
"""
from __future__ import annotations

import gc
import json
import logging

from lsprotocol import types as T

from conelang.ide import AnalysisHost

log = logging.getLogger("conelang.server")

TEXT = ("lattice N = Z^2\ncone c in N { rays (1,0) (1,2) (2,4) }\ncone d = dual c\n"
        "map f : N -> N { rows (1,0) (0,1) }\nexpect c dim = 2\nexpect c ")
DOC = {"uri": "file:///w.cone"}
RANGE = {"start": {"line": 0, "character": 0}, "end": {"line": 1, "character": 0}}
POSITION = {"line": 1, "character": 2}
REQUESTS = {
    T.TEXT_DOCUMENT_DID_OPEN: {"textDocument": {**DOC, "languageId": "cone", "version": 1, "text": ""}},
    T.TEXT_DOCUMENT_DID_CHANGE: {"textDocument": {**DOC, "version": 2}, "contentChanges": [{"text": ""}]},
    T.TEXT_DOCUMENT_DID_CLOSE: {"textDocument": DOC},
    T.TEXT_DOCUMENT_HOVER: {"textDocument": DOC, "position": POSITION},
    T.TEXT_DOCUMENT_COMPLETION: {"textDocument": DOC, "position": POSITION, "context": {"triggerKind": 1}},
    T.TEXT_DOCUMENT_DEFINITION: {"textDocument": DOC, "position": POSITION},
    T.TEXT_DOCUMENT_REFERENCES: {"textDocument": DOC, "position": POSITION, "context": {"includeDeclaration": True}},
    T.TEXT_DOCUMENT_DOCUMENT_HIGHLIGHT: {"textDocument": DOC, "position": POSITION},
    T.TEXT_DOCUMENT_SEMANTIC_TOKENS_FULL: {"textDocument": DOC},
    T.TEXT_DOCUMENT_FORMATTING: {"textDocument": DOC, "options": {"tabSize": 2, "insertSpaces": True}},
    T.TEXT_DOCUMENT_DOCUMENT_SYMBOL: {"textDocument": DOC},
    T.TEXT_DOCUMENT_FOLDING_RANGE: {"textDocument": DOC},
    T.TEXT_DOCUMENT_INLAY_HINT: {"textDocument": DOC, "range": RANGE},
    T.TEXT_DOCUMENT_CODE_ACTION: {"textDocument": DOC, "range": RANGE, "context": {"diagnostics": []}},
}


def warm_up(ls) -> None:
    try:
        _questions(ls.budget_limit)
        conv = ls.protocol._converter
        _requests(conv)
        _answers(conv)
    except Exception:
        log.exception("warm-up failed (harmless)")
    gc.collect()
    gc.freeze()


def _questions(budget_limit) -> None:
    """The loop's own questions, once (parser tables, lazy imports)."""
    host = AnalysisHost(budget_limit)
    uri = "warm-up:///w.cone"
    host.apply_change(uri, TEXT)
    host.static_diagnostics(uri)
    host.statement_sources(uri)
    for off in (17, 33, 60):
        host.name_at(uri, off)
    host.completions(uri, len(TEXT))
    host.semantic_tokens(uri)
    host.format(uri)
    host.outline(uri)
    host.folding_ranges(uri)
    host.references(uri, 8)
    host.pin_target(uri, 22)


def _requests(conv) -> None:
    # the converter forgets its generated functions each time it meets a new type, so go over
    # all of them twice: the second pass leaves every function in place
    for method, params in [*REQUESTS.items()] * 2:
        conv.structure({"jsonrpc": "2.0", "id": 0, "method": method, "params": params}, T.METHOD_TO_TYPES[method][0])


def _answers(conv) -> None:
    from pygls.protocol.json_rpc import JsonRPCResponseMessage   # what answers are sent as
    r = T.Range(start=T.Position(line=0, character=0), end=T.Position(line=0, character=1))
    loc = T.Location(uri=DOC["uri"], range=r)
    results = [
        T.Hover(contents=T.MarkupContent(kind=T.MarkupKind.Markdown, value="x"), range=r),
        T.CompletionList(is_incomplete=False, items=[T.CompletionItem(
            label="x", kind=T.CompletionItemKind.Keyword, detail="x", insert_text="x", sort_text="1x")]),
        loc, [loc], [T.DocumentHighlight(range=r)], T.SemanticTokens(data=[0, 0, 1, 0, 0]),
        [T.TextEdit(range=r, new_text="x")],
        [T.DocumentSymbol(name="x", detail="x", kind=T.SymbolKind.Variable, range=r, selection_range=r)],
        [T.FoldingRange(start_line=0, end_line=1, kind=T.FoldingRangeKind.Region)],
        [T.InlayHint(position=r.start, label="x", padding_left=True)],
        [T.CodeAction(title="x", kind=T.CodeActionKind.QuickFix, is_preferred=True,
                      edit=T.WorkspaceEdit(changes={DOC["uri"]: [T.TextEdit(range=r, new_text="")]}))],
    ]
    diag = T.Diagnostic(range=r, message="x", severity=T.DiagnosticSeverity.Warning, code="x", source="conelang",
                        related_information=[T.DiagnosticRelatedInformation(location=loc, message="x")],
                        tags=[T.DiagnosticTag.Unnecessary])
    published = T.PublishDiagnosticsNotification(
        method=T.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS, jsonrpc="2.0",
        params=T.PublishDiagnosticsParams(uri=DOC["uri"], diagnostics=[diag], version=1))
    json.dumps(conv.unstructure(published))
    for _ in range(2):
        for result in results:
            json.dumps(conv.unstructure(JsonRPCResponseMessage(id=0, result=result, jsonrpc="2.0")))
        json.dumps(conv.unstructure(published))
