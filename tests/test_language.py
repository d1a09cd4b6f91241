"""End-to-end checks of the language on small worked examples (the facts a user reads)."""
from __future__ import annotations

from conelang.ide import AnalysisHost


def doc(text: str) -> dict:
    h = AnalysisHost()
    h.apply_change("mem://t.cone", text)
    return h.document("mem://t.cone")


def errors(d: dict) -> list:
    return [x for x in d["diagnostics"] if x["severity"] == "error"]


def test_empty_character_list_is_the_trivial_action():
    # no characters: the monoid is {0}, trivially saturated; every one-parameter subgroup has a
    # limit, so the limit cone is the whole space (common practice, no source)
    d = doc("lattice T = Z^2\ncharacters e of T { }\nexpect e normal\n")
    assert errors(d) == []
    e = d["objects"]["e"]
    assert e["normal"] is True and e["cone"]["rays"] == [] and len(e["limits_cone"]["lineality"]) == 2


def test_characters_normal_in_their_own_group():
    # (1,0) and (1,2) generate the index-2 lattice {b even}, in which the monoid they generate is
    # saturated: normal (the definition in docs/language.md); with (1,1) added instead of (1,2) also.
    d = doc("lattice T = Z^2\ncharacters c of T { (1,0) (1,2) }\nexpect c normal\n"
            "characters g of T { (1,0) (1,3) (1,2) }\nexpect g not normal\n")
    assert errors(d) == []
    # (1,1) lies in the cone and the group but is no sum of the characters
    assert [1, 1] in d["objects"]["g"]["holes"]


def test_overlattice_dual_and_facets_are_in_the_dual_lattice():
    # N = Z^2 + 1/7 (1,3); its dual is {u in Z^2 : u1 + 3 u2 = 0 mod 7}; the quadrant's facet
    # normals must be primitive in that dual lattice (common practice, no source)
    d = doc("lattice Q = Z^2 + 1/7 (1, 3)\ncone q in Q { rays (1,0) (0,1) }\n")
    facets = d["objects"]["q"]["facets"]
    for u in facets:
        assert (u[0] + 3 * u[1]) % 7 == 0
    # the normals lie on the axes; the smallest multiples in the dual lattice are 7 e1 and 7 e2
    assert sorted(facets) == [[0, 7], [7, 0]]


def test_variety_of_a_non_full_cone_has_units():
    # sigma = cone(e1) in Z^2: U = C x C^*, coordinate ring C[x, y, y^-1] (Cox–Little–Schenck,
    # Example 1.2.? — the cone over a ray (from memory)); docs/language.md: the units come as u, -u
    # with the relation z_i*z_j - 1.
    d = doc("lattice N = Z^2\ncone r in N { rays (1,0) }\nexpect r generators = 3\nexpect r smooth\n")
    assert errors(d) == []
    v = d["objects"]["r"]["variety"]
    assert sorted(v["generators"]) == [[0, -1], [0, 1], [1, 0]]
    assert any(e.endswith("- 1") for e in v["equations"]) and len(v["equations"]) == 1
