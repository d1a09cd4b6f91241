"""The editor questions answered by the host (conelang/ide/editor.py), without the protocol.

Checks: pinned results are accepted by the checker on every example file; completion,
rename, folding and semantic tokens on small files whose answers follow from the syntax.
Mathematical facts come with their source.
"""
from __future__ import annotations

from pathlib import Path

import pytest

from conelang.ide import AnalysisHost
from conelang.ide.editor import RenameError

EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "examples").glob("*.cone"))


def _host(text: str, uri: str = "mem://t.cone") -> AnalysisHost:
    h = AnalysisHost()
    h.apply_change(uri, text)
    return h


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_pinned_results_hold_on_the_examples(path):
    text = path.read_text()
    h = _host(text)
    a = h.analysis("mem://t.cone")
    edits = []
    for name in a.defs:
        st = a.defs[name]
        if h.pin_target("mem://t.cone", st.name.span[0]) != name:
            continue
        e = h.pin_results("mem://t.cone", name)
        if e is not None:
            edits.append(e)
    if not edits:
        pytest.skip("everything in this file is pinned already")
    new = text
    for e in sorted(edits, key=lambda e: e.span, reverse=True):
        new = new[:e.span[0]] + e.new_text + new[e.span[1]:]
    h2 = _host(new)
    before = {(d.code, d.message) for d in h.diagnostics("mem://t.cone")}
    after = [d for d in h2.diagnostics("mem://t.cone") if (d.code, d.message) not in before]
    assert after == []
    assert new.count("\nexpect ") > text.count("\nexpect ")


def test_pin_skips_what_is_already_expected_and_what_is_undefined():
    # the positive quadrant: properties already expected are not written again
    text = "lattice N = Z^2\ncone c in N { rays (1,0) (0,1) }\nexpect c dim = 2\n"
    h = _host(text)
    e = h.pin_results("mem://t.cone", "c")
    assert "dim" not in e.new_text                 # already expected
    assert e.span == (len(text), len(text))        # after the expect line that follows the cone
    assert "expect c pointed" in e.new_text.splitlines()


def test_completion_contexts_from_the_syntax():
    text = ("lattice N = Z^3\ncone w in N { rays (1,0,0) (0,1,0) (1,1,4) }\n"
            "characters chi of N { (1,0,0) }\nexpect chi ")
    h = _host(text)
    got = {s.label: s.kind for s in h.completions("mem://t.cone", len(text))}
    assert got == {"normal": "property", "not": "keyword"}
    # inside a comment or a string: nothing
    h = _host(text + "  # cone ")
    assert h.completions("mem://t.cone", len(text) + 9) == []
    # a partial word at the start of a line: the statement keywords
    h = _host("lattice N = Z^3\nco")
    assert {"cone", "lattice", "expect"} <= {s.label for s in h.completions("mem://t.cone", 18)}


def test_rename_covers_uses_in_statements_that_do_not_parse_yet():
    text = "lattice N = Z^2\ncone c in N { rays (1,0) }\ncone d = dual c &\nexpect c pointed\n"
    h = _host(text)
    spans = [e.span for e in h.rename("mem://t.cone", text.index("c in"), "sigma")]
    assert [text[a:b] for a, b in spans] == ["c", "c", "c"]
    assert spans[1][0] == text.index("dual c") + 5
    with pytest.raises(RenameError, match="already defined"):
        h.rename("mem://t.cone", text.index("c in"), "N")
    with pytest.raises(RenameError, match="keyword"):
        h.rename("mem://t.cone", text.index("c in"), "crepant")


def test_folding_and_semantic_tokens():
    text = "# a\n# b\nlattice N = Z^2\ncone c in N {\n  rays (1,0)\n}\nfan F = resolve c\n"
    h = _host(text)
    assert h.folding_ranges("mem://t.cone") == [(0, 1, "comment"), (3, 5, "region")]
    toks = {(text[s:e], t, m) for s, e, t, m in h.semantic_tokens("mem://t.cone")}
    assert {("N", "type", ("declaration",)), ("c", "variable", ()), ("F", "namespace", ("declaration",)),
            ("resolve", "keyword", ()), ("Z", "type", ("defaultLibrary",)), ("# a", "comment", ())} <= toks


def test_doctests():
    import doctest

    import conelang.ide.editor
    import conelang.ide.host
    import conelang.server.convert
    import conelang.server.worker
    import conelang.syntax.format
    for mod in (conelang.ide.editor, conelang.ide.host, conelang.server.convert, conelang.server.worker,
                conelang.syntax.format):
        result = doctest.testmod(mod)
        assert result.failed == 0 and result.attempted > 0, mod.__name__
