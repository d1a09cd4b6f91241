"""Helpers of the language-server tests: a server started as `conelang serve` would be
(over stdio, in its own process) and helpers that poll instead of sleeping for fixed times."""
from __future__ import annotations

import asyncio
import sys
import time
from pathlib import Path

import pytest
import pytest_lsp
from lsprotocol import types as T
from pytest_lsp import ClientServerConfig, LanguageClient

SERVER = [sys.executable, "-m", "conelang.cli", "serve"]
TIMEOUT = 30.0          # generous: the machine is shared; nothing asserts a duration

CAPABILITIES = T.ClientCapabilities(
    workspace=T.WorkspaceClientCapabilities(apply_edit=True,
                                            inlay_hint=T.InlayHintWorkspaceClientCapabilities(refresh_support=True)),
    text_document=T.TextDocumentClientCapabilities(
        hover=T.HoverClientCapabilities(content_format=[T.MarkupKind.Markdown]),
        code_action=T.CodeActionClientCapabilities(
            resolve_support=T.ClientCodeActionResolveOptions(properties=["edit"])),
        rename=T.RenameClientCapabilities(prepare_support=True),
        publish_diagnostics=T.PublishDiagnosticsClientCapabilities(related_information=True,
                                                                   tag_support=T.ClientDiagnosticsTagOptions(
                                                                       value_set=[T.DiagnosticTag.Unnecessary]),
                                                                   version_support=True),
    ),
)


def uri_of(path: Path) -> str:
    return path.resolve().as_uri()


async def initialize(client: LanguageClient, root: Path | None = None, capabilities=CAPABILITIES, **options):
    params = T.InitializeParams(capabilities=capabilities,
                                root_uri=uri_of(root) if root else None,
                                workspace_folders=[T.WorkspaceFolder(uri=uri_of(root), name="ws")] if root else None,
                                initialization_options=options or None)
    await client.initialize_session(params)


def open_doc(client: LanguageClient, uri: str, text: str, version: int = 1) -> None:
    client.text_document_did_open(T.DidOpenTextDocumentParams(
        text_document=T.TextDocumentItem(uri=uri, language_id="cone", version=version, text=text)))


def replace_doc(client: LanguageClient, uri: str, text: str, version: int) -> None:
    """Send a full-text change."""
    client.text_document_did_change(T.DidChangeTextDocumentParams(
        text_document=T.VersionedTextDocumentIdentifier(uri=uri, version=version),
        content_changes=[T.TextDocumentContentChangeWholeDocument(text=text)]))


async def wait_for(predicate, timeout: float = TIMEOUT, what: str = "condition"):
    end = time.monotonic() + timeout
    while True:
        value = predicate()
        if value:
            return value
        if time.monotonic() > end:
            raise AssertionError(f"timed out waiting for {what}")
        await asyncio.sleep(0.05)


async def poll(ask, done, what: str, timeout: float = TIMEOUT):
    """Ask again (``await ask()``) until ``done(answer)``; return that answer."""
    end = time.monotonic() + timeout
    while True:
        answer = await ask()
        if done(answer):
            return answer
        if time.monotonic() > end:
            raise AssertionError(f"timed out waiting for {what}; last answer: {answer!r}")
        await asyncio.sleep(0.1)


async def diagnostics_where(client: LanguageClient, uri: str, predicate, what="diagnostics"):
    """Wait until the latest diagnostics published for ``uri`` satisfy ``predicate``."""
    def check():
        d = client.diagnostics.get(uri)
        return d is not None and predicate(list(d)) and (list(d) or True)
    await wait_for(check, what=what)
    return list(client.diagnostics[uri])


def pos(text: str, needle: str, occurrence: int = 0, delta: int = 0) -> T.Position:
    """The LSP position (UTF-16) of the ``occurrence``-th ``needle`` in ``text`` (+ delta)."""
    i = -1
    for _ in range(occurrence + 1):
        i = text.index(needle, i + 1)
    i += delta
    line = text.count("\n", 0, i)
    col_text = text[text.rfind("\n", 0, i) + 1:i]
    return T.Position(line=line, character=sum(2 if ord(c) > 0xFFFF else 1 for c in col_text))


def raw_write(client: LanguageClient, body: str) -> None:
    """Send bytes the typed client would refuse to build (malformed requests)."""
    data = body.encode("utf-8")
    client.protocol.writer.write(f"Content-Length: {len(data)}\r\n\r\n".encode("ascii") + data)


async def raw_request(client: LanguageClient, method: str, params) -> object:
    """A request with arbitrary (possibly malformed) params; raises the error response."""
    import concurrent.futures
    import json
    import uuid
    msg_id = f"raw-{uuid.uuid4()}"
    fut: concurrent.futures.Future = concurrent.futures.Future()
    client.protocol._request_futures[msg_id] = fut
    raw_write(client, json.dumps({"jsonrpc": "2.0", "id": msg_id, "method": method, "params": params}))
    return await asyncio.wait_for(asyncio.wrap_future(fut), TIMEOUT)
