"""Polytopes in the language: statements, diagnostics at the right span with fixes, expect
properties, `show` in every format, hover and completion.  The numbers are checked against
the geometry (itself tested against theorems and brute force in tests/geometry/test_polytope.py)
and against brute-force counts made here."""
from __future__ import annotations

import json
from itertools import product

import pytest

from conelang.cli import main
from conelang.ide.editor import completions
from conelang.ide import AnalysisHost
from conelang.semantics.analysis import Analysis

BASE = """lattice N = Z^2
polytope P in N { vertices (1,0) (0,1) (-1,-1) }
polytope Q = polar P
"""


def codes(text):
    a = Analysis(text)
    return a, [(d.code, a.text[d.span[0]:d.span[1]]) for d in a.diagnostics()]


def test_redundant_vertex_has_a_removing_fix():
    text = "lattice N = Z^2\npolytope P in N { vertices (0,0) (2,0) (1,1) (1,0) (0,2) }\n"
    a = Analysis(text)
    # (1, 1) lies on the edge from (2, 0) to (0, 2); (1, 0) on the edge from (0, 0) to (2, 0)
    got = sorted(text[x.span[0]:x.span[1]] for x in a.diagnostics() if x.code == "redundant-vertex")
    assert got == ["(1,0)", "(1,1)"]
    assert all(x.fixes and x.fixes[0].new_text == "" for x in a.diagnostics() if x.code == "redundant-vertex")


@pytest.mark.parametrize("body, code, where", [
    ("polytope P in N { halfspaces (1,0) >= 0 (0,1) >= 0 }", "unbounded-polytope", "halfspaces"),
    ("polytope P in N { halfspaces (1,0) >= 1 (-1,0) >= 0 (0,1) >= 0 (0,-1) >= 0 }", "empty-polytope", "halfspaces"),
    ("polytope P in N { vertices }", "empty-polytope", "vertices"),
    ("polytope P in N { vertices (1/2, 0) (0,1) }", "not-in-lattice", "(1/2, 0)"),
    ("polytope P in N { halfspaces (2,0) >= -1 (0,1) >= 0 (-1,-1) >= -1 }", "not-lattice-polytope", "halfspaces"),
    ("polytope P in N { vertices (0,0) (1,0) (0,1) }\npolytope Q = polar P", "origin-not-interior", "polar P"),
    ("polytope P in N { vertices (2,0) (0,1) (-1,-1) }\npolytope Q = polar P", "polar-not-lattice", "polar P"),
    ("polytope P in N { vertices (0,0) (1,0) }\nfan F = normal P", "not-full-dimensional", "P"),
    ("polytope P in N { vertices (0,0) (1,0) (0,1) }\nfan F = over P", "origin-not-interior", "P"),
    ("polytope P in N { vertices (1,0) (0,1) (-1,-1) }\npolytope Q = P + polar P", "lattice-mismatch", "P + polar P"),
    ("cone c in N { rays (1,0) (1,2) grading (1,-1) }", "bad-grading", "(1,-1)"),
    ("cone c in N { rays (1,0) (1,2) grading (1,0) (0,1) }", "bad-grading", "grading (1,0) (0,1)"),
    ("polytope P in N { vertices (0,0) halfspaces (1,0) >= 0 }", "mixed-description", "halfspaces"),
    ("cone c = over N", "wrong-kind", "N"),
])
def test_diagnostics_at_the_right_span(body, code, where):
    a, got = codes("lattice N = Z^2\n" + body + "\n")
    assert (code, where) in got, got


def test_messages_name_the_rational_vertex_and_the_direction():
    a = Analysis("lattice N = Z^2\npolytope P in N { vertices (2,0) (0,1) (-1,-1) }\npolytope Q = polar P\n")
    (msg,) = [d.message for d in a.diagnostics() if d.code == "polar-not-lattice"]
    # the facet through (2, 0) and (0, 1) is x + 2y <= 2: the polar vertex (-1/2, -1)
    assert "(-1/2, -1)" in msg
    a = Analysis("lattice N = Z^2\npolytope P in N { halfspaces (1,0) >= 0 (0,1) >= 0 (1,-1) >= -3 }\n")
    (msg,) = [d.message for d in a.diagnostics() if d.code == "unbounded-polytope"]
    assert "t·(1, 1)" in msg or "t·(0, 1)" in msg or "t·(1, 0)" in msg


def test_redundant_halfspace_warning():
    a, got = codes("lattice N = Z^2\npolytope P in N { halfspaces (1,0) >= 0, (0,1) >= 0, (-1,-1) >= -2, (1,1) >= -5 }\n")
    assert got == [("redundant-inequality", "(1,1) >= -5")]


def test_expect_properties_against_brute_force():
    """A non-reflexive pentagon: every count is also made by brute force over a box here."""
    verts = [(0, 0), (3, 0), (4, 2), (1, 3), (-1, 1)]
    P = "polytope P in N { vertices " + " ".join(f"({x},{y})" for x, y in verts) + " }"
    a = Analysis("lattice N = Z^2\n" + P + "\npolytope P2 = 2 P\n")
    from conelang.geometry import polytope as gp
    geo = a.value("P").polytope
    def count(poly, strict=False):
        pts = [x for x in product(range(-3, 9), repeat=2) if gp.contains(poly, x)]
        return len([x for x in pts if gp.in_interior(poly, x)]) if strict else len(pts)
    lp, ip = count(geo), count(geo, True)
    lp2 = count(a.value("P2").polytope)
    text = "lattice N = Z^2\n" + P + "\npolytope P2 = 2 P\n" + "\n".join([
        f"expect P lattice_points = {lp}", f"expect P interior_points = {ip}",
        f"expect P boundary_points = {lp - ip}", f"expect P2 lattice_points = {lp2}",
        "expect P vertices = 5", "expect P facets = 5", "expect P f_vector = (5, 5)", "expect P dim = 2",
        "expect P not reflexive"])
    a = Analysis(text)
    assert [d.code for d in a.diagnostics()] == []
    # the Ehrhart polynomial through three values L(0) = 1, L(1), L(2) by Lagrange: L(n) = a n^2 + b n + 1
    from fractions import Fraction
    A2 = Fraction(lp2 - 2 * lp + 1, 2)
    B = lp - 1 - A2
    a = Analysis(text + f"\nexpect P ehrhart = (1, {B}, {A2})\nexpect P ehrhart = (1, 2, 3)\n")
    fails = [d for d in a.diagnostics() if d.code == "expect-failed"]
    assert len(fails) == 1 and "(1, 2, 3)" in fails[0].message


def test_expect_bad_values():
    a, got = codes(BASE + "expect P ehrhart = 3\nexpect P h_star = (1, 1/2)\nexpect P volume = (1, 2)\n")
    assert [c for c, _ in got] == ["expect-bad-value"] * 3


def test_show_json_keys(tmp_path, capsys):
    p = tmp_path / "p.cone"
    p.write_text(BASE + "cone C = over P\nfan F = normal P\nfan G = over P\n")
    assert main(["show", str(p), "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    P = doc["objects"]["P"]
    assert P["kind"] == "polytope"
    for key in ("lattice", "dim", "vertices", "facets", "f_vector", "lattice_points", "interior_points",
                "volume", "ehrhart", "h_star", "reflexive"):
        assert key in P
    assert P["facets"][0].keys() == {"normal", "offset"}
    assert P["lattice_points"] == 4 and P["interior_points"] == 1 and P["volume"] == 3
    assert P["ehrhart"] == [1, "3/2", "3/2"] and P["h_star"] == [1, 1, 1]
    Q = doc["objects"]["Q"]
    assert Q["lattice"] == "dual N" and Q["lattice_points"] == 10        # 12 - 3 boundary points + 1
    C = doc["objects"]["C"]
    assert C["lattice"] == "N × Z" and C["hilbert_series"]["numerator"] == [1, 1, 1]
    assert C["hilbert_series"]["denominator"] == [1, 1, 1]
    F, G = doc["objects"]["F"], doc["objects"]["G"]
    assert F["lattice"] == "dual N" and F["complete"] and G["complete"]


@pytest.mark.parametrize("fmt", ["text", "markdown", "latex", "svg"])
def test_show_other_formats(tmp_path, capsys, fmt):
    p = tmp_path / "p.cone"
    p.write_text(BASE + "polytope T in Z^3 { vertices (1,0,0) (0,1,0) (0,0,1) (-1,-1,-1) }\n")
    assert main(["show", str(p), "--format", fmt]) == 0
    out = capsys.readouterr().out
    assert "Traceback" not in out
    if fmt == "svg":
        assert out.count("data-vertex=") == 3 + 3 + 4 and "oblique projection" in out
    elif fmt == "latex":
        assert r"L(n) = \tfrac{3}{2}n^{2}" in out
    else:
        assert "3/2 n^2 + 3/2 n + 1" in out


def test_hover_and_completion():
    host = AnalysisHost()
    host.apply_change("u", BASE)
    md, _ = host.hover("u", BASE.index("P in"))
    assert "polytope `P`" in md and "h*-vector" in md
    a = Analysis(BASE + "fan F = ")
    assert {"normal", "over"} <= {s.label for s in completions(a, len(a.text))}
    a = Analysis(BASE + "polytope R = ")
    assert {"P", "Q", "polar", "hull"} <= {s.label for s in completions(a, len(a.text))}


def test_product_and_cone_over_in_an_overlattice():
    """The product and the cone over P live in direct sums of lattices; with an overlattice the
    user coordinates are kept (the glue vector (1/2, 1/2) is a lattice point)."""
    text = ("lattice L = Z^2 + 1/2 (1, 1)\npolytope S in L { vertices (0,0) (1/2,1/2) (1,0) }\n"
            "polytope I in Z^1 { vertices (0) (1) }\npolytope SI = S * I\ncone C = over S\n"
            "expect S lattice_points = 3\nexpect SI lattice_points = 6\nexpect C hilbert_numerator = (1)\n")
    a = Analysis(text)
    assert [d.code for d in a.diagnostics()] == []
    from conelang.semantics.facts import object_facts
    assert [0, 0, 1] in object_facts(a, "SI")["vertices"]
    assert ["1/2", "1/2", 0] in object_facts(a, "SI")["vertices"]


def test_format_polytope_statements():
    """The canonical layout covers the new statements (and keeps what the file says)."""
    from conelang.syntax.format import format_text
    from conelang.syntax.parser import parse
    src = ("lattice N = Z^2\npolytope P in N{vertices(1,0)(0,1)(-1,-1)}\n"
           "polytope H in N { halfspaces (1,0)>=-1,(0,1)>= -1 (-1,-1)>=-1 }\n"
           "polytope Q=polar P+2 P*hull(P,P)\ncone C=over P\nfan F=normal P\n"
           "cone D in N{rays(1,0)(1,2)grading(1,1)}\n")
    out = format_text(src)
    assert out.splitlines()[1:4] == [
        "polytope P in N { vertices (1, 0) (0, 1) (-1, -1) }",
        "polytope H in N { halfspaces (1, 0) >= -1 (0, 1) >= -1 (-1, -1) >= -1 }",
        "polytope Q = polar P + 2 P * hull(P, P)"]
    assert "cone D in N { rays (1, 0) (1, 2) grading (1, 1) }" in out
    assert format_text(out) == out
    assert len(parse(out).statements) == len(parse(src).statements) == 7


def test_semantic_tokens_know_polytopes():
    from conelang.ide import editor
    a = Analysis(BASE + "fan F = normal P\n")
    toks = {(a.text[s:e], kind) for s, e, kind, _ in editor.semantic_tokens(a)}
    assert ("P", "variable") in toks and ("polytope", "keyword") in toks
