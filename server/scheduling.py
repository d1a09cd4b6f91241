"""When the language server checks a file, and what it shows meanwhile.

The event loop never evaluates a definition: every answer that needs a value (diagnostics
beyond syntax and names, hovers, inlay hints, quick fixes, pinned results) is a job of the
worker process (:mod:`conelang.server.worker`).  :class:`Jobs` is the server's side of that:

* **jobs** — :meth:`Jobs.submit` sends a job for the current text of a file together with the
  texts of the files it uses; the job's *key* is the fingerprint of those texts, so answers are
  cached by it (:meth:`Jobs.remembered`) and jobs made for an older text are cancelled
  (:meth:`Jobs.text_changed`);
* **debounce** — :meth:`Jobs.schedule` checks a file after a delay, and a newer change restarts
  the wait;
* **carry-over** — while the worker computes, the loop publishes the diagnostics it finds by
  itself (syntax, names, kinds, cycles, use statements: no value) together with the previous
  results of the statements whose text did not change, moved to where they are now and marked
  as from the previous check, so that they do not flicker; the worker's answer replaces them.
"""
from __future__ import annotations

import asyncio
import gc
import hashlib
import logging
from dataclasses import replace

import time

from conelang.cache import ContentCache

from .worker import HeavyWorker, JobCancelled, WorkerFailed

log = logging.getLogger("conelang.server")

CARRIED = " (from the previous check; checking again…)"


def fingerprint(text: str) -> str:
    return hashlib.blake2b(text.encode("utf-8", "surrogatepass"), digest_size=16).hexdigest()


class Jobs:
    def __init__(self, server, cache_size: int = 512):
        self.server = server
        self.worker: HeavyWorker | None = None
        self.tasks: dict[str, asyncio.Task] = {}
        # the worker's answers by the fingerprint of the texts they were computed from
        self.cache = ContentCache("worker answers", cache_size)
        self.last_full: dict[str, tuple[list, list]] = {}   # uri -> (diagnostics, statement sources)
        self.last_inlay: dict[str, tuple[list, list]] = {}  # uri -> (inlay hints, statement sources)

    @property
    def host(self):
        return self.server.host

    # -- the worker ----------------------------------------------------------------------
    def start(self) -> None:
        if self.worker is None:
            ls = self.server
            self.worker = HeavyWorker(ls.budget_limit, allow_outside_root=ls.loader.allow_outside_root)
            self.worker.start()
            self.worker.submit("ping", "", "", key="")

    def stop(self) -> None:
        if self.worker is not None:
            self.worker.stop()

    def used_texts(self, uri: str) -> dict[str, str | None]:
        """The texts of the files ``uri`` uses (directly or through others), as the host sees
        them: what a worker job about ``uri`` needs besides its own text."""
        return {u: self.host.source(u) for u in self.host.used_files(uri)}

    def state_key(self, uri: str, files: dict | None = None) -> str:
        """The fingerprint of what the answers about ``uri`` depend on: its text and the texts
        of the files it uses."""
        files = self.used_texts(uri) if files is None else files
        parts = [self.host.text(uri)]
        for u in sorted(files):
            parts += [u, "\x00" if files[u] is None else files[u]]
        return fingerprint("\x01".join(parts)) if len(parts) > 1 else fingerprint(parts[0])

    def submit(self, kind: str, uri: str, *args, interactive: bool = False):
        """A job for the current text of ``uri`` (and of the files it uses): (key, asyncio future)."""
        self.start()
        files = self.used_texts(uri)
        key = self.state_key(uri, files)
        fut = asyncio.wrap_future(self.worker.submit(kind, uri, self.host.text(uri), *args, key=key,
                                                     interactive=interactive, files=files))
        fut.add_done_callback(_consume)       # a result nobody waits for any more is not an error
        return key, fut

    def remembered(self, key):
        return self.cache.get(key)

    def remember(self, key, value) -> None:
        self.cache.put(key, value)

    # -- checking files ------------------------------------------------------------------
    def text_changed(self, uri: str, delay: float) -> None:
        """``uri`` has a new text: cancel the jobs made for the old one, check it after ``delay``."""
        if self.worker is not None:
            self.worker.cancel_stale(uri, self.state_key(uri))
        self.schedule(uri, delay)

    def schedule(self, uri: str, delay: float) -> None:
        old = self.tasks.pop(uri, None)
        if old is not None and not old.done():
            old.cancel()
        self.tasks[uri] = asyncio.ensure_future(self.diagnose(uri, delay))

    def closed(self, uri: str, forget: bool = False) -> None:
        """``uri`` is no longer open, or gone: stop checking it and clear its diagnostics
        (``forget``: the worker drops its open text too)."""
        task = self.tasks.pop(uri, None)
        if task is not None:
            task.cancel()
        if self.worker is not None:
            self.worker.cancel_stale(uri, None)
            if forget:
                self.worker.submit("forget", uri, "", key="")
        self.last_full.pop(uri, None)
        self.last_inlay.pop(uri, None)
        self.server.publish(uri, [])

    def checked(self) -> list[str]:
        """The files whose diagnostics have been published (open or not)."""
        return list(self.last_full)

    async def diagnose(self, uri: str, delay: float) -> None:
        """Publish the diagnostics of ``uri`` after ``delay`` seconds (the debounce): the worker's,
        and when they take longer than ``diagnostics_wait``, the loop's own first (see the
        module docstring)."""
        try:
            if delay:
                await asyncio.sleep(delay)
            cached = self.remembered(("diagnostics", self.state_key(uri)))
            if cached is not None:
                self.server.publish(uri, cached)
                return
            key, fut = self.submit("diagnostics", uri)
            try:
                full = await asyncio.wait_for(asyncio.shield(fut), self.server.diagnostics_wait)
            except asyncio.TimeoutError:
                static = self.host.static_diagnostics(uri)
                self.server.publish(uri, static + self.carried_over(uri, static))
                full = await asyncio.shield(fut)
            if self.state_key(uri) != key:
                return
            self.remember(("diagnostics", key), full)
            self.server.publish(uri, full)
            self.last_full[uri] = (full, self.host.statement_sources(uri))
            _settle_garbage()
        except (asyncio.CancelledError, JobCancelled):
            return
        except WorkerFailed as exc:
            self.server.publish(uri, self.host.static_diagnostics(uri), note=f"expectations were not checked: {exc}")
        except Exception:
            log.exception("diagnostics of %s failed", uri)

    def _moves(self, uri: str, old_statements) -> dict:
        """old span -> new span of the statements whose text is the same in the current text."""
        free: dict[str, list] = {}
        for src, span in self.host.statement_sources(uri):
            free.setdefault(src, []).append(span)
        moved = {}
        for src, span in old_statements:
            if free.get(src):
                moved[span] = free[src].pop(0)
        return moved

    def carried_over(self, uri: str, static) -> list:
        """The previous results inside statements whose text did not change, moved to where
        those statements are now (a result the loop found again itself is not repeated)."""
        prev = self.last_full.get(uri)
        if prev is None:
            return []
        old_diags, old_statements = prev
        moved = self._moves(uri, old_statements)
        have = {(d.code, d.message) for d in static}
        out = []
        for d in old_diags:
            if (d.code, d.message) in have:
                continue
            for (a, b), new_span in moved.items():
                if a <= d.span[0] and d.span[1] <= b:
                    shift = new_span[0] - a
                    out.append(replace(d, span=(d.span[0] + shift, d.span[1] + shift), related=(), fixes=(),
                                       message=d.message + CARRIED))
                    break
        return out

    def moved_inlays(self, uri: str) -> list:
        """The previous inlay hints of statements whose text did not change, where they are now."""
        prev = self.last_inlay.get(uri)
        if prev is None:
            return []
        hints, old_statements = prev
        ends = {b: new[1] for (a, b), new in self._moves(uri, old_statements).items()}
        return [(ends[off], label) for off, label in hints if off in ends]


class LoopMonitor:
    """How long the event loop is blocked: a task that asks to wake up every ``period`` seconds
    records how late it wakes up (a test and benchmark hook, off unless the client asks for it
    with the initialization option ``"monitorLoop": true``)."""

    def __init__(self, period: float = 0.005, keep: int = 100_000):
        self.period = period
        self.keep = keep
        self.lags: list[float] = []
        self.task: asyncio.Task | None = None

    def start(self) -> None:
        if self.task is None:
            self.task = asyncio.ensure_future(self._run())

    async def _run(self) -> None:
        while True:
            t = time.perf_counter()
            await asyncio.sleep(self.period)
            self.lags.append(max(0.0, time.perf_counter() - t - self.period))
            if len(self.lags) > self.keep:
                del self.lags[:len(self.lags) - self.keep]

    def stats(self, reset: bool = False) -> dict:
        xs = sorted(self.lags)
        if reset:
            self.lags = []
        if not xs:
            return {"samples": 0}
        at = lambda q: xs[min(len(xs) - 1, int(round(q * (len(xs) - 1))))] * 1000   # noqa: E731
        return {"samples": len(xs), "p50_ms": at(0.5), "p99_ms": at(0.99), "max_ms": xs[-1] * 1000}


def _settle_garbage() -> None:
    """At a quiet moment (the diagnostics were just published): collect the young garbage
    (a few ms), then hide the survivors from the collector.  Otherwise the objects that the
    analyses keep (typed statements) grow the oldest generation, and a full collection over
    them blocks the event loop for 50-120 ms at a random moment.  What is frozen is still
    freed when no longer referenced; only reference cycles among frozen objects would never be
    collected, and an analysis makes none (they are freed by reference counting)."""
    gc.collect(1)
    gc.freeze()


def _consume(fut) -> None:
    if not fut.cancelled():
        fut.exception()
