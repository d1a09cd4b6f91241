"""The event loop of `conelang serve` computes no value: every value, the double description of
a cone included, is computed in the worker process, and the loop publishes what it gets.

The server counts the heavy computations started in its own process (the engine reports each
one to the host's progress hook) and tells them with the command ``conelang.serverStats``; for
a file whose cone takes the worker about a second (the 5×5 magic squares), that count stays 0
while diagnostics, hovers, inlay hints, quick fixes and the editor's other answers arrive.
Nothing here asserts a duration.
"""
from __future__ import annotations

import pytest
import pytest_lsp
from lsprotocol import types as T
from pytest_lsp import ClientServerConfig, LanguageClient

from references import magic_square_constraints

from lsp_helpers import SERVER, diagnostics_where, initialize, open_doc, poll, pos, replace_doc

pytestmark = pytest.mark.asyncio(loop_scope="module")


def _vec(v) -> str:
    return "(" + ",".join(map(str, v)) + ")"


def magic_square_text(n: int = 5) -> str:
    ineqs, eqs = magic_square_constraints(n)
    return (f"lattice M = Z^{n * n}\ncone magic in M {{ halfspaces {' '.join(map(_vec, ineqs))} "
            f"equations {' '.join(map(_vec, eqs))} }}\n")


# magic squares of order 5 form a cone of dimension 25 - 10 = 15 (see tests/geometry/test_cone.py);
# cone((2,0),(0,1),(1,1)): (2,0) is not primitive, (1,1) is not extremal (plain linear algebra)
TEXT = (magic_square_text() + "expect magic dim = 1\n"
        "lattice N = Z^2\ncone q in N { rays (2,0) (0,1) (1,1) }\nexpect q simplicial\n")


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER), scope="module")
async def client(lsp_client: LanguageClient, tmp_path_factory):
    lsp_client.root = tmp_path_factory.mktemp("loop")

    @lsp_client.feature(T.WORKSPACE_INLAY_HINT_REFRESH)
    def refresh(params):       # asked when the full inlay hints arrive after the answer
        return None

    await initialize(lsp_client, lsp_client.root, debounce=0.05, diagnosticsWait=0.0, monitorLoop=True)
    yield
    await lsp_client.shutdown_session()


async def stats(client: LanguageClient) -> dict:
    return await client.workspace_execute_command_async(T.ExecuteCommandParams(command="conelang.serverStats"))


def _codes(ds):
    return sorted(str(d.code) for d in ds)


async def test_a_heavy_file_is_evaluated_in_the_worker_only(client: LanguageClient):
    uri = (client.root / "magic.cone").as_uri()
    open_doc(client, uri, TEXT)
    diags = await diagnostics_where(client, uri, lambda ds: "expect-failed" in _codes(ds), "the worker's diagnostics")
    assert _codes(diags) == ["expect-failed", "not-primitive", "redundant-ray"]
    assert "computed 15" in next(d.message for d in diags if d.code == "expect-failed")
    doc = T.TextDocumentIdentifier(uri=uri)

    async def hover_text():
        h = await client.text_document_hover_async(T.HoverParams(text_document=doc, position=pos(TEXT, "q in")))
        return h.contents.value
    assert "Hilbert basis" in await poll(hover_text, lambda v: "computing" not in v, "the full hover of q")
    p = pos(TEXT, "(2,0)", delta=1)
    actions = await client.text_document_code_action_async(T.CodeActionParams(
        text_document=doc, range=T.Range(start=p, end=p), context=T.CodeActionContext(diagnostics=[])))
    assert "replace by (1, 0)" in [a.title for a in actions]
    res = await client.text_document_completion_async(T.CompletionParams(text_document=doc,
                                                                         position=pos(TEXT, "q simplicial")))
    assert "magic" in {i.label for i in res.items}
    await client.text_document_semantic_tokens_full_async(T.SemanticTokensParams(text_document=doc))
    got = await stats(client)
    assert got["geometry_on_loop"] == 0 and got["worker_jobs"] > 0
    assert got["loop"]["samples"] > 0          # the monitor runs (its figures are for the benchmark)


async def test_while_the_worker_computes_the_loop_shows_syntax_names_and_carried_results(client: LanguageClient):
    uri = (client.root / "carry.cone").as_uri()
    open_doc(client, uri, TEXT)
    await diagnostics_where(client, uri, lambda ds: "expect-failed" in _codes(ds), "the first check")
    # edit the heavy statement (a redundant halfspace x1 + x2 >= 0: a new double description,
    # about a second in the worker) and add an unknown name
    edited = TEXT.replace("halfspaces ", "halfspaces " + _vec([1, 1] + [0] * 23) + " ", 1) + "expect nothing pointed\n"
    replace_doc(client, uri, edited, 2)
    interim = await diagnostics_where(client, uri, lambda ds: "unknown-name" in _codes(ds), "the loop's diagnostics")
    carried = [d for d in interim if "from the previous check" in d.message]
    if "expect-failed" not in _codes(interim) or carried:
        # the loop's own answer came first: the unchanged statements keep their previous results
        assert {d.code for d in carried} <= {"not-primitive", "redundant-ray", "expect-failed"}
        assert all(d.range.start.line >= 2 for d in carried)
    final = await diagnostics_where(client, uri, lambda ds: "expect-failed" in _codes(ds) and not any(
        "from the previous check" in d.message for d in ds), "the worker's diagnostics of the new text")
    assert _codes(final) == ["expect-failed", "not-primitive", "redundant-inequality", "redundant-ray", "unknown-name"]
    # last: the full inlay hints of the magic squares take the worker many seconds (the Hilbert
    # basis of the dual cone); the answer comes at once, with what is there already
    rng = T.Range(start=T.Position(line=0, character=0), end=T.Position(line=9, character=0))
    await client.text_document_inlay_hint_async(T.InlayHintParams(text_document=T.TextDocumentIdentifier(uri=uri),
                                                                  range=rng))
    assert (await stats(client))["geometry_on_loop"] == 0
