"""The command line: exit codes, output format, JSON keys of docs/language.md, and no tracebacks."""
from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from conelang.cli import main

EXAMPLES = Path(__file__).parent.parent / "examples"

GOOD = """lattice N = Z^2
cone c in N { rays (1,0) (1,2) }
cone d = dual c
expect c dim = 2
expect d == dual c
"""


@pytest.fixture
def good(tmp_path):
    p = tmp_path / "good.cone"
    p.write_text(GOOD)
    return p


def test_check_examples_succeeds(capsys):
    assert main(["check", str(EXAMPLES)]) == 0
    out, _ = capsys.readouterr()
    assert "error" not in out


def test_check_reports_failed_expectation(tmp_path, capsys):
    p = tmp_path / "bad.cone"
    p.write_text(GOOD.replace("dim = 2", "dim = 3"))
    assert main(["check", str(p)]) == 1
    out, _ = capsys.readouterr()
    assert out.strip() == f"{p}:4:1: error: expected dim = 3 for 'c', computed 2 [expect-failed]"


def test_usage_errors_exit_2(tmp_path, capsys):
    assert main(["check", str(tmp_path / "missing.cone")]) == 2
    assert main(["frobnicate"]) == 2
    assert main([]) == 2
    assert main(["show", str(tmp_path / "missing.cone")]) == 2


def test_unreadable_file_exits_2(tmp_path, capsys):
    p = tmp_path / "latin1.cone"
    p.write_bytes(b"lattice N = Z^2 # caf\xe9\n")
    assert main(["check", str(p)]) == 2
    _, err = capsys.readouterr()
    assert "not UTF-8" in err


def test_folder_recursion(tmp_path, capsys):
    (tmp_path / "sub").mkdir()
    (tmp_path / "sub" / "a.cone").write_text(GOOD)
    (tmp_path / "b.cone").write_text(GOOD.replace("dim = 2", "dim = 1"))
    (tmp_path / "notes.txt").write_text("not a cone file")
    assert main(["check", str(tmp_path)]) == 1
    out, err = capsys.readouterr()
    assert "b.cone:4:1" in out and "checked 2 files: 1 with errors" in err


def test_show_json_has_the_contract_keys(good, capsys):
    assert main(["show", str(good), "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert set(doc) == {"file", "diagnostics", "objects"}
    c = doc["objects"]["c"]
    for key in ("kind", "lattice", "ambient_dim", "dim", "pointed", "rays", "lineality", "facets",
                "linear_equations"):
        assert key in c
    assert c["rays"] == [[1, 0], [1, 2]]
    assert c["facets"] == [[0, 1], [2, -1]]
    assert doc["objects"]["N"] == {"kind": "lattice", "rank": 2}
    assert doc["objects"]["d"]["lattice"] == "dual N"


def test_show_json_rationals_are_strings(tmp_path, capsys):
    p = tmp_path / "q.cone"
    p.write_text("lattice Q = Z^2 + 1/7 (1, 3)\ncone c in Q { rays (1/7, 3/7) (0,1) }\n")
    main(["show", str(p), "--format", "json"])
    doc = json.loads(capsys.readouterr().out)
    assert doc["objects"]["c"]["rays"] == [[0, 1], ["1/7", "3/7"]]


def test_show_selected_names_and_unknown_name(good, capsys):
    main(["show", str(good), "c", "--format", "json"])
    assert list(json.loads(capsys.readouterr().out)["objects"]) == ["c"]
    assert main(["show", str(good), "nothere"]) == 2


@pytest.mark.parametrize("fmt", ["text", "markdown"])
def test_show_text_formats(good, capsys, fmt):
    assert main(["show", str(good), "--format", fmt]) == 0
    out = capsys.readouterr().out
    assert "(1, 2)" in out and "c" in out


def test_installed_command_runs_from_any_folder(tmp_path, good):
    proc = subprocess.run([sys.executable, "-m", "conelang.cli", "check", str(good)], cwd=tmp_path,
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert "Traceback" not in proc.stderr
