"""The language server across files (`use` statements): definition, references, rename,
hover and completion into other files; diagnostics of the files that use a file, refreshed
when it changes (typed into, closed, or changed on disk); cycles of files; bad `use`
statements never take the server down.

Real files in a project folder (a ``conelang.toml`` marks its root), driven over stdio by
pytest-lsp.  Each test has its own subfolder, listed before the session starts (the server
lists the workspace's ``.cone`` files when it is initialized).  The mathematics is plain
linear algebra: cone((1,0),(0,1)) is smooth (its rays are a basis of Z^2); cone((1,0),(1,2))
is not (the determinant of its rays is 2).
"""
from __future__ import annotations

import pytest
import pytest_lsp
from lsprotocol import types as T
from pytest_lsp import ClientServerConfig, LanguageClient

from lsp_helpers import (CAPABILITIES, SERVER, diagnostics_where, initialize, open_doc, poll, pos, replace_doc,
                         uri_of, wait_for)

pytestmark = pytest.mark.asyncio(loop_scope="module")

SHARED = "lattice N = Z^2\ncone wedge in N { rays (1,0) (0,1) }\ncone _hidden in N { rays (1,0) }\n"
SHARED_NO_WEDGE = "lattice N = Z^2\ncone _hidden in N { rays (1,0) }\n"
SHARED_NOT_SMOOTH = "lattice N = Z^2\ncone wedge in N { rays (1,0) (1,2) }\ncone _hidden in N { rays (1,0) }\n"

NAV_A = 'use "shared.cone"\ncone w2 = dual wedge\nexpect wedge smooth\n'
NAV_B = 'use "../shared.cone" (N, wedge as w)\ncone z in N { rays (1,0) (0,1) }\nexpect w smooth\nexpect z == w\n'
IMPORTER = 'use "shared.cone" (N, wedge)\nexpect wedge smooth\n'

FILES = {
    "nav/shared.cone": SHARED,
    "nav/a.cone": NAV_A,
    "nav/sub/b.cone": NAV_B,                      # never opened
    "edit/shared.cone": SHARED,
    "edit/importer.cone": IMPORTER,
    "disk/shared.cone": SHARED,
    "disk/importer.cone": IMPORTER,
    "disk/closed_importer.cone": IMPORTER,        # never opened
    "disk/waits.cone": 'use "later.cone" (N)\ncone c in N { rays (1,0) }\n',
    "cycle/x.cone": 'use "y.cone"\nlattice X = Z^2\n',
    "cycle/y.cone": 'use "x.cone"\nlattice Y = Z^2\n',
    "paths/shared.cone": SHARED,
    "paths/sub/inner.cone": "lattice I = Z^1\n",
    "paths/sub/.hidden/h.cone": "lattice H = Z^1\n",
    "paths/notes.txt": "not a cone file\n",
    "top.cone": "lattice T = Z^1\n",
    "bad/folder.cone/inside.cone": "lattice F = Z^1\n",
}


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER), scope="module")
async def client(lsp_client: LanguageClient, tmp_path_factory):
    root = tmp_path_factory.mktemp("project")
    (root / "conelang.toml").write_text("")
    for rel, text in FILES.items():
        (root / rel).parent.mkdir(parents=True, exist_ok=True)
        (root / rel).write_text(text)
    (root / "bad" / "binary.cone").write_bytes(b"\xff\xfe\x00lattice\x80\n")
    lsp_client.root = root
    lsp_client.registrations = []

    @lsp_client.feature(T.CLIENT_REGISTER_CAPABILITY)
    def registered(params: T.RegistrationParams):
        lsp_client.registrations.extend(params.registrations)

    caps = T.ClientCapabilities(
        workspace=T.WorkspaceClientCapabilities(
            apply_edit=True, workspace_folders=True,
            workspace_edit=T.WorkspaceEditClientCapabilities(document_changes=True),
            did_change_watched_files=T.DidChangeWatchedFilesClientCapabilities(dynamic_registration=True)),
        text_document=CAPABILITIES.text_document)
    await initialize(lsp_client, root, capabilities=caps, debounce=0.05)
    yield
    await lsp_client.shutdown_session()


def uri(client, rel: str) -> str:
    return uri_of(client.root / rel)


def codes(diags) -> list[str]:
    return sorted(str(d.code) for d in diags)


def at(text: str, needle: str, occurrence: int = 0, delta: int = 0) -> tuple[int, int]:
    p = pos(text, needle, occurrence, delta)
    return p.line, p.character


def doc(u: str) -> T.TextDocumentIdentifier:
    return T.TextDocumentIdentifier(uri=u)


def apply(text: str, edits) -> str:
    """The text after the LSP edits (single-line ranges, as a rename gives)."""
    lines = text.split("\n")
    for e in sorted(edits, key=lambda e: (e.range.start.line, e.range.start.character), reverse=True):
        ln = lines[e.range.start.line]
        lines[e.range.start.line] = ln[:e.range.start.character] + e.new_text + ln[e.range.end.character:]
    return "\n".join(lines)


async def test_the_watcher_is_registered(client: LanguageClient):
    await wait_for(lambda: client.registrations, what="the registration of the file watcher")
    (reg,) = client.registrations
    assert reg.method == T.WORKSPACE_DID_CHANGE_WATCHED_FILES
    assert [w["globPattern"] for w in reg.register_options["watchers"]] == ["**/*.cone"]


async def test_definition_into_another_file(client: LanguageClient):
    a, shared = uri(client, "nav/a.cone"), uri(client, "nav/shared.cone")
    open_doc(client, a, NAV_A)
    await diagnostics_where(client, a, lambda ds: ds == [], "a.cone without diagnostics")
    loc = await client.text_document_definition_async(T.DefinitionParams(text_document=doc(a),
                                                                         position=pos(NAV_A, "wedge")))
    assert loc.uri == shared
    assert (loc.range.start, loc.range.end) == (pos(SHARED, "wedge"), pos(SHARED, "wedge", delta=5))
    # the path of a use statement leads to the file; a listed name to its definition
    b = uri(client, "nav/sub/b.cone")
    loc = await client.text_document_definition_async(T.DefinitionParams(text_document=doc(b),
                                                                         position=pos(NAV_B, "shared")))
    assert loc.uri == shared and (loc.range.start.line, loc.range.start.character) == (0, 0)
    loc = await client.text_document_definition_async(T.DefinitionParams(text_document=doc(b),
                                                                         position=pos(NAV_B, "wedge as")))
    assert loc.uri == shared and loc.range.start == pos(SHARED, "wedge")
    # a name of the file itself stays in the file
    loc = await client.text_document_definition_async(T.DefinitionParams(text_document=doc(a),
                                                                         position=pos(NAV_A, "w2")))
    assert loc.uri == a and loc.range.start == pos(NAV_A, "w2")


async def test_references_from_both_sides(client: LanguageClient):
    a, b, shared = uri(client, "nav/a.cone"), uri(client, "nav/sub/b.cone"), uri(client, "nav/shared.cone")
    open_doc(client, a, NAV_A)
    expected = {(shared, at(SHARED, "wedge")), (a, at(NAV_A, "wedge")), (a, at(NAV_A, "wedge", 1)),
                (b, at(NAV_B, "wedge")), (b, at(NAV_B, "w smooth")), (b, at(NAV_B, "== w", delta=3))}

    async def refs(u, p, include=True):
        got = await client.text_document_references_async(T.ReferenceParams(
            text_document=doc(u), position=p, context=T.ReferenceContext(include_declaration=include)))
        return {(r.uri, (r.range.start.line, r.range.start.character)) for r in got}

    # from the file that uses it (b.cone is not open: it is found among the workspace's files)
    assert await refs(a, pos(NAV_A, "wedge", 1)) == expected
    # from the defining file (not open either: read from disk)
    assert await refs(shared, pos(SHARED, "wedge")) == expected
    # from the alias in the file that is not open
    assert await refs(b, pos(NAV_B, "w smooth")) == expected
    assert await refs(shared, pos(SHARED, "wedge"), include=False) == expected - {(shared, at(SHARED, "wedge"))}
    # highlights stay in the file
    hl = await client.text_document_document_highlight_async(T.DocumentHighlightParams(
        text_document=doc(a), position=pos(NAV_A, "wedge", 1)))
    assert hl and all(h.range.start.line < 3 for h in hl)


async def test_rename_across_three_files_keeps_an_alias(client: LanguageClient):
    a, b, shared = uri(client, "nav/a.cone"), uri(client, "nav/sub/b.cone"), uri(client, "nav/shared.cone")
    open_doc(client, a, NAV_A, version=7)
    open_doc(client, shared, SHARED, version=3)
    edit = await client.text_document_rename_async(T.RenameParams(text_document=doc(a),
                                                                  position=pos(NAV_A, "wedge", 1), new_name="cusp"))
    assert edit.changes is None                    # the client takes documentChanges
    by_uri = {d.text_document.uri: d for d in edit.document_changes}
    assert set(by_uri) == {a, b, shared}
    assert by_uri[a].text_document.version == 7 and by_uri[shared].text_document.version == 3
    assert by_uri[b].text_document.version is None            # not open: the disk text
    assert apply(SHARED, by_uri[shared].edits) == SHARED.replace("wedge", "cusp")
    assert apply(NAV_A, by_uri[a].edits) == NAV_A.replace("wedge", "cusp")
    # b.cone brings it in as 'w': only the name in its use list changes, 'w' stays
    assert apply(NAV_B, by_uri[b].edits) == NAV_B.replace("wedge as w", "cusp as w")
    # renaming the alias is local to its file
    edit = await client.text_document_rename_async(T.RenameParams(text_document=doc(b),
                                                                  position=pos(NAV_B, "w smooth"), new_name="v"))
    (only,) = edit.document_changes
    assert only.text_document.uri == b
    assert apply(NAV_B, only.edits) == NAV_B.replace("as w", "as v").replace("w smooth", "v smooth").replace("== w", "== v")
    # a clash in any file refuses the rename
    with pytest.raises(Exception, match="w2"):
        await client.text_document_rename_async(T.RenameParams(text_document=doc(shared),
                                                               position=pos(SHARED, "wedge"), new_name="w2"))
    client.text_document_did_close(T.DidCloseTextDocumentParams(text_document=doc(shared)))


async def test_hover_on_an_imported_name_shows_the_other_files_facts(client: LanguageClient):
    a = uri(client, "nav/a.cone")
    open_doc(client, a, NAV_A)

    async def hover():
        return await client.text_document_hover_async(T.HoverParams(text_document=doc(a),
                                                                    position=pos(NAV_A, "wedge", 1)))
    h = await poll(hover, lambda h: h is not None and "computing" not in h.contents.value, "the full hover")
    md = h.contents.value
    assert "cone `wedge`" in md and "(1, 0)" in md and "(0, 1)" in md
    assert "smooth" in md


async def test_importers_see_the_open_text_of_a_shared_file_and_the_disk_after_close(client: LanguageClient):
    importer, shared = uri(client, "edit/importer.cone"), uri(client, "edit/shared.cone")
    open_doc(client, importer, IMPORTER)
    await diagnostics_where(client, importer, lambda ds: ds == [], "the importer checked")
    open_doc(client, shared, SHARED)
    # not saved: only the open text says wedge is gone
    replace_doc(client, shared, SHARED_NO_WEDGE, 2)
    diags = await diagnostics_where(client, importer, lambda ds: "import-unknown-name" in codes(ds),
                                    "import-unknown-name in the importer")
    (d,) = [d for d in diags if d.code == "import-unknown-name"]
    assert d.range.start == pos(IMPORTER, "wedge") and "wedge" in d.message
    # an expectation is checked by the worker process: it must see the open text too
    replace_doc(client, shared, SHARED_NOT_SMOOTH, 3)
    diags = await diagnostics_where(client, importer, lambda ds: codes(ds) == ["expect-failed"],
                                    "the expectation failing on the edited shared file")
    assert diags[0].range.start.line == 1
    # closed without saving: the importer reads the disk again
    client.text_document_did_close(T.DidCloseTextDocumentParams(text_document=doc(shared)))
    await diagnostics_where(client, importer, lambda ds: ds == [], "the importer clean again")


async def test_a_change_on_disk_refreshes_open_and_closed_importers(client: LanguageClient):
    importer, closed = uri(client, "disk/importer.cone"), uri(client, "disk/closed_importer.cone")
    shared = uri(client, "disk/shared.cone")
    open_doc(client, importer, IMPORTER)
    await diagnostics_where(client, importer, lambda ds: ds == [], "the importer checked")
    (client.root / "disk" / "shared.cone").write_text(SHARED_NO_WEDGE)
    client.workspace_did_change_watched_files(T.DidChangeWatchedFilesParams(
        changes=[T.FileEvent(uri=shared, type=T.FileChangeType.Changed)]))
    await diagnostics_where(client, importer, lambda ds: codes(ds) == ["import-unknown-name"], "the open importer")
    # the file that is not open gets its diagnostics from its disk text
    await diagnostics_where(client, closed, lambda ds: codes(ds) == ["import-unknown-name"], "the closed importer")
    # opening it takes over with the open text
    open_doc(client, closed, 'use "shared.cone" (N)\n')
    await diagnostics_where(client, closed, lambda ds: ds == [], "the opened importer")


async def test_a_created_file_is_found(client: LanguageClient):
    waits = uri(client, "disk/waits.cone")
    text = FILES["disk/waits.cone"]
    open_doc(client, waits, text)
    await diagnostics_where(client, waits, lambda ds: codes(ds) == ["import-not-found"], "the missing file")
    (client.root / "disk" / "later.cone").write_text("lattice N = Z^2\n")
    client.workspace_did_create_files(T.CreateFilesParams(files=[T.FileCreate(uri=uri(client, "disk/later.cone"))]))
    await diagnostics_where(client, waits, lambda ds: ds == [], "the file found once created")
    (client.root / "disk" / "later.cone").unlink()
    client.workspace_did_change_watched_files(T.DidChangeWatchedFilesParams(
        changes=[T.FileEvent(uri=uri(client, "disk/later.cone"), type=T.FileChangeType.Deleted)]))
    await diagnostics_where(client, waits, lambda ds: codes(ds) == ["import-not-found"], "missing again")


async def test_a_cycle_of_files(client: LanguageClient):
    x, y = uri(client, "cycle/x.cone"), uri(client, "cycle/y.cone")
    text = FILES["cycle/x.cone"]
    open_doc(client, x, text)
    diags = await diagnostics_where(client, x, lambda ds: "import-cycle" in codes(ds), "the cycle")
    (d,) = [d for d in diags if d.code == "import-cycle"]
    assert "x.cone" in d.message and "y.cone" in d.message
    # y.cone uses x.cone: it is checked too (from its disk text), and names the cycle
    await diagnostics_where(client, y, lambda ds: "import-cycle" in codes(ds), "the cycle in y.cone")
    replace_doc(client, x, text + "lattice X2 = Z^3\n", 2)
    await diagnostics_where(client, x, lambda ds: "import-cycle" in codes(ds), "the cycle after an edit")
    refs = await client.text_document_references_async(T.ReferenceParams(
        text_document=doc(x), position=pos(text, "X ="), context=T.ReferenceContext(include_declaration=True)))
    assert [r.uri for r in refs] == [x]


async def test_path_completion_inside_the_quotes(client: LanguageClient):
    main = uri(client, "paths/main.cone")
    versions: dict[str, int] = {}

    async def complete(text, u=main):
        if u in versions:
            versions[u] += 1
            replace_doc(client, u, text, versions[u])
        else:
            versions[u] = 1
            open_doc(client, u, text)
        end = T.Position(line=text.count("\n"), character=len(text.split("\n")[-1]))
        res = await client.text_document_completion_async(T.CompletionParams(text_document=doc(u), position=end))
        return res.items

    items = await complete('use "')
    assert {i.label for i in items} == {"shared.cone", "sub/", "../"}
    folder = next(i for i in items if i.label == "sub/")
    assert folder.kind == T.CompletionItemKind.Folder and folder.text_edit.range.start.character == 5
    items = await complete('use "sub/')
    assert [i.label for i in items] == ["sub/inner.cone"]
    assert items[0].text_edit.range.start.character == 5 and items[0].text_edit.new_text == "sub/inner.cone"
    # at the project root: nothing above it
    items = await complete('use "', uri(client, "top.cone"))
    assert "../" not in {i.label for i in items} and {"nav/", "paths/"} <= {i.label for i in items}
    assert list(await complete('use "../', uri(client, "top.cone"))) == []
    # names brought in are offered where a cone is expected
    text = 'use "shared.cone"\ncone d = dual '
    items = await complete(text)
    assert "wedge" in {i.label for i in items} and "_hidden" not in {i.label for i in items}


async def test_bad_use_statements_never_take_the_server_down(client: LanguageClient):
    bad = uri(client, "bad/main.cone")
    text = ('use "missing.cone"\nuse "folder.cone"\nuse "binary.cone"\nuse "../../../../etc/passwd"\nuse ""\n'
            'use "main.cone"\nuse "missing.cone" (a, b as c)\ncone k = dual c\n')
    open_doc(client, bad, text)
    diags = await diagnostics_where(client, bad, lambda ds: "import-outside-root" in codes(ds), "the bad uses")
    got = codes(diags)
    assert got.count("import-not-found") >= 4 and "import-cycle" in got
    messages = " ".join(d.message for d in diags)
    assert "folder" in messages and "UTF-8" in messages
    for needle in ("missing", "folder", "binary", "passwd", '""', "main", "b as c", "dual c"):
        p = pos(text, needle)
        await client.text_document_hover_async(T.HoverParams(text_document=doc(bad), position=p))
        await client.text_document_definition_async(T.DefinitionParams(text_document=doc(bad), position=p))
        await client.text_document_references_async(T.ReferenceParams(
            text_document=doc(bad), position=p, context=T.ReferenceContext(include_declaration=True)))
        await client.text_document_completion_async(T.CompletionParams(text_document=doc(bad), position=p))
        try:
            await client.text_document_rename_async(T.RenameParams(text_document=doc(bad), position=p, new_name="q"))
        except Exception:
            pass                                   # refused with an error response: fine
    # the binary file itself, opened or asked about, and workspace symbols over it
    await client.text_document_hover_async(T.HoverParams(text_document=doc(uri(client, "bad/binary.cone")),
                                                         position=T.Position(line=0, character=1)))
    await client.workspace_symbol_async(T.WorkspaceSymbolParams(query=""))
    replace_doc(client, bad, 'use "shared.cone"\n', 2)
    await diagnostics_where(client, bad, lambda ds: codes(ds) == ["import-not-found"], "still answering")


async def test_allow_outside_root_from_the_configuration(client: LanguageClient):
    outside = client.root.parent / "outside_of_the_project.cone"
    outside.write_text("lattice O = Z^2\n")
    u = uri(client, "far.cone")
    text = f'use "../{outside.name}" (O)\ncone c in O {{ rays (1,0) (0,1) }}\nexpect c smooth\n'
    open_doc(client, u, text)
    await diagnostics_where(client, u, lambda ds: codes(ds) == ["import-outside-root"], "outside the root")
    client.workspace_did_change_configuration(T.DidChangeConfigurationParams(
        settings={"conelang": {"allowOutsideRoot": True}}))
    await diagnostics_where(client, u, lambda ds: ds == [], "allowed outside the root")
    client.workspace_did_change_configuration(T.DidChangeConfigurationParams(
        settings={"conelang": {"allowOutsideRoot": False}}))
    await diagnostics_where(client, u, lambda ds: codes(ds) == ["import-outside-root"], "outside the root again")
