"""The worker process of the language server: jobs, cancellation, crashes and restarts.

No assertion is about a duration: cancellation is checked by its outcome (the job ends as
cancelled, and whether the worker had to be restarted), with generous timeouts.
"""
from __future__ import annotations

import concurrent.futures as cf

import pytest

from conelang.ide import AnalysisHost
from conelang.server.worker import HeavyWorker, JobCancelled, WorkerFailed

WAIT = 60


@pytest.fixture(scope="module")
def worker():
    w = HeavyWorker(grace=30.0)
    w.start()
    assert w.submit("ping", "", "", key="").result(WAIT) == "pong"
    yield w
    w.stop()


def test_results_match_the_host_in_this_process(worker):
    # A failed expectation: cone((1,0),(1,2)) has dimension 2, so 'dim = 3' fails (its span is Q^2)
    text = "lattice N = Z^2\ncone c in N { rays (1,0) (1,2) (2,1) (2,2) }\nexpect c dim = 3\n"
    got = worker.submit("diagnostics", "mem://a", text, key="t1").result(WAIT)
    host = AnalysisHost()
    host.apply_change("mem://a", text)
    assert got == host.diagnostics("mem://a")
    assert {d.code for d in got} == {"expect-failed", "redundant-ray", "not-primitive"}
    md = worker.submit("markdown", "mem://a", text, "c", key="t1").result(WAIT)
    assert md.startswith("### cone `c` in `N`")


def test_cancelling_a_running_job_uses_the_flag_not_a_kill(worker):
    restarts = worker.restarts
    fut = worker.submit("sleep", "mem://s", "", 60, key="old")
    # wait until it runs, then say the text changed
    for _ in range(600):
        if worker._running is not None and worker._running.kind == "sleep":
            break
        cf.wait([fut], timeout=0.05)
    assert worker.cancel_stale("mem://s", "new") == 1
    with pytest.raises(JobCancelled):
        fut.result(WAIT)
    assert worker.restarts == restarts                 # the computation stopped by itself
    assert worker.submit("ping", "", "", key="").result(WAIT) == "pong"


def test_stale_queued_jobs_are_dropped_and_identical_jobs_shared(worker):
    running = worker.submit("sleep", "mem://q", "", 60, key="v1")
    queued = worker.submit("diagnostics", "mem://q", "lattice N = Z^2", key="v1")
    again = worker.submit("diagnostics", "mem://q", "lattice N = Z^2", key="v1")
    other = worker.submit("ping", "mem://other", "", key="x")
    assert again is queued
    worker.cancel_stale("mem://q", "v2")
    for f in (running, queued):
        with pytest.raises(JobCancelled):
            f.result(WAIT)
    assert other.result(WAIT) == "pong"               # other files are not affected


def test_a_crash_is_reported_and_the_worker_restarted(worker):
    restarts = worker.restarts
    with pytest.raises(WorkerFailed):
        worker.submit("crash", "mem://c", "", key="k").result(WAIT)
    assert worker.restarts == restarts + 1
    assert worker.submit("ping", "", "", key="").result(WAIT) == "pong"


def test_a_job_that_ignores_cancellation_is_killed_after_the_grace_time():
    w = HeavyWorker(grace=0.2, max_seconds=None)
    w.start()
    try:
        # the child must be up and inside the job: a job cancelled before the child reads it is
        # answered "cancelled" at once, with no restart (seen on a loaded machine)
        assert w.submit("ping", "", "", key="").result(WAIT) == "pong"
        fut = w.submit("hang", "mem://h", "", 120, key="old")
        for _ in range(600):
            if w._running is not None:
                break
            cf.wait([fut], timeout=0.05)
        cf.wait([fut], timeout=0.5)
        w.cancel_stale("mem://h", None)
        with pytest.raises(JobCancelled):
            fut.result(WAIT)
        assert w.restarts == 1
        assert w.submit("ping", "", "", key="").result(WAIT) == "pong"
        w.max_seconds = 0.5
        with pytest.raises(WorkerFailed, match="longer than"):
            w.submit("hang", "mem://h", "", 120, key="k").result(WAIT)
    finally:
        w.stop()
    with pytest.raises(WorkerFailed):
        w.submit("ping", "", "", key="").result(WAIT)        # stopped for good


def test_a_job_computes_with_the_texts_it_carries_of_the_files_it_uses(worker, tmp_path):
    # cone((1,0),(0,1)) is smooth, cone((1,0),(1,2)) is not (determinant 2): plain linear algebra
    (tmp_path / "conelang.toml").write_text("")
    shared = tmp_path / "shared.cone"
    shared.write_text("lattice N = Z^2\ncone wedge in N { rays (1,0) (0,1) }\n")
    importer, shared_uri = (tmp_path / "importer.cone").as_uri(), shared.as_uri()
    text = 'use "shared.cone" (N, wedge)\nexpect wedge smooth\n'

    def codes(key, files=None, allow=False):
        worker.allow_outside_root = allow
        return [d.code for d in worker.submit("diagnostics", importer, text, key=key, files=files).result(WAIT)]

    assert codes("disk") == []                                   # nothing carried: the worker reads the disk
    # the server's (open, unsaved) text of the shared file wins over the disk
    assert codes("open", {shared_uri: "lattice N = Z^2\ncone wedge in N { rays (1,0) (1,2) }\n"}) == ["expect-failed"]
    # None: the file is to be read from disk again (it changed there)
    shared.write_text("lattice N = Z^2\n")
    assert codes("changed", {shared_uri: None}) == ["import-unknown-name"]
    # the rule for files outside the project root comes with the job
    outside = tmp_path.parent / f"{tmp_path.name}_outside.cone"
    outside.write_text("lattice N = Z^2\ncone wedge in N { rays (1,0) (0,1) }\n")
    text = f'use "../{outside.name}" (N, wedge)\nexpect wedge smooth\n'
    assert codes("outside") == ["import-outside-root"]
    assert codes("allowed", allow=True) == []
    assert codes("refused") == ["import-outside-root"]


def test_an_interactive_job_preempts_a_background_job_which_then_runs_again(worker):
    restarts = worker.restarts
    background = worker.submit("sleep", "mem://p", "", 2, key="bg")
    for _ in range(600):
        if worker._running is not None and worker._running.kind == "sleep":
            break
        cf.wait([background], timeout=0.05)
    hover = worker.submit("ping", "mem://p", "", key="bg", interactive=True)
    assert hover.result(WAIT) == "pong"
    assert not background.done()                      # stopped for the hover, then started again
    assert background.result(WAIT) == 2               # and it finishes: preempted once, not cancelled
    assert worker.restarts == restarts
