"""Faults on a real Dask cluster (loopback only): lost workers, no workers left, Ctrl-C.

Each run's table is compared, row by row, with the table of an uninterrupted
run in this process (itself checked against OEIS and brute force elsewhere).
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import Any

import pytest

from realquad.core.executors import DaskExecutor, Finished, WorkFunction
from realquad.errors import InputError
from realquad.survey.ranges import Chunk, SurveyRange
from realquad.survey.store import SurveyStore
from realquad.survey.tabulate import SurveyInterrupted, tabulate
from tests.survey.test_helpers import completed_chunks, stored_table

distributed = pytest.importorskip("distributed")

RANGE = SurveyRange("d", 2, 24000)
CHUNK = 600


@pytest.fixture(scope="module")
def reference(tmp_path_factory: pytest.TempPathFactory) -> list[tuple[Any, ...]]:
    path = tmp_path_factory.mktemp("reference") / "reference.sqlite"
    with SurveyStore.open_for_writing(str(path)) as store:
        tabulate(RANGE, store, chunk_size=CHUNK)
    return stored_table(path)


class _Cluster:
    """A scheduler in this process and ``workers`` worker processes without nannies (so a
    killed worker stays dead), all on loopback, as docs/survey.md starts them."""

    def __init__(self, workers: int) -> None:
        self.scheduler = distributed.LocalCluster(
            n_workers=0, processes=False, host="127.0.0.1", dashboard_address=None, protocol="tcp"
        )
        self.address = self.scheduler.scheduler_address
        self.workers: list[subprocess.Popen[bytes]] = []
        self.add_workers(workers)

    def add_workers(self, count: int) -> None:
        """Start ``count`` more workers and wait until the scheduler knows them."""
        self.workers += [
            subprocess.Popen(
                [sys.executable, "-m", "distributed.cli.dask_worker", self.address]
                + ["--no-nanny", "--nthreads", "1", "--host", "127.0.0.1", "--no-dashboard"],
                stdout=subprocess.DEVNULL,
                stderr=subprocess.DEVNULL,
            )
            for _ in range(count)
        ]
        alive = sum(worker.poll() is None for worker in self.workers)
        with distributed.Client(self.address, timeout=30) as client:
            client.wait_for_workers(alive, timeout=60)

    def __enter__(self) -> _Cluster:
        return self

    def __exit__(self, *exc_info: object) -> None:
        for worker in self.workers:
            if worker.poll() is None:
                worker.kill()
            worker.wait()
        self.scheduler.close()


class _After:
    """An executor that does ``act()`` once ``after`` chunks have come back from ``inner``."""

    def __init__(self, inner: DaskExecutor, after: int, act: Any) -> None:
        self.inner, self.after, self.act = inner, after, act
        self.description = inner.description

    def map_unordered(self, chunks: Iterable[Chunk], function: WorkFunction) -> Iterator[Finished]:
        for count, finished in enumerate(self.inner.map_unordered(chunks, function), 1):
            yield finished
            if count == self.after:
                self.act()

    def close(self) -> None:
        self.inner.close()


@pytest.mark.slow
def test_a_worker_killed_mid_run_costs_nothing(
    tmp_path: Path, reference: list[tuple[Any, ...]]
) -> None:
    target = tmp_path / "dask.sqlite"
    with _Cluster(2) as cluster:
        executor = DaskExecutor(cluster.address)
        killed = _After(executor, 3, cluster.workers[0].kill)
        with SurveyStore.open_for_writing(str(target)) as store:
            outcome = tabulate(RANGE, store, killed, chunk_size=CHUNK)  # type: ignore[arg-type]
            assert store.missing() == []
    assert outcome.computed_chunks == len(list(RANGE.chunks(CHUNK)))
    assert stored_table(target) == reference
    assert sorted(os.listdir(tmp_path)) == ["dask.sqlite"]


@pytest.mark.slow
def test_no_worker_left_stops_the_run_in_bounded_time_and_resumes(
    tmp_path: Path, reference: list[tuple[Any, ...]]
) -> None:
    target = tmp_path / "dask.sqlite"
    with _Cluster(1) as cluster:
        executor = DaskExecutor(cluster.address, stall_timeout=3.0)

        def kill_all() -> None:
            for worker in cluster.workers:
                worker.kill()  # SIGKILL

        start = time.monotonic()
        with SurveyStore.open_for_writing(str(target)) as store:
            with pytest.raises(InputError, match="no workers left and nothing finished for 3 s"):
                tabulate(RANGE, store, _After(executor, 2, kill_all), chunk_size=CHUNK)  # type: ignore[arg-type]
            saved = store.chunks_written
            assert saved >= 2 and store.missing()  # what finished is kept; the rest is missing
        assert time.monotonic() - start < 40
    assert sorted(os.listdir(tmp_path)) == ["dask.sqlite"]
    with _Cluster(1) as cluster, SurveyStore.open_for_writing(str(target)) as store:
        outcome = tabulate(RANGE, store, DaskExecutor(cluster.address), chunk_size=CHUNK)
        assert outcome.skipped_chunks == saved and store.missing() == []
    assert stored_table(target) == reference


@pytest.mark.slow
def test_interrupt_then_resume_on_dask(tmp_path: Path, reference: list[tuple[Any, ...]]) -> None:
    target = tmp_path / "dask.sqlite"

    def interrupt() -> None:
        raise KeyboardInterrupt

    with _Cluster(2) as cluster:
        with SurveyStore.open_for_writing(str(target)) as store:
            executor = _After(DaskExecutor(cluster.address), 4, interrupt)
            with pytest.raises(SurveyInterrupted):
                tabulate(RANGE, store, executor, chunk_size=CHUNK)  # type: ignore[arg-type]
            assert store.chunks_written == 4 and store.missing()
        with SurveyStore.open_for_writing(str(target)) as store:
            outcome = tabulate(RANGE, store, DaskExecutor(cluster.address), chunk_size=CHUNK)
            assert outcome.skipped_chunks == 4
    assert stored_table(target) == reference


@pytest.mark.slow
def test_ctrl_c_on_a_dask_run_is_one_line_and_resumes(
    tmp_path: Path, reference: list[tuple[Any, ...]]
) -> None:
    target = tmp_path / "dask.sqlite"
    command = [sys.executable, "-m", "realquad", "survey", "run", "--d-max", str(RANGE.hi)]
    command += ["--chunk-size", str(CHUNK), "--db", str(target)]
    with _Cluster(1) as cluster:
        proc = subprocess.Popen(
            [*command, "--scheduler", cluster.address],
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            text=True,
        )
        deadline = time.monotonic() + 50

        def wait_for(chunks: int) -> None:
            while (
                proc.poll() is None
                and completed_chunks(target) < chunks
                and time.monotonic() < deadline
            ):
                time.sleep(0.02)

        wait_for(3)
        cluster.workers[0].kill()  # the only worker lost, with results not yet fetched:
        time.sleep(3)  # the cluster library logs its complaints meanwhile
        proc.send_signal(signal.SIGINT)  # what Ctrl-C sends
        _, err = proc.communicate(timeout=60)
        assert proc.returncode == 130, err
        lines = [line for line in err.splitlines() if line.strip()]
        assert "Traceback" not in err and lines[-1] == "realquad: interrupted", err
        # nothing but our own lines: progress, what was saved, the interruption
        assert all(line.startswith(("survey: ", "realquad: ")) for line in lines), err
        cluster.add_workers(2)
        finished = subprocess.run(
            [*command, "--scheduler", cluster.address, "--json"],
            capture_output=True,
            text=True,
            timeout=120,
        )
        assert finished.returncode == 0 and finished.stderr == "", finished.stderr
    assert stored_table(target) == reference
    assert sorted(os.listdir(tmp_path)) == ["dask.sqlite"]


@pytest.mark.slow
def test_a_lost_scheduler_stops_the_run_in_one_line_and_resumes(
    tmp_path: Path, reference: list[tuple[Any, ...]]
) -> None:
    target = tmp_path / "dask.sqlite"
    with _Cluster(2) as cluster:
        executor = DaskExecutor(cluster.address)
        with SurveyStore.open_for_writing(str(target)) as store:
            with pytest.raises(InputError, match="lost the connection to the Dask scheduler"):
                tabulate(
                    RANGE, store, _After(executor, 2, cluster.scheduler.close), chunk_size=CHUNK
                )  # type: ignore[arg-type]
            saved = store.chunks_written
            assert saved >= 2 and store.missing()
    with _Cluster(2) as cluster, SurveyStore.open_for_writing(str(target)) as store:
        outcome = tabulate(RANGE, store, DaskExecutor(cluster.address), chunk_size=CHUNK)
        assert outcome.skipped_chunks == saved and store.missing() == []
    assert stored_table(target) == reference
