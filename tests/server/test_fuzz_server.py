"""Random edit sequences through the real server: mutated documents, incremental edits at
random (and out-of-range) positions, and requests of every kind in between.  The server must
answer every request and end up with exactly the diagnostics the CLI gives for the final text
(common practice, no source: an editor's view must agree with batch checking)."""
from __future__ import annotations

import os
import random
from pathlib import Path

import pytest
import pytest_lsp
from lsprotocol import types as T
from pytest_lsp import ClientServerConfig, LanguageClient

from conelang.ide import AnalysisHost

from lsp_helpers import SERVER, initialize, open_doc, wait_for

pytestmark = pytest.mark.asyncio(loop_scope="module")

EXAMPLES = Path(__file__).parent.parent.parent / "examples"
SEEDS = [p.read_text() for p in sorted(EXAMPLES.glob("*.cone"))]
STEPS = int(os.environ.get("CONELANG_FUZZ_EXAMPLES", "0")) // 100 or 60
TOKENS = ["cone", "dual", "face", "(", ")", "{", "}", "1", "-1", "/", ",", "expect", "x", "\n", "&", "rays",
          "#", "=", "Z^2", "^-1", "∘", "𝔸", "é"]


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER), scope="module")
async def client(lsp_client: LanguageClient, tmp_path_factory):
    await initialize(lsp_client, tmp_path_factory.mktemp("fz"), debounce=0.01)
    yield
    await lsp_client.shutdown_session()


def utf16_position(text: str, offset: int) -> T.Position:
    line = text.count("\n", 0, offset)
    col = text[text.rfind("\n", 0, offset) + 1:offset]
    return T.Position(line=line, character=sum(2 if ord(c) > 0xFFFF else 1 for c in col))


def expected_codes(text: str) -> list[tuple[int, str]]:
    host = AnalysisHost()
    host.apply_change("x", text)
    a = host.analysis("x")
    return sorted((a.index.position(d.span[0])[0], d.code) for d in host.diagnostics("x"))


@pytest.mark.parametrize("seed", range(3))
async def test_random_edit_sequences(client: LanguageClient, seed: int):
    rng = random.Random(seed)
    uri = f"file:///fuzz/doc{seed}.cone"
    text = rng.choice(SEEDS)
    open_doc(client, uri, text)
    version = 1
    doc = T.TextDocumentIdentifier(uri=uri)
    for step in range(STEPS):
        # an incremental edit of a random range (a whole-document replace now and then)
        i = rng.randrange(len(text) + 1)
        j = min(len(text), i + rng.randrange(8))
        new = rng.choice(TOKENS) if rng.random() < 0.7 else ""
        version += 1
        if rng.random() < 0.1:
            text = text[:i] + new + text[j:]
            change = T.TextDocumentContentChangeWholeDocument(text=text)
        else:
            change = T.TextDocumentContentChangePartial(
                range=T.Range(start=utf16_position(text, i), end=utf16_position(text, j)), text=new)
            text = text[:i] + new + text[j:]
        client.text_document_did_change(T.DidChangeTextDocumentParams(
            text_document=T.VersionedTextDocumentIdentifier(uri=uri, version=version), content_changes=[change]))
        # requests at a random position, sometimes far outside the document
        p = utf16_position(text, rng.randrange(len(text) + 1))
        if rng.random() < 0.2:
            p = T.Position(line=p.line + rng.choice([1, 50, 10_000]), character=rng.choice([0, 999]))
        kind = step % 5
        if kind == 0:
            await client.text_document_hover_async(T.HoverParams(text_document=doc, position=p))
        elif kind == 1:
            await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=p))
        elif kind == 2:
            await client.text_document_definition_async(T.DefinitionParams(text_document=doc, position=p))
        elif kind == 3:
            await client.text_document_code_action_async(T.CodeActionParams(
                text_document=doc, range=T.Range(start=p, end=p), context=T.CodeActionContext(diagnostics=[])))
        else:
            await client.text_document_document_symbol_async(T.DocumentSymbolParams(text_document=doc))
    # the server is alive and its final diagnostics are those of the final text
    want = expected_codes(text)

    def settled():
        got = client.diagnostics.get(uri)
        return got is not None and sorted((d.range.start.line, str(d.code)) for d in got) == want
    await wait_for(settled, what=f"final diagnostics {want}")
