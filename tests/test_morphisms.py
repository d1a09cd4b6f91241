"""Lattice maps and toric morphisms end to end: ``.cone`` text in, diagnostics and JSON facts out.

Every compatible morphism below is checked against outside mathematics:
* the pullback exponents ``a_j`` satisfy ``Σ a_ji u_i = f^*(u'_j)`` in *user* coordinates
  (characters as printed in the cones' ``variety.generators``, the map as written), which
  is independent of the engine's lattice coordinates;
* every equation of the target variety (as printed) pulls back to zero on the source variety:
  substituted with sympy into the parametrisation ``z_i = t^{u_i}`` (the source's toric ideal
  is the kernel of that substitution).
The examples are named after their sources.
"""
from __future__ import annotations

from fractions import Fraction

import pytest
import sympy

from conelang.ide import AnalysisHost


def document(text: str) -> dict:
    host = AnalysisHost()
    host.apply_change("mem://t.cone", text)
    return host.document("mem://t.cone")


def codes(doc) -> list[tuple[str, int]]:
    return [(d["code"], d["line"]) for d in doc["diagnostics"]]


def errors(doc) -> list[dict]:
    return [d for d in doc["diagnostics"] if d["severity"] == "error"]


def only(doc, code) -> dict:
    found = [d for d in doc["diagnostics"] if d["code"] == code]
    assert len(found) == 1, doc["diagnostics"]
    return found[0]


# ---------------------------------------------------------------------------------------------
# outside checks on the facts


def frac(x):
    return Fraction(x) if not isinstance(x, str) else Fraction(x)


def check_pullbacks(doc, phi: str, map_rows=None):
    """Σ a_ji u_i = u'_j ∘ f (user coordinates) and the target's equations pull back to zero."""
    o = doc["objects"][phi]
    assert o["compatible"] is True
    src = doc["objects"][o["source"]]["variety"]
    tgt = doc["objects"][o["target"]]["variety"]
    rows = map_rows if map_rows is not None else doc["objects"][o["map"]]["rows"]
    rows = [[frac(x) for x in r] for r in rows]
    us = [[frac(x) for x in u] for u in src["generators"]]
    uts = [[frac(x) for x in u] for u in tgt["generators"]]
    n = len(rows[0])
    assert len(o["pullback_exponents"]) == len(uts)
    for a, up in zip(o["pullback_exponents"], uts):
        assert min(a, default=0) >= 0 and len(a) == len(us)
        lhs = [sum(ai * u[k] for ai, u in zip(a, us)) for k in range(n)]
        rhs = [sum(up[i] * rows[i][k] for i in range(len(rows))) for k in range(n)]
        assert lhs == rhs
    # the strings say the same as the exponents
    z = sympy.symbols(f"z1:{len(us) + 1}")
    for a, s in zip(o["pullback_exponents"], o["pullbacks"]):
        expected = sympy.Mul(*[zi ** e for zi, e in zip(z, a)])
        assert sympy.sympify(s, locals={str(zi): zi for zi in z}) == expected
    # equations of the target, pulled back, vanish under z_i = t^{u_i}
    w = sympy.symbols(f"w1:{len(uts) + 1}")
    t = sympy.symbols(f"t1:{n + 1}")
    pull = {wj: sympy.Mul(*[zi ** e for zi, e in zip(z, a)]) for wj, a in zip(w, o["pullback_exponents"])}
    param = {zi: sympy.Mul(*[tk ** sympy.Rational(e.numerator, e.denominator) for tk, e in zip(t, u)])
             for zi, u in zip(z, us)}
    for eq in tgt["equations"]:
        e = sympy.sympify(eq, locals={f"z{j}": wj for j, wj in enumerate(w, 1)})
        assert sympy.simplify(e.subs(pull, simultaneous=True).subs(param, simultaneous=True)) == 0, eq
    return o


# ---------------------------------------------------------------------------------------------
# maps: shapes and lattice membership


def test_images_and_rows_describe_the_same_map():
    # docs/language.md: images (1,0) (0,1) (1,1) and rows (1,0,1) (0,1,1) are the same map
    doc = document("""lattice N = Z^3
lattice P = Z^2
map f : N -> P { images (1,0) (0,1) (1,1) }
map g : N -> P { rows (1,0,1) (0,1,1) }
expect f rank = 2
expect g rank = 2
expect f cokernel = "0"
""")
    assert errors(doc) == []
    f, g = doc["objects"]["f"], doc["objects"]["g"]
    assert f["rows"] == g["rows"] == [[1, 0, 1], [0, 1, 1]]
    assert f["lattice_matrix"] == g["lattice_matrix"]


def test_too_few_images():
    doc = document("lattice N = Z^3\nlattice P = Z^2\nmap f : N -> P { images (1,0) (0,1) }\n")
    d = only(doc, "map-shape")
    assert d["line"] == 3 and "needs 3 images" in d["message"] and "2 given" in d["message"]


def test_too_many_rows_points_at_the_extra_ones():
    text = "lattice N = Z^2\nlattice P = Z^1\nmap f : N -> P {\n  rows (1, 1)\n  (2, 2) }\n"
    doc = document(text)
    d = only(doc, "map-shape")
    assert (d["line"], d["column"]) == (5, 3)
    assert "needs 1 rows" in d["message"] and "2 given" in d["message"]


def test_every_image_of_the_wrong_length_is_reported():
    doc = document("lattice N = Z^2\nlattice P = Z^2\nmap f : N -> P {\n images (1,0,0)\n (0,1,2) }\n")
    found = [(d["code"], d["line"]) for d in doc["diagnostics"]]
    assert found == [("map-shape", 4), ("map-shape", 5)]
    assert "needs 2 coordinates; this one has 3" in doc["diagnostics"][0]["message"]
    assert "f" not in doc["objects"]


def test_rows_of_the_wrong_length():
    doc = document("lattice N = Z^2\nlattice P = Z^2\nmap f : N -> P { rows (1,0) (0,1,1) }\n")
    d = only(doc, "map-shape")
    assert d["line"] == 3 and "so 2; this one has 3" in d["message"]


def test_rational_image_in_the_standard_lattice():
    doc = document("lattice N = Z^2\nlattice P = Z^2\nmap f : N -> P {\n images (1,0)\n (1/2,1) }\n")
    d = only(doc, "not-in-lattice")
    assert (d["line"], d["column"]) == (5, 2)
    assert "(0, 1) of N to (1/2, 1), which is not in P" in d["message"]


def test_map_out_of_an_overlattice_must_send_the_glue_into_the_target():
    # the identity Q → Z^2 with Q = Z^2 + Z (1/7, 3/7) does not land in Z^2; the other way it
    # is the inclusion Z^2 ⊂ Q of index 7 (Fulton §2.2 (from memory))
    doc = document("""lattice Q = Z^2 + 1/7 (1, 3)
lattice N = Z^2
map bad : Q -> N { images (1,0) (0,1) }
map inc : N -> Q { images (1,0) (0,1) }
expect inc cokernel = "Z/7"
expect inc rank = 2
""")
    d = only(doc, "not-in-lattice")
    assert d["line"] == 3 and "(1/7, 3/7) of Q" in d["message"]
    assert [e for e in errors(doc) if e is not d] == []


def test_map_properties_in_expectations():
    doc = document("""lattice N = Z^3
lattice P = Z^2
lattice Q = Z^2 + 1/7 (1, 3)
map pr : N -> P { rows (1,0,0) (0,1,0) }
map inc : P -> Q { images (1,0) (0,1) }
expect pr surjective
expect pr not injective
expect inc injective
expect inc not surjective
expect inc not isomorphism
expect pr injective
""")
    assert codes(doc) == [("expect-failed", 11)]


# ---------------------------------------------------------------------------------------------
# morphisms: compatibility


def test_incompatible_morphism_names_ray_image_and_inequality():
    # the orthant does not lie in cone((1,0), (1,2)): its ray (0,1) goes to (0,1), where the
    # facet functional (2,-1) of the target takes the value -1
    doc = document("""lattice N = Z^2
cone s in N { rays (1,0) (1,2) }
cone t in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism ok = id : s -> t
morphism bad = id : t -> s
""")
    d = only(doc, "incompatible-morphism")
    assert d["line"] == 6
    msg = d["message"]
    assert "the ray (0, 1) of 't'" in msg and "to (0, 1)" in msg
    assert "inequality <(2, -1), v> ≥ 0 of 's'" in msg and "= -1 < 0" in msg
    assert doc["objects"]["ok"]["compatible"] is True
    assert "bad" not in doc["objects"]


def test_incompatible_morphism_into_a_lower_dimensional_cone_names_the_equation():
    doc = document("""lattice N = Z^2
lattice P = Z^3
cone s in N { rays (1,0) (0,1) }
cone t in P { rays (1,0,0) (0,1,0) }
map f : N -> P { images (1,0,0) (0,1,1) }
morphism bad = f : s -> t
""")
    d = only(doc, "incompatible-morphism")
    assert d["line"] == 6
    assert "the ray (0, 1) of 's' to (0, 1, 1)" in d["message"]
    assert "equation <(0, 0, 1), v> = 0" in d["message"] and "= 1 ≠ 0" in d["message"]


def test_incompatible_morphism_in_an_overlattice_speaks_user_coordinates():
    doc = document("""lattice Q = Z^2 + 1/7 (1, 3)
cone s in Q { rays (1,0) (0,1) }
cone t in Q { rays (1,0) (1,7) }
map id : Q -> Q { images (1,0) (0,1) }
morphism bad = id : s -> t
""")
    d = only(doc, "incompatible-morphism")
    # the facet of cone((1,0),(1,7)) through (1,7) has normals k (7,-1); <(7,-1), (1/7,3/7)>
    # = 4/7, so the primitive normal in dual Q is 7 (7,-1) = (49,-7), and its value on the ray
    # (0,1) (primitive in Q: a point (0, y) of Q has y integral) is -7 (hand computation)
    assert "the ray (0, 1) of 's' to (0, 1)" in d["message"]
    assert "<(49, -7), v> ≥ 0 of 't'" in d["message"] and "= -7 < 0" in d["message"]


def test_morphism_lattice_mismatch_and_not_pointed():
    doc = document("""lattice N = Z^2
lattice P = Z^2
cone s in N { rays (1,0) (0,1) }
cone t in P { rays (1,0) (0,1) }
cone h in N { rays (1,0) (-1,0) (0,1) }
map f : N -> N { images (1,0) (0,1) }
morphism m1 = f : s -> t
morphism m2 = f : h -> s
""")
    mm = only(doc, "lattice-mismatch")
    assert mm["line"] == 7 and "target lattice N, but 't' lives in P" in mm["message"]
    npd = only(doc, "not-pointed")
    assert npd["line"] == 8 and "'h' is not pointed" in npd["message"]


def test_expect_not_compatible_keeps_the_value_without_an_error():
    doc = document("""lattice N = Z^2
cone s in N { rays (1,0) (1,2) }
cone t in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism bad = id : t -> s
expect bad not compatible
""")
    assert errors(doc) == []
    o = doc["objects"]["bad"]
    assert o["compatible"] is False and "the ray (0, 1) of 't'" in o["violation"]
    assert "pullbacks" not in o


def test_compatible_expectations_both_ways():
    doc = document("""lattice N = Z^2
cone s in N { rays (1,0) (1,2) }
cone t in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism good = id : s -> t
morphism bad = id : t -> s
expect bad not compatible
expect good compatible
expect good not compatible
expect bad birational
""")
    assert codes(doc) == [("expect-failed", 9), ("not-computed-yet", 10)]
    assert "there is no morphism" in doc["diagnostics"][1]["message"]


def test_composing_an_incompatible_morphism_is_an_error():
    doc = document("""lattice N = Z^2
cone s in N { rays (1,0) (1,2) }
cone t in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism bad = id : t -> s
morphism good = id : s -> t
morphism c = good ∘ bad
expect bad not compatible
""")
    d = only(doc, "incompatible-morphism")
    assert d["line"] == 7 and "'bad' is not a morphism" in d["message"]


def test_composition_needs_matching_cones():
    doc = document("""lattice N = Z^2
cone s in N { rays (1,0) (1,2) }
cone t in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism a = id : s -> t
morphism b = id : s -> t
morphism c = b after a
""")
    d = only(doc, "lattice-mismatch")
    assert d["line"] == 7 and "'b' starts at cone 's'" in d["message"]


# ---------------------------------------------------------------------------------------------
# morphisms: pullbacks, torus maps and kinds


def test_identity_morphism():
    # the identity of the A1 cone (Cox–Little–Schenck Example 1.2.21-ish (from memory)):
    # U = {z1 z3 = z2^2}; every coordinate pulls back to itself
    doc = document("""lattice N = Z^2
cone a1 in N { rays (0,1) (2,-1) }
map id : N -> N { images (1,0) (0,1) }
morphism one = id : a1 -> a1
expect one degree = 1
""")
    assert errors(doc) == []
    o = check_pullbacks(doc, "one")
    assert o["pullbacks"] == ["z1", "z2", "z3"]
    assert o["torus"] == ["t1", "t2"]
    assert {"isomorphism", "open_embedding", "closed_embedding", "birational"} <= set(o["kinds"])
    assert "subdivision_piece" not in o["kinds"]


def test_face_inclusion_is_an_open_embedding():
    # Cox–Little–Schenck Prop. 1.3.16 / Fulton §1.3 (from memory): a face τ = σ ∩ m^⊥ gives
    # the principal open subset U_τ = (U_σ)_{χ^m} ⊂ U_σ
    doc = document("""lattice N = Z^3
cone sigma in N { rays (1,0,0) (0,1,0) (1,1,2) }
cone tau = face sigma at (0,0,1)
map id : N -> N { rows (1,0,0) (0,1,0) (0,0,1) }
morphism j = id : tau -> sigma
""")
    assert errors(doc) == []
    o = check_pullbacks(doc, "j")
    assert "open_embedding" in o["kinds"] and "injective" in o["kinds"]
    assert "isomorphism" not in o["kinds"] and "surjective" not in o["kinds"]
    # τ is not full-dimensional: its variety has a unit pair z_{r-1} z_r = 1 (χ^m, χ^-m)
    assert doc["objects"]["tau"]["variety"]["generators"][-2:] == [[0, 0, 1], [0, 0, -1]]


def test_blow_up_chart_is_a_subdivision_piece():
    # the chart of the blow-up of C^2 at the origin on cone(e1, e1 + e2): (u, v) ↦ (u v, u)
    # (Hartshorne I.4, Fulton §2.4 (from memory))
    doc = document("""lattice N = Z^2
cone chart in N { rays (1,0) (1,1) }
cone plane in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism blowup = id : chart -> plane
expect blowup degree = 1
""")
    assert errors(doc) == []
    o = check_pullbacks(doc, "blowup")
    # z1 = χ^(1,-1) = v, z2 = χ^(0,1) = u: x ↦ u v, y ↦ u
    assert doc["objects"]["chart"]["variety"]["generators"] == [[1, -1], [0, 1]]
    assert o["pullbacks"] == ["z1*z2", "z2"]
    assert "subdivision_piece" in o["kinds"] and "birational" in o["kinds"]
    assert not {"surjective", "injective", "open_embedding", "finite"} & set(o["kinds"])


def test_blow_up_chart_expectations():
    doc = document("""lattice N = Z^2
cone chart in N { rays (1,0) (1,1) }
cone plane in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism blowup = id : chart -> plane
expect blowup subdivision_piece
expect blowup birational
expect blowup not surjective
expect blowup not injective
expect blowup not open_embedding
expect blowup surjective
""")
    assert codes(doc) == [("expect-failed", 11)]


def test_projection_to_a_lower_rank_lattice():
    # (x, y, z) ↦ (x, y): C^3 → C^2, onto, not finite (common practice, no source); with a
    # non-full source cone(e1, e2): C^2 × C^* → C^2
    doc = document("""lattice N = Z^3
lattice P = Z^2
cone o3 in N { rays (1,0,0) (0,1,0) (0,0,1) }
cone o2 in P { rays (1,0) (0,1) }
cone flat in N { rays (1,0,0) (0,1,0) }
map pr : N -> P { rows (1,0,0) (0,1,0) }
morphism p = pr : o3 -> o2
morphism q = pr : flat -> o2
""")
    assert errors(doc) == []
    p = check_pullbacks(doc, "p")
    assert p["pullbacks"] == ["z1", "z2"]
    assert {"surjective", "dominant", "lattice_surjective"} <= set(p["kinds"])
    assert p["degree"] is None
    q = check_pullbacks(doc, "q")
    assert "surjective" in q["kinds"] and "finite" not in q["kinds"]


@pytest.mark.parametrize("n,q", [(2, 1), (3, 1), (5, 2), (7, 3)])
def test_cyclic_quotient_in_the_overlattice_picture(n, q):
    # C^2 → C^2/μ_n with μ_n acting by (ζ, ζ^q): the identity Z^2 → N' = Z^2 + 1/n (1, q)
    # sends the orthant to the orthant (Fulton §2.2, Cox–Little–Schenck Example 1.3.20-ish
    # (from memory)).  The pullbacks are the minimal invariant monomials x^a y^b,
    # a + q b ≡ 0 (mod n), found here by brute force; the degree is n.
    doc = document(f"""lattice N = Z^2
lattice Q = Z^2 + 1/{n} (1, {q})
cone plane in N {{ rays (1,0) (0,1) }}
cone quot in Q {{ rays (1,0) (0,1) }}
map inc : N -> Q {{ images (1,0) (0,1) }}
morphism pi = inc : plane -> quot
expect pi degree = {n}
expect inc cokernel = "Z/{n}"
""")
    assert errors(doc) == []
    o = check_pullbacks(doc, "pi")
    assert doc["objects"]["plane"]["variety"]["generators"] == [[1, 0], [0, 1]]   # z1 = x, z2 = y
    inv = [(a, b) for a in range(n + 1) for b in range(n + 1)
           if (a, b) != (0, 0) and (a + q * b) % n == 0]
    minimal = {p for p in inv if not any(r != p and r[0] <= p[0] and r[1] <= p[1] for r in inv)}
    assert {tuple(a) for a in o["pullback_exponents"]} == minimal
    # the target's generators in user coordinates are exactly these invariant characters
    assert {tuple(u) for u in doc["objects"]["quot"]["variety"]["generators"]} == minimal
    assert {"quotient", "finite", "surjective", "dominant"} <= set(o["kinds"])
    assert "injective" not in o["kinds"] and "birational" not in o["kinds"]
    assert o["degree"] == n
    if (n, q) == (2, 1):
        assert sorted(o["pullbacks"]) == ["z1*z2", "z1^2", "z2^2"]


def test_torus_map_as_laurent_monomials():
    # (a, b) ↦ (a - b, 2b, a) on cocharacters: t'1 = t1 t2^-1, t'2 = t2^2, t'3 = t1
    doc = document("""lattice N = Z^2
lattice P = Z^3
cone s in N { rays (1,0) (1,1) }
cone t in P { rays (1,0,1) (0,2,1) (1,0,0) (0,1,0) (0,0,1) }
map f : N -> P { rows (1,-1) (0,2) (1,0) }
morphism phi = f : s -> t
""")
    assert errors(doc) == []
    o = check_pullbacks(doc, "phi")
    assert o["torus"] == ["t1*t2^-1", "t2^2", "t1"]


def test_composition_equals_the_composite_of_pullbacks():
    # functoriality, (ψ ∘ φ)^* = φ^* ∘ ψ^* (common practice, no source): the blow-up chart
    # followed by the quotient C^2 → C^2/μ_3, written both as ∘ and as 'after'
    doc = document("""lattice N = Z^2
lattice Q = Z^2 + 1/3 (1, 1)
cone chart in N { rays (1,0) (1,1) }
cone plane in N { rays (1,0) (0,1) }
cone quot in Q { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
map inc : N -> Q { images (1,0) (0,1) }
morphism phi = id : chart -> plane
morphism psi = inc : plane -> quot
morphism both = psi ∘ phi
morphism both2 = psi after phi
""")
    assert errors(doc) == []
    phi, psi = doc["objects"]["phi"], doc["objects"]["psi"]
    both = check_pullbacks(doc, "both", map_rows=[[1, 0], [0, 1]])
    assert doc["objects"]["both2"]["pullbacks"] == both["pullbacks"]
    assert both["source"] == "chart" and both["target"] == "quot"
    # substitute: w_k ↦ (monomial in the middle coordinates) ↦ (monomial in z)
    z = sympy.symbols("z1:3")
    y = sympy.symbols("y1:3")
    inner = {yj: sympy.Mul(*[zi ** e for zi, e in zip(z, a)]) for yj, a in zip(y, phi["pullback_exponents"])}
    chart_gens = doc["objects"]["chart"]["variety"]["generators"]
    t = sympy.symbols("t1:3")
    param = {zi: sympy.Mul(*[tk ** e for tk, e in zip(t, u)]) for zi, u in zip(z, chart_gens)}
    for b, a in zip(psi["pullback_exponents"], both["pullback_exponents"]):
        composite = sympy.Mul(*[yj ** e for yj, e in zip(y, b)]).subs(inner, simultaneous=True)
        direct = sympy.Mul(*[zi ** e for zi, e in zip(z, a)])
        # as functions on U_chart (z_i = t^{u_i}) — and literally, since the chart is smooth
        assert sympy.simplify((composite - direct).subs(param, simultaneous=True)) == 0
        assert sympy.expand(composite - direct) == 0


def test_show_renders_morphisms():
    from conelang.render import markdown, text
    doc = document("""lattice N = Z^2
cone chart in N { rays (1,0) (1,1) }
cone plane in N { rays (1,0) (0,1) }
map id : N -> N { images (1,0) (0,1) }
morphism blowup = id : chart -> plane
morphism back = id : plane -> chart
expect back not compatible
""")
    t = text.render(doc)
    assert "w1 ↦ z1*z2" in t and "subdivision piece" in t and "t'1 ↦ t1" in t
    assert "not compatible: 'id' does not send 'plane' into 'chart'" in t
    md = markdown.render(doc)
    assert "`w2 ↦ z2`" in md and "**not compatible:**" in md


# ---------------------------------------------------------------------------------------------
# images and preimages through the language


def _contains(facts, v):
    """Membership from the printed facets and linear equations (user coordinates)."""
    v = [Fraction(x) for x in v]
    dot = lambda u: sum(Fraction(a) * b for a, b in zip(u, v))
    return all(dot(e) == 0 for e in facts["linear_equations"]) and all(dot(u) >= 0 for u in facts["facets"])


def test_image_and_preimage_of_the_wedge():
    # the example of docs/language.md: f(e1) = (1,0), f(e2) = (0,1), f(e3) = (1,1).  f(σ) is generated by
    # the images of the rays: (1,0), (0,1), (5,5), i.e. the orthant.  f^-1(orthant) is cut out by
    # the pulled-back facets u ∘ f: (1,0,1) and (0,1,1), and contains the kernel line (1,1,-1).
    doc = document("""lattice N = Z^3
lattice P = Z^2
cone wedge in N { rays (1,0,0) (0,1,0) (1,1,4) }
cone target in P { rays (1,0) (0,1) }
map f : N -> P { images (1,0) (0,1) (1,1) }
cone img = f(wedge)
cone pre = f^-1(target)
cone pre2 in N { halfspaces (1,0,1) (0,1,1) }
expect img == target
expect pre == pre2
expect pre not pointed
expect pre dim = 3
""")
    assert errors(doc) == []
    pre = doc["objects"]["pre"]
    assert pre["lineality"] == [[1, 1, -1]]
    # brute force: v ∈ f^-1(τ) iff f(v) ∈ τ, on a box of lattice points
    tgt = doc["objects"]["target"]
    import itertools
    for v in itertools.product(range(-2, 3), repeat=3):
        fv = (v[0] + v[2], v[1] + v[2])
        assert _contains(pre, v) == _contains(tgt, fv)


def test_image_under_the_inclusion_into_an_overlattice():
    # Z^2 ⊂ Z^2 + 1/5 (1, 2): the image of the orthant is the orthant, now in Q; its primitive
    # ray generators stay (1,0), (0,1) (a point (x, 0) of Q has x integral, as 2a/5 ∈ Z forces
    # 5 | a — hand computation)
    doc = document("""lattice N = Z^2
lattice Q = Z^2 + 1/5 (1, 2)
cone plane in N { rays (1,0) (0,1) }
cone quot in Q { rays (1,0) (0,1) }
map inc : N -> Q { images (1,0) (0,1) }
cone img = inc(plane)
cone back = inc^-1(quot)
expect img == quot
expect back == plane
""")
    assert errors(doc) == []
    assert doc["objects"]["img"]["lattice"] == "Q"
    assert sorted(doc["objects"]["img"]["rays"]) == [[0, 1], [1, 0]]


def test_image_of_a_cone_in_the_wrong_lattice():
    doc = document("""lattice N = Z^2
lattice P = Z^2
cone c in P { rays (1,0) (0,1) }
map f : N -> P { images (1,0) (0,1) }
cone img = f(c)
""")
    d = only(doc, "lattice-mismatch")
    assert d["line"] == 5 and "this cone lives in P" in d["message"]
