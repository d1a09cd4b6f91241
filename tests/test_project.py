"""Files that use other files: resolution, diagnostics, sharing, the command line and batch.

The mathematics carried across files is checked against outside knowledge: the A_n surface
singularity 1/(n+1)(1,n) has class group Z/(n+1) and is a hypersurface (Fulton, Introduction
to Toric Varieties, §2.2 and §3.4, from memory); 1/7(1,2,4) is Gorenstein with three junior
elements (Reid, Young person's guide to canonical singularities, from memory).
"""
from __future__ import annotations

import json
from pathlib import Path

import pytest

from conelang import batch
from conelang.cli import main
from conelang.ide import AnalysisHost
from conelang.project import FileLoader, uri_to_path
from conelang.semantics import analysis as sem_analysis

SHARED = """lattice N = Z^2
cone a2 in N { rays (0,1) (3,-2) }     # A_2 = 1/3(1,2)
cone a4 in N { rays (0,1) (5,-4) }     # A_4 = 1/5(1,4)
cone _scratch in N { rays (1,0) }
map twice : N -> N { images (2,0) (0,2) }
"""


def project(tmp_path: Path, files: dict[str, str], marker: bool = True) -> Path:
    tmp_path.mkdir(parents=True, exist_ok=True)
    if marker:
        (tmp_path / "conelang.toml").write_text("")
    for name, text in files.items():
        p = tmp_path / name
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(text)
    return tmp_path


def diagnostics(path: Path, loader=None, host=None):
    host = host or AnalysisHost(loader=loader or FileLoader())
    a = host.analysis(str(path))
    return [(d.code, a.index.position(d.span[0])[0] + 1, d.message) for d in host.diagnostics(str(path))]


def codes(path: Path, **kw):
    return [c for c, _, _ in diagnostics(path, **kw)]


# ---- resolution -------------------------------------------------------------------------
def test_every_public_name_and_the_values_are_those_of_the_other_file(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED, "tables/t.cone": (
        'use "../shared.cone"\n'
        'expect a2 class_group = "Z/3"\n'       # Fulton §3.4 (from memory): Cl(A_n) = Z/(n+1)
        'expect a4 class_group = "Z/5"\n'
        'expect a4 equations = 1\n'             # A_n is the hypersurface xy = z^(n+1)
        'cone here in N { rays (1,0) (0,1) }\n'
        'expect here smooth\n')})
    host = AnalysisHost(loader=FileLoader())
    uri = str(root / "tables" / "t.cone")
    assert diagnostics(root / "tables" / "t.cone", host=host) == []
    a = host.analysis(uri)
    assert {n: a.kind_of(n) for n in ("N", "a2", "a4", "twice")} == \
        {"N": "lattice", "a2": "cone", "a4": "cone", "twice": "map"}
    assert "_scratch" not in a.defs                       # private
    other = host.analysis(str(root / "shared.cone"))
    assert a.value("a4") is other.value("a4")             # one value, computed in its own file
    doc = host.document(uri)
    assert list(doc["objects"]) == ["here"]               # show lists the file's own objects


def test_a_list_with_aliases_and_the_names_it_refuses(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED, "lib2.cone": 'use "shared.cone" (N)\ncone q in N { rays (1,0) (0,1) }\n',
                              "t.cone": 'use "shared.cone" (N, a2 as wedge, _scratch, a5)\n'
                                        'use "lib2.cone" (N, q)\n'
                                        'expect wedge class_group = "Z/3"\n'
                                        'cone c in N { rays (1,0) }\n'})
    got = diagnostics(root / "t.cone")
    assert [(c, line) for c, line, _ in got] == [("import-unknown-name", 1), ("import-unknown-name", 1),
                                                 ("import-unknown-name", 2)]
    assert "private to shared.cone" in got[0][2]
    assert "'a5' is not defined in shared.cone; did you mean 'a2'?" in got[1][2] \
        or "'a5' is not defined in shared.cone" in got[1][2]
    assert "used there from shared.cone" in got[2][2]    # lib2 does not pass N on


def test_clashes(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED, "other.cone": "lattice N = Z^3\n",
                              "local.cone": 'use "shared.cone"\nlattice N = Z^2\n',
                              "two.cone": 'use "shared.cone" (N)\nuse "other.cone" (N)\n',
                              "same.cone": 'use "shared.cone" (N)\nuse "shared.cone"\nexpect a2 pointed\n',
                              "renamed.cone": 'use "shared.cone" (N)\nuse "other.cone" (N as N3)\n'
                                              'cone c in N3 { rays (1,0,0) }\n'})
    assert codes(root / "local.cone") == ["import-clash"]
    assert codes(root / "two.cone") == ["import-clash"]
    assert codes(root / "same.cone") == []               # the same definition twice is fine
    assert codes(root / "renamed.cone") == []


def test_cycles_of_files_are_reported_the_same_from_every_entry(tmp_path):
    root = project(tmp_path, {"a.cone": 'use "b.cone"\nlattice A = Z^1\n',
                              "b.cone": 'use "sub/c.cone"\nlattice B = Z^1\n',
                              "sub/c.cone": 'use "../a.cone"\nlattice C = Z^1\n',
                              "d.cone": 'use "a.cone" (A)\ncone x in A { rays (1) }\n'})
    for first in ("a.cone", "sub/c.cone"):
        host = AnalysisHost(loader=FileLoader())
        got = {}
        for name in (first, "a.cone", "b.cone", "sub/c.cone"):
            got[name] = diagnostics(root / name, host=host)
        assert got["a.cone"] == [("import-cycle", 1, "files that use each other: a.cone → b.cone → c.cone → a.cone")]
        assert got["b.cone"][0][:2] == ("import-cycle", 1)
        assert got["sub/c.cone"][0][2] == "files that use each other: c.cone → a.cone → b.cone → c.cone"
    # a file outside the cycle that uses a member gets its names (the cycle is the members' error)
    assert codes(root / "d.cone") == []


def test_missing_folder_binary_and_unsaved(tmp_path):
    root = project(tmp_path, {"t.cone": 'use "nope.cone"\nuse "dir"\nuse "bin.cone"\nuse ""\n'
                                        'cone c in N { rays (1,0) }\n'})
    (root / "dir").mkdir()
    (root / "bin.cone").write_bytes(b"\xff\xfe\x00lattice")
    got = diagnostics(root / "t.cone")
    assert [(c, line) for c, line, _ in got] == [("import-not-found", i) for i in (1, 2, 3, 4)]
    assert "no such file" in got[0][2] and "folder" in got[1][2] and "UTF-8" in got[2][2]
    # a failed `use` of every name hides the unknown names it would have brought (one mistake)
    host = AnalysisHost(loader=FileLoader())
    host.apply_change("untitled:1", 'use "x.cone"\n')
    assert [d.code for d in host.diagnostics("untitled:1")] == ["import-not-found"]
    assert "not saved" in host.diagnostics("untitled:1")[0].message


def test_the_project_root(tmp_path):
    (tmp_path / "outside.cone").write_text("lattice O = Z^1\n")
    root = project(tmp_path / "proj", {"t.cone": 'use "../outside.cone"\ncone c in O { rays (1) }\n'})
    assert codes(root / "t.cone") == ["import-outside-root"]
    assert codes(root / "t.cone", loader=FileLoader(allow_outside_root=True)) == []
    # a .git folder marks the root too; without any marker the root is the file's own folder
    git = tmp_path / "g"
    project(git, {"sub/t.cone": 'use "../lib.cone"\n', "lib.cone": "lattice L = Z^1\n"}, marker=False)
    assert codes(git / "sub" / "t.cone") == ["import-outside-root"]
    (git / ".git").mkdir()
    assert codes(git / "sub" / "t.cone") == []
    # symbolic links are followed before the check
    link = root / "link.cone"
    try:
        link.symlink_to(tmp_path / "outside.cone")
    except OSError:
        pytest.skip("no symbolic links here")
    (root / "u.cone").write_text('use "link.cone"\n')
    assert codes(root / "u.cone") == ["import-outside-root"]


def test_nothing_but_the_named_files_is_read(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED, "unrelated.cone": "lattice X = Z^1\n",
                              "t.cone": 'use "shared.cone" (a2)\nexpect a2 pointed\n'})

    class Recording(FileLoader):
        def __init__(self):
            super().__init__()
            self.read_paths = []

        def read(self, uri):
            self.read_paths.append(Path(uri_to_path(uri)).name)
            return super().read(uri)

    loader = Recording()
    assert codes(root / "t.cone", loader=loader) == []
    assert sorted(set(loader.read_paths)) == ["shared.cone", "t.cone"]


# ---- editing: the analysis of a file that uses another follows its text ------------------
def test_an_edit_of_the_shared_file_reaches_the_files_that_use_it(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED, "t.cone": 'use "shared.cone" (N, a2)\nexpect a2 class_group = "Z/3"\n'})
    host = AnalysisHost(loader=FileLoader())
    t, shared = str(root / "t.cone"), str(root / "shared.cone")
    assert diagnostics(root / "t.cone", host=host) == []
    host.apply_change(shared, SHARED.replace("(3,-2)", "(4,-3)"))          # the editor's text wins
    assert [c for c, _, _ in diagnostics(root / "t.cone", host=host)] == ["expect-failed"]
    host.apply_change(shared, SHARED.replace("cone a2", "cone b2"))
    assert [c for c, _, _ in diagnostics(root / "t.cone", host=host)] == ["import-unknown-name"]
    host.remove(shared)                                                      # closed: the disk again
    assert diagnostics(root / "t.cone", host=host) == []
    (root / "shared.cone").write_text("lattice N = Z^2\n")
    assert diagnostics(root / "t.cone", host=host) == []                     # not told yet: cached
    host.invalidate(shared)
    assert [c for c, _, _ in diagnostics(root / "t.cone", host=host)] == ["import-unknown-name"]
    assert host.dependents(shared) == [t]


def test_definition_references_and_rename_across_files(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED,
                              "a.cone": 'use "shared.cone" (N, a2)\nexpect a2 pointed\n',
                              "b.cone": 'use "shared.cone" (a2 as w)\nexpect w pointed\n',
                              "c.cone": 'use "shared.cone"\nexpect a2 simplicial\n'})
    host = AnalysisHost(loader=FileLoader())
    a, b, c, s = (str(root / n) for n in ("a.cone", "b.cone", "c.cone", "shared.cone"))
    ta = (root / "a.cone").read_text()
    ts = (root / "shared.cone").read_text()
    where = ts.index("a2")
    assert host.definition_location(a, ta.index("a2 pointed")) == (s, (where, where + 2))
    refs = host.references_everywhere(s, where, candidates=[a, b, c])
    assert {u for u, _ in refs} == {s, a, b, c}
    edits = host.rename_everywhere(a, ta.index("a2 pointed"), "a_two", candidates=[b, c])
    assert set(edits) == {s, a, b, c}
    # b keeps its alias: only the listed name changes
    tb = (root / "b.cone").read_text()
    assert [(tb[e.span[0]:e.span[1]], e.new_text) for e in edits[b]] == [("a2", "a_two")]
    for uri, es in edits.items():
        text = host.text(uri) or Path(uri).read_text()
        for e in sorted(es, key=lambda e: e.span, reverse=True):
            text = text[:e.span[0]] + e.new_text + text[e.span[1]:]
        Path(uri).write_text(text)
    fresh = AnalysisHost(loader=FileLoader())
    for uri in (a, b, c, s):
        assert [d.code for d in fresh.diagnostics(uri)] == [], uri
    # an alias is renamed in its own file only
    tb = (root / "b.cone").read_text()
    assert set(fresh.rename_everywhere(b, tb.index("w pointed"), "w2", candidates=[a, c])) == {b}


# ---- command line and batch ---------------------------------------------------------------
def test_check_reports_a_shared_files_errors_once(tmp_path, capsys):
    root = project(tmp_path, {"shared.cone": SHARED + "cone bad in N { rays (1,0,0) }\n",
                              "t1.cone": 'use "shared.cone" (N, bad)\n',
                              "t2.cone": 'use "shared.cone" (N, a2)\nexpect a2 pointed\n'})
    assert main(["check", "--jobs", "1", str(root)]) == 1
    out = capsys.readouterr().out.splitlines()
    assert sum("vector-length" in line for line in out) == 1
    assert all(line.startswith(str(root / "shared.cone")) for line in out if "vector-length" in line)
    assert [line.rsplit("[", 1)[1] for line in out if line.startswith(str(root / "t1.cone"))] == ["import-has-errors]"]
    assert not any(line.startswith(str(root / "t2.cone")) for line in out)


def test_batch_analyses_a_shared_file_once_per_process(tmp_path, monkeypatch):
    users = {f"t{i}.cone": f'use "shared.cone" (a4)\nexpect a4 class_group = "Z/5"\n' for i in range(6)}
    root = project(tmp_path, {"shared.cone": SHARED, **users})
    built = []
    real = sem_analysis.Analysis.__init__

    def counting(self, text, *args, **kw):
        built.append(text)
        real(self, text, *args, **kw)

    monkeypatch.setattr(sem_analysis.Analysis, "__init__", counting)
    paths = [str(root / n) for n in sorted(users)] + [str(root / "shared.cone")]
    results = batch.run(paths, jobs=1)
    assert [r["status"] for r in results] == ["ok"] * 7
    assert built.count(SHARED) == 1
    assert len(built) == 7
    # a second run reads the disk afresh (a long-lived worker must see edits)
    (root / "shared.cone").write_text(SHARED.replace("(5,-4)", "(6,-5)"))
    results = batch.run(paths, jobs=1)
    assert [r["status"] for r in results][:6] == ["failed"] * 6


def test_check_in_parallel_and_show(tmp_path, capsys):
    root = project(tmp_path, {"shared.cone": SHARED,
                              **{f"t{i}.cone": 'use "shared.cone" (a2 as w)\nexpect w class_group = "Z/3"\n'
                                 for i in range(4)}})
    assert main(["check", "--jobs", "2", str(root)]) == 0
    capsys.readouterr()
    assert main(["show", "--format", "json", str(root / "t0.cone")]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["objects"] == {} and doc["diagnostics"] == []
    assert main(["show", str(root / "t0.cone"), "w"]) == 2
    assert "defined in shared.cone" in capsys.readouterr().err


def test_allow_outside_root_on_the_command_line(tmp_path, capsys):
    (tmp_path / "lib.cone").write_text("lattice L = Z^1\n")
    root = project(tmp_path / "p", {"t.cone": 'use "../lib.cone"\ncone c in L { rays (1) }\n'})
    assert main(["check", str(root / "t.cone")]) == 1
    assert "import-outside-root" in capsys.readouterr().out
    assert main(["check", "--allow-outside-root", str(root / "t.cone")]) == 0
    assert main(["show", "--allow-outside-root", str(root / "t.cone")]) == 0


def test_the_example_project_checks_and_its_numbers_are_the_known_ones(capsys):
    # Cl(A_n) = Z/(n+1) (Fulton §3.4, from memory); 1/7(1,2,4) has three junior elements (Reid,
    # from memory): the example states these with expect lines, so exit 0 means they hold
    example = Path(__file__).resolve().parent.parent / "examples" / "project"
    assert main(["check", "--jobs", "1", str(example)]) == 0
    assert capsys.readouterr().out == ""
    host = AnalysisHost(loader=FileLoader())
    t = str(example / "tables" / "threefolds.cone")
    assert host.analysis(t).kind_of("k7") == "cone"
    assert [d.code for d in host.diagnostics(t)] == []


def test_devices_pipes_and_huge_files_are_refused_without_reading_them(tmp_path, monkeypatch):
    import os

    from conelang import project as loader_module
    root = project(tmp_path, {"t.cone": 'use "/dev/zero"\nuse "fifo.cone"\nuse "big.cone"\n'})
    os.mkfifo(root / "fifo.cone")                  # reading it would block forever
    (root / "big.cone").write_text("lattice N = Z^1\n" * 10)
    monkeypatch.setattr(loader_module, "MAX_BYTES", 100)
    got = diagnostics(root / "t.cone", loader=FileLoader(allow_outside_root=True))
    assert [(c, line) for c, line, _ in got] == [("import-not-found", 1), ("import-not-found", 2),
                                                 ("import-not-found", 3)]
    assert "not a regular file" in got[0][2] and "not a regular file" in got[1][2]
    assert "larger than" in got[2][2]


def test_hover_on_a_use_path_lists_what_it_brings(tmp_path):
    root = project(tmp_path, {"shared.cone": SHARED, "t.cone": 'use "shared.cone" (N, a2 as wedge)\nuse "nope.cone"\n'})
    host = AnalysisHost(loader=FileLoader())
    uri = str(root / "t.cone")
    text = (root / "t.cone").read_text()
    md, span = host.hover(uri, text.index("shared"))
    assert md == "`shared.cone` brings 2 names: `N` (lattice), `wedge` (cone, `a2` there)"
    assert text[span[0]:span[1]] == '"shared.cone"'
    assert host.hover(uri, text.index("nope")) is None          # the diagnostic says what is wrong
