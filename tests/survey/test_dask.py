"""A survey on a real Dask scheduler and worker (loopback only) equals a local run."""

from __future__ import annotations

from pathlib import Path

import pytest
from realquad_cli.main import main

from tests.survey.test_helpers import stored_table as _table

distributed = pytest.importorskip("distributed")


def test_dask_run_equals_local_run(tmp_path: Path) -> None:
    local, remote = tmp_path / "local.sqlite", tmp_path / "dask.sqlite"
    args = ["survey", "run", "--d-min", "1000", "--d-max", "2500", "--chunk-size", "300", "--json"]
    assert main([*args, "--db", str(local), "--workers", "2"]) == 0
    with distributed.LocalCluster(
        n_workers=1,
        threads_per_worker=2,
        processes=True,
        host="127.0.0.1",
        dashboard_address=None,
        protocol="tcp",
    ) as cluster:
        assert cluster.scheduler_address.startswith("tcp://127.0.0.1:")
        assert main([*args, "--db", str(remote), "--scheduler", cluster.scheduler_address]) == 0
        # resuming on the cluster computes nothing twice
        assert main([*args, "--db", str(remote), "--scheduler", cluster.scheduler_address]) == 0
    assert _table(remote) == _table(local)
    assert (
        len(_table(local)) == 915
    )  # squarefree 1000 ≤ d ≤ 2500 (the sieve is checked against sympy in test_survey_ranges)


def test_scheduler_without_workers_is_refused() -> None:
    from realquad.core.executors import DaskExecutor

    with distributed.LocalCluster(
        n_workers=0, processes=False, host="127.0.0.1", dashboard_address=None, protocol="tcp"
    ) as cluster:
        from realquad.errors import InputError

        with pytest.raises(InputError, match="has no workers"):
            DaskExecutor(cluster.scheduler_address, timeout=1.0)


def test_a_port_that_is_not_a_scheduler_is_refused() -> None:
    import socket
    import threading

    server = socket.socket()
    server.bind(("127.0.0.1", 0))
    server.listen()
    port = server.getsockname()[1]

    def answer_nonsense() -> None:
        try:
            connection, _ = server.accept()
            connection.sendall(b"HTTP/1.0 400 nonsense\r\n\r\n")
            connection.close()
        except OSError:
            pass

    threading.Thread(target=answer_nonsense, daemon=True).start()
    from realquad.core.executors import DaskExecutor
    from realquad.errors import InputError

    with pytest.raises(InputError, match="cannot reach the Dask scheduler"):
        DaskExecutor(f"tcp://127.0.0.1:{port}", timeout=1.0)
    server.close()
