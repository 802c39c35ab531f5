"""Helpers shared by the command-line tests: in-process runs and interrupted subprocesses."""

from __future__ import annotations

import json
import signal
import subprocess
import sys
import time
from typing import Any

import gmpy2
from realquad_cli.main import main

#: Every command, as the JSON page and the reference page name them.
COMMAND_NAMES = (
    "cfrac",
    "pell",
    "unit",
    "classgroup",
    "split",
    "represent",
    "solve",
    "form reduce",
    "form equivalent",
    "form compose",
    "form power",
    "form cycle",
    "form class",
    "survey run",
    "survey query",
    "survey report",
)


def run(capsys: Any, *args: str) -> tuple[int, str, str]:
    """Run ``realquad ARGS`` in-process; return (status, stdout, stderr)."""
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def run_json(capsys: Any, *args: str) -> dict:
    """Run ``realquad ARGS --json`` in-process, expect status 0, parse big integers exactly."""
    code, out, err = run(capsys, *args, "--json")
    assert code == 0, err
    return json.loads(out, parse_int=lambda text: int(gmpy2.mpz(text)))


def interrupted(args: list[str], after: float = 3.0) -> tuple[int, str, str]:
    """Start ``python -m realquad ARGS``, send SIGINT after ``after`` seconds, return the outcome."""
    proc = subprocess.Popen(
        [sys.executable, "-m", "realquad", *args],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    time.sleep(after)
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=60)
    return proc.returncode, out, err


def check_subexp_options(
    capsys: Any, command: str, text: str, workers: str | None, scheduler: str | None
) -> None:
    """``command --disc TEXT --method subexp`` with any ``--workers`` and ``--scheduler``:
    an answer, or one ``realquad: error:`` line and status 2, never a traceback."""
    args = [command, "--disc", text, "--method", "subexp", "--json"]
    if workers is not None:
        args += ["--workers", workers]
    if scheduler is not None:
        args += ["--scheduler", scheduler]
    code, _, err = run(capsys, *args)
    assert code in (0, 2)
    assert "Traceback" not in err
    if code == 2:
        assert err.startswith("realquad: error:") and len(err.strip().splitlines()) == 1
