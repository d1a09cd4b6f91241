"""End-to-end tests of `conelang serve` over stdio (pytest-lsp drives the real server process).

Mathematical facts asserted here come with their source; the rest checks the protocol:
positions, codes, edits, and that the server stays up whatever it is sent.
"""
from __future__ import annotations

import re

import pytest
import pytest_lsp
from lsprotocol import types as T
from pytest_lsp import ClientServerConfig, LanguageClient

from pygls.exceptions import JsonRpcException

from conelang.syntax.format import format_text

from lsp_helpers import (SERVER, diagnostics_where, initialize, open_doc, poll, pos, raw_request, raw_write,
                         replace_doc)

pytestmark = pytest.mark.asyncio(loop_scope="module")


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER), scope="module")
async def client(lsp_client: LanguageClient, tmp_path_factory):
    root = tmp_path_factory.mktemp("ws")
    (root / "a.cone").write_text("lattice N = Z^2\ncone quadrant in N { rays (1,0) (0,1) }\n")
    (root / "sub").mkdir()
    (root / "sub" / "b.cone").write_text("lattice M = Z^3\ncone wedge_b in M { rays (1,0,0) (0,1,0) (1,1,4) }\n")
    lsp_client.root = root
    # a short hover wait makes "computing…" certain for a heavy cone, however fast the machine
    await initialize(lsp_client, root, debounce=0.05, hoverWait=0.05)
    yield
    await lsp_client.shutdown_session()


# The rational normal cone: sigma = cone(d e1 - e2, e2) gives the affine cone over the rational
# normal curve of degree d, embedded in C^(d+1) by d+1 monomials; for d = 2 it is the quadric cone
# V(xz - y^2) ⊂ C^3 (the A_1 singularity) — Cox–Little–Schenck, Toric Varieties, Example 1.2.22
# (from memory); Fulton, Introduction to Toric Varieties, §1.2 (from memory).
A1 = """lattice N = Z^2
cone a1 in N { rays (2,-1) (0,1) }
expect a1 generators = 2
cone q in N { rays (2,0) (0,1) (1,1) }
cone broken in N { rays (1,0 (0,1) }
cone after_error in N { rays (0,1) (1,nope) }
expect a1 pointed
cone a1 = dual a1
"""


def _codes(diags):
    return sorted(str(d.code) for d in diags)


async def test_diagnostics_on_open_with_codes_related_and_tags(client: LanguageClient):
    uri = (client.root / "diag.cone").as_uri()
    open_doc(client, uri, A1)
    diags = await diagnostics_where(client, uri, lambda ds: any(d.code == "expect-failed" for d in ds),
                                    "the failed expectation")
    by_code = {}
    for d in diags:
        by_code.setdefault(d.code, []).append(d)
    # the A_1 embedding dimension is 3, not 2 (see the source above)
    (failed,) = by_code["expect-failed"]
    assert failed.range.start.line == 2 and "computed 3" in failed.message
    assert failed.severity == T.DiagnosticSeverity.Error
    # (2,0) is not primitive, (1,1) is not extremal in cone((1,0),(0,1)) — plain linear algebra
    (np,) = by_code["not-primitive"]
    assert np.range.start.line == 3 and np.range.start.character == A1.splitlines()[3].index("(2,0)")
    assert "(1, 0)" in np.message and np.severity == T.DiagnosticSeverity.Warning
    (red,) = by_code["redundant-ray"]
    assert list(red.tags) == [T.DiagnosticTag.Unnecessary] and red.range.start.line == 3
    # the syntax errors cost their own statements only: the statements after them still report
    syntax = by_code["syntax"]
    assert {d.range.start.line for d in syntax} == {4, 5}
    (dup,) = by_code["duplicate-name"]
    assert dup.range.start.line == 7
    assert dup.related_information and dup.related_information[0].location.range.start.line == 1
    assert dup.source == "conelang"


async def test_change_updates_diagnostics(client: LanguageClient):
    uri = (client.root / "change.cone").as_uri()
    text = "lattice N = Z^2\ncone c in N { rays (2,-1) (0,1) }\nexpect c generators = 2\n"
    open_doc(client, uri, text)
    await diagnostics_where(client, uri, lambda ds: _codes(ds) == ["expect-failed"])
    replace_doc(client, uri, text.replace("= 2", "= 3"), 2)
    await diagnostics_where(client, uri, lambda ds: ds == [], "the expectation to hold")
    replace_doc(client, uri, text.replace("(0,1)", "(0,1) (x"), 3)
    diags = await diagnostics_where(client, uri, lambda ds: "syntax" in _codes(ds))
    assert diags[0].range.start.line == 1


async def test_closing_a_document_clears_its_diagnostics(client: LanguageClient):
    uri = (client.root / "close.cone").as_uri()
    open_doc(client, uri, "lattice N = Z^2\ncone c in N { rays (2,0) }\n")
    await diagnostics_where(client, uri, lambda ds: len(ds) == 1)
    client.text_document_did_close(T.DidCloseTextDocumentParams(text_document=T.TextDocumentIdentifier(uri=uri)))
    await diagnostics_where(client, uri, lambda ds: ds == [], "the diagnostics to be cleared")


async def test_utf16_columns(client: LanguageClient):
    uri = (client.root / "utf16.cone").as_uri()
    # 𝔸 is outside the basic multilingual plane: two UTF-16 code units, one character
    text = "lattice N = Z^2  # 𝔸\ncone c in N { rays (1,0) }  # 𝔸𝔸\n# 𝔸\ncone d in N { rays (3,0) }  # 𝔸\n"
    open_doc(client, uri, text)
    (d,) = await diagnostics_where(client, uri, lambda ds: len(ds) == 1)
    assert d.range.start == pos(text, "(3,0)")
    # a character the language does not know, after one of two code units
    replace_doc(client, uri, "lattice N = Z^2\ncone 𝔸 in N { rays (3,0) }\n", 2)
    (d,) = await diagnostics_where(client, uri, lambda ds: ds and ds[0].code == "syntax")
    assert d.range.start == T.Position(line=1, character=5)


async def test_hover_cone_has_generators_equations_and_dual(client: LanguageClient):
    uri = (client.root / "hover.cone").as_uri()
    text = "lattice N = Z^2\ncone a1 in N { rays (2,-1) (0,1) }\nexpect a1 smooth\n"
    open_doc(client, uri, text)
    await diagnostics_where(client, uri, lambda ds: True)

    async def hover_text():
        h = await client.text_document_hover_async(T.HoverParams(
            text_document=T.TextDocumentIdentifier(uri=uri), position=pos(text, "a1", 1, 1)))
        return h.contents.value

    value = await poll(hover_text, lambda v: "computing" not in v, "the full hover")
    # U = V(xz - y^2) ⊂ C^3 (source at the top of this file): 3 generators, one quadric
    assert "C^3" in value
    assert re.search(r"z\d\^2", value) and re.search(r"z\d\*z\d", value)
    assert "dual cone" in value and "Hilbert basis" in value


async def test_hover_vectors_properties_and_cheap_objects(client: LanguageClient):
    uri = (client.root / "hover2.cone").as_uri()
    text = ("lattice N = Z^2\ncone q in N { rays (2,0) (0,1) (1,1) }\ncone h in N { halfspaces (1,0) (0,1) (1,1) }\n"
            "expect q simplicial\nmap f : N -> N { rows (1,1) (0,1) }\n")
    open_doc(client, uri, text)

    async def hover(p):
        h = await client.text_document_hover_async(T.HoverParams(text_document=T.TextDocumentIdentifier(uri=uri),
                                                                 position=p))
        return h.contents.value if h else None

    v = await hover(pos(text, "(2,0)", delta=1))
    assert "not primitive" in v and "(1, 0)" in v and "**extremal**" in v
    v = await hover(pos(text, "(1,1)", delta=2))
    assert "primitive" in v and "not extremal" in v
    # (1,1) >= 0 follows from x >= 0 and y >= 0: it cuts out no facet
    v = await hover(pos(text, "(1,1)", 1, 2))
    assert "redundant" in v
    v = await hover(pos(text, "simplicial", delta=3))
    assert "ray generators are linearly independent" in v
    v = await hover(pos(text, "N", 0))
    assert "rank 2" in v
    v = await hover(pos(text, "f :", 0))
    assert "injective yes" in v           # the matrix [[1,1],[0,1]] is unimodular
    assert await hover(T.Position(line=0, character=1)) is None        # on a keyword
    assert await hover(T.Position(line=999, character=999)) is None    # past the end: clamped


async def test_definition_references_and_rename(client: LanguageClient):
    uri = (client.root / "names.cone").as_uri()
    text = "lattice N = Z^2\ncone c in N { rays (1,0) (0,1) }\ncone d = dual c\nexpect c pointed\nexpect d == dual c\n"
    open_doc(client, uri, text)
    doc = T.TextDocumentIdentifier(uri=uri)
    loc = await client.text_document_definition_async(T.DefinitionParams(text_document=doc,
                                                                         position=pos(text, "dual c", delta=5)))
    assert loc.range.start == pos(text, "c in")
    refs = await client.text_document_references_async(T.ReferenceParams(
        text_document=doc, position=pos(text, "c in"), context=T.ReferenceContext(include_declaration=True)))
    assert len(refs) == 4
    prep = await client.text_document_prepare_rename_async(T.PrepareRenameParams(text_document=doc,
                                                                                 position=pos(text, "c in")))
    assert prep is not None
    edit = await client.text_document_rename_async(T.RenameParams(text_document=doc, position=pos(text, "c in"),
                                                                  new_name="sigma"))
    edits = edit.changes[uri]
    assert len(edits) == 4 and all(e.new_text == "sigma" for e in edits)
    for bad in ("cone", "2x", "a-b", "d"):
        with pytest.raises(Exception) as info:
            await client.text_document_rename_async(T.RenameParams(text_document=doc, position=pos(text, "c in"),
                                                                   new_name=bad))
        assert bad in str(info.value)


async def test_document_and_workspace_symbols_and_folding(client: LanguageClient):
    uri = (client.root / "sym.cone").as_uri()
    text = "# one\n# two\nlattice N = Z^2\ncone c in N {\n  rays (1,0)\n    (0,1)\n}\nmap f : N -> N { rows (1,0) (0,1) }\n"
    open_doc(client, uri, text)
    doc = T.TextDocumentIdentifier(uri=uri)
    syms = await client.text_document_document_symbol_async(T.DocumentSymbolParams(text_document=doc))
    assert [(s.name, s.kind) for s in syms] == [("N", T.SymbolKind.Struct), ("c", T.SymbolKind.Variable),
                                                ("f", T.SymbolKind.Function)]
    folds = await client.text_document_folding_range_async(T.FoldingRangeParams(text_document=doc))
    assert {(f.start_line, f.end_line) for f in folds} == {(0, 1), (3, 6)}
    ws = await client.workspace_symbol_async(T.WorkspaceSymbolParams(query="wdgb"))
    assert [s.name for s in ws] == ["wedge_b"] and ws[0].location.uri.endswith("sub/b.cone")
    ws = await client.workspace_symbol_async(T.WorkspaceSymbolParams(query=""))
    assert {"quadrant", "wedge_b", "c", "f"} <= {s.name for s in ws}


async def test_completion_by_context(client: LanguageClient):
    uri = (client.root / "compl.cone").as_uri()
    base = ("lattice N = Z^3\nlattice P = Z^2\ncone w in N { rays (1,0,0) (0,1,0) (1,1,4) }\n"
            "cone t in P { rays (1,0) (0,1) }\nmap f : N -> P { images (1,0) (0,1) (1,1) }\n"
            "morphism m = f : w -> t\n")

    cases = [("cone x in ", {"N", "P"}, {"w", "t", "f"}),
             ("cone x = ", {"w", "t", "f", "dual", "face"}, {"N", "P"}),
             ("cone x = dual ", {"w", "t"}, {"N"}),
             ("expect w ", {"pointed", "generators", "class_group", "not"}, {"normal"}),
             ("expect w not ", {"pointed", "smooth"}, {"generators"}),
             ("morphism m2 = f : ", {"w", "t"}, {"f", "N"}),
             ("map g : N -> ", {"N", "P"}, {"w"}),
             ("cone y in N { ", {"rays", "halfspaces", "equations"}, {"w"}),
             ("fan R = resolve ", {"w", "t", "crepant"}, {"f", "N"}),
             ("", {"cone", "lattice", "expect", "map"}, set())]
    version = 1
    open_doc(client, uri, base)
    for suffix, must, must_not in cases:
        version += 1
        text = base + suffix
        replace_doc(client, uri, text, version)
        end = pos(text, text[-1], text.count(text[-1]) - 1, 1) if suffix else T.Position(line=text.count("\n"), character=0)
        res = await client.text_document_completion_async(T.CompletionParams(
            text_document=T.TextDocumentIdentifier(uri=uri), position=end))
        got = {i.label for i in res.items}
        assert must <= got, (suffix, got)
        assert not (must_not & got), (suffix, got)
    # a space typed to indent a line is not a question
    version += 1
    text = base + "cone y in N {\n  "
    replace_doc(client, uri, text, version)
    res = await client.text_document_completion_async(T.CompletionParams(
        text_document=T.TextDocumentIdentifier(uri=uri), position=T.Position(line=text.count("\n"), character=2),
        context=T.CompletionContext(trigger_kind=T.CompletionTriggerKind.TriggerCharacter, trigger_character=" ")))
    assert not res.items


def _apply(text: str, edits) -> str:
    from conelang.syntax.text import LineIndex
    ix = LineIndex(text)
    spans = []
    for e in edits:
        a = ix.offset_utf16(e.range.start.line, e.range.start.character)
        b = ix.offset_utf16(e.range.end.line, e.range.end.character)
        spans.append((a, b, e.new_text))
    for a, b, new in sorted(spans, reverse=True):
        text = text[:a] + new + text[b:]
    return text


async def test_quick_fixes_repair_the_file(client: LanguageClient):
    uri = (client.root / "fix.cone").as_uri()
    text = "lattice N = Z^2\ncone q in N { rays (2,0) (0,1) (1,1) }\n"
    open_doc(client, uri, text)
    await diagnostics_where(client, uri, lambda ds: len(ds) == 2)
    doc = T.TextDocumentIdentifier(uri=uri)
    version = 1
    for needle, title in (("(2,0)", "replace by (1, 0)"), ("(1,1)", "remove the redundant ray (1, 1)")):
        p = pos(text, needle, delta=1)
        actions = await client.text_document_code_action_async(T.CodeActionParams(
            text_document=doc, range=T.Range(start=p, end=p), context=T.CodeActionContext(diagnostics=[])))
        (fix,) = [a for a in actions if a.kind == T.CodeActionKind.QuickFix]
        assert fix.title == title and fix.diagnostics
        text = _apply(text, fix.edit.changes[uri])
        version += 1
        replace_doc(client, uri, text, version)
    assert "rays (1, 0) (0,1) }" in text      # the primitive vector, and no ray left over
    await diagnostics_where(client, uri, lambda ds: ds == [], "no warnings after the fixes")


async def test_pin_results_then_break_them(client: LanguageClient):
    uri = (client.root / "pin.cone").as_uri()
    text = "lattice N = Z^2\ncone a1 in N { rays (2,-1) (0,1) }\nexpect a1 pointed\n\ncone other in N { rays (1,0) }\n"
    open_doc(client, uri, text)
    doc = T.TextDocumentIdentifier(uri=uri)
    p = pos(text, "a1 in")
    actions = await client.text_document_code_action_async(T.CodeActionParams(
        text_document=doc, range=T.Range(start=p, end=p), context=T.CodeActionContext(diagnostics=[])))
    (pin,) = [a for a in actions if a.kind == T.CodeActionKind.Refactor]
    assert "a1" in pin.title and pin.edit is None
    resolved = await client.code_action_resolve_async(pin)
    text = _apply(text, resolved.edit.changes[uri])
    lines = text.splitlines()
    # inserted right after the definition and its existing expect line
    assert lines[2] == "expect a1 pointed" and lines[3].startswith("expect a1 ")
    # A_1 (source at the top of this file): 3 generators, class group Z/2, not smooth
    assert "expect a1 generators = 3" in lines and "expect a1 not smooth" in lines
    assert "expect a1 dim = 2" in lines and "expect a1 pointed" in lines
    replace_doc(client, uri, text, 2)
    await diagnostics_where(client, uri, lambda ds: ds == [], "the pinned results to hold")
    # a later change of the cone is caught: d = 3 gives 4 generators (source at the top of this file)
    replace_doc(client, uri, text.replace("(2,-1)", "(3,-1)"), 3)
    diags = await diagnostics_where(client, uri, lambda ds: any(d.code == "expect-failed" for d in ds))
    assert any("generators" in d.message for d in diags)


async def test_pin_results_by_command_for_clients_without_resolve(client: LanguageClient):
    uri = (client.root / "pin_cmd.cone").as_uri()
    text = "lattice N = Z^2\ncone a1 in N { rays (2,-1) (0,1) }\n"
    open_doc(client, uri, text)
    applied = []

    @client.feature(T.WORKSPACE_APPLY_EDIT)
    def apply_edit(params: T.ApplyWorkspaceEditParams):
        applied.append(params.edit)
        return T.ApplyWorkspaceEditResult(applied=True)

    result = await client.workspace_execute_command_async(T.ExecuteCommandParams(
        command="conelang.pinResults", arguments=[uri, "a1"]))
    assert result is True
    (edit,) = applied
    new = _apply(text, edit.changes[uri])
    # source at the top of this file: 3 generators for d = 2
    assert new.startswith(text) and "expect a1 generators = 3\n" in new
    # a name that is not a cone or characters: nothing to pin, and no error
    assert await client.workspace_execute_command_async(T.ExecuteCommandParams(
        command="conelang.pinResults", arguments=[uri, "N"])) is None


async def test_formatting_gives_the_canonical_layout(client: LanguageClient):
    uri = (client.root / "fmt.cone").as_uri()
    text = "lattice N=Z^2   # the lattice\ncone c in N{rays(1,0),(1 ,2)}\n\n\n\nexpect c dim=2"
    open_doc(client, uri, text)
    doc = T.TextDocumentIdentifier(uri=uri)
    edits = await client.text_document_formatting_async(T.DocumentFormattingParams(
        text_document=doc, options=T.FormattingOptions(tab_size=2, insert_spaces=True)))
    new = _apply(text, edits)
    assert new == format_text(text)
    assert new == "lattice N = Z^2  # the lattice\ncone c in N { rays (1, 0) (1, 2) }\n\nexpect c dim = 2\n"
    replace_doc(client, uri, new, 2)
    edits = await client.text_document_formatting_async(T.DocumentFormattingParams(
        text_document=doc, options=T.FormattingOptions(tab_size=2, insert_spaces=True)))
    assert not edits
    replace_doc(client, uri, "cone c in N { rays (1,0", 3)
    edits = await client.text_document_formatting_async(T.DocumentFormattingParams(
        text_document=doc, options=T.FormattingOptions(tab_size=2, insert_spaces=True)))
    assert not edits                       # a file with a syntax error is left alone


async def test_inlay_hints_and_semantic_tokens(client: LanguageClient):
    uri = (client.root / "inlay.cone").as_uri()
    text = "lattice N = Z^2\ncone a1 in N { rays (2,-1) (0,1) }  # A_1\nexpect a1 pointed\n"
    open_doc(client, uri, text)
    doc = T.TextDocumentIdentifier(uri=uri)
    rng = T.Range(start=T.Position(line=0, character=0), end=T.Position(line=5, character=0))

    async def labels():
        hints = await client.text_document_inlay_hint_async(T.InlayHintParams(text_document=doc, range=rng))
        return [(h.position.line, h.label) for h in hints]

    got = await poll(labels, lambda g: "generators" in g[0][1], "the full inlay hints")  # cheap ones come first
    # A_1: 2-dimensional, simplicial, 3 generators, Gorenstein (source at the top of this file)
    assert got[0][0] == 1 and got[0][1].startswith("dim 2 · pointed · simplicial · 3 generators")
    toks = await client.text_document_semantic_tokens_full_async(T.SemanticTokensParams(text_document=doc))
    data = toks.data
    legend = ["keyword", "type", "variable", "function", "method", "enumMember", "namespace",
              "property", "number", "string", "comment", "operator"]
    decoded, line, col = [], 0, 0
    for i in range(0, len(data), 5):
        dl, dc, length, typ, mods = data[i:i + 5]
        line += dl
        col = dc if dl else col + dc
        decoded.append((text.splitlines()[line][col:col + length], legend[typ], mods))
    assert ("lattice", "keyword", 0) in decoded
    assert ("N", "type", 1) in decoded and ("N", "type", 0) in decoded     # declaration, then a use
    assert ("a1", "variable", 1) in decoded and ("pointed", "property", 0) in decoded
    assert ("# A_1", "comment", 0) in decoded and ("2", "number", 0) in decoded


async def test_malformed_and_odd_requests_do_not_take_the_server_down(client: LanguageClient):
    uri = (client.root / "odd.cone").as_uri()
    text = "lattice N = Z^2\ncone c in N { rays (1,0) }\n"
    open_doc(client, uri, text)
    with pytest.raises(JsonRpcException):
        await raw_request(client, "textDocument/hover", {"textDocument": {"uri": 5}})
    with pytest.raises(JsonRpcException):
        await raw_request(client, "textDocument/definition", {"nonsense": True})
    with pytest.raises(JsonRpcException):
        await raw_request(client, "conelang/noSuchMethod", {})
    raw_write(client, "{this is not json")
    # positions far outside the text are clamped, never an error
    doc = T.TextDocumentIdentifier(uri=uri)
    far = T.Position(line=10 ** 6, character=10 ** 6)
    await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=far))
    await client.text_document_definition_async(T.DefinitionParams(text_document=doc, position=far))
    await client.text_document_code_action_async(T.CodeActionParams(
        text_document=doc, range=T.Range(start=far, end=T.Position(line=0, character=0)),
        context=T.CodeActionContext(diagnostics=[])))
    # a document that was never opened
    ghost = T.TextDocumentIdentifier(uri=(client.root / "ghost.cone").as_uri())
    assert await client.text_document_hover_async(T.HoverParams(text_document=ghost, position=far)) is None
    # still alive and correct
    h = await client.text_document_hover_async(T.HoverParams(text_document=doc, position=pos(text, "N", 0)))
    assert "rank 2" in h.contents.value


# A cone whose dual monoid has a very large Hilbert basis: the worker needs many seconds
HEAVY = "lattice N = Z^4\ncone h in N { rays (1,0,0,0) (0,1,0,0) (0,0,1,0) (17,23,29,101) }\n"


async def test_cancellation_while_a_heavy_hover_is_computed(client: LanguageClient):
    uri = (client.root / "heavy.cone").as_uri()
    open_doc(client, uri, HEAVY)
    doc = T.TextDocumentIdentifier(uri=uri)
    h = await client.text_document_hover_async(T.HoverParams(text_document=doc, position=pos(HEAVY, "h in")))
    assert "computing…" in h.contents.value and "Hilbert basis of the dual of h" in h.contents.value
    assert "(17, 23, 29, 101)" in h.contents.value           # the cheap part is there already
    # change the text while the worker is busy with the old cone
    text = HEAVY.replace("(17,23,29,101)", "(1,1,1,2)") + "expect h generators = 0\n"
    replace_doc(client, uri, text, 2)
    # the server answers cheap requests at once and then checks the new text
    h2 = await client.text_document_hover_async(T.HoverParams(text_document=doc, position=pos(text, "N", 0)))
    assert "rank 4" in h2.contents.value
    diags = await diagnostics_where(client, uri, lambda ds: any(d.code == "expect-failed" for d in ds),
                                    "the new text to be checked (the old computation was cancelled)")
    assert diags[0].range.start.line == 2
