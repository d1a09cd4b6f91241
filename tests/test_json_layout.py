"""``conelang show --format json`` keeps each vector on one line (issue 15, item 9).

The layout is checked against the standard library's own JSON reader and writer: the text must
parse back (``json.loads``) to the document that ``json.dumps(indent=2)`` would have written,
and no line may hold only a number (which is how an indented vector looks when split up).
"""
from __future__ import annotations

import json
import re

from hypothesis import given
from hypothesis import strategies as st

from conelang.cli import main
from conelang.render import json as json_layout
from conelang.render.json import render

SCALARS = st.one_of(st.none(), st.booleans(), st.integers(-10**6, 10**6), st.text(max_size=6))
DOCS = st.recursive(SCALARS, lambda kids: st.one_of(
    st.lists(kids, max_size=4), st.dictionaries(st.text(max_size=4), kids, max_size=4)), max_leaves=20)


@given(st.dictionaries(st.text(max_size=4), DOCS, max_size=5))
def test_render_round_trips(doc):
    assert json.loads(render(doc)) == doc


@given(st.lists(st.lists(st.integers(-99, 99), min_size=1, max_size=5), max_size=5))
def test_each_vector_is_one_line(vectors):
    text = render({"rays": vectors})
    lines = [line.strip().rstrip(",") for line in text.splitlines()]
    for v in vectors:
        assert json.dumps(v) in lines          # json.dumps writes "[1, 2]": one line, same spacing


def test_show_json_vectors_one_per_line(tmp_path, capsys):
    # a wedge of the README's tour; the keys must be those of the indented standard layout
    p = tmp_path / "w.cone"
    p.write_text("lattice N = Z^3\ncone wedge in N { rays (1,0,0) (0,1,0) (1,1,4) }\n")
    assert main(["show", str(p), "--format", "json"]) == 0
    out = capsys.readouterr().out
    doc = json.loads(out)
    assert set(doc["objects"]["wedge"]) >= {"rays", "facets", "hilbert_basis"}
    assert "[1, 1, 4]" in [line.strip().rstrip(",") for line in out.splitlines()]
    assert not any(re.fullmatch(r"\s*-?\d+,?", line) for line in out.splitlines())


def test_doctest():
    import doctest
    assert doctest.testmod(json_layout).failed == 0
