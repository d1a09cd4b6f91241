"""The golden cases: today's answers of the command line and of the editor layer, byte for byte.

For every ``.cone`` file in ``examples/`` and ``tests/corpus/`` there is one expected file per
question, in ``tests/golden/<group>/<file stem>/<case>.out``:

* ``check`` — ``conelang check FILE``: exit code, stdout, stderr;
* ``show-<format>`` — ``conelang show FILE --format <format>`` for every format;
* ``lsp-…`` — what :class:`conelang.ide.host.AnalysisHost` answers without a server: diagnostics,
  hovers (every definition name, vectors, properties), go-to-definition and references,
  completions at a few offsets, semantic tokens, formatting, code actions, inlay hints, folding,
  outline and the "pin results" edits.

Regenerate after a deliberate change with ``python tests/golden/regenerate.py [SUBSTRING...]``
(or ``pytest tests/golden --update-golden``), then read the diff before committing it.
"""
from __future__ import annotations

import contextlib
import io
import os
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent.parent
GOLDEN = Path(__file__).resolve().parent
GROUPS = {"examples": ROOT / "examples", "corpus": ROOT / "tests" / "corpus"}
FORMATS = ("text", "markdown", "json", "latex", "svg")
LSP_CASES = ("diagnostics", "hover", "definition", "completion", "tokens", "format", "actions",
             "misc")
# Work budget of each heavy computation in the golden runs: enough for every shipped file, small
# enough that a file that grows heavy stops quickly (with a `budget` diagnostic) instead of
# slowing the suite down.
BUDGET = 2_000_000
REGENERATE = "python tests/golden/regenerate.py"


def inputs() -> list[tuple[str, Path]]:
    """(group, path) of every input file, sorted."""
    out = []
    for group, folder in GROUPS.items():
        out.extend((group, p) for p in sorted(folder.rglob("*.cone")))
    return out


def case_names() -> list[str]:
    return ["check"] + [f"show-{f}" for f in FORMATS] + [f"lsp-{c}" for c in LSP_CASES]


def expected_path(group: str, path: Path, case: str) -> Path:
    rel = path.relative_to(GROUPS[group]).with_suffix("")
    return GOLDEN / group / rel / f"{case}.out"


def all_cases() -> list[tuple[str, Path, str]]:
    return [(g, p, c) for g, p in inputs() for c in case_names()]


# ---- the command line -------------------------------------------------------------------------
def run_cli(argv: list[str]) -> str:
    """Run ``conelang ARGV`` in this process from the repository root; exit code and output."""
    from conelang.cli import main
    out, err = io.StringIO(), io.StringIO()
    with contextlib.chdir(ROOT), contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return f"$ conelang {' '.join(argv)}\nexit {code}\n--- stdout\n{out.getvalue()}--- stderr\n{err.getvalue()}"


def cli_case(path: Path, case: str) -> str:
    rel = str(path.relative_to(ROOT))
    if case == "check":
        return run_cli(["check", rel, "--budget", str(BUDGET)])
    fmt = case.removeprefix("show-")
    return run_cli(["show", rel, "--format", fmt, "--budget", str(BUDGET)])


# ---- the editor layer -------------------------------------------------------------------------
class Probe:
    """One host with one file open, and positions written as line:column (1-based)."""

    def __init__(self, path: Path):
        from conelang.ide import AnalysisHost
        from conelang.project import FileLoader
        self.uri = str(path)                 # absolute: `use` paths are relative to the file
        self.host = AnalysisHost(BUDGET, loader=FileLoader())
        self.host.apply_change(self.uri, path.read_text(encoding="utf-8"))
        self.a = self.host.analysis(self.uri)
        self.text = self.a.text

    def pos(self, offset: int) -> str:
        line, col = self.a.index.position(offset)
        return f"{line + 1}:{col + 1}"

    def span(self, span) -> str:
        if span is None:
            return "none"
        return f"{self.pos(span[0])}-{self.pos(span[1])}"

    def diag(self, d) -> str:
        return f"{self.span(d.span)} {d.severity} [{d.code}] {d.message}"

    # offsets that the cases probe
    def definition_names(self):
        from conelang.syntax import ast as A
        return [st.name for st in self.a.module.statements if A.is_definition(st)]

    def vectors(self, per_section: int = 3):
        from conelang.syntax import ast as A
        out = []
        for st in self.a.module.statements:
            if isinstance(st, A.ConeDef):
                for sec in st.sections:
                    out.extend(v for v in sec.vectors[:per_section])
            elif isinstance(st, A.FanDef):
                out.extend(st.rays[:per_section])
        return out

    def completion_offsets(self) -> list[tuple[str, int]]:
        from conelang.syntax import ast as A
        found = [("end of file", len(self.text))]
        for st in self.a.module.statements:
            if isinstance(st, A.Expect) and st.prop is not None:
                found.append((f"property of '{self.text[st.span[0]:st.span[1]]}'", st.prop.span[0]))
                break
        for ref in self.a.refs[:2]:
            found.append((f"use of {ref.name.text}", ref.name.span[0]))
        for st in self.a.module.statements[:1]:
            found.append(("start of the first statement", st.span[0]))
        return found


def _hover_lines(p: Probe, where: str, offset: int, heavy: bool = True) -> list[str]:
    got = p.host.hover(p.uri, offset, heavy)
    head = f"== hover at {p.pos(offset)} ({where}){'' if heavy else ' cheap'}"
    if got is None:
        return [head, "none"]
    md, span = got
    return [head, f"span {p.span(span)}", md]


def lsp_diagnostics(p: Probe) -> list[str]:
    out = ["== with expectations"]
    out += [p.diag(d) for d in p.host.diagnostics(p.uri, True)]
    out += ["== without expectations"]
    out += [p.diag(d) for d in p.host.diagnostics(p.uri, False)]
    return out


def lsp_hover(p: Probe) -> list[str]:
    out = []
    for name in p.definition_names():
        out += _hover_lines(p, f"definition of {name.text}", name.span[0])
        out += _hover_lines(p, f"definition of {name.text}", name.span[0], heavy=False)
        out += [f"pending: {p.host.hover_pending(p.uri, name.span[0])}"]
    for v in p.vectors():
        out += _hover_lines(p, "vector", v.span[0])
    for ex in p.a.expects:
        if ex.prop is not None:
            out += _hover_lines(p, "property", ex.prop.span[0])
    out += _hover_lines(p, "start of file", 0)
    return out


def lsp_definition(p: Probe) -> list[str]:
    out = []
    for ref in p.a.refs:
        at = ref.name.span[0]
        out.append(f"definition at {p.pos(at)} ({ref.name.text}) -> {p.span(p.host.definition(p.uri, at))}")
    for name in p.definition_names():
        at = name.span[0]
        spans = p.host.references(p.uri, at)
        out.append(f"references at {p.pos(at)} ({name.text}) -> " + " ".join(p.span(s) for s in spans))
        out.append(f"prepare rename at {p.pos(at)} -> {_prepare(p, at)}")
    return out


def _prepare(p: Probe, at: int) -> str:
    got = p.host.prepare_rename(p.uri, at)
    return "none" if got is None else f"{p.span(got[0])} {got[1]}"


def lsp_completion(p: Probe) -> list[str]:
    out = []
    for where, offset in p.completion_offsets():
        out.append(f"== completion at {p.pos(offset)} ({where})")
        for s in p.host.completions(p.uri, offset):
            out.append(f"{s.label!r} kind={s.kind} detail={s.detail!r} insert={s.insert!r} sort={s.sort}")
    return out


def lsp_tokens(p: Probe) -> list[str]:
    return [f"{p.span((s, e))} {kind} {','.join(mods)} {p.text[s:e]!r}"
            for s, e, kind, mods in p.host.semantic_tokens(p.uri)]


def lsp_format(p: Probe) -> list[str]:
    return [p.host.format(p.uri)]


def _edit(p: Probe, e) -> str:
    return f"  edit {p.span(e.span)} -> {e.new_text!r}"


def lsp_actions(p: Probe) -> list[str]:
    out = []
    spans = [(0, len(p.text))] + [d.span for d in p.host.diagnostics(p.uri)]
    for s, e in spans:
        out.append(f"== actions for {p.span((s, e))}")
        for act in p.host.code_fixes(p.uri, s, e):
            diag = p.diag(act.diagnostic) if act.diagnostic is not None else "none"
            out.append(f"{act.kind} {act.title!r} preferred={act.preferred} diagnostic={diag}")
            out += [_edit(p, ed) for ed in act.edits]
    return out


def lsp_misc(p: Probe) -> list[str]:
    out = ["== inlay hints"]
    out += [f"{p.pos(o)} {label}" for o, label in p.host.inlay_hints(p.uri)]
    out += ["== inlay hints cheap"]
    out += [f"{p.pos(o)} {label}" for o, label in p.host.inlay_hints(p.uri, heavy=False)]
    out += ["== folding ranges"]
    out += [f"{l1 + 1}-{l2 + 1} {kind}" for l1, l2, kind in p.host.folding_ranges(p.uri)]
    out += ["== outline"]
    out += [f"{s.name} {s.kind} {s.detail!r} {p.span(s.span)} {p.span(s.name_span)}"
            for s in p.host.outline(p.uri)]
    out += ["== symbols"]
    out += [f"{n} {k} {p.span(sp)} {p.span(nsp)}" for n, k, sp, nsp in p.host.symbols(p.uri)]
    out += ["== pin results"]
    for name in p.definition_names():
        target = p.host.pin_target(p.uri, name.span[0])
        out.append(f"pin target at {p.pos(name.span[0])} -> {target}")
        if target is not None:
            ed = p.host.pin_results(p.uri, target)
            out.append("none" if ed is None else _edit(p, ed))
    return out


LSP = {"diagnostics": lsp_diagnostics, "hover": lsp_hover, "definition": lsp_definition,
       "completion": lsp_completion, "tokens": lsp_tokens, "format": lsp_format,
       "actions": lsp_actions, "misc": lsp_misc}


def produce(path: Path, case: str, probe: Probe | None = None) -> str:
    """Today's answer for ``case`` on ``path`` (``probe``: a host to reuse for lsp cases)."""
    if not case.startswith("lsp-"):
        return cli_case(path, case)
    p = probe or Probe(path)
    return "\n".join(LSP[case.removeprefix("lsp-")](p)) + "\n"


def regenerate(substrings: list[str] | None = None) -> tuple[int, int, int]:
    """Rewrite the expected files (only cases whose expected path contains one of
    ``substrings``, when given); remove expected files of cases that no longer exist.
    Returns (written, unchanged, removed)."""
    written = unchanged = removed = 0
    wanted = set()
    probes: dict[Path, Probe] = {}
    for group, path, case in all_cases():
        target = expected_path(group, path, case)
        wanted.add(target)
        if substrings and not any(s in str(target.relative_to(GOLDEN)) for s in substrings):
            continue
        probe = None
        if case.startswith("lsp-"):
            probe = probes.get(path) or probes.setdefault(path, Probe(path))
        text = produce(path, case, probe)
        if target.exists() and target.read_text(encoding="utf-8") == text:
            unchanged += 1
            continue
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_text(text, encoding="utf-8")
        written += 1
    if not substrings:
        for old in GOLDEN.rglob("*.out"):
            if old not in wanted:
                old.unlink()
                removed += 1
        for folder in sorted((d for d in GOLDEN.rglob("*") if d.is_dir()), reverse=True):
            if not any(folder.iterdir()):
                folder.rmdir()
    return written, unchanged, removed
