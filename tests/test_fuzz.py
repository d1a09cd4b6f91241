"""Fuzzing the whole pipeline: random and mutated documents through parsing, analysis and every
output format.  Zero crashes: every outcome is diagnostics, never an exception.

Quick mode (default, in CI): a few thousand cases.  Long mode for nightly use:
``CONELANG_FUZZ_EXAMPLES=100000 pytest tests/test_fuzz.py``.
"""
from __future__ import annotations

import json
import os
from pathlib import Path

from hypothesis import HealthCheck, given, settings, strategies as st

from conelang.ide import AnalysisHost
from conelang.render import json as rjson
from conelang.render import markdown as rmd
from conelang.render import text as rtext

EXAMPLES = Path(__file__).parent.parent / "examples"
CORPUS = Path(__file__).parent / "corpus" / "broken"
SEEDS = [p.read_text() for p in sorted(EXAMPLES.glob("*.cone")) + sorted(CORPUS.glob("*.cone"))]
N = int(os.environ.get("CONELANG_FUZZ_EXAMPLES", "0"))
FUZZ = settings(max_examples=N or 1500, deadline=None, suppress_health_check=list(HealthCheck))
FUZZ_SMALL = settings(max_examples=max(N // 4, 600), deadline=None, suppress_health_check=list(HealthCheck))
BUDGET = 300_000   # small: fuzzing is about robustness, not about big computations

TOKENS = ["lattice", "cone", "map", "morphism", "characters", "fan", "expect", "dual", "face", "at",
          "in", "of", "not", "rays", "halfspaces", "equations", "images", "rows", "cones", "resolve",
          "N", "P", "Z^2", "Z^3", "a", "b", "f", "{", "}", "(", ")", "[", "]", ",", "=", "==", "->",
          "&", "^-1", "∘", "+", "1/7", "0", "1", "-1", "2", "99999999999999999999", "#", "\n", '"Z/4"',
          "dim", "pointed", "smooth", "generators", "class_group"]


def run_everything(text: str) -> None:
    host = AnalysisHost(budget_limit=BUDGET)
    host.apply_change("fuzz.cone", text)
    diags = host.diagnostics("fuzz.cone")
    for d in diags:
        assert 0 <= d.span[0] <= d.span[1] <= len(text)
        assert d.severity in ("error", "warning", "information", "hint")
    doc = host.document("fuzz.cone", label="fuzz.cone")
    json.loads(rjson.render(doc))
    rtext.render(doc)
    rmd.render(doc)
    for offset in range(0, len(text) + 1, max(1, len(text) // 7)):
        host.hover("fuzz.cone", offset)
        host.definition("fuzz.cone", offset)
        host.references("fuzz.cone", offset)


@st.composite
def mutated(draw):
    text = draw(st.sampled_from(SEEDS))
    for _ in range(draw(st.integers(1, 4))):
        if not text:
            break
        i = draw(st.integers(0, len(text) - 1))
        j = min(len(text), i + draw(st.integers(0, 12)))
        op = draw(st.sampled_from(["delete", "insert", "replace", "duplicate"]))
        if op == "delete":
            text = text[:i] + text[j:]
        elif op == "insert":
            text = text[:i] + " " + draw(st.sampled_from(TOKENS)) + " " + text[i:]
        elif op == "replace":
            text = text[:i] + draw(st.sampled_from(TOKENS)) + text[j:]
        else:
            text = text[:j] + text[i:j] + text[j:]
    return text


@FUZZ
@given(mutated())
def test_mutated_documents_never_crash(text):
    run_everything(text)


@FUZZ_SMALL
@given(st.lists(st.sampled_from(TOKENS), max_size=40).map(" ".join))
def test_token_soup_never_crashes(text):
    run_everything(text)


@FUZZ_SMALL
@given(st.text(max_size=80))
def test_arbitrary_text_never_crashes(text):
    run_everything(text)
