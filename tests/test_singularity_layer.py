"""The next layer end to end: quotient types, ages, classes of singularities, star subdivisions
and refinements, intersection numbers and Mori cones of fans, kernels and cokernels of maps —
through the language (expect, JSON facts, diagnostics).

Scenario: a group classifying three-dimensional quotient singularities for a paper checks the
types and classes of its cones and the blow-ups it builds from them.
"""
from __future__ import annotations

import itertools

import sympy

from conelang.ide import AnalysisHost
from conelang.semantics.analysis import Analysis


def diagnostics(text: str):
    return Analysis(text).diagnostics()


def errors(text: str):
    return [(d.code, d.message) for d in diagnostics(text) if d.severity == "error"]


def facts(text: str) -> dict:
    h = AnalysisHost()
    h.apply_change("mem://t.cone", text)
    return h.document("mem://t.cone")["objects"]


HEAD = "lattice N = Z^3\n"
ONE_THIRD = HEAD + "cone c in N { rays (1,0,0) (0,1,0) (-1,-1,3) }\n"     # 1/3(1,1,1)


def test_expect_quotient_and_classes():
    """Reid, YPG §3–4 (from memory): 1/3(1,1,1) is Gorenstein, canonical, not terminal, one
    junior element; 1/5(1,2,3) = 1/5(2,-2,1) is terminal by the terminal lemma."""
    text = ONE_THIRD + (
        "cone t in N { rays (1,0,0) (0,1,0) (1,3,5) }\n"
        'expect c quotient = "1/3(1,1,1)"\n'
        'expect c quotient_group = "Z/3"\n'
        "expect c junior = 1\nexpect c canonical\nexpect c not terminal\nexpect c log_terminal\n"
        'expect t quotient = "1/5(2,3,1)"\n'     # the same singularity written with another generator/order
        "expect t terminal\nexpect t junior = 0\n")
    assert errors(text) == []
    bad = errors(ONE_THIRD + 'expect c quotient = "1/3(1,1,2)"\nexpect c terminal\n')
    assert [c for c, _ in bad] == ["expect-failed", "expect-failed"]
    assert "1/3(1,1,1)" in bad[0][1]


def test_quotient_facts_in_json():
    v = facts(ONE_THIRD)["c"]["variety"]
    assert v["quotient"] == "1/3(1,1,1)" and v["quotient_group"] == "Z/3"
    assert v["junior"] == [[0, 0, 1]] and v["ages"] == {"1": 1, "2": 1}
    assert v["terminal"] is False and v["canonical"] is True and v["log_terminal"] is True
    assert v["witnesses"] == {"terminal": [0, 0, 1]}


def test_non_cyclic_group_and_overlattice():
    """C^3/(Z/2 × Z/2) with the group acting by sign changes of two coordinates: N/N' = Z/2 + Z/2,
    three junior elements (Ito–Reid: three crepant divisors), Gorenstein hence canonical."""
    text = ("lattice N = Z^3 + 1/2 (1,1,0) + 1/2 (0,1,1)\n"
            "cone o in N { rays (1,0,0) (0,1,0) (0,0,1) }\n"
            'expect o quotient = "Z/2 + Z/2"\nexpect o junior = 3\nexpect o canonical\nexpect o not terminal\n')
    assert errors(text) == []
    v = facts(text)["o"]["variety"]
    assert v["quotient"] == "Z/2 + Z/2" and len(v["quotient_generators"]) == 2
    assert sorted(v["junior"], key=str) == sorted([["1/2", "1/2", 0], ["1/2", 0, "1/2"], [0, "1/2", "1/2"]], key=str)


def test_not_simplicial_and_not_q_gorenstein():
    text = HEAD + ("cone q in N { rays (0,0,1) (1,0,1) (0,1,1) (1,1,1) }\n"
                   "cone w in N { rays (1,0,1) (0,1,1) (-1,0,1) (0,-1,2) }\n"
                   "expect q junior = 0\nexpect q terminal\nexpect w canonical\n")
    assert [c for c, _ in errors(text)] == ["not-simplicial", "not-qgorenstein"]
    o = facts(text)
    assert "quotient" not in o["q"]["variety"] and o["q"]["variety"]["terminal"] is True   # the conifold
    assert "terminal" not in o["w"]["variety"]


def test_discrepancies_of_resolutions_and_star_subdivisions():
    """Discrepancies a(E) = <m_K, v_E> - 1: the blow-up of a smooth point of an n-fold has
    a(E) = n - 1 (Hartshorne II.8.20, from memory); of a smooth curve in a
    3-fold 1; the exceptional curve of 1/4(1,1) has -1 + 2/4 (Fulton §2.6, from memory)."""
    text = HEAD + ("cone o in N { rays (1,0,0) (0,1,0) (0,0,1) }\n"
                   "fan B = refine o by (1,1,1), (1,1,0)\n"
                   "fan Q = star o at (1,1,1)\n"
                   "lattice P = Z^2\ncone s in P { rays (0,1) (4,-1) }\nfan R = resolve s\n")
    o = facts(text)
    assert dict(zip(map(tuple, o["B"]["rays"]), o["B"]["discrepancies"])) == {
        (0, 0, 1): 0, (0, 1, 0): 0, (1, 0, 0): 0, (1, 1, 1): 2, (1, 1, 0): 1}
    assert o["B"]["subdivides"] == "o" and o["B"]["smooth"] and o["Q"]["cones"] == [[1, 2, 4], [1, 3, 4], [2, 3, 4]]
    assert sorted(o["R"]["discrepancies"], key=str) == ["-1/2", 0, 0]


def test_star_subdivision_diagnostics():
    base = ONE_THIRD + "fan P2 in Z^2 { rays (1,0) (0,1) (-1,-1) cones [1 2] [2 3] [3 1] }\n"
    assert [c for c, _ in errors(base + "fan X = star c at (0,0,-1)\n")] == ["not-in-support"]
    assert [c for c, _ in errors(base + "fan X = star c at (1,0)\n")] == ["vector-length"]
    assert [c for c, _ in errors(base + "fan X = star N at (1,0,0)\n")] == ["wrong-kind"]
    half = "fan H in Z^2 { rays (1,0) (0,1) cones [1 2] }\nfan X = refine H by (-1,1)\n"
    assert [c for c, _ in errors(half)] == ["not-in-support"]
    warn = [d.code for d in diagnostics(base + "fan X = refine P2 by (2,2), (1,0)\n")]
    assert sorted(warn) == ["existing-ray", "not-primitive"]


def test_blow_ups_of_the_plane_by_refinement():
    """Fulton §2.5 (from memory): the blow-up of P^2 at a fixed point has E^2 = -1 and
    (-K)^2 = 8; the blow-up at the three fixed points has K^2 = 6 and six (-1)-curves, which
    span its Mori cone; both projective."""
    text = ("lattice P = Z^2\nfan P2 in P { rays (1,0) (0,1) (-1,-1) cones [1 2] [2 3] [3 1] }\n"
            "fan B1 = star P2 at (1,1)\nfan B3 = refine P2 by (1,1) (-1,0) (0,-1)\n"
            "expect B1 projective\nexpect B3 mori_rays = 6\nexpect B3 nef_rays = 5\n")
    assert errors(text) == []
    o = facts(text)
    assert o["B1"]["intersections"]["D4*D4"] == -1 and o["B1"]["anticanonical_degree"] == 8
    assert o["B3"]["anticanonical_degree"] == 6
    assert o["P2"]["intersections"] == {f"D{i}*D{j}": 1 for i, j in itertools.combinations_with_replacement((1, 2, 3), 2)}


def test_projective_fails_on_incomplete_fan():
    text = "fan H in Z^2 { rays (1,0) (0,1) cones [1 2] }\nexpect H projective\n"
    assert [c for c, _ in errors(text)] == ["not-complete"]


def test_map_kernel_image_cokernel_against_sympy():
    rows = [[2, 4, 6], [0, 3, 3]]
    text = "lattice A = Z^3\nlattice B = Z^2\nmap f : A -> B { rows (2,4,6) (0,3,3) }\n"
    o = facts(text)["f"]
    M = sympy.Matrix(rows)
    assert o["rank"] == M.rank()
    for k in o["kernel"]:
        assert M * sympy.Matrix(k) == sympy.zeros(2, 1)
    assert len(o["kernel"]) == 3 - M.rank()
    from sympy.matrices.normalforms import smith_normal_form
    snf = smith_normal_form(M, domain=sympy.ZZ)
    torsion = sorted(abs(snf[i, i]) for i in range(2) if abs(snf[i, i]) > 1)
    assert o["cokernel"] == " + ".join(f"Z/{t}" for t in torsion)
    img = sympy.Matrix(o["image"]).T
    assert img.rank() == M.rank() and abs(img.det()) == 6     # index of f(Z^3) in Z^2 = |coker|


def test_hover_and_show_formats_name_the_quotient():
    from conelang.ide.editor import object_markdown
    from conelang.render import latex, text
    a = Analysis(ONE_THIRD)
    md = object_markdown(a, "c")
    assert "quotient singularity 1/3(1,1,1)" in md and "junior elements (age 1): (0, 0, 1)" in md
    h = AnalysisHost()
    h.apply_change("mem://t.cone", ONE_THIRD + "map f : N -> N { rows (1,0,0) (0,1,0) (0,0,3) }\n")
    doc = h.document("mem://t.cone")
    shown = text.render(doc)
    assert "terminal: no (the lattice point (0, 0, 1) has height ≤ 1)" in shown
    assert "rank 3; kernel: 0; image: (1, 0, 0) (0, 1, 0) (0, 0, 3); cokernel: Z/3" in shown
    assert "Quotient singularity 1/3(1,1,1)" in latex.render(doc)


def test_crepant_refinements():
    """The blow-up of 1/3(1,1,1) at its junior point is crepant (Reid, YPG §3, from memory); the
    blow-up of a smooth point is not (a(E) = 2); the minimal resolution of A_3 is crepant and
    that of 1/3(1,1) is not (Fulton §2.6, from memory)."""
    text = ONE_THIRD + ("cone o in N { rays (1,0,0) (0,1,0) (0,0,1) }\n"
                        "fan B = star c at (0,0,1)\nfan O = star o at (1,1,1)\n"
                        "lattice P = Z^2\ncone a3 in P { rays (0,1) (4,-3) }\ncone t in P { rays (0,1) (3,-1) }\n"
                        "fan Ra = resolve a3\nfan Rt = resolve t\n"
                        "expect B crepant\nexpect O not crepant\nexpect Ra crepant\nexpect Rt not crepant\n")
    assert errors(text) == []


def test_ages_and_discrepancies_as_expectations():
    # Reid, Young person's guide (from memory): the age of g = (a_1/r, …, a_n/r) is Σ a_i / r;
    # 1/7(1,2,4) has the three junior elements g, g^2, g^4 and g^3, g^5, g^6 of age 2.  Brute
    # force for 1/5(1,2): the ages of k·(1,2)/5 mod 1, k = 1..4, are 3/5, 6/5, 4/5, 7/5.
    from fractions import Fraction
    brute = sorted(Fraction(k % 5, 5) + Fraction(2 * k % 5, 5) for k in range(1, 5))
    text = ("lattice N5 = Z^2 + 1/5 (1, 2)\ncone q in N5 { rays (1,0) (0,1) }\n"
            f"expect q ages = ({', '.join(str(a) for a in brute)})\n"
            "lattice L = Z^3 + 1/7 (1, 2, 4)\ncone klein in L { rays (1,0,0) (0,1,0) (0,0,1) }\n"
            "expect klein ages = (1, 1, 1, 2, 2, 2)\n"
            # the minimal resolution of 1/5(1,2): rays (0,1) (1,0) (3,-1) (5,-2); with
            # m_K = (1, 2) (value 1 on both rays) the discrepancies are <m_K, v> - 1
            # (Fulton §3.4 for the resolution, from memory)
            "lattice N = Z^2\ncone e52 in N { rays (0,1) (5,-2) }\nfan r = resolve e52\n"
            "expect r discrepancies = (0, -2/5, -1/5, 0)\nexpect r not crepant\n"
            "cone a2 in N { rays (0,1) (3,-2) }\nfan ra2 = resolve a2\n"
            "expect ra2 discrepancies = (0, 0, 0, 0)\nexpect ra2 crepant\n")
    assert errors(text) == []
    wrong = errors(text.replace("expect klein ages = (1, 1, 1, 2, 2, 2)", "expect klein ages = (1, 2)"))
    assert [c for c, _ in wrong] == ["expect-failed"]
    assert [c for c, _ in errors("lattice N = Z^2\nfan f in N { rays (1,0) cones [1] }\n"
                                 "expect f discrepancies = (0)\n")] == ["not-a-refinement"]
