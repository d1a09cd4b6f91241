"""The canonical formatter (conelang/syntax/format.py) and `conelang format`.

What is checked: formatting never changes what a file says (same syntax tree, same comments
in the same order), is idempotent, leaves files with syntax errors alone, and gives the layout
the module docstring specifies (the expected texts below are written by hand from that spec).
The properties are checked with hypothesis on generated files with random spacing, line breaks
and comments between any two tokens.
"""
from __future__ import annotations

import dataclasses
import os
import re

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conelang.syntax.format import WIDTH, format_text, needs_formatting, tokenize
from conelang.syntax.parser import parse

# ---- generated files ---------------------------------------------------------------------------
NAMES = st.sampled_from(["a", "b", "N", "P", "wedge", "x1", "_t", "Zed", "sigma_2"])
INTS = st.integers(0, 40).map(str)


@st.composite
def numbers(draw):
    out = []
    if draw(st.booleans()):
        out.append(draw(st.sampled_from(["-", "+"])))
    out.append(draw(INTS))
    if draw(st.integers(0, 4)) == 0:
        out += ["/", str(draw(st.integers(1, 9)))]
    return out


@st.composite
def vectors(draw, max_len=4):
    n = draw(st.integers(1, max_len))
    out = ["("]
    for i in range(n):
        if i:
            out.append(",")
        out += draw(numbers())
    if draw(st.integers(0, 5)) == 0:
        out.append(",")
    out.append(")")
    return out


@st.composite
def vector_list(draw, max_size=6):
    out = []
    for _ in range(draw(st.integers(0, max_size))):
        out += draw(vectors())
        if draw(st.integers(0, 3)) == 0:
            out.append(",")
    return out


@st.composite
def lattice_refs(draw, depth=0):
    choice = draw(st.integers(0, 3 if depth < 2 else 1))
    if choice == 0:
        return [draw(NAMES)]
    if choice == 1:
        return ["Z", "^", str(draw(st.integers(1, 5)))]
    if choice == 2:
        return ["dual"] + draw(lattice_refs(depth + 1))
    return ["("] + draw(lattice_refs(depth + 1)) + [")"]


@st.composite
def cone_atoms(draw, depth=0):
    choice = draw(st.integers(0, 5 if depth < 3 else 0))
    if choice == 0:
        return [draw(NAMES)]
    if choice == 1:
        return ["dual"] + draw(cone_atoms(depth + 1))
    if choice == 2:
        return ["face"] + draw(cone_atoms(depth + 1)) + ["at"] + draw(vectors())
    if choice == 3:
        return [draw(NAMES), "("] + draw(cone_exprs(depth + 1)) + [")"]
    if choice == 4:
        return [draw(NAMES), "^-1", "("] + draw(cone_exprs(depth + 1)) + [")"]
    return ["("] + draw(cone_exprs(depth + 1)) + [")"]


@st.composite
def cone_exprs(draw, depth=0):
    out = draw(cone_atoms(depth))
    for _ in range(draw(st.integers(0, 2 if depth < 2 else 0))):
        out += ["&"] + draw(cone_atoms(depth + 1))
    return out


@st.composite
def statements(draw):
    kind = draw(st.integers(0, 10))
    name = draw(NAMES)
    if kind == 0:
        out = ["lattice", name, "="]
        if draw(st.booleans()):
            return out + draw(lattice_refs())
        out += ["Z", "^", str(draw(st.integers(1, 4)))]
        for _ in range(draw(st.integers(1, 2))):
            out.append("+")
            if draw(st.booleans()):
                out += [str(draw(st.integers(1, 9))), "/", str(draw(st.integers(1, 9)))]
            out += draw(vectors())
        return out
    if kind in (1, 2):
        out = ["cone", name, "in"] + draw(lattice_refs()) + ["{"]
        for kw in draw(st.lists(st.sampled_from(["rays", "halfspaces", "equations"]), max_size=2)):
            out += [kw] + draw(vector_list())
        return out + ["}"]
    if kind == 3:
        return ["cone", name, "="] + draw(cone_exprs())
    if kind == 4:
        return (["map", name, ":"] + draw(lattice_refs()) + [draw(st.sampled_from(["->", "→"]))]
                + draw(lattice_refs()) + ["{", draw(st.sampled_from(["images", "rows"]))] + draw(vector_list()) + ["}"])
    if kind == 5:
        if draw(st.booleans()):
            return ["morphism", name, "=", draw(NAMES), ":", draw(NAMES), "->", draw(NAMES)]
        out = ["morphism", name, "=", draw(NAMES)]
        for _ in range(draw(st.integers(1, 3))):
            out += [draw(st.sampled_from(["∘", "after"])), draw(NAMES)]
        return out
    if kind == 6:
        return ["characters", name, "of"] + draw(lattice_refs()) + ["{"] + draw(vector_list()) + ["}"]
    if kind == 7:
        if draw(st.booleans()):
            return ["fan", name, "=", "resolve"] + (["crepant"] if draw(st.booleans()) else []) + [draw(NAMES)]
        out = ["fan", name, "in"] + draw(lattice_refs()) + ["{", "rays"] + draw(vector_list()) + ["cones"]
        for _ in range(draw(st.integers(0, 4))):
            out.append("[")
            for i in range(draw(st.integers(0, 4))):
                if i and draw(st.booleans()):
                    out.append(",")
                out.append(str(draw(st.integers(1, 9))))
            out.append("]")
        return out + ["}"]
    if kind == 8:
        return ["expect", name] + (["not"] if draw(st.booleans()) else []) + [draw(NAMES)]
    if kind == 9:
        value = draw(st.one_of(numbers(), vectors(), st.sampled_from([['"Z/4"'], ['"0"'], ['"Z^2 + Z/3"']])))
        return ["expect", name, draw(NAMES), "="] + value
    return ["expect", name, "=="] + draw(cone_exprs())


COMMENT_TEXT = st.text(alphabet="abc xyz(){}#=→𝔸é,", max_size=12)


SEPARATORS = [" ", "  ", "\n", "\t", "\n\n", "", " #{}\n", "#{}\n  ", "\n#{}\n", " #{}\n\n"]


@st.composite
def files(draw):
    """A file of valid statements with random blanks, line breaks and comments between tokens."""
    toks: list[str] = []
    for _ in range(draw(st.integers(0, 6))):
        toks += draw(statements())
    seps = draw(st.lists(st.integers(0, len(SEPARATORS) - 1), min_size=len(toks), max_size=len(toks)))
    texts = draw(st.lists(COMMENT_TEXT, min_size=1, max_size=3))
    out = [draw(st.sampled_from(["", "\n", "# head\n", "  \n"]))]
    for i, t in enumerate(toks):
        if i:
            sep = SEPARATORS[seps[i]]
            if sep == "" and re.search(r"\w$", toks[i - 1]) and re.match(r"\w", t):
                sep = " "                   # two words need a blank between them
            out.append(sep.replace("{}", texts[i % len(texts)]))
        out.append(t)
    out.append(draw(st.sampled_from(["", "\n", "\n\n", "  # tail", "\n# tail\n"])))
    return "".join(out)


def shape(node):
    """A syntax tree without source positions, for comparing two parses."""
    if type(node).__name__ == "IndexList":
        return ("IndexList",) + tuple(i for i, _ in node.indices)
    if dataclasses.is_dataclass(node) and not isinstance(node, type):
        return (type(node).__name__,) + tuple(shape(getattr(node, f.name)) for f in dataclasses.fields(node)
                                              if f.name not in ("span", "statement_span"))
    if isinstance(node, (list, tuple)):
        return tuple(shape(x) for x in node)
    return node


def comments(text: str) -> list[str]:
    return [t.text.rstrip() for t in tokenize(text) if t.type == "COMMENT"]


FAST = settings(max_examples=50, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@FAST
@given(files())
def test_formatting_keeps_meaning_and_comments_and_is_idempotent(text):
    module = parse(text)
    out = format_text(text)
    if module.errors:                         # the generator can make a division by zero etc.
        assert out == text
        return
    assert format_text(out) == out
    again = parse(out)
    assert not again.errors
    assert shape(again.statements) == shape(module.statements)
    assert comments(out) == comments(text)
    if out:
        assert out.endswith("\n") and not out.endswith("\n\n") and not out.startswith("\n")
    for line in out.splitlines():
        assert line == line.rstrip()
    assert "\n\n\n" not in out


@FAST
@given(files(), st.sampled_from(["@", "}", "cone", "(", "lattice = =", "expect"]), st.integers(0, 10_000))
def test_files_with_syntax_errors_are_left_alone(text, junk, where):
    i = where % (len(text) + 1)
    broken = text[:i] + " " + junk + " " + text[i:]
    if parse(broken).errors:
        assert format_text(broken) == broken
        assert not needs_formatting(broken)


def test_layout_of_each_kind_of_statement():
    text = """

# cones of the survey
lattice N=Z^3   # the lattice
lattice Q = Z^2+1/7(1,3)
cone wedge in N{rays(1,0,0),(0,1,0) , (1,1,4)}
cone slab in N { halfspaces (1,0,0)(0,1,0) equations (1,1,-2,) }
cone wv=dual   wedge
cone img = f ( wedge ) & dual(a&b)
cone pre=f^-1(target)
cone top = face wedge at (0,0,- 1)
map f:N->P{images (1,0) (0,1) (1,1)}
morphism phi=f:wedge->target
morphism h = g∘f
characters chi of P{(1,0)(1,1)(1,2)}
fan F in P{rays (1,0) (0,1) (-1,-1) cones [1,2] [2 3][3 1]}
fan R=resolve wedge
fan C = resolve  crepant   wedge



expect wedge class_group="Z/4"
expect wv==dual wedge
expect wedge not   smooth"""
    expected = """# cones of the survey
lattice N = Z^3  # the lattice
lattice Q = Z^2 + 1/7 (1, 3)
cone wedge in N { rays (1, 0, 0) (0, 1, 0) (1, 1, 4) }
cone slab in N { halfspaces (1, 0, 0) (0, 1, 0) equations (1, 1, -2) }
cone wv = dual wedge
cone img = f(wedge) & dual (a & b)
cone pre = f^-1(target)
cone top = face wedge at (0, 0, -1)
map f : N -> P { images (1, 0) (0, 1) (1, 1) }
morphism phi = f : wedge -> target
morphism h = g ∘ f
characters chi of P { (1, 0) (1, 1) (1, 2) }
fan F in P { rays (1, 0) (0, 1) (-1, -1) cones [1 2] [2 3] [3 1] }
fan R = resolve wedge
fan C = resolve crepant wedge

expect wedge class_group = "Z/4"
expect wv == dual wedge
expect wedge not smooth
"""
    assert format_text(text) == expected
    assert format_text(expected) == expected


def test_long_blocks_and_comments_inside_blocks_are_laid_out_one_section_a_line():
    rays = " ".join(f"({i},{i + 1},{i + 2})" for i in range(20))
    text = f"cone big in N {{ rays {rays} }}\ncone c in N {{  # about c\n rays (1,0) # first\n (0,1)\n # end\n}}\n"
    out = format_text(text)
    lines = out.splitlines()
    assert lines[0] == "cone big in N {"
    assert lines[1].startswith("  rays (0, 1, 2) (1, 2, 3)")
    assert all(line.startswith("    (") for line in lines[2:lines.index("}")])
    assert all(len(line) <= WIDTH for line in lines)
    assert lines[lines.index("}") + 1:] == ["cone c in N {  # about c", "  rays (1, 0)  # first",
                                            "    (0, 1)", "  # end", "}"]
    # a short block without comments goes back on one line
    assert format_text("cone c in N {\n  rays (1,0)\n}\n") == "cone c in N { rays (1, 0) }\n"


def test_crlf_files_keep_crlf_and_empty_files_stay_empty():
    assert format_text("lattice N=Z^2\r\nexpect N  pointed\r\n") == "lattice N = Z^2\r\nexpect N pointed\r\n"
    assert format_text("") == ""
    assert format_text("\n\n# only a comment   \n\n") == "# only a comment\n"


class _Run:
    def __init__(self, returncode, stdout, stderr):
        self.returncode, self.stdout, self.stderr = returncode, stdout, stderr


def _cli(*args):
    """``conelang ARGS`` in this process (the entry point is the same ``main``)."""
    import contextlib
    import io
    from conelang.cli import main
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(list(args))
    return _Run(code, out.getvalue(), err.getvalue())


def test_cli_format_check_and_write(tmp_path):
    ugly = tmp_path / "ugly.cone"
    ugly.write_text("lattice N=Z^2\ncone c in N{rays(1,0)}\n")
    fine = tmp_path / "sub" / "fine.cone"
    fine.parent.mkdir()
    fine.write_text("lattice N = Z^2\n")
    broken = tmp_path / "broken.cone"
    broken.write_text("cone c in N { rays (1,0\n")

    r = _cli("format", "--check", str(ugly), str(fine))
    assert r.returncode == 1 and "ugly.cone: would be reformatted" in r.stdout and "fine" not in r.stdout
    assert ugly.read_text() == "lattice N=Z^2\ncone c in N{rays(1,0)}\n"          # --check writes nothing

    mode = 0o640
    os.chmod(ugly, mode)
    r = _cli("format", str(tmp_path / "sub"), str(ugly))
    assert r.returncode == 0, r.stderr
    assert ugly.read_text() == "lattice N = Z^2\ncone c in N { rays (1, 0) }\n"
    assert os.stat(ugly).st_mode & 0o777 == mode                                   # permissions kept
    assert sorted(p.name for p in tmp_path.iterdir()) == ["broken.cone", "sub", "ugly.cone"]   # no temp files
    assert _cli("format", "--check", str(tmp_path / "ugly.cone")).returncode == 0

    r = _cli("format", str(broken))
    assert r.returncode == 1 and "syntax errors" in r.stderr
    assert broken.read_text() == "cone c in N { rays (1,0\n"
    assert _cli("format", str(tmp_path / "missing.cone")).returncode == 2


def test_use_statements_are_laid_out_and_keep_their_meaning():
    text = ('use   "shared/lattices.cone"(N,a2   as wedge ,)  # the shared file\n'
            'use "other.cone"\n\ncone c in N { rays (1,0) }\n')
    out = format_text(text)
    assert out == ('use "shared/lattices.cone" (N, a2 as wedge)  # the shared file\n'
                   'use "other.cone"\n\ncone c in N { rays (1, 0) }\n')
    assert format_text(out) == out
    before, after = parse(text).statements[0], parse(out).statements[0]
    assert (before.path, [(i.name.text, i.alias and i.alias.text) for i in before.items]) == \
        (after.path, [(i.name.text, i.alias and i.alias.text) for i in after.items])
