"""Progress of a survey run: a bar on a terminal, periodic lines otherwise, or nothing.

``SurveyProgress(total_fields, mode)`` with ``mode`` one of ``"bar"`` (a rich
bar with rate and time remaining, on standard error), ``"lines"`` (a plain
line every ``interval`` seconds, for logs and pipes) or ``"quiet"``.
:func:`choose_mode` picks ``bar`` on a terminal, ``lines`` otherwise, and
``quiet`` under ``--json``.

>>> import io
>>> out = io.StringIO()
>>> with SurveyProgress(100, "lines", stream=out, interval=0) as p:
...     p.advance(40)
>>> print(out.getvalue().strip())  # doctest: +ELLIPSIS
survey: 40/100 fields (40.0%), ... fields/s, about ... left
survey: 40/100 fields (40.0%), ... fields/s, done in ...
"""

from __future__ import annotations

import sys
import time
from typing import Any, Literal, TextIO

from rich.console import Console
from rich.progress import (
    BarColumn,
    MofNCompleteColumn,
    Progress,
    TextColumn,
    TimeElapsedColumn,
    TimeRemainingColumn,
)

Mode = Literal["bar", "lines", "quiet"]


def choose_mode(as_json: bool, stream: TextIO | None = None) -> Mode:
    """``quiet`` with JSON output, ``bar`` on a terminal, ``lines`` otherwise."""
    if as_json:
        return "quiet"
    stream = stream or sys.stderr
    return "bar" if getattr(stream, "isatty", lambda: False)() else "lines"


def _duration(seconds: float) -> str:
    seconds = max(0, int(round(seconds)))
    h, rest = divmod(seconds, 3600)
    m, s = divmod(rest, 60)
    return f"{h}h{m:02d}m{s:02d}s" if h else (f"{m}m{s:02d}s" if m else f"{s}s")


def note(mode: Mode, text: str, stream: TextIO | None = None) -> None:
    """One line on the progress stream (stderr) unless ``mode`` is ``quiet``."""
    if mode != "quiet":
        print(text, file=stream or sys.stderr, flush=True)


class SurveyProgress:
    """Counts finished fields against ``total`` and shows it in the chosen ``mode``."""

    def __init__(
        self,
        total: int,
        mode: Mode,
        stream: TextIO | None = None,
        interval: float = 10.0,
        done: int = 0,
    ) -> None:
        self.total = total
        self.mode = mode
        self.stream = stream or sys.stderr
        self.interval = interval
        self.done = done
        self._start_done = done
        self._start = time.monotonic()
        self._last_line = self._start
        self._bar: Any = None
        self._task: Any = None

    def __enter__(self) -> SurveyProgress:
        if self.mode == "bar":
            self._bar = Progress(
                TextColumn("survey"),
                BarColumn(),
                MofNCompleteColumn(),
                TextColumn("fields · {task.fields[rate]}"),
                TimeElapsedColumn(),
                TextColumn("elapsed,"),
                TimeRemainingColumn(),
                TextColumn("left"),
                console=Console(file=self.stream),
                transient=False,
            )
            self._bar.start()
            self._task = self._bar.add_task(
                "survey", total=self.total, completed=self.done, rate=""
            )
        return self

    def rate(self) -> float:
        """Fields per second in this run so far."""
        elapsed = time.monotonic() - self._start
        return (self.done - self._start_done) / elapsed if elapsed > 0 else 0.0

    def _line(self, final: bool) -> str:
        share = 100.0 * self.done / self.total if self.total else 100.0
        rate = self.rate()
        if final:
            tail = f"done in {_duration(time.monotonic() - self._start)}"
        elif rate > 0:
            tail = f"about {_duration((self.total - self.done) / rate)} left"
        else:
            tail = "time left unknown"
        return (
            f"survey: {self.done}/{self.total} fields ({share:.1f}%), {rate:,.0f} fields/s, {tail}"
        )

    def advance(self, fields: int) -> None:
        self.done += fields
        if self.mode == "bar":
            self._bar.update(self._task, completed=self.done, rate=f"{self.rate():,.0f}/s")
        elif self.mode == "lines":
            now = time.monotonic()
            if now - self._last_line >= self.interval:
                self._last_line = now
                print(self._line(False), file=self.stream, flush=True)

    def __exit__(self, kind: type[BaseException] | None, *exc_rest: object) -> None:
        if self.mode == "bar":
            self._bar.stop()
        elif self.mode == "lines" and kind is None:
            print(self._line(True), file=self.stream, flush=True)
