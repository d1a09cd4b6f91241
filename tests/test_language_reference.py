"""docs/language.md, the language reference, stays true and complete: each of its ```cone
examples passes ``conelang check``, and it names every `expect` property of the registry,
every diagnostic code and every reserved word."""
from __future__ import annotations

import re
from pathlib import Path

import pytest

from conelang.ide import AnalysisHost
from conelang.semantics.properties import REGISTRY
from conelang.syntax.parser import KEYWORDS

ROOT = Path(__file__).parent.parent
REFERENCE = (ROOT / "docs" / "language.md").read_text(encoding="utf-8")
BLOCKS = re.findall(r"^```cone\n(.*?)^```", REFERENCE, flags=re.S | re.M)


def test_the_reference_has_examples():
    assert len(BLOCKS) >= 6


@pytest.mark.parametrize("i", range(len(BLOCKS)))
def test_example_passes_check(i):
    host = AnalysisHost()
    host.apply_change(f"language.md#{i}", BLOCKS[i])
    a = host.analysis(f"language.md#{i}")
    problems = [f"line {a.index.position(d.span[0])[0] + 1}: {d.message} [{d.code}]"
                for d in host.diagnostics(f"language.md#{i}") if d.severity in ("error", "warning")]
    assert not problems, f"example {i + 1} of docs/language.md:\n{BLOCKS[i]}\n" + "\n".join(problems)


def test_every_property_is_in_the_reference():
    for (kind, name) in REGISTRY:
        assert f"| {kind} | `{name}` |" in REFERENCE, f"{kind} property {name} missing from docs/language.md"


def _emitted_codes() -> set[str]:
    codes = {"syntax"}
    for path in (ROOT / "conelang").rglob("*.py"):
        text = path.read_text(encoding="utf-8")
        codes |= set(re.findall(r'(?:_fail|\.error|\.warning|\.info|\.add)\([^()]*?,\s*"([a-z]+(?:-[a-z]+)+)"', text))
    return codes


def test_every_diagnostic_code_is_in_the_reference():
    table = REFERENCE.split("## Diagnostic codes", 1)[1]
    missing = sorted(c for c in _emitted_codes() if f"`{c}`" not in table)
    assert not missing, f"diagnostic codes missing from docs/language.md: {missing}"


def test_every_reserved_word_is_in_the_reference():
    words = REFERENCE.split("Reserved words:", 1)[1].split("\n\n", 1)[0]
    missing = sorted(k for k in KEYWORDS if not re.search(rf"\b{re.escape(k)}\b", words))
    assert not missing, f"reserved words missing from docs/language.md: {missing}"


def _keys(value, out: set) -> None:
    if isinstance(value, dict):
        for k, v in value.items():
            out.add(k)
            _keys(v, out)
    elif isinstance(value, list):
        for v in value:
            _keys(v, out)


def test_every_json_key_of_the_examples_is_in_the_reference():
    """Each key of `conelang show --format json` on the examples and the corpus is described
    in the JSON section of the reference."""
    section = REFERENCE.split("## JSON", 1)[1].split("\n## ", 1)[0]
    keys: set[str] = set()
    files = sorted((ROOT / "examples").glob("*.cone")) + sorted((ROOT / "tests" / "corpus").rglob("*.cone"))
    for path in files:
        host = AnalysisHost(budget_limit=2_000_000)
        host.apply_change(str(path), path.read_text(encoding="utf-8"))
        doc = host.document(str(path))
        keys |= set(doc)
        for d in doc["diagnostics"]:
            keys |= set(d)
        for obj in doc["objects"].values():          # object names are keys too: skip them
            _keys(obj, keys)
    assert len(keys) >= 40
    missing = sorted(k for k in keys if f"`{k}`" not in section)
    assert not missing, f"JSON keys missing from the JSON section of docs/language.md: {missing}"
