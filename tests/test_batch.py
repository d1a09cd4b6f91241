"""Batch checking: the same verdicts and summary serially, with parallel jobs, and on a local
dask.distributed cluster (common practice, no source: a parallel run must agree with the serial one)."""
from __future__ import annotations

import json
from pathlib import Path

import pytest

from conelang import batch
from conelang.cli import main

GOOD = "lattice N = Z^2\ncone c{i} in N {{ rays (1,0) ({i},1) }}\nexpect c{i} dim = 2\n"
BAD = "lattice N = Z^2\ncone c in N {{ rays (1,0) ({i},1) }}\nexpect c rays = 3\n"


@pytest.fixture
def folder(tmp_path):
    for i in range(1, 41):
        text = (BAD if i % 7 == 0 else GOOD).format(i=i)
        (tmp_path / f"f{i:02d}.cone").write_text(text)
    (tmp_path / "broken.cone").write_bytes(b"\xff\xfe not utf-8")
    return tmp_path


def test_parallel_run_agrees_with_serial(folder):
    paths = sorted(str(p) for p in folder.glob("*.cone"))
    serial = batch.run(paths, jobs=1)
    parallel = batch.run(paths, jobs=2)
    strip = lambda rs: [{k: r[k] for k in ("path", "status", "lines", "errors", "warnings")} for r in rs]
    assert strip(serial) == strip(parallel)
    s = batch.summary(serial)
    assert (s["files"], s["failed"], s["unreadable"]) == (41, 5, 1)


def test_cli_json_summary_and_exit_code(folder, tmp_path, capsys):
    out = tmp_path / "summary.json"
    code = main(["check", str(folder), "--jobs", "2", "--json-summary", str(out)])
    assert code == 2          # an unreadable file is a usage-level failure
    summary = json.loads(out.read_text())
    assert summary["failed"] == 5 and summary["unreadable"] == 1
    (folder / "broken.cone").unlink()
    assert main(["check", str(folder), "--jobs", "2"]) == 1
    _, err = capsys.readouterr()
    assert "checked 40 files: 5 with errors" in err


def test_progress_is_reported(folder, capsys):
    (folder / "broken.cone").unlink()
    main(["check", str(folder), "--progress", "--jobs", "1"])
    _, err = capsys.readouterr()
    assert "checked 40/40 files" in err


def test_dask_local_cluster_gives_the_same_verdicts(folder):
    distributed = pytest.importorskip("distributed")
    paths = sorted(str(p) for p in folder.glob("*.cone"))
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster, distributed.Client(cluster) as client:
        remote = batch.run(paths, client=client)
    local = batch.run(paths, jobs=1)
    assert batch.summary(remote)["results"] == batch.summary(local)["results"]
    assert [r["lines"] for r in remote] == [r["lines"] for r in local]
