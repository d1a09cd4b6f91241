"""JSON output (``conelang show --format json``): the document described in docs/language.md."""
from __future__ import annotations

import json


def render(doc: dict) -> str:
    return json.dumps(doc, indent=2, ensure_ascii=False)
