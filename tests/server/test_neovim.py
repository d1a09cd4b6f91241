"""A real editor against `conelang serve`: Neovim's built-in LSP client, headless.

Skipped only when `nvim` is missing outside CI; in CI (CI=true) a missing nvim fails.

The cone: sigma = cone(2e1 - e2, e2) is the rational normal cone for d = 2, the quadric cone
V(xz - y^2) ⊂ C^3 with 3 generators of the dual monoid — Cox–Little–Schenck, Toric Varieties,
Example 1.2.22 (from memory).
"""
from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

HERE = Path(__file__).resolve().parent

EXAMPLE = """# the A_1 singularity, and a cone with a mistake
lattice N = Z^2
cone a1 in N { rays (2,-1) (0,1) }
cone bad in N { rays (1,0) (0,1,1) }
expect a1 generators = 3
"""


def test_neovim_diagnostics_hover_and_fix(tmp_path):
    nvim = shutil.which("nvim")
    if nvim is None:
        if os.environ.get("CI"):
            pytest.fail("nvim is not installed, but CI must run the editor test (apt-get install neovim)")
        pytest.skip("nvim is not installed")
    src = tmp_path / "example.cone"
    src.write_text(EXAMPLE)
    out = tmp_path / "result.json"
    env = dict(os.environ,
               CONE_FILE=str(src), CONE_OUT=str(out),
               CONE_SERVER=json.dumps([sys.executable, "-m", "conelang.cli", "serve"]),
               CONE_HOVER_LINE="2", CONE_HOVER_COL=str(EXAMPLE.splitlines()[2].index("a1") + 1),
               CONE_FIX_LINE="3", CONE_FIX_TEXT="cone bad in N { rays (1,0) (0,1) }",
               HOME=str(tmp_path), XDG_CONFIG_HOME=str(tmp_path), XDG_DATA_HOME=str(tmp_path),
               XDG_STATE_HOME=str(tmp_path), XDG_CACHE_HOME=str(tmp_path))
    proc = subprocess.run([nvim, "--headless", "-n", "-i", "NONE", "-u", "NONE", "--noplugin",
                           "-c", f"luafile {HERE / 'nvim_client.lua'}"],
                          env=env, capture_output=True, text=True, timeout=240, stdin=subprocess.DEVNULL)
    assert out.exists(), f"nvim wrote no result (exit {proc.returncode}): {proc.stdout}\n{proc.stderr}"
    result = json.loads(out.read_text())
    assert result["ok"], (result["message"], result["times"])
    # the vector of the wrong length, reported on its line (0-based 3) at its column
    (d,) = result["diagnostics"]
    assert d["lnum"] == 3 and d["col"] == EXAMPLE.splitlines()[3].index("(0,1,1)")
    assert d["code"] == "vector-length" and "rank 2" in d["message"]
    hover = result["hover"]
    assert "C^3" in hover and "generators" in hover
    assert len(re.findall(r"z\d = χ\^", hover)) == 3
    assert re.search(r"z\d\^2", hover) and re.search(r"z\d\*z\d", hover)      # the quadric
    assert result["cleared"] is True
