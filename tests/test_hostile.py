"""Hostile sizes: each input either works or ends with a clear diagnostic from the budget,
and never takes long (the budget bounds the work, whatever the input)."""
from __future__ import annotations

import random

from conelang.ide import AnalysisHost

SMALL_BUDGET = 2_000_000


def diagnostics(text: str, budget=SMALL_BUDGET, expectations=True):
    host = AnalysisHost(budget_limit=budget)
    host.apply_change("h.cone", text)
    return host, host.diagnostics("h.cone", expectations)


def test_integers_with_hundreds_of_digits():
    big = 10 ** 300 + 7
    text = f"lattice N = Z^2\ncone c in N {{ rays (1,0) ({big},{big + 1}) }}\nexpect c dim = 2\n"
    _, diags = diagnostics(text)
    assert [d.code for d in diags if d.severity == "error"] == []


def test_huge_rational_glue():
    big = 10 ** 200
    text = f"lattice Q = Z^2 + 1/{big} (1, 3)\ncone c in Q {{ rays (1,0) (0,1) }}\nexpect c simplicial\n"
    _, diags = diagnostics(text)
    assert all(d.severity != "error" or d.code == "budget" for d in diags)


def test_rank_50_lattice():
    rays = " ".join("(" + ",".join("1" if i == j else "0" for j in range(50)) + ")" for i in range(50))
    text = f"lattice N = Z^50\ncone orthant in N {{ rays {rays} }}\nexpect orthant dim = 50\nexpect orthant simplicial\n"
    _, diags = diagnostics(text)
    assert [d for d in diags if d.severity == "error"] == []


def test_cone_with_500_rays():
    rng = random.Random(3)
    rays = " ".join(f"({rng.randint(-40, 40)},{rng.randint(-40, 40)},100)" for _ in range(500))
    text = f"lattice N = Z^3\ncone big in N {{ rays {rays} }}\nexpect big pointed\n"
    _, diags = diagnostics(text)
    assert all(d.severity != "error" or d.code == "budget" for d in diags), diags[:3]


def test_500_rays_in_dimension_6_hits_the_budget_or_works():
    rng = random.Random(4)
    rays = " ".join("(" + ",".join(str(rng.randint(-9, 9)) for _ in range(5)) + ",30)" for _ in range(500))
    text = f"lattice N = Z^6\ncone big in N {{ rays {rays} }}\nexpect big pointed\n"
    _, diags = diagnostics(text, budget=200_000)
    errors = [d for d in diags if d.severity == "error"]
    assert all(d.code == "budget" for d in errors)
    for d in errors:
        assert "budget" in d.message and "--budget" in d.message


def test_ten_thousand_line_file():
    lines = ["lattice N = Z^2"]
    for i in range(3333):
        lines.append(f"cone c{i} in N {{ rays (1,0) ({i % 7 + 1},{i % 5 + 1}) }}")
        lines.append(f"expect c{i} dim = 2")
        lines.append("# a comment line")
    _, diags = diagnostics("\n".join(lines))
    assert [d for d in diags if d.severity == "error"] == []


def test_deep_definition_chain():
    lines = ["lattice N = Z^2", "cone c0 in N { rays (1,0) (1,2) }"]
    lines += [f"cone c{i} = dual c{i - 1}" for i in range(1, 3001)]
    lines += ["expect c3000 == c2", "expect c2999 == dual c0"]
    _, diags = diagnostics("\n".join(lines))
    assert [d for d in diags if d.severity == "error"] == []


def test_deeply_nested_expression_is_a_diagnostic():
    text = "lattice N = Z^2\ncone a in N { rays (1,0) }\ncone b = " + "dual " * 5000 + "a\n"
    host, diags = diagnostics(text)
    index = host.analysis("h.cone").index
    assert [(d.code, index.position(d.span[0])[0]) for d in diags] == [("syntax", 2)]
    assert "nested too deeply" in diags[0].message
