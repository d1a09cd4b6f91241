"""The parser: every statement of the language contract parses, spans are exact, and a
syntax error costs one statement, not the file."""
from __future__ import annotations

from fractions import Fraction
from pathlib import Path

from hypothesis import given, settings, strategies as st

from conelang.syntax import ast as A
from conelang.syntax.parser import parse, split_statements
from conelang.syntax.text import LineIndex

CONTRACT = """
lattice N = Z^3
lattice P = Z^2
lattice Q = Z^2 + 1/7 (1, 3)
cone wedge in N { rays (1,0,0) (0,1,0) (1,1,4) }
cone slab  in N { halfspaces (1,0,0) (0,1,0) }
cone mag   in N { halfspaces (1,0,0) (0,1,0) (0,0,1)  equations (1,1,-2) }
cone wv    = dual wedge
cone top   = face wedge at (0,0,1)
cone meet  = wedge & slab
cone target in P { rays (1,0) (0,1) }
cone img   = f(wedge)
cone pre   = f^-1(target)
map f : N -> P { images (1,0) (0,1) (1,1) }
map g : N -> P { rows (1,0,1) (0,1,1) }
morphism phi = f : wedge -> target
characters chi of P { (1,0) (1,1) (1,2) }
fan F in P { rays (1,0) (0,1) (-1,-1)  cones [1 2] [2 3] [3 1] }
fan R = resolve wedge
expect wedge pointed
expect wedge not smooth
expect wedge generators = 8
expect wedge class_group = "Z/4"
expect wv == dual wedge
"""


def test_every_statement_of_the_contract_parses():
    m = parse(CONTRACT)
    assert m.errors == []
    kinds = [type(s).__name__ for s in m.statements]
    assert kinds == ["LatticeStmt"] * 3 + ["ConeDef"] * 3 + ["ConeLet"] * 3 + ["ConeDef"] + ["ConeLet"] * 2 + \
        ["MapStmt"] * 2 + ["MorphismDef", "CharactersStmt", "FanDef", "FanResolve"] + ["Expect"] * 5


def test_spans_point_at_the_source_text():
    m = parse(CONTRACT)
    for s in m.statements:
        text = CONTRACT[s.span[0]:s.span[1]]
        assert text.split()[0] == s.keyword.text
        if not isinstance(s, A.Expect):
            assert CONTRACT[s.name.span[0]:s.name.span[1]] == s.name.text
    wedge = m.statements[3]
    assert [CONTRACT[v.span[0]:v.span[1]] for v in wedge.sections[0].vectors] == ["(1,0,0)", "(0,1,0)", "(1,1,4)"]


def test_rationals_and_signs():
    m = parse("lattice Q = Z^2 + 1/7 (1, 3) + (-1/2, 2/4)")
    glue = m.statements[0].body.glue
    assert glue[0].coefficient == Fraction(1, 7) and glue[0].vector.entries == (1, 3)
    assert glue[1].coefficient == 1 and glue[1].vector.entries == (Fraction(-1, 2), Fraction(1, 2))


def test_composition_syntax():
    m = parse("morphism h = g ∘ f\nmorphism k = g after f")
    assert [tuple(p.text for p in s.parts) for s in m.statements] == [("g", "f"), ("g", "f")]


def test_error_recovery_keeps_later_statements():
    text = "lattice N = Z^2\ncone a in N { rays (1,0) (0,1)\ncone b = dual a\nexpect b pointed"
    m = parse(text)
    assert [type(s).__name__ for s in m.statements] == ["LatticeStmt", "ConeLet", "Expect"]
    assert len(m.errors) == 1
    err = m.errors[0]
    assert LineIndex(text).position(err.span[0])[0] == 1
    assert "expected" in err.message and "'}'" in err.message


def test_unexpected_token_names_it_and_what_was_expected():
    m = parse("lattice N = Z^2\ncone a in N { rays (1,0) (0 1) }")
    (err,) = m.errors
    assert "unexpected '1'" in err.message and "','" in err.message


def test_standard_lattice_must_be_z():
    m = parse("lattice N = R^2")
    assert m.errors and "Z^d" in m.errors[0].message


def test_comments_do_not_split_statements():
    assert split_statements("# cone lattice map\ncone a = b # expect\n") == [(19, 39)]


def test_garbage_before_the_first_statement_is_an_error():
    m = parse("hello\nlattice N = Z^2")
    assert len(m.errors) == 1 and len(m.statements) == 1


def test_examples_parse_cleanly():
    for path in (Path(__file__).parent.parent / "examples").glob("*.cone"):
        assert parse(path.read_text()).errors == [], path


@settings(max_examples=200, deadline=None)
@given(st.text(alphabet="lattice cone map expect dual face at rays {}()[],=^-+/&:0123456789 N Z\n#", max_size=120))
def test_parser_never_crashes(text):
    m = parse(text)
    for err in m.errors:
        assert 0 <= err.span[0] <= err.span[1] <= len(text)


def test_line_index_utf16():
    text = "a𝔸b\ncd"
    ix = LineIndex(text)
    assert ix.position_utf16(2) == (0, 3)      # 𝔸 takes two UTF-16 code units
    assert ix.offset_utf16(0, 3) == 2
    assert ix.offset(5, 0) == len(text)
