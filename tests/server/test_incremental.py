"""Incremental re-analysis (what keeps the server fast after an edit) changes nothing: after
every edit of a random edit sequence, the analysis made with the caches of the previous texts
(typed statements reused and shifted, evaluations remembered per statement) equals the analysis
of the same text from scratch, diagnostic for diagnostic and value for value (common practice,
no source: an incremental computation must agree with the batch one)."""
from __future__ import annotations

import random
from pathlib import Path

import pytest

from conelang.semantics.analysis import Analysis, clear_memo
from conelang.syntax.parser import clear_caches, parse

ROOT = Path(__file__).parent.parent.parent
FILES = sorted(ROOT.glob("examples/*.cone")) + sorted((ROOT / "tests" / "corpus").rglob("*.cone"))
TOKENS = ["cone", "dual", "(", ")", "{", "}", "1", "-1", "2", "/", ",", "expect", "x", "\n", "&",
          "rays", "#", "=", "Z^2", "Z^3", "lattice N = Z^2\n", "cone c in N { rays (1,0) (2,4) }\n", " ", "𝔸"]


def _full(d):
    return (d.span, d.severity, d.code, d.message, d.related, d.unnecessary, d.fixes)


def _snapshot(a: Analysis):
    diags = [_full(d) for d in a.diagnostics(True)]
    return diags, {name: a.value(name) for name in a.defs}, a.module


def _from_scratch(text: str):
    clear_caches()
    clear_memo()
    return _snapshot(Analysis(text))


def _edit(rng: random.Random, text: str) -> str:
    r = rng.random()
    if r < 0.15:                                  # a line at the top: every statement moves
        return rng.choice(["# note\n", "\n", "lattice Top = Z^2\n"]) + text
    if r < 0.25 and "Z^2" in text:                # a lattice changes: what uses it is evaluated again
        i = text.index("Z^2")
        return text[:i] + rng.choice(["Z^3", "Z^2 + 1/2 (1,1)", "Z^1"]) + text[i + 3:]
    i = rng.randrange(len(text) + 1)
    j = min(len(text), i + rng.randrange(6))
    return text[:i] + (rng.choice(TOKENS) if rng.random() < 0.7 else "") + text[j:]


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.name)
def test_edit_sequences_match_a_fresh_analysis(path: Path):
    rng = random.Random(path.name)
    text = path.read_text("utf-8")
    Analysis(text).diagnostics(True)
    for _ in range(6):
        text = _edit(rng, text)
        warm = _snapshot(Analysis(text))
        assert warm == _from_scratch(text), text
        Analysis(text).diagnostics(True)          # leave warm caches for the next edit


def test_moved_statements_are_shifted_copies():
    # brute force on a small case: every statement's spans after a prefix is inserted are the
    # spans of a fresh parse, and they point at the same source text as before
    text = "lattice N = Z^2\ncone c in N { rays (1,0) (1,2) }\nexpect c dim = 2\n"
    parse(text)
    moved = parse("# a new first line\n" + text)
    assert moved == _from_scratch("# a new first line\n" + text)[2]
    src = "# a new first line\n" + text
    assert [src[s.span[0]:s.span[1]] for s in moved.statements] == [
        "lattice N = Z^2", "cone c in N { rays (1,0) (1,2) }", "expect c dim = 2"]
