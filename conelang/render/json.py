"""JSON output (``conelang show --format json``): the document described in
docs/language.md.

Laid out like ``json.dumps(doc, indent=2)``, except that a list of numbers (a vector, a list of
exponents, a list of orbit counts) stays on one line, so that a changed ray is a one-line diff
in git.  The text is ordinary JSON: ``json.loads`` gives back ``doc``.

>>> print(render({"rays": [[1, 0], [1, "1/2"]], "dim": 2, "lineality": []}))
{
  "rays": [
    [1, 0],
    [1, "1/2"]
  ],
  "dim": 2,
  "lineality": []
}
"""
from __future__ import annotations

import json
import re


def render(doc: dict) -> str:
    return "".join(_chunks(doc, 0))


_RATIONAL = re.compile(r"-?\d+(/\d+)?")


def _is_coordinate(x) -> bool:
    """A number, a yes/no, null or a rational ``"p/q"``: what a vector is made of.  Other
    strings (equations, monomials, messages) keep one line each."""
    return (x is None or isinstance(x, (bool, int, float))
            or (isinstance(x, str) and _RATIONAL.fullmatch(x) is not None))


def _dump(x) -> str:
    return json.dumps(x, ensure_ascii=False)


def _chunks(x, level: int):
    pad, inner = "  " * level, "  " * (level + 1)
    if isinstance(x, dict):
        if not x:
            yield "{}"
            return
        yield "{\n"
        for i, (k, v) in enumerate(x.items()):
            yield inner + _dump(str(k)) + ": "
            yield from _chunks(v, level + 1)
            yield ",\n" if i + 1 < len(x) else "\n"
        yield pad + "}"
    elif isinstance(x, (list, tuple)):
        if all(_is_coordinate(v) for v in x):      # a vector (or empty): one line
            yield "[" + ", ".join(_dump(v) for v in x) + "]"
            return
        yield "[\n"
        for i, v in enumerate(x):
            yield inner
            yield from _chunks(v, level + 1)
            yield ",\n" if i + 1 < len(x) else "\n"
        yield pad + "]"
    else:
        yield _dump(x)
