"""Rewrite the golden files after a deliberate change of output.

    python tests/golden/regenerate.py               # every case
    python tests/golden/regenerate.py show-json     # only cases whose path contains a substring
    python tests/golden/regenerate.py examples/surfaces lsp-hover

Then read ``git diff tests/golden`` before committing: every changed line is a changed answer.
"""
from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from golden_cases import regenerate  # noqa: E402


def main(argv: list[str]) -> int:
    written, unchanged, removed = regenerate(argv or None)
    print(f"golden files: {written} written, {unchanged} unchanged, {removed} removed")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
