"""The ``conelang`` command line: a thin adapter over :class:`conelang.ide.host.AnalysisHost`.

Exit codes: 0 no error and every expectation holds; 1 otherwise; 2 usage error or an
unreadable file.
"""
from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

from .geometry import budget as gbudget
from .ide import AnalysisHost, diagnostic_line

FORMATS = ("text", "markdown", "json", "latex", "svg")


class UsageError(Exception):
    pass


def _cone_files(paths: list[str]) -> list[Path]:
    files: list[Path] = []
    for p in paths:
        path = Path(p)
        if path.is_dir():
            files.extend(sorted(q for q in path.rglob("*.cone") if q.is_file()))
        elif path.exists():
            files.append(path)
        else:
            raise UsageError(f"{p}: no such file or folder")
    return files


def _read(path: Path) -> str:
    try:
        return path.read_text(encoding="utf-8")
    except UnicodeDecodeError as exc:
        raise UsageError(f"{path}: not UTF-8 text ({exc.reason} at byte {exc.start})") from None
    except OSError as exc:
        raise UsageError(f"{path}: cannot read ({exc.strerror})") from None


def _budget(value: str) -> int | None:
    if value in ("none", "unlimited"):
        return None
    try:
        n = int(value)
    except ValueError:
        raise argparse.ArgumentTypeError("a whole number of work steps, or 'none'") from None
    if n <= 0:
        raise argparse.ArgumentTypeError("must be positive")
    return n


def cmd_check(args) -> int:
    from . import batch
    files = _cone_files(args.paths)
    if not files:
        raise UsageError("no .cone files found in " + " ".join(args.paths))
    progress = batch.Progress() if (args.progress or len(files) >= 200) else None
    try:
        results = batch.run([str(f) for f in files], jobs=args.jobs or batch.default_jobs(),
                            budget_limit=args.budget, progress=progress, scheduler=args.scheduler,
                            allow_outside_root=args.allow_outside_root)
    except RuntimeError as exc:
        raise UsageError(str(exc)) from None
    for r in results:
        for line in r["lines"]:
            print(line)
        if r["status"] == "unreadable":
            print(f"conelang: {r['path']}: {r['message']}", file=sys.stderr)
    summ = batch.summary(results)
    if len(files) > 1 or args.summary:
        n, e, w = summ["files"], summ["errors"], summ["warnings"]
        print(f"checked {n} file{'s' * (n != 1)}: {summ['failed']} with errors, "
              f"{e} error{'s' * (e != 1)}, {w} warning{'s' * (w != 1)}"
              + (f", {summ['unreadable']} unreadable" if summ["unreadable"] else ""), file=sys.stderr)
    if args.json_summary:
        import json
        text = json.dumps(summ, indent=2)
        if args.json_summary == "-":
            print(text)
        else:
            _write_atomic(Path(args.json_summary), text + "\n")
    if summ["unreadable"]:
        return 2
    return 1 if summ["failed"] else 0


def _write_atomic(path: Path, text: str) -> None:
    """Write via a temporary file in the same folder and an atomic rename: a crash mid-write
    leaves the old file whole."""
    import tempfile
    fd, tmp = tempfile.mkstemp(dir=str(path.parent or "."), prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        try:                                   # keep the permissions of the file it replaces
            os.chmod(tmp, path.stat().st_mode & 0o7777)
        except OSError:
            pass
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


class _Progress:
    """What ``show`` is computing, on one rewritten line of stderr (only when it is a
    terminal): the definition, the computation and, for long ones, seconds and work steps."""

    def __init__(self, interval: float = 0.5):
        import threading
        self.name, self.what, self.budget, self.since = "", "", None, time.monotonic()
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._run, args=(interval,), daemon=True)
        self._thread.start()

    def __call__(self, what: str, budget) -> None:
        if budget is None:
            self.name, self.what = what, ""
        else:
            self.what, self.budget = what, budget
        self.since = time.monotonic()

    def _line(self) -> str:
        took = time.monotonic() - self.since
        used = getattr(self.budget, "used", 0) if self.what else 0
        line = f"conelang: {self.name}: {self.what or 'facts'}"
        if took >= 1:
            line += f" … {took:.0f} s, {used:,} steps"
        return line[:120]

    def _run(self, interval: float) -> None:
        shown = False
        while not self._stop.wait(interval):
            if time.monotonic() - self.since >= interval or shown:
                sys.stderr.write("\r\033[K" + self._line())
                sys.stderr.flush()
                shown = True
        if shown:
            sys.stderr.write("\r\033[K")
            sys.stderr.flush()

    def close(self) -> None:
        self._stop.set()
        self._thread.join()


def cmd_show(args) -> int:
    path = Path(args.path)
    if not path.is_file():
        raise UsageError(f"{args.path}: no such file")
    progress = _Progress() if sys.stderr.isatty() else None
    from .project import FileLoader
    host = AnalysisHost(args.budget, progress=progress, loader=FileLoader(args.allow_outside_root))
    uri = str(path)
    host.apply_change(uri, _read(path))
    names = host.defined_names(uri)
    unknown = [n for n in args.names if n not in names]
    if unknown:
        raise UsageError(f"{path}: no definition named {', '.join(unknown)}")
    elsewhere = [f"'{n}' is defined in {names[n]}" for n in args.names if names[n] is not None]
    if elsewhere:
        raise UsageError(f"{path}: {'; '.join(elsewhere)}: show that file")
    try:
        doc = host.document(uri, label=str(path), names=args.names or None)
    finally:
        if progress is not None:
            progress.close()
    fmt = args.format
    if fmt == "json":
        from .render import json as r
    elif fmt == "markdown":
        from .render import markdown as r
    elif fmt == "latex":
        from .render import latex as r
    elif fmt == "svg":
        from .render import svg as r
    else:
        from .render import text as r
    if fmt in ("text", "markdown"):
        sources = sorted({src for src in names.values() if src is not None})
        if not doc["objects"] and sources:
            print(f"conelang: {path} defines nothing of its own; its names come from "
                  f"{', '.join(sources)} (show that file for their facts)", file=sys.stderr)
        for d in doc["diagnostics"]:
            print(diagnostic_line(str(path), d), file=sys.stderr)
    out = (r.render(doc, whole_document=True) if fmt == "latex" and args.whole_document
           else r.render(doc))
    sys.stdout.write(out if out.endswith("\n") else out + "\n")
    return 1 if any(d["severity"] == "error" for d in doc["diagnostics"]) else 0


def cmd_format(args) -> int:
    """Rewrite files in the canonical layout (``--check``: only say which would change).

    A file with a syntax error is reported and left alone.  Files are replaced atomically
    (written to a temporary file in the same folder, then renamed over the original).
    """
    from .syntax.format import format_text
    from .syntax.parser import parse
    files = _cone_files(args.paths)
    if not files:
        raise UsageError("no .cone files found in " + " ".join(args.paths))
    changed = broken = 0
    unreadable = False
    for path in files:
        try:
            text = _read(path)
        except UsageError as exc:
            print(f"conelang: {exc}", file=sys.stderr)
            unreadable = True
            continue
        new = format_text(text)
        if new == text:
            if parse(text).errors:
                broken += 1
                print(f"{path}: not formatted: it has syntax errors (run 'conelang check {path}')", file=sys.stderr)
            continue
        changed += 1
        if args.check:
            print(f"{path}: would be reformatted")
            continue
        try:
            _write_atomic(path, new)
        except OSError as exc:
            print(f"conelang: {path}: cannot write ({exc.strerror})", file=sys.stderr)
            unreadable = True
            continue
        print(f"{path}: reformatted")
    if unreadable:
        return 2
    return 1 if (args.check and changed) or broken else 0


def cmd_serve(args) -> int:
    from .server import main as serve_main
    serve_main()
    return 0


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="conelang", description="Check and compute lattice cones, maps and fans.")
    p.add_argument("--version", action="version", version="conelang " + __import__("conelang").__version__)
    sub = p.add_subparsers(dest="command", required=True)
    budget_help = f"work budget per heavy computation (default {gbudget.DEFAULT_LIMIT}, or 'none')"
    outside_help = ("let use statements name files outside the project root (the folder with .git "
                    "or conelang.toml)")

    c = sub.add_parser("check", help="check files or folders of .cone files")
    c.add_argument("paths", nargs="+", metavar="PATH")
    c.add_argument("--budget", type=_budget, default=gbudget.DEFAULT_LIMIT, help=budget_help)
    c.add_argument("--summary", action="store_true", help="print a summary line even for one file")
    c.add_argument("--jobs", "-j", type=int, default=0, metavar="N",
                   help="check files in N parallel processes (default: one per core)")
    c.add_argument("--progress", action="store_true", help="show progress on stderr (automatic from 200 files)")
    c.add_argument("--json-summary", metavar="FILE", help="write a JSON summary for CI to FILE ('-' for stdout)")
    c.add_argument("--scheduler", metavar="ADDRESS",
                   help="hand the files to a dask.distributed scheduler (needs conelang[distributed])")
    c.add_argument("--allow-outside-root", action="store_true", help=outside_help)
    c.set_defaults(run=cmd_check)

    s = sub.add_parser("show", help="print the computed facts of a file's objects")
    s.add_argument("path", metavar="PATH")
    s.add_argument("names", nargs="*", metavar="NAME")
    s.add_argument("--format", choices=FORMATS, default="text")
    s.add_argument("--whole-document", action="store_true",
                   help="with --format latex: a complete document instead of a fragment to \\input")
    s.add_argument("--budget", type=_budget, default=gbudget.DEFAULT_LIMIT, help=budget_help)
    s.add_argument("--allow-outside-root", action="store_true", help=outside_help)
    s.set_defaults(run=cmd_show)

    f = sub.add_parser("format", help="rewrite .cone files in the canonical layout")
    f.add_argument("paths", nargs="+", metavar="PATH")
    f.add_argument("--check", action="store_true",
                   help="change nothing; exit 1 when a file would be reformatted")
    f.set_defaults(run=cmd_format)

    v = sub.add_parser("serve", help="run the language server on stdio")
    v.set_defaults(run=cmd_serve)
    return p


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:
        return int(exc.code or 0) if exc.code in (0, None) else 2
    try:
        return args.run(args)
    except UsageError as exc:
        print(f"conelang: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        return 130
    except RecursionError:
        print("conelang: input nested too deeply", file=sys.stderr)
        return 2
    except BrokenPipeError:   # the reader stopped early (`| head`): not an error
        try:
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())      # so the final flush at exit is silent
        except (OSError, ValueError):
            pass
        return 0
    except Exception as exc:  # the last line of defence: a message, never a traceback
        print(f"conelang: internal error: {type(exc).__name__}: {exc}", file=sys.stderr)
        return 2


if __name__ == "__main__":
    sys.exit(main())
