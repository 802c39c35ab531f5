"""A survey killed with SIGKILL at random moments resumes to the same table as an uninterrupted run."""

from __future__ import annotations

import os
import random
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

from realquad.survey.ranges import SurveyRange
from realquad.survey.store import SurveyStore
from realquad.survey.tabulate import tabulate
from tests.survey.test_helpers import completed_chunks
from tests.survey.test_helpers import stored_table as _table

D_MAX = 4000


def survey_command(d_max: int, chunk_size: int) -> list[str]:
    """The command line of a survey run in a fresh interpreter."""
    return [
        sys.executable,
        "-m",
        "realquad",
        "survey",
        "run",
        "--d-max",
        str(d_max),
        "--chunk-size",
        str(chunk_size),
    ]


COMMAND = survey_command(D_MAX, 80)


def _check_consistent(path: Path) -> None:
    """Every chunk row has exactly its fields, every field row its chunk, nothing twice."""
    c = sqlite3.connect(path)
    assert c.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    per_chunk = dict(c.execute("SELECT chunk, COUNT(*) FROM fields GROUP BY chunk").fetchall())
    for chunk_id, expected in c.execute("SELECT id, fields FROM chunks"):
        assert per_chunk.pop(chunk_id, 0) == expected
    assert not per_chunk  # no row without its completed chunk
    assert (
        c.execute("SELECT COUNT(*) FROM fields").fetchone()[0]
        == c.execute("SELECT COUNT(DISTINCT d) FROM fields").fetchone()[0]
    )
    c.close()


def _orphans(marker: str) -> list[int]:
    found = []
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                cmdline = Path("/proc", entry, "cmdline").read_bytes()
            except OSError:
                continue
            if marker.encode() in cmdline:
                found.append(int(entry))
    return found


def test_kill_nine_at_random_moments_then_resume(tmp_path: Path) -> None:
    reference = tmp_path / "reference.sqlite"
    with SurveyStore.open_for_writing(str(reference)) as store:
        tabulate(SurveyRange("d", 2, D_MAX), store, chunk_size=80)

    target = tmp_path / "killed.sqlite"
    rng = random.Random(20261201)  # fixed seed: the same moments every run
    total_chunks = len(list(SurveyRange("d", 2, D_MAX).chunks(80)))
    # kill once on the way to each of these chunk counts, plus a random few milliseconds
    thresholds = sorted(rng.sample(range(1, total_chunks - 5), 4))
    kills = 0
    for threshold in thresholds:
        proc = subprocess.Popen(
            [*COMMAND, "--db", str(target), "--workers", "2"],
            stdout=subprocess.DEVNULL,
            stderr=subprocess.PIPE,
        )
        while proc.poll() is None and completed_chunks(target) < threshold:
            time.sleep(0.005)
        time.sleep(rng.uniform(0, 0.05))
        if proc.poll() is None:
            os.kill(proc.pid, signal.SIGKILL)  # the run itself, not its workers
            kills += 1
        proc.wait()
        if target.exists():
            _check_consistent(target)
    assert kills >= 3
    time.sleep(0.5)
    if sys.platform.startswith("linux"):
        assert _orphans(str(target)) == []  # workers die with their parent
    finished = subprocess.run(
        [*COMMAND, "--db", str(target), "--workers", "2", "--json"],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert finished.returncode == 0, finished.stderr
    # the -wal and -shm files a kill leaves are recovered and removed by the next run
    assert sorted(os.listdir(tmp_path)) == ["killed.sqlite", "reference.sqlite"]
    _check_consistent(target)
    assert _table(target) == _table(reference)


def test_interrupt_stops_cleanly(tmp_path: Path) -> None:
    target = tmp_path / "interrupted.sqlite"
    # a range far longer than the wait for two chunks, so the run cannot finish before the signal
    command = survey_command(2_000_000, 500)
    proc = subprocess.Popen(
        [*command, "--db", str(target), "--workers", "2"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    while proc.poll() is None and completed_chunks(target) < 2:
        time.sleep(0.01)
    proc.send_signal(signal.SIGINT)  # what Ctrl-C sends
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 130, err
    lines = [line for line in err.splitlines() if line.strip()]
    assert "Traceback" not in err and lines[-1] == "realquad: interrupted"
    assert "rerun the same command to resume" in lines[-2]
    assert os.listdir(tmp_path) == ["interrupted.sqlite"]  # no -wal, -shm or lock file
    _check_consistent(target)
    time.sleep(0.3)
    assert _orphans(str(target)) == []
