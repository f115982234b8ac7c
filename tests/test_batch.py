"""Many files at once: local processes, a Dask cluster on loopback, and ``draft`` over inputs."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from click.testing import CliRunner

from minutes import batch
from minutes.cli import main
from minutes.errors import InputError, UsageError


def square(job: int) -> int:
    """A job for the tests: fails on 3 the way a bad input file does."""
    if job == 3:
        raise InputError("cannot read this one", path=f"file{job}.vtt")
    if job == 4:
        raise ZeroDivisionError("a bug")
    return job * job


def test_local_pool_keeps_input_order_and_reports_failures_per_file() -> None:
    seen: list[tuple[int, int]] = []
    outcomes = batch.run(square, [1, 2, 3, 4, 5], batch.Plan(workers=2),
                         progress=lambda done, total, name: seen.append((done, total)))
    assert [o.index for o in outcomes] == [0, 1, 2, 3, 4]
    assert [o.value for o in outcomes if o.ok] == [1, 4, 25]
    assert outcomes[2].error == "file3.vtt: cannot read this one"
    assert outcomes[3].error == "internal error (ZeroDivisionError: a bug)"
    assert seen[0] == (0, 5) and seen[-1] == (5, 5) and len(seen) == 6


def test_one_worker_runs_in_this_process() -> None:
    outcomes = batch.run(square, [2, 3], batch.Plan(workers=1))
    assert outcomes[0].value == 4 and not outcomes[1].ok


def test_bad_plans_are_usage_errors() -> None:
    with pytest.raises(UsageError, match="choose one of local, dask"):
        batch.run(square, [1], batch.Plan(executor="ray"))
    with pytest.raises(UsageError, match="--scheduler"):
        batch.run(square, [1], batch.Plan(executor="dask"))
    assert batch.workers_for(10, 3) == 3 and batch.workers_for(1, None) == 1


@pytest.fixture(scope="module")
def cluster():  # type: ignore[no-untyped-def]
    """Return the address of a Dask cluster on loopback (in this process)."""
    try:
        from distributed import LocalCluster
    except ImportError:
        if os.environ.get("CI"):
            pytest.fail("dask[distributed] is part of the CI install (extra 'dask')")
        pytest.skip("dask.distributed is not installed (pip install 'minutes[dask]')")
    with LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                      protocol="tcp://", host="127.0.0.1", dashboard_address=None) as local:
        yield local.scheduler_address


def test_dask_runs_the_same_jobs(cluster: str) -> None:
    seen: list[int] = []
    outcomes = batch.run(square, [1, 2, 3], batch.Plan("dask", scheduler=cluster),
                         progress=lambda done, total, name: seen.append(done))
    assert [o.value for o in outcomes] == [1, 4, None]
    assert outcomes[2].error == "file3.vtt: cannot read this one"
    assert seen == [0, 1, 2, 3]


CALL = """WEBVTT

1
00:00:01.000 --> 00:00:05.000
<v Mei Lin>Tomás, can you send the revised lease to the landlord by Friday?

2
00:00:06.000 --> 00:00:09.000
<v Tomás Reyes>Yes, I'll send the revised lease to the landlord by Friday.
"""


@pytest.fixture()
def calls(tmp_path: Path) -> list[Path]:
    paths = []
    for name in ("monday", "tuesday"):
        path = tmp_path / f"{name}.vtt"
        path.write_text(CALL, encoding="utf-8")
        paths.append(path)
    return paths


def test_draft_over_many_inputs_writes_each_into_the_folder(calls: list[Path],
                                                            tmp_path: Path) -> None:
    out = tmp_path / "out"
    out.mkdir()
    result = CliRunner().invoke(main, ["draft", *map(str, calls), "--out-dir", str(out),
                                       "--format", "json", "--jobs", "2"])
    assert result.exit_code == 0, result.output
    assert sorted(p.name for p in out.iterdir()) == ["monday.json", "tuesday.json"]
    assert "drafted 2 of 2 files" in result.stderr
    assert "2 of 2 drafted" in result.stderr


def test_draft_over_many_inputs_reports_a_bad_file_and_keeps_the_others(
        calls: list[Path], tmp_path: Path) -> None:
    out = tmp_path / "out"
    out.mkdir()
    missing = tmp_path / "wednesday.vtt"
    result = CliRunner().invoke(main, ["draft", str(calls[0]), str(missing), "--out-dir",
                                       str(out), "--jobs", "1", "-q"])
    assert result.exit_code == 1
    assert f"{missing}: no such file" in result.stderr
    assert "1 of 2 files could not be drafted" in result.stderr
    assert sorted(p.name for p in out.iterdir()) == ["monday.md"]


def test_draft_many_usage_errors(calls: list[Path], tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["draft", *map(str, calls)])
    assert result.exit_code == 2 and "--out-dir" in result.stderr
    result = CliRunner().invoke(main, ["draft", *map(str, calls), "-o", str(tmp_path / "x.md")])
    assert result.exit_code == 2 and "--out-dir" in result.stderr
    result = CliRunner().invoke(main, ["draft", str(calls[0]), str(calls[0]), "--out-dir",
                                       str(tmp_path)])
    assert result.exit_code == 2 and "same minutes file" in result.stderr
    result = CliRunner().invoke(main, ["draft", str(calls[0]), "--executor", "dask"])
    assert result.exit_code == 2 and "--scheduler" in result.stderr


def test_draft_over_a_dask_cluster(cluster: str, calls: list[Path], tmp_path: Path) -> None:
    out = tmp_path / "out"
    out.mkdir()
    result = CliRunner().invoke(main, ["draft", *map(str, calls), "--out-dir", str(out),
                                       "--executor", "dask", "--scheduler", cluster, "-q"])
    assert result.exit_code == 0, result.output
    text = (out / "monday.md").read_text("utf-8")
    assert text.startswith("# Monday") and "DRAFT" in text
