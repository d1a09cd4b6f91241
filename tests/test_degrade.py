"""Results degrade field by field: equations over budget never take the generators, torus action,
invariants or the expectations that do not need them along."""
from __future__ import annotations

import json

from conelang.cli import main

# 1/17(3,5)-type threefold cone: its dual's Hilbert basis (14 generators) is cheap, its 65
# minimal equations are not, under a budget of 5000 steps
TEXT = """lattice N = Z^3
cone q in N { rays (1,0,0) (0,1,0) (3,5,17) }
expect q simplicial
expect q generators = 14
expect q not smooth
"""


def test_over_budget_equations_leave_the_rest(tmp_path, capsys):
    f = tmp_path / "q.cone"
    f.write_text(TEXT)
    assert main(["show", str(f), "--format", "json", "--budget", "5000"]) in (0, 1)
    out = json.loads(capsys.readouterr().out)
    q = out["objects"]["q"]
    var = q["variety"]
    assert len(var["generators"]) == 14 and len(var["torus_action"]) == 14
    assert var["smooth"] is False and var["simplicial"] is True
    assert var["gorenstein_index"] is not None and var["class_group"]
    assert "equations" not in var and "binomials" not in var
    assert any(e.startswith("equations:") and "--budget" in e for e in q["errors"]), q["errors"]


def test_expectations_without_equations_still_decide(tmp_path, capsys):
    f = tmp_path / "q.cone"
    f.write_text(TEXT)
    assert main(["check", str(f), "--budget", "5000"]) == 0
    assert "budget" not in capsys.readouterr().out


def test_with_enough_budget_the_equations_come_back(tmp_path, capsys):
    f = tmp_path / "q.cone"
    f.write_text(TEXT)
    main(["show", str(f), "--format", "json"])
    text = capsys.readouterr().out
    assert '"equations"' in text and text.count("z") > 65


def test_show_says_what_it_computes_on_a_terminal_only(tmp_path):
    """Progress goes to stderr when it is a terminal, never to stdout (which stays valid JSON)."""
    import os
    import pty
    import subprocess
    import sys
    f = tmp_path / "slow.cone"
    f.write_text("lattice N = Z^3 + 1/997 (1,100,300)\ncone q in N { rays (1,0,0) (0,1,0) (0,0,1) }\n")
    master, slave = pty.openpty()
    cmd = [sys.executable, "-m", "conelang.cli", "show", str(f), "--format", "json", "--budget", "20000000"]
    p = subprocess.run(cmd, stdout=subprocess.PIPE, stderr=slave, timeout=300)
    os.close(slave)
    err = b""
    try:
        while chunk := os.read(master, 65536):
            err += chunk
    except OSError:
        pass
    os.close(master)
    doc = json.loads(p.stdout)
    assert "generators" in doc["objects"]["q"]["variety"]
    assert b"conelang: q:" in err and b"conelang: q:" not in p.stdout
    piped = subprocess.run(cmd, capture_output=True, timeout=300)
    assert b"conelang: q:" not in piped.stderr
