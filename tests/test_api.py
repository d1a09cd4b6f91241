"""The Python API (conelang/api.py): the same facts as ``conelang show --format json`` for every
example file, exact values, constructors that write .cone text, diagnostics, rich display, and
the notebook-style example script."""
from __future__ import annotations

import itertools
import json
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from fractions import Fraction
from pathlib import Path

import pytest

import conelang
from conelang.api import ConelangError, Diagnostic, Document, Object, Section

ROOT = Path(__file__).parent.parent
EXAMPLES = sorted((ROOT / "examples").rglob("*.cone"))      # with the project of use statements
RATIONAL = re.compile(r"-?\d+/\d+")


def expected(value):
    """The JSON value converted by the rule of docs/language.md (written here independently of
    conelang.api): "p/q" strings → Fraction, lists → tuples, dicts → dicts."""
    if isinstance(value, str) and RATIONAL.fullmatch(value):
        return Fraction(value)
    if isinstance(value, list):
        return tuple(expected(v) for v in value)
    if isinstance(value, dict):
        return {k: expected(v) for k, v in value.items()}
    return value


def walk(value):
    """Every leaf of an API value (sections and tuples opened)."""
    if isinstance(value, Section):
        for k in value:
            yield from walk(value[k])
    elif isinstance(value, tuple):
        for v in value:
            yield from walk(v)
    else:
        yield value


def cli_json(path: Path) -> dict:
    out = subprocess.run([sys.executable, "-m", "conelang.cli", "show", str(path.relative_to(ROOT)),
                          "--format", "json"], cwd=ROOT, capture_output=True, text=True, timeout=300)
    assert out.returncode in (0, 1), out.stderr
    return json.loads(out.stdout)


# -- the API against the JSON ------------------------------------------------------------------

def test_there_are_examples():
    assert len(EXAMPLES) >= 5


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: str(p.relative_to(ROOT / "examples")))
def test_every_example_matches_the_json(path, monkeypatch):
    monkeypatch.chdir(ROOT)
    data = cli_json(path)
    doc = conelang.load(path.relative_to(ROOT))
    assert doc.to_json() == data                       # the same document as the command line
    assert doc.ok                                      # the examples pass `conelang check`
    assert doc.file == data["file"]
    assert doc.names == list(data["objects"]) and len(doc) == len(data["objects"])
    assert [o.name for o in doc] == doc.names
    assert doc.diagnostics == [Diagnostic(**d) for d in data["diagnostics"]]
    for name, facts in data["objects"].items():
        obj = doc[name]
        assert isinstance(obj, Object) and obj.name == name and obj.kind == facts["kind"]
        assert obj.facts == facts
        assert obj == expected(facts)
        for key, value in facts.items():
            assert obj[key] == expected(value), (name, key)
            if key.isidentifier():
                assert getattr(obj, key) == expected(value), (name, key)
            if isinstance(value, dict):                # nested sections: attribute access too
                section = getattr(obj, key)
                for k2, v2 in value.items():
                    if k2.isidentifier():
                        assert getattr(section, k2) == expected(v2), (name, key, k2)
        for leaf in walk(obj):
            assert not isinstance(leaf, float), (name, leaf)
            assert not (isinstance(leaf, str) and RATIONAL.fullmatch(leaf)), (name, leaf)
            if isinstance(leaf, Fraction):
                assert leaf.denominator != 1, (name, leaf)


def test_load_uses_a_file_uri_and_the_path_as_given(tmp_path, monkeypatch):
    (tmp_path / "a.cone").write_text("lattice N = Z^2\n", encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    doc = conelang.load("a.cone")
    assert doc.file == "a.cone"
    assert doc.uri == (tmp_path / "a.cone").resolve().as_uri() and doc.uri.startswith("file://")
    assert doc.text == "lattice N = Z^2\n"


def test_use_statements_are_read_by_load_and_not_by_loads():
    table = ROOT / "examples" / "project" / "tables" / "surfaces.cone"
    doc = conelang.load(table)
    assert doc.ok and "a3" in doc
    assert "a1" not in doc               # an imported object belongs to its own file, as in the JSON
    text = table.read_text(encoding="utf-8")
    assert "import-not-found" in {d.code for d in conelang.loads(text).diagnostics}


# -- exact values ----------------------------------------------------------------------------

def test_rationals_become_fractions_and_other_strings_stay():
    doc = conelang.loads("lattice Q = Z^2 + 1/3 (1, 2)\ncone c in Q { rays (1,0) (0,1) }")
    c = doc["c"]
    # the rational coordinates of the JSON, and only those, are Fractions
    raw = c.facts["hilbert_basis"]
    assert any(isinstance(x, str) for v in raw for x in v)
    for v_raw, v in zip(raw, c.hilbert_basis):
        assert v == tuple(Fraction(x) if isinstance(x, str) else x for x in v_raw)
    assert Fraction(1, 3) in itertools.chain.from_iterable(c.hilbert_basis)
    # G = (Z^2 + Z(1/3, 2/3)) / Z^2 = Z/3; its name stays a string
    assert c.variety.class_group == "Z/3" and isinstance(c.variety.quotient, str)
    assert all(isinstance(e, str) for e in c.variety.equations)
    assert isinstance(c.dim, int) and c.pointed is True
    assert conelang.api.exact(["7/2", "-1/3", "Z/3", 4]) == (Fraction(7, 2), Fraction(-1, 3), "Z/3", 4)


def test_unknown_facts_name_the_available_keys():
    doc = conelang.loads("lattice N = Z^2\ncone wedge in N { rays (1,0) (1,2) }")
    with pytest.raises(AttributeError, match="hilbert_basis") as err:
        doc["wedge"].hilbert_bassis
    assert "hilbert_bassis" in str(err.value)
    with pytest.raises(AttributeError, match="generators"):
        doc["wedge"].variety.generator
    with pytest.raises(KeyError, match="wedge"):
        doc["wedg"]
    with pytest.raises(KeyError, match="rays"):
        doc["wedge"]["ray"]
    assert "wedge" in doc and "wedg" not in doc and doc.get("wedg") is None
    assert "hilbert_basis" in dir(doc["wedge"])


# -- checks against outside knowledge --------------------------------------------------------

def test_the_A1_singularity():
    """σ = cone((1,0),(1,2)) gives the A_1 singularity (the quadric cone xz = y^2): the Hilbert
    basis of σ^∨ ∩ M is (0,1), (1,0), (2,-1), with one equation, and Cl(U_σ) = Z/2 (Cox–Little–
    Schenck, Toric Varieties, §1.2 and §4.1, the rational normal cone of degree 2; example
    numbers from memory)."""
    doc = conelang.loads("lattice N = Z^2\ncone wedge in N { rays (1,0) (1,2) }")
    v = doc["wedge"].variety
    assert sorted(v.generators) == [(0, 1), (1, 0), (2, -1)]
    assert len(v.equations) == 1 and v.class_group == "Z/2"
    # the one binomial z^a = z^b is a relation of the generators of degree 2 on each side
    (plus, minus), = v.binomials
    relation = [sum(e * g[i] for e, g in zip(plus, v.generators)) -
                sum(e * g[i] for e, g in zip(minus, v.generators)) for i in range(2)]
    assert relation == [0, 0] and sum(plus) == sum(minus) == 2


def ages(r: int, weights: tuple[int, ...]) -> dict[Fraction, int]:
    """Ages of the nonzero elements k/r·(a_1, …, a_n) of 1/r(a): Σ {k a_i / r} (Reid, "Young
    person's guide to canonical singularities", §4, by the definition)."""
    out: dict[Fraction, int] = {}
    for k in range(1, r):
        age = sum(Fraction(k * a % r, r) for a in weights)
        out[age] = out.get(age, 0) + 1
    return out


ORTHANT = [(1, 0, 0), (0, 1, 0), (0, 0, 1)]


@pytest.mark.parametrize("r,weights", [(3, (1, 1, 1)), (5, (1, 2, 2)), (5, (1, 4, 2)), (7, (1, 2, 4)),
                                       (7, (1, 1, 3)), (4, (1, 1, 1)), (2, (1, 1, 1))])
def test_cyclic_quotients_against_the_reid_tai_criterion(r, weights):
    """For G = Z/r acting by 1/r(a, b, c) with every weight prime to r (no pseudo-reflections):
    the ages are the definition's, junior elements are those of age 1, U is Gorenstein iff
    r | a + b + c (G ⊂ SL_3, Watanabe), canonical iff every age ≥ 1 and terminal iff every
    age > 1 (the Reid–Tai criterion)."""
    N = conelang.lattice(3, glue=[tuple(Fraction(a, r) for a in weights)])
    v = conelang.cone(rays=ORTHANT, lattice=N).variety
    want = ages(r, weights)
    assert {Fraction(k): n for k, n in v.ages.items()} == want
    assert len(v.junior) == want.get(Fraction(1), 0)
    assert v.quotient_order == r
    assert v.gorenstein == (sum(weights) % r == 0)
    assert v.canonical == all(a >= 1 for a in want)
    assert v.terminal == all(a > 1 for a in want)


# -- constructors ----------------------------------------------------------------------------

def test_a_built_cone_equals_the_same_cone_written_as_text():
    built = conelang.cone(rays=[(1, 0), (1, 2)], lattice=2, name="wedge")
    text = conelang.loads("lattice N = Z^2\ncone wedge in N { rays (1,0) (1,2) }")["wedge"]
    assert built.facts == text.facts and built == text
    assert built.document.text.startswith("lattice N = Z^2\n")
    # the rank is read off the vectors when no lattice is given; the default name is sigma
    assert conelang.cone(rays=[(1, 0), (1, 2)]).facts == text.facts
    assert conelang.cone(rays=[(1, 0), (1, 2)]).name == "sigma"


def test_constructors_take_lattices_of_a_loaded_file():
    doc = conelang.load(ROOT / "examples" / "quotient_classification.cone")
    for name in ("klein", "third", "term", "klein4"):
        lat = doc[doc[name].lattice]
        built = conelang.cone(rays=ORTHANT, lattice=lat, name=name)
        assert built.facts == doc[name].facts, name
    # a dual lattice is written with its primal
    d = conelang.loads("lattice Q = Z^2 + 1/5 (1, 2)\nlattice M = dual Q\ncone c in M { rays (5,0) (0,5) }")
    built = conelang.cone(rays=[(5, 0), (0, 5)], lattice=d["M"], name="c")
    assert built.facts == d["c"].facts


def test_other_constructors_match_their_text():
    cases = [
        (conelang.lattice(2, glue=[(Fraction(1, 7), Fraction(3, 7))], name="Q"),
         "lattice Q = Z^2 + 1/7 (1, 3)", "Q"),
        (conelang.cone(halfspaces=[(1, 0, 0), (0, 1, 0)], equations=[(1, 1, -2)], name="plane"),
         "lattice N = Z^3\ncone plane in N { halfspaces (1,0,0) (0,1,0) equations (1,1,-2) }", "plane"),
        (conelang.cone(rays=[(1, 0), (1, 2)], grading=(1, 1), name="D"),
         "lattice N = Z^2\ncone D in N { rays (1,0) (1,2) grading (1,1) }", "D"),
        (conelang.map(images=[(1, 0), (0, 1), (1, 1)]),
         "lattice N = Z^3\nlattice P = Z^2\nmap f : N -> P { images (1,0) (0,1) (1,1) }", "f"),
        (conelang.map(rows=[(1, 0, 1), (0, 1, 1)], name="g"),
         "lattice N = Z^3\nlattice P = Z^2\nmap g : N -> P { rows (1,0,1) (0,1,1) }", "g"),
        (conelang.fan(rays=[(1, 0), (0, 1), (-1, -1)], cones=[[1, 2], [2, 3], [3, 1]], name="F"),
         "lattice N = Z^2\nfan F in N { rays (1,0) (0,1) (-1,-1) cones [1 2] [2 3] [3 1] }", "F"),
        (conelang.polytope(vertices=[(1, 0), (0, 1), (-1, -1)], name="tri"),
         "lattice N = Z^2\npolytope tri in N { vertices (1,0) (0,1) (-1,-1) }", "tri"),
        (conelang.polytope(halfspaces=[((1, 0), 0), ((0, 1), 0), ((-1, -1), -2)], name="s"),
         "lattice N = Z^2\npolytope s in N { halfspaces (1,0) >= 0, (0,1) >= 0, (-1,-1) >= -2 }", "s"),
        (conelang.characters([(1, 0), (1, 1), (1, 2)], name="cubic"),
         "lattice T = Z^2\ncharacters cubic of T { (1,0) (1,1) (1,2) }", "cubic"),
    ]
    for built, text, name in cases:
        assert built.facts == conelang.loads(text)[name].facts, text


def test_a_map_of_a_lattice_to_itself():
    T = conelang.lattice(2, name="T")
    sq = conelang.map(images=[(1, 1), (-1, 1)], source=T, target=T, name="sq")
    assert sq.source == sq.target == "T"
    assert sq.facts == conelang.loads("lattice T = Z^2\nmap sq : T -> T { images (1,1) (-1,1) }")["sq"].facts
    # det 2: the image has index 2 (independent: |det [[1,1],[-1,1]]| = 2)
    assert sq.cokernel == "Z/2"


def _assert_clear(err: pytest.ExceptionInfo, *words: str) -> None:
    e = err.value
    assert e.__cause__ is None and (e.__context__ is None or e.__suppress_context__)
    for w in words:
        assert w in str(e), (w, str(e))


@pytest.mark.parametrize("call,words", [
    (lambda: conelang.cone(rays=[(1, 0.5)]), ["float", "Fraction"]),
    (lambda: conelang.cone(rays=[(1, True)]), ["bool"]),
    (lambda: conelang.cone(rays=[(1, "1/2")]), ["str", "ints or Fractions"]),
    (lambda: conelang.cone(rays=[(1, 0), (1, 0, 0)]), ["vector 2", "3 coordinates"]),
    (lambda: conelang.cone(rays="(1,0)"), ["list or tuple"]),
    (lambda: conelang.cone(rays=[(1, 0)], halfspaces=[(1, 0)]), ["either rays or halfspaces"]),
    (lambda: conelang.cone(), ["either rays or halfspaces"]),
    (lambda: conelang.cone(rays=[]), ["give the lattice"]),
    (lambda: conelang.cone(rays=[(1, 0)], name="2x"), ["not a conelang name"]),
    (lambda: conelang.cone(rays=[(1, 0)], name="rays"), ["reserved word"]),
    (lambda: conelang.cone(rays=[(1, 0)], name=3), ["must be a str"]),
    (lambda: conelang.cone(rays=[(1, 0)], lattice="Z^2"), ["int rank or a lattice object"]),
    (lambda: conelang.cone(rays=[(1, 0)], lattice=conelang.cone(rays=[(1, 0)])), ["is a cone, not a lattice"]),
    (lambda: conelang.cone(rays=[(0, 0)]), ["zero-vector"]),
    (lambda: conelang.cone(rays=[(1, 0, 0)], lattice=2), ["vector-length"]),
    (lambda: conelang.fan(rays=[(1, 0)], cones=[[1.0]]), ["ray index"]),
    (lambda: conelang.fan(rays=[(1, 0), (0, 1)], cones=[[1, 3]]), ["bad-index"]),
    (lambda: conelang.map(images=[(1, 0)], rows=[(1,)]), ["either images or rows"]),
    (lambda: conelang.lattice(2.0), ["rank is an int"]),
    (lambda: conelang.polytope(halfspaces=[((1, 0),)]), ["pair (u, b)"]),
])
def test_bad_input_gives_a_clear_error(call, words):
    with pytest.raises(ConelangError) as err:
        call()
    _assert_clear(err, *words)


def test_an_error_of_the_generated_text_carries_its_diagnostics():
    with pytest.raises(ConelangError) as err:
        conelang.cone(rays=[(0, 0)], lattice=2)
    assert [d.code for d in err.value.diagnostics if d.severity == "error"] == ["zero-vector"]
    assert "cone sigma in N" in str(err.value)        # the generated source is shown


def test_bad_arguments_of_load_and_loads(tmp_path):
    with pytest.raises(FileNotFoundError, match="no such file") as err:
        conelang.load(tmp_path / "missing.cone")
    _assert_clear(err)
    (tmp_path / "latin1.cone").write_bytes("lattice N = Z^2 # é".encode("latin-1"))
    with pytest.raises(ConelangError, match="not UTF-8") as err:
        conelang.load(tmp_path / "latin1.cone")
    _assert_clear(err)
    with pytest.raises(ConelangError, match="loads"):
        conelang.load(b"lattice N = Z^2")
    with pytest.raises(ConelangError, match="decode"):
        conelang.loads(b"lattice N = Z^2")
    with pytest.raises(ConelangError, match="budget"):
        conelang.loads("lattice N = Z^2", budget=-1)


# -- diagnostics -----------------------------------------------------------------------------

def test_diagnostics_point_at_the_text():
    text = ("lattice N = Z^2\n"
            "cone c in N { rays (2,0) (0,1) }\n"
            "cone d in N { rays (1,0) (0,1) }\n"
            "cone e = dual nothere\n"
            "expect d simplicial\n"
            "expect d generators = 5\n")
    doc = conelang.loads(text, name="mine.cone")
    assert doc.file == "mine.cone" and not doc.ok
    by_code = {d.code: d for d in doc.diagnostics}
    assert {"not-primitive", "unknown-name", "expect-failed"} <= set(by_code)
    lines = text.splitlines()
    for code, word in (("not-primitive", "(2,0)"), ("unknown-name", "nothere")):
        d = by_code[code]
        covered = lines[d.line - 1][d.column - 1:d.end_column - 1]
        assert word in covered or covered in word, (code, covered)
    assert by_code["not-primitive"].severity == "warning"
    assert by_code["unknown-name"].severity == "error" and "nothere" in by_code["unknown-name"].message
    assert by_code["expect-failed"].line == 6
    assert set(doc.errors) == {d for d in doc.diagnostics if d.severity == "error"}
    # an object with an error is left out, as in the JSON; the others are there
    assert "e" not in doc and {"N", "c", "d"} <= set(doc.names)
    with pytest.raises(KeyError, match="unknown-name"):
        doc["e"]
    d = by_code["unknown-name"]
    assert str(d) == f"{d.line}:{d.column}: error: {d.message} [unknown-name]"
    with pytest.raises(AttributeError):
        d.line = 3                                    # frozen


# -- rich display ----------------------------------------------------------------------------

def balanced(latex: str) -> bool:
    depth = 0
    for ch in re.sub(r"\\[{}]", "", latex):
        depth += {"{": 1, "}": -1}.get(ch, 0)
        if depth < 0:
            return False
    return depth == 0


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: str(p.relative_to(ROOT / "examples")))
def test_rich_display_parses(path):
    doc = conelang.load(path)
    drawn = 0
    for obj in doc:
        svg = obj._repr_svg_()
        if svg is not None:
            root = ET.fromstring(svg)
            assert root.tag == "{http://www.w3.org/2000/svg}svg"
            drawn += 1
        pictured = (obj.kind == "cone" and obj.ambient_dim == 2 or
                    obj.kind == "fan" and len(obj.rays[0]) == 2)
        if pictured:
            assert svg is not None, obj.name
        if obj.kind in ("lattice", "map", "characters"):
            assert svg is None, obj.name
        latex = obj._repr_latex_()
        assert latex.strip() and balanced(latex), obj.name
        md = obj._repr_markdown_()
        assert md.strip() and f"`{obj.name}`" in md, obj.name
        assert obj.name in repr(obj) and obj.kind in repr(obj)
    assert doc._repr_markdown_().strip()
    ET.fromstring(doc.svg())
    assert balanced(doc.latex()) and balanced(doc.latex(whole_document=True))
    assert repr(doc).startswith("<Document")
    if any(o.kind in ("cone", "fan") for o in doc):
        assert drawn > 0


def test_an_object_picture_is_its_own():
    doc = conelang.loads("lattice N = Z^2\ncone a in N { rays (1,0) (0,1) }\ncone b in N { rays (1,0) (1,3) }")
    titles = lambda svg: ["".join(t.itertext()) for t in ET.fromstring(svg).iter()
                          if t.get("class") == "title"]
    assert titles(doc.svg()) == ["cone a in N", "dual of a", "cone b in N", "dual of b"]
    assert titles(doc["b"].svg()) == ["cone b in N", "dual of b"]     # b alone, never a


# -- the package ----------------------------------------------------------------------------

def test_import_conelang_stays_cheap():
    code = ("import sys, conelang, conelang.cli; "
            "assert 'conelang.api' not in sys.modules and 'conelang.ide.host' in sys.modules; "
            "import conelang as c; c.load; assert 'conelang.api' in sys.modules; "
            "assert c.map is sys.modules['conelang.api'].map")
    subprocess.run([sys.executable, "-c", "import sys, conelang; assert 'conelang.ide.host' not in sys.modules, "
                    "sorted(sys.modules)"], check=True, cwd=ROOT)
    subprocess.run([sys.executable, "-c", code], check=True, cwd=ROOT)
    assert {"load", "loads", "cone", "map", "fan", "lattice"} <= set(dir(conelang))
    with pytest.raises(AttributeError):
        conelang.no_such_thing


def test_the_notebook_example_runs(tmp_path):
    out = subprocess.run([sys.executable, str(ROOT / "examples" / "notebook_example.py")],
                         cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    assert "klein" in out.stdout and "1/3(1,1,1)" in out.stdout and "quintic" in out.stdout
    assert "Traceback" not in out.stderr


# -- the documentation -----------------------------------------------------------------------

def _python_blocks(text: str) -> list[str]:
    return re.findall(r"^```python\n(.*?)^```", text, flags=re.S | re.M)


@pytest.mark.parametrize("doc_file", ["README.md", "docs/language.md"])
def test_the_python_examples_of_the_docs_hold(doc_file, monkeypatch):
    """Each ```python block of the Python API sections runs; a line `expr  # value` whose
    comment starts with a Python value (up to ';' or ':') gives that value."""
    text = (ROOT / doc_file).read_text(encoding="utf-8").split("## Python API", 1)[1].split("\n## ", 1)[0]
    blocks = _python_blocks(text)
    assert blocks, doc_file
    monkeypatch.chdir(ROOT)
    checked = 0
    for block in blocks:
        env: dict = {}
        for line in block.splitlines():
            code, _, comment = line.partition("  # ")
            exec(code, env)
            claim = re.split(r"[;:]", comment.strip(), maxsplit=1)[0].strip()
            if not claim or "=" in code.split("(")[0] or code.startswith(("import", "from")):
                continue
            try:
                want = eval(claim, {"Fraction": Fraction})
            except Exception:
                continue                               # prose, not a value
            assert eval(code, env) == want, (doc_file, line)
            checked += 1
    assert checked >= 2, doc_file


def test_loads_with_a_folder_resolves_use_statements(tmp_path):
    # the A_2 singularity 1/3(1,2) has class group Z/3 (Fulton §3.4, from memory)
    (tmp_path / "conelang.toml").write_text("")
    (tmp_path / "shared.cone").write_text("lattice N = Z^2\ncone a2 in N { rays (0,1) (3,-2) }\n")
    doc = conelang.loads('use "shared.cone" (N, a2)\nexpect a2 class_group = "Z/3"\n'
                         'cone c in N { rays (1,0) (0,1) }\n', folder=tmp_path)
    assert doc.diagnostics == [] and doc.names == ["c"]
    assert [d.code for d in conelang.loads('use "shared.cone"\n').diagnostics] == ["import-not-found"]
    with pytest.raises(conelang.ConelangError):
        conelang.loads("lattice N = Z^2\n", folder=tmp_path / "missing")
