"""Error recovery and hints (issue 15, item 7): one mistake gives one diagnostic, at its place,
saying what was meant; the statements around it are analysed as if it were not there.

The checks compare whole diagnostic lists, so a false follow-up error (an "unknown lattice"
caused by the typo above it) fails the test.  Expected hints are common practice, no source.
"""
from __future__ import annotations

import re

import pytest

from conelang.ide import AnalysisHost
from conelang.semantics import engine as sem_engine
from conelang.syntax.parser import parse
from conelang.syntax.text import closest_word, edit_distance


def diags(text: str, budget=None):
    host = AnalysisHost(budget) if budget else AnalysisHost()
    host.apply_change("t.cone", text)
    a = host.analysis("t.cone")
    return [(d.code, a.index.position(d.span[0])[0] + 1, d.message) for d in host.diagnostics("t.cone")]


def codes(text: str):
    return [(c, line) for c, line, _ in diags(text)]


@pytest.mark.parametrize("typo, meant", [("cnoe", "cone"), ("lattce", "lattice"), ("fna", "fan"),
                                         ("exepct", "expect"), ("mpa", "map")])
def test_misspelled_statement_keyword_costs_only_its_statement(typo, meant):
    rest = {"cone": "c in N { rays (1,0) (0,1) }", "lattice": "P = Z^2", "fan": "c = resolve s",
            "expect": "s simplicial", "map": "c : N -> N { images (1,0) (0,1) }"}[meant]
    text = f"lattice N = Z^2\ncone s in N {{ rays (1,0) (1,3) }}\n{typo} {rest}\ncone t in N {{ rays (1,0) (0,1) }}\nexpect s simplicial\nexpect t smooth\n"
    got = diags(text)
    assert [(c, line) for c, line, _ in got] == [("syntax", 3)]
    assert f"did you mean '{meant}'?" in got[0][2]


def test_failed_statement_still_names_what_it_defines():
    # a typo on line 2 must not make line 3 report an unknown lattice defined on line 1, nor
    # the uses of the failed definition report an unknown name
    text = ("lattice N = Z^2\ncnoe a in N { rays (1,0) (0,1) }\ncone b in N { rays (1,0) (1,2) }\n"
            "cone c = dual a\nexpect a smooth\nexpect b simplicial\n")
    assert codes(text) == [("syntax", 2)]
    text = "lattice N = Z^2\ncone b in N { rays (1,0) (1,1)\ncone c = dual b\nexpect b smooth\n"
    assert codes(text) == [("syntax", 2)]


def test_unknown_statement_word_of_definition_shape_splits():
    got = diags("lattice N = Z^2\nsimplex s in N { rays (1,0) }\ncone c in N { rays (1,0) }\nexpect s pointed\n")
    assert [(c, line) for c, line, _ in got] == [("syntax", 2)]
    assert "a statement starts with 'lattice'" in got[0][2]


@pytest.mark.parametrize("body, meant", [("rasy (1,0)", "rays"), ("halfspace (1,0)", "halfspaces"),
                                         ("equation (0,1)", "equations")])
def test_misspelled_section_keyword(body, meant):
    got = diags(f"lattice N = Z^2\ncone c in N {{ {body} }}\nexpect c pointed\n")
    assert [(c, line) for c, line, _ in got] == [("syntax", 2)]
    assert f"did you mean '{meant}'?" in got[0][2]


def test_misspelled_property():
    got = diags("lattice N = Z^2\ncone c in N { rays (1,0) (0,1) }\nexpect c gorenstien\n")
    assert got[0][0] == "unknown-property" and "did you mean 'gorenstein'?" in got[0][2]


@pytest.mark.parametrize("word, written", [("yes", "expect c smooth"), ("no", "expect c not smooth")])
def test_yes_no_values_say_how_flags_are_written(word, written):
    got = diags(f"lattice N = Z^2\ncone c in N {{ rays (1,0) (0,1) }}\nexpect c smooth = {word}\n")
    assert [(c, line) for c, line, _ in got] == [("syntax", 3)]
    assert "'expect c smooth' or 'expect c not smooth'" in got[0][2] and written in got[0][2]


def test_slash_comments_are_reported_and_skipped():
    text = "lattice N = Z^2  // the plane\ncone c in N { rays (1,0) (0,1) }  // the orthant\nexpect c smooth\n"
    got = diags(text)
    assert [(c, line) for c, line, _ in got] == [("syntax", 1), ("syntax", 2)]
    assert all("comments start with '#'" in m for _, _, m in got)
    assert codes('lattice N = Z^2\ncone c in N { rays (1,0) (0,1) }\nexpect c class_group = "Z//2"\n') \
        == [("expect-bad-value", 3)]


def test_dual_lattice_hint():
    got = diags("lattice N = Z^2\ncone c in M { halfspaces (1,0) }\n")
    assert got[0][:2] == ("unknown-name", 2) and "'dual N'" in got[0][2]
    got = diags("lattice N1 = Z^2\nlattice N2 = Z^3\ncone c in M2 { halfspaces (1,0,0) }\n")
    assert "'dual N2'" in got[0][2]


def test_budget_message_names_a_budget_that_suffices():
    # the dual of this simplicial cone has about 800000 parallelepiped points to enumerate
    text = "lattice N = Z^3\ncone c in N { rays (1,0,0) (0,1,0) (3,5,2000) }\nexpect c generators = 405\n"
    got = diags(text, budget=10_000)
    assert [c for c, _, _ in got] == ["budget"]
    m = re.search(r"--budget (\d+)", got[0][2])
    assert m and "--budget none" in got[0][2]
    assert diags(text, budget=int(m.group(1))) == []


def test_counting_the_cones_of_a_fan_needs_no_picard_group(monkeypatch):
    def refuse(self, value):
        raise AssertionError("the invariants (Picard group) were computed")
    monkeypatch.setattr(sem_engine.Engine, "fan_facts", refuse)
    # P^2: three maximal cones (Fulton, Introduction to Toric Varieties, §1.4, from memory)
    text = "lattice N = Z^2\nfan F in N { rays (1,0) (0,1) (-1,-1) cones [1 2] [2 3] [3 1] }\nexpect F cones = 3\n"
    assert diags(text) == []


def test_edit_distance_against_brute_force():
    # brute force: the words one edit (insert, delete, substitute, adjacent swap) from "cone"
    letters = "cnoe"
    word = "cone"
    one = {word[:i] + word[i + 1:] for i in range(4)}
    one |= {word[:i] + c + word[i + 1:] for i in range(4) for c in letters} - {word}
    one |= {word[:i] + c + word[i:] for i in range(5) for c in letters}
    one |= {word[:i] + word[i + 1] + word[i] + word[i + 2:] for i in range(3)}
    for w in one:
        assert edit_distance(w, word) == 1, w
    assert closest_word("xyz", ["cone", "fan"]) is None


def test_a_line_after_a_keyword_or_operator_continues_the_statement():
    # found by the formatter's property test: an `expect` whose object is on the next line
    # looked like a new statement `a a = …` (the typo rule), so the formatted file broke
    for text in ('lattice N = Z^2\ncone a in N { rays (1,0) (0,1) }\nexpect  # the quadrant\n'
                 '    a class_group = "0"\n',
                 'lattice N = Z^2\ncone a in N { rays (1,0) (0,1) }\nexpect a class_group =\n'
                 '    "0"\n'):
        module = parse(text)
        assert module.errors == [], text
        assert [type(s).__name__ for s in module.statements][-1] == "Expect"
    # after a complete statement the typo rule still splits the file
    module = parse('lattice N = Z^2\nfoo a = b\ncone c in N { rays (1,0) }\n')
    assert len(module.errors) == 1 and "'foo' does not start a statement" in module.errors[0].message
