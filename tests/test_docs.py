"""The contributor guide stays in step with the code: every `expect` property and every
diagnostic code the analysis can emit is documented in DEVELOPERS.md."""
from __future__ import annotations

import re
from pathlib import Path

from conelang.semantics.properties import REGISTRY

ROOT = Path(__file__).parent.parent
DOC = (ROOT / "DEVELOPERS.md").read_text()


def test_every_property_is_documented():
    for (kind, name), p in REGISTRY.items():
        assert f"| {kind} | `{name}` |" in DOC, f"{kind} property {name} missing from DEVELOPERS.md"


def test_every_diagnostic_code_is_documented():
    codes = set()
    for path in (ROOT / "conelang" / "semantics").glob("*.py"):
        text = path.read_text()
        codes |= set(re.findall(r'(?:_fail|\.error|\.warning|\.info|\.add)\([^()]*?,\s*"([a-z]+(?:-[a-z]+)+)"', text))
    codes |= {"syntax"}
    missing = sorted(c for c in codes if f"`{c}`" not in DOC)
    assert not missing, f"undocumented diagnostic codes: {missing}"
