"""The wheel ships every package of the source tree (a package missing from pyproject.toml
installs a `conelang` that fails on import, which an editable install would hide)."""
from __future__ import annotations

import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_every_package_folder_is_listed_in_pyproject():
    cfg = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]
    listed = set(cfg["packages"])
    dirs = cfg["package-dir"]
    found = set()
    for pkg, folder in dirs.items():
        base = ROOT / folder
        for init in base.rglob("__init__.py"):
            rel = init.parent.relative_to(base)
            found.add(".".join((pkg, *rel.parts)) if rel.parts else pkg)
    assert found <= listed, f"packages missing from pyproject.toml: {sorted(found - listed)}"
    assert (ROOT / "grammar" / "conelang.lark").is_file() and "*.lark" in \
        tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["package-data"]["conelang.grammar"]
