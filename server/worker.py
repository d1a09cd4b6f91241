"""The worker process of the language server: heavy computations off the event loop.

The server keeps one worker process with its own :class:`conelang.ide.host.AnalysisHost` (and so
its own geometry cache, which lives as long as the process: editing one cone recomputes only
that cone).  Jobs are sent one at a time over a pipe; the queue stays in the server, so a job
whose text is already stale is dropped before it is ever sent.

Cancellation: every job has an id; the server cancels the running job by writing its id into
a shared integer.  Inside the worker the engine's budget checks that integer on every tick
(:class:`JobFlag` has the ``is_set()`` of an event), so a budgeted computation stops at once
with ``Cancelled``.  A computation that does not tick (or a worker that hangs) is killed when
it has not stopped ``grace`` seconds after its cancellation, and a fresh worker is started.
A job that runs longer than ``max_seconds`` is treated the same way.

Other files: the worker's host reads the files that ``use`` statements name through its own
:class:`conelang.project.FileLoader`, but every job also carries ``files``, the texts the
server sees of all the files the job's file uses (directly or through other files: the open
text of an open file, the disk text otherwise, None for a file that cannot be read).  The
worker applies them before the job, so it computes with exactly the texts the server's
diagnostics were made from, whatever order jobs run in, and a job never depends on an earlier
one having been delivered (a job is self-contained; the server's fingerprint of a job covers
those texts too, so a cached answer is never one computed with another version of a used
file).  Applying a text that did not change costs nothing, so the worker's analyses of shared
files stay warm.
"""
from __future__ import annotations

import collections
import concurrent.futures as cf
import gc
import itertools
import multiprocessing as mp
import os
import threading
import time
import traceback
from dataclasses import dataclass, field

from conelang.geometry import budget as gbudget


class JobCancelled(Exception):
    """The job was cancelled (its text changed) before it finished."""


class WorkerFailed(Exception):
    """The worker could not compute the job (it crashed, was killed, or the job raised)."""


# ---- inside the worker process ----------------------------------------------------------------
class JobFlag:
    """The cancellation flag of the job that is running in this worker.

    >>> class Shared: value = 0
    >>> f = JobFlag(Shared()); f.job = 7
    >>> f.is_set()
    False
    >>> f.shared.value = 7; f.is_set()
    True
    """

    __slots__ = ("shared", "job")

    def __init__(self, shared):
        self.shared = shared
        self.job = 0

    def is_set(self) -> bool:
        return self.shared.value == self.job


def _job_sleep(host, uri, seconds):
    """A test job: sleep in small steps, honouring cancellation like a budgeted computation."""
    budget = gbudget.Budget(None, host.cancel)
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        budget.tick(1, "sleep")
        time.sleep(0.01)
    return seconds


def _hover_quick(host, uri, offset):
    """The hover that needs values but no heavy facts, and what the full one still computes."""
    light = host.hover(uri, offset, heavy=False)
    return None if light is None else (light[0], light[1], host.hover_pending(uri, offset))


def _hover_partial(host, uri, offset):
    """The facts of the object under ``offset`` except its binomial equations (None when the
    hover there is not about an object with heavy facts)."""
    hit = host.name_at(uri, offset)
    if hit is None or host.hover_pending(uri, offset) is None:
        return None
    return host.object_markdown(uri, hit[0], True, False)


JOBS = {
    "diagnostics": lambda host, uri: host.diagnostics(uri, True),
    "hover": lambda host, uri, offset: host.hover(uri, offset, True),
    "hover_quick": _hover_quick,
    "hover_partial": _hover_partial,
    "fixes": lambda host, uri, start, end: host.code_fixes(uri, start, end),
    "inlay_quick": lambda host, uri: host.inlay_hints(uri, False),
    "markdown": lambda host, uri, name: host.object_markdown(uri, name, True),
    "markdown_quick": lambda host, uri, name: host.object_markdown(uri, name, True, False),
    "inlay": lambda host, uri: host.inlay_hints(uri, True),
    "pin": lambda host, uri, name: host.pin_results(uri, name),
    "ping": lambda host, uri: "pong",
    "forget": lambda host, uri: host.remove(uri),
    # for the tests of the worker itself
    "sleep": _job_sleep,
    "hang": lambda host, uri, seconds: time.sleep(seconds),      # does not look at the flag
    "crash": lambda host, uri: os._exit(3),
}


def _watch_parent(parent_pid: int) -> None:
    while True:
        time.sleep(1.0)
        if os.getppid() != parent_pid:
            os._exit(0)


def _warm_up() -> None:
    """Build the parser and import what the jobs use, then hide everything alive so far from
    the garbage collector (``gc.freeze``), so that a full collection in the middle of a job
    walks the objects the jobs made, not the ~70 000 of the imported libraries (45 ms)."""
    try:
        from conelang.ide import warm_up
        warm_up()
    except Exception:  # noqa: BLE001 - only an optimisation
        pass
    gc.collect()
    gc.freeze()


def apply_files(host, files: dict, allow_outside_root: bool) -> None:
    """Make the worker's host see ``files`` (uri -> text, or None: read it from disk) and the
    server's ``allow_outside_root``."""
    loader = host.loader
    if loader is not None and loader.allow_outside_root != allow_outside_root:
        loader.allow_outside_root = allow_outside_root
        host.forget_files()
    for u, t in files.items():
        if t is None:
            host.remove(u)
            host.invalidate(u)
        else:
            host.apply_change(u, t)


def worker_main(conn, shared, budget_limit, parent_pid, allow_outside_root: bool = False) -> None:
    """Entry point of the worker process: answer jobs until the pipe closes."""
    from conelang.geometry.budget import Cancelled
    from conelang.ide import AnalysisHost
    from conelang.project import FileLoader
    threading.Thread(target=_watch_parent, args=(parent_pid,), daemon=True).start()
    flag = JobFlag(shared)
    host = AnalysisHost(budget_limit, cancel=flag, loader=FileLoader(allow_outside_root))
    _warm_up()
    while True:
        try:
            job_id, kind, uri, text, args, files, allow = conn.recv()
        except (EOFError, OSError, KeyboardInterrupt):
            os._exit(0)
        flag.job = job_id
        if flag.is_set():
            reply = ("cancelled", None)
        else:
            try:
                apply_files(host, files, allow)
            except Exception:  # noqa: BLE001 - the job still runs, with what the disk says
                host.forget_files()
            host.apply_change(uri, text)
            try:
                reply = ("ok", JOBS[kind](host, uri, *args))
            except Cancelled:
                host.forget_analysis(uri)
                reply = ("cancelled", None)
            except BaseException as exc:  # noqa: BLE001 - report every failure, never die
                host.forget_analysis(uri)
                reply = ("error", f"{type(exc).__name__}: {exc}\n{traceback.format_exc(limit=6)}")
        try:
            conn.send(reply)
        except (EOFError, OSError):
            os._exit(0)
        except Exception as exc:  # an answer that does not pickle
            conn.send(("error", f"cannot send the result: {type(exc).__name__}: {exc}"))
        gc.collect(1)          # between jobs: keep full collections out of the next job (see _warm_up)
        gc.freeze()


# ---- in the server ---------------------------------------------------------------------------
@dataclass(eq=False)
class Job:
    id: int
    kind: str
    uri: str
    key: str                       # fingerprint of the text
    text: str
    args: tuple
    files: dict = field(default_factory=dict)     # uri -> text of the files the job's file uses
    future: cf.Future = field(default_factory=cf.Future)
    cancelled_at: float | None = None
    interactive: bool = False
    preempted: bool = False        # stopped once to let an interactive job run first


class HeavyWorker:
    """A queue of jobs in front of one worker process.

    ``submit`` returns a :class:`concurrent.futures.Future` that ends with the job's result,
    or with :class:`JobCancelled` / :class:`WorkerFailed`.  Identical jobs (same kind, file,
    text and arguments) share one future.

    Interactive jobs (a hover, a quick fix: someone waits for them) go to the front of the
    queue, and an interactive job *preempts* a running background job (diagnostics of a heavy
    file): the background job is cancelled through the flag, the interactive job runs, then the
    background job runs again from the start (computations finished before the stop stay in the
    worker's caches).  A job is preempted at most once, so a stream of hovers cannot starve
    the diagnostics.
    """

    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT, grace: float = 1.0,
                 max_seconds: float | None = None, start_method: str = "spawn",
                 allow_outside_root: bool = False):
        self.budget_limit = budget_limit
        self.allow_outside_root = allow_outside_root     # sent with every job: may change at any time
        self.grace = grace
        self.max_seconds = max_seconds
        self._ctx = mp.get_context(start_method)
        self._shared = self._ctx.RawValue("q", 0)
        self._cond = threading.Condition()
        self._queue: collections.deque[Job] = collections.deque()
        self._running: Job | None = None
        self._ids = itertools.count(1)
        self._proc = None
        self._conn = None
        self._stopped = False
        self._thread: threading.Thread | None = None
        self.restarts = 0
        self.jobs_run = 0

    # -- life cycle
    def start(self) -> None:
        if self._thread is not None:
            return
        self._spawn()
        self._thread = threading.Thread(target=self._loop, name="conelang-worker", daemon=True)
        self._thread.start()

    def _spawn(self) -> None:
        parent, child = self._ctx.Pipe()
        proc = self._ctx.Process(target=worker_main, name="conelang-heavy",
                                 args=(child, self._shared, self.budget_limit, os.getpid(),
                                       self.allow_outside_root), daemon=True)
        proc.start()
        child.close()
        self._proc, self._conn = proc, parent

    def _kill(self) -> None:
        proc, conn = self._proc, self._conn
        self._proc = self._conn = None
        if conn is not None:
            try:
                conn.close()
            except OSError:
                pass
        if proc is not None and proc.is_alive():
            proc.kill()
            proc.join(5)

    def restart(self) -> None:
        self._kill()
        if not self._stopped:
            self.restarts += 1
            self._spawn()

    def stop(self) -> None:
        with self._cond:
            self._stopped = True
            pending = list(self._queue)
            self._queue.clear()
            self._cond.notify_all()
        for job in pending:
            _settle(job.future, exc=JobCancelled("the server is shutting down"))
        self._kill()

    @property
    def pid(self) -> int | None:
        return self._proc.pid if self._proc is not None else None

    # -- jobs
    def submit(self, kind: str, uri: str, text: str, *args, key: str, interactive: bool = False,
               files: dict | None = None) -> cf.Future:
        """``key``: the fingerprint of ``text`` and ``files`` (the texts of the files ``uri``
        uses, see the module docstring): jobs are shared and cancelled by it."""
        with self._cond:
            if self._stopped:
                f = cf.Future()
                f.set_exception(WorkerFailed("the server is shutting down"))
                return f
            for job in ([self._running] if self._running else []) + list(self._queue):
                if ((job.kind, job.uri, job.key, job.args) == (kind, uri, key, args) and job.cancelled_at is None
                        and not job.future.done()):
                    if interactive and job is not self._running:
                        self._queue.remove(job)
                        self._queue.appendleft(job)
                    return job.future
            job = Job(next(self._ids), kind, uri, key, text, args, dict(files or {}), interactive=interactive)
            if interactive:
                self._queue.appendleft(job)
                self._preempt()
            else:
                self._queue.append(job)
            self._cond.notify_all()
            return job.future

    def _preempt(self) -> None:
        """Stop the running background job so that the interactive job queued first runs now
        (it runs again afterwards; see the class docstring).  Called with the lock held."""
        r = self._running
        if r is not None and not r.interactive and not r.preempted and r.cancelled_at is None:
            r.preempted = True
            r.cancelled_at = time.monotonic()
            self._shared.value = r.id

    def _requeue(self, job: Job) -> bool:
        """Put a preempted job back behind the interactive jobs at the front of the queue;
        False when it was cancelled for good meanwhile.  Called with the lock held."""
        if job.future.done() or self._stopped or job.key is None:
            return False
        job.id, job.cancelled_at = next(self._ids), None
        front = next((i for i, j in enumerate(self._queue) if not j.interactive), len(self._queue))
        self._queue.insert(front, job)
        self._cond.notify_all()
        return True

    def cancel_stale(self, uri: str, key: str | None) -> int:
        """Cancel the queued and running jobs of ``uri`` made for a text other than ``key``
        (all of them when ``key`` is None); returns how many were cancelled."""
        n = 0
        with self._cond:
            for job in list(self._queue):
                if job.uri == uri and job.key != key:
                    self._queue.remove(job)
                    _settle(job.future, exc=JobCancelled("the text changed"))
                    n += 1
            r = self._running
            if r is not None and r.uri == uri and r.key != key and (r.cancelled_at is None or r.preempted):
                r.preempted = False            # stale: cancelled for good, not run again
                r.cancelled_at = r.cancelled_at or time.monotonic()
                self._shared.value = r.id
                n += 1
        return n

    def busy(self) -> bool:
        with self._cond:
            return self._running is not None or bool(self._queue)

    def _loop(self) -> None:
        while True:
            with self._cond:
                while not self._queue and not self._stopped:
                    self._cond.wait()
                if self._stopped:
                    return
                job = self._queue.popleft()
                if job.future.done():          # nobody waits for it any more
                    continue
                self._running = job
            try:
                status, value = self._run(job)
            except Exception as exc:  # never let the dispatcher die
                status, value = "error", f"{type(exc).__name__}: {exc}"
            with self._cond:
                self._running = None
                self.jobs_run += 1
                if status == "cancelled" and job.preempted and self._requeue(job):
                    continue
            if status == "ok":
                _settle(job.future, result=value)
            elif status == "cancelled":
                _settle(job.future, exc=JobCancelled("the text changed"))
            else:
                _settle(job.future, exc=WorkerFailed(str(value).strip().splitlines()[0] if value else "failed"))

    def _run(self, job: Job):
        if self._conn is None or self._proc is None or not self._proc.is_alive():
            self.restart()
        try:
            self._conn.send((job.id, job.kind, job.uri, job.text, job.args, job.files, self.allow_outside_root))
            started = time.monotonic()
            while not self._conn.poll(0.05):
                if self._stopped:
                    return ("cancelled", None)
                if not self._proc.is_alive():
                    raise EOFError
                now = time.monotonic()
                if job.cancelled_at is not None and now - job.cancelled_at > self.grace:
                    self.restart()
                    return ("cancelled", None)
                if self.max_seconds is not None and now - started > self.max_seconds:
                    self.restart()
                    return ("error", f"the computation took longer than {self.max_seconds:g} s and was stopped")
            return self._conn.recv()
        except (EOFError, OSError, BrokenPipeError):
            if self._stopped:
                return ("cancelled", None)
            self.restart()
            return ("error", "the worker process stopped unexpectedly; it has been restarted")


def _settle(future: cf.Future, result=None, exc: BaseException | None = None) -> None:
    if future.done():
        return
    try:
        if exc is not None:
            future.set_exception(exc)
        else:
            future.set_result(result)
    except cf.InvalidStateError:
        pass
