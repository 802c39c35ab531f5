"""Progress lines: rate-limited on a terminal, rarer plain lines in a pipe or a file."""

from __future__ import annotations

import pytest
from realquad_cli import progress as progress_module


def _lines(
    capsys: pytest.CaptureFixture[str],
    monkeypatch: pytest.MonkeyPatch,
    force: bool,
    times: list[float],
) -> list[str]:
    clock = iter([0.0, *times])
    monkeypatch.setattr(progress_module.time, "monotonic", lambda: next(clock))
    report = progress_module.ProgressLine(force=force)
    for _ in times:
        report("classes found", 12345)
    return capsys.readouterr().err.splitlines()


def test_a_terminal_hears_every_two_seconds(capsys, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    lines = _lines(capsys, monkeypatch, True, [1.0, 2.5, 3.0, 4.6, 7.0])
    assert lines == ["realquad: classes found: 12,345 so far (Ctrl-C stops)"] * 3


def test_a_pipe_hears_every_ten_seconds(capsys, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    lines = _lines(capsys, monkeypatch, False, [2.5, 9.0, 10.5, 15.0, 21.0])
    assert len(lines) == 2  # at 10.5 and 21.0
