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
from conelang.host import AnalysisHost

CORPUS = sorted((Path(__file__).parent / "corpus" / "broken").glob("*.cone"))
WARNING_CODES = {"not-primitive", "redundant-ray", "redundant-inequality", "ray-in-lineality", "existing-ray",
                 "fan-unused-ray", "fan-redundant-cone", "fan-duplicate-index"}
INTENT = re.compile(r"#\s*diagnostic:\s*([a-z-]+)\s+at\s+(\d+)")


def test_corpus_is_not_empty():
    assert len(CORPUS) >= 20


@pytest.mark.parametrize("path", CORPUS, ids=lambda p: p.stem)
def test_broken_file_gives_intended_diagnostic(path: Path):
    text = path.read_text()
    wanted = [(m.group(1), int(m.group(2))) for m in INTENT.finditer(text)]
    assert wanted, f"{path.name} states no intended diagnostic"
    host = AnalysisHost()
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
