"""A corpus of broken files: each gives the intended diagnostic code at the intended line.

Each file in tests/corpus/broken states its intent in header comments
``# diagnostic: CODE at LINE``; the check is that every such diagnostic is reported, and that
the file as a whole fails ``conelang check`` (exit 1) while printing no traceback.
"""
from __future__ import annotations

import re
from pathlib import Path

import pytest

from conelang.cli import main
from conelang.ide import AnalysisHost
from conelang.project import FileLoader

CORPUS = sorted((Path(__file__).parent / "corpus" / "broken").glob("*.cone"))
WARNING_CODES = {"not-primitive", "redundant-ray", "redundant-inequality", "ray-in-lineality", "existing-ray",
                 "fan-unused-ray", "fan-redundant-cone", "fan-duplicate-index", "redundant-vertex",
                 "import-has-errors"}
INTENT = re.compile(r"#\s*diagnostic:\s*([a-z-]+)\s+at\s+(\d+)")


def test_corpus_is_not_empty():
    assert len(CORPUS) >= 20


@pytest.mark.parametrize("path", CORPUS, ids=lambda p: p.stem)
def test_broken_file_gives_intended_diagnostic(path: Path):
    text = path.read_text()
    wanted = [(m.group(1), int(m.group(2))) for m in INTENT.finditer(text)]
    assert wanted, f"{path.name} states no intended diagnostic"
    host = AnalysisHost(loader=FileLoader())       # `use` statements read files beside them
    host.apply_change(str(path), text)
    a = host.analysis(str(path))
    got = {(d.code, a.index.position(d.span[0])[0] + 1) for d in host.diagnostics(str(path))}
    for code, line in wanted:
        assert (code, line) in got, f"{path.name}: wanted {code} at line {line}, got {sorted(got)}"


@pytest.mark.parametrize("path", CORPUS, ids=lambda p: p.stem)
def test_check_exit_code_and_format(path: Path, capsys):
    text = path.read_text()
    only_warnings = all(c in WARNING_CODES
                        for c, _ in ((m.group(1), m.group(2)) for m in INTENT.finditer(text)))
    code = main(["check", str(path)])
    out, err = capsys.readouterr()
    assert code == (0 if only_warnings else 1)
    assert "Traceback" not in out + err
    for line in out.splitlines():
        assert re.match(r"^.+:\d+:\d+: (error|warning|information|hint): .+ \[[a-z-]+\]$", line), line


# ---- every diagnostic code has a corpus file ---------------------------------------------------
ROOT = Path(__file__).parent.parent
# Codes that honest input cannot produce: they are safety nets, tested below by simulating the
# failure they catch.
EXEMPT = {
    "internal-error": "reported only when the engine itself has a bug",
    "too-deep": "the parser refuses nesting ('statement is nested too deeply', a syntax "
                "diagnostic, see tests/test_hostile.py) before evaluation could recurse that deep",
}


def code_table() -> set[str]:
    """The codes of the table of diagnostic codes in DEVELOPERS.md (first column)."""
    doc = (ROOT / "DEVELOPERS.md").read_text()
    section = doc.split("## Diagnostic codes", 1)[1].split("\n## ", 1)[0]
    codes = set()
    for line in section.splitlines():
        if line.startswith("| `"):
            codes |= set(re.findall(r"`([a-z]+(?:-[a-z]+)*)`", line.split("|")[1]))
    return codes


def test_every_diagnostic_code_has_a_corpus_file():
    intended = set()
    for path in CORPUS:
        intended |= {m.group(1) for m in INTENT.finditer(path.read_text())}
    table = code_table()
    assert len(table) >= 30
    missing = sorted(table - intended - set(EXEMPT))
    assert not missing, f"diagnostic codes without a file in tests/corpus/broken/: {missing}"
    unknown = sorted(intended - table)
    assert not unknown, f"corpus files state codes that are not in the table: {unknown}"
    assert set(EXEMPT) <= table


def _host_with(text: str) -> tuple[AnalysisHost, str]:
    host = AnalysisHost()
    host.apply_change("mem.cone", text)
    return host, "mem.cone"


def test_internal_error_is_reported_on_the_definition_and_the_rest_is_analysed(monkeypatch):
    from conelang.semantics import evaluate

    def broken(self, st):
        if st.name.text == "buggy":
            raise ZeroDivisionError("simulated bug")
        return original(self, st)
    original = evaluate.Evaluator._evaluate
    monkeypatch.setattr(evaluate.Evaluator, "_evaluate", broken)
    host, uri = _host_with("lattice N = Z^2\ncone a in N { rays (1,0) (1,2) }\n"
                           "cone buggy in N { rays (1,0) (0,7) }\nexpect a dim = 3\n")
    got = [(d.code, d.message) for d in host.diagnostics(uri)]
    assert ("internal-error", "internal error while evaluating 'buggy': ZeroDivisionError: simulated bug") in got
    assert any(code == "expect-failed" for code, _ in got)       # 'a' is still checked


def test_too_deep_is_reported_when_evaluation_recurses_too_far(monkeypatch):
    from conelang.semantics import evaluate

    def deep(self, st):
        raise RecursionError
    monkeypatch.setattr(evaluate.Evaluator, "_evaluate", deep)
    # texts of their own: the analysis remembers evaluations of statement texts it has seen
    host, uri = _host_with("lattice DeepTest = Z^4\n")
    assert [d.code for d in host.diagnostics(uri)] == ["too-deep"]
