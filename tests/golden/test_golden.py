"""Golden tests: the CLI output, JSON, diagnostics and editor answers stay byte-identical on the
examples and the corpus (see golden_cases.py for what is pinned).

A deliberate change of output is recorded with ``python tests/golden/regenerate.py [SUBSTRING]``
or ``pytest tests/golden --update-golden``; the diff of ``tests/golden`` then shows every
changed answer for review.
"""
from __future__ import annotations

import difflib
import sys
from functools import lru_cache
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))

import golden_cases as G  # noqa: E402

CASES = G.all_cases()


@lru_cache(maxsize=4)
def _probe(path: Path) -> G.Probe:
    return G.Probe(path)


def _id(case) -> str:
    group, path, name = case
    return str(G.expected_path(group, path, name).relative_to(G.GOLDEN).with_suffix(""))


def test_golden_inputs_exist():
    groups = {g for g, _, _ in CASES}
    assert groups == set(G.GROUPS), f"an input folder is empty: {set(G.GROUPS) - groups}"


def test_no_stale_golden_files():
    wanted = {G.expected_path(*c) for c in CASES}
    stale = sorted(str(p.relative_to(G.GOLDEN)) for p in G.GOLDEN.rglob("*.out") if p not in wanted)
    assert not stale, (f"golden files without a case (an input was removed or renamed): {stale}; "
                       f"run `{G.REGENERATE}` to remove them")


@pytest.mark.parametrize("case", CASES, ids=_id)
def test_golden(case, request):
    group, path, name = case
    target = G.expected_path(group, path, name)
    probe = _probe(path) if name.startswith("lsp-") else None
    got = G.produce(path, name, probe)
    if request.config.getoption("--update-golden"):
        if not target.exists() or target.read_text(encoding="utf-8") != got:
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_text(got, encoding="utf-8")
        return
    rel = _id(case)
    how = (f"if the change is deliberate, regenerate with `{G.REGENERATE} {rel}` "
           f"(or `{G.REGENERATE}` for every case, or `pytest tests/golden --update-golden`) "
           f"and review `git diff tests/golden`")
    assert target.exists(), f"no golden file {target.relative_to(G.ROOT)}; {how}"
    want = target.read_text(encoding="utf-8")
    if got != want:
        diff = list(difflib.unified_diff(want.splitlines(), got.splitlines(), "expected", "now",
                                         lineterm="", n=2))
        shown = "\n".join(diff[:60]) + ("\n…" if len(diff) > 60 else "")
        pytest.fail(f"{rel}: output changed from the golden file\n{shown}\n{how}", pytrace=False)
