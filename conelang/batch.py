"""Batch checking of many files: locally in parallel, or on a dask.distributed cluster.

Each file is checked on its own (:func:`check_path`), so the verdicts do not depend on how the
work is spread; results come back in the order of the input, so the output is deterministic.
A process (each worker, with ``jobs`` or a scheduler) keeps one analysis host, so a file that
other files ``use`` is analysed, and its definitions computed, once per process; the
diagnostics of a file are reported for that file only.

>>> import tempfile, pathlib
>>> d = pathlib.Path(tempfile.mkdtemp()); (d / "a.cone").write_text("lattice N = Z^2\\n")
16
>>> [r["status"] for r in run([str(d / "a.cone")], jobs=1)]
['ok']
"""
from __future__ import annotations

import os
import sys
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path


_HOST: list = [None, None]           # (settings and run, host) of this process


def process_host(budget_limit=None, allow_outside_root: bool = False, run_id: str = ""):
    """The analysis host of this process for one run of :func:`run` (files that other files use
    stay analysed in it, see :meth:`conelang.ide.host.AnalysisHost.release`; a new run, say on a
    long-lived cluster worker, starts afresh, so it sees the files as they are now)."""
    key = (budget_limit, allow_outside_root, run_id)
    if _HOST[0] != key or _HOST[1] is None:
        from .ide import AnalysisHost
        from .project import FileLoader
        _HOST[:] = [key, AnalysisHost(budget_limit, loader=FileLoader(allow_outside_root))]
    return _HOST[1]


def check_path(path: str, budget_limit=None, allow_outside_root: bool = False, run_id: str | None = None) -> dict:
    """Check one file; never raises.  Returns a plain dict (picklable, JSON-ready)."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except UnicodeDecodeError as exc:
        return {"path": path, "status": "unreadable", "message": f"not UTF-8 text ({exc.reason} at byte {exc.start})",
                "lines": [], "errors": 0, "warnings": 0}
    except OSError as exc:
        return {"path": path, "status": "unreadable", "message": f"cannot read ({exc.strerror})",
                "lines": [], "errors": 0, "warnings": 0}
    t0 = time.perf_counter()
    if run_id is None:                    # one file on its own: a fresh look at the disk
        import uuid
        run_id = uuid.uuid4().hex
    host = process_host(budget_limit, allow_outside_root, run_id)
    host.apply_change(path, text)
    try:
        lines, errors, warnings = [], 0, 0
        for severity, line in host.diagnostic_lines(path):
            lines.append(line)
            errors += severity == "error"
            warnings += severity == "warning"
    finally:
        host.release(path)
    return {"path": path, "status": "failed" if errors else "ok", "message": "", "lines": lines,
            "errors": errors, "warnings": warnings, "seconds": round(time.perf_counter() - t0, 4)}


def _check_many(paths: list[str], budget_limit, allow_outside_root: bool = False, run_id: str = "") -> list[dict]:
    return [check_path(p, budget_limit, allow_outside_root, run_id) for p in paths]


def _chunks(items: list, size: int) -> list[list]:
    return [items[i:i + size] for i in range(0, len(items), size)]


def run(paths: list[str], jobs: int = 1, budget_limit=None, progress=None, scheduler: str | None = None,
        client=None, allow_outside_root: bool = False) -> list[dict]:
    """Check ``paths``; ``jobs`` local processes, or a dask.distributed ``scheduler`` address
    (or an existing ``client``).  ``progress(done, total)`` is called as results arrive.
    ``allow_outside_root``: ``use`` statements may name files outside the project root."""
    import uuid
    total = len(paths)
    run_id = uuid.uuid4().hex
    if scheduler is not None or client is not None:
        return _run_dask(paths, budget_limit, progress, scheduler, client, allow_outside_root, run_id)
    if jobs <= 1 or total <= 1:
        out = []
        for i, p in enumerate(paths, 1):
            out.append(check_path(p, budget_limit, allow_outside_root, run_id))
            if progress:
                progress(i, total)
        return out
    # warm up before the workers fork, so they inherit the imports and the built parser
    from .ide import warm_up
    warm_up()
    # several files per task keeps the per-task overhead small; results stay in input order
    size = max(1, min(32, total // (jobs * 4) or 1))
    chunks = _chunks(paths, size)
    out: list[dict] = []
    with ProcessPoolExecutor(max_workers=jobs) as pool:
        for res in pool.map(_check_many, chunks, [budget_limit] * len(chunks),
                            [allow_outside_root] * len(chunks), [run_id] * len(chunks)):
            out.extend(res)
            if progress:
                progress(len(out), total)
    return out


def _run_dask(paths, budget_limit, progress, scheduler, client, allow_outside_root=False, run_id=""):
    try:
        from dask.distributed import Client, as_completed
    except ImportError:
        raise RuntimeError("distributed checking needs the optional extra: pip install 'conelang[distributed]'") from None
    own = client is None
    if own:
        client = Client(scheduler)
    try:
        chunks = _chunks(paths, 16)
        futures = client.map(_check_many, chunks, budget_limit=budget_limit,
                             allow_outside_root=allow_outside_root, run_id=run_id, pure=False)
        index = {f.key: i for i, f in enumerate(futures)}
        results: list = [None] * len(chunks)
        done = 0
        for fut in as_completed(futures):
            res = fut.result()
            results[index[fut.key]] = res
            done += len(res)
            if progress:
                progress(done, len(paths))
        return [r for chunk in results for r in chunk]
    finally:
        if own:
            client.close()


def summary(results: list[dict]) -> dict:
    return {
        "files": len(results),
        "failed": sum(r["status"] == "failed" for r in results),
        "unreadable": sum(r["status"] == "unreadable" for r in results),
        "errors": sum(r["errors"] for r in results),
        "warnings": sum(r["warnings"] for r in results),
        "results": [{k: r[k] for k in ("path", "status", "errors", "warnings", "message")} for r in results],
    }


def default_jobs() -> int:
    return max(1, len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else (os.cpu_count() or 1))


class Progress:
    """Progress on stderr for long runs: one line, rewritten in place on a terminal."""

    def __init__(self, stream=None, min_files: int = 20):
        self.stream = stream or sys.stderr
        self.min_files = min_files
        self.tty = getattr(self.stream, "isatty", lambda: False)()
        self.last = 0.0

    def __call__(self, done: int, total: int) -> None:
        if total < self.min_files:
            return
        now = time.monotonic()
        if done < total and now - self.last < 0.5:
            return
        self.last = now
        end = "\r" if self.tty and done < total else "\n"
        if not self.tty and done < total and done % max(1, total // 10):
            return
        print(f"checked {done}/{total} files", end=end, file=self.stream, flush=True)
