"""The progress reporters of the command line: a line on a terminal's stderr now and then.

Commands hand an instance to the library as its ``progress`` callback
(:data:`realquad.core.progress.Progress`: ``progress(what, amount)``). Nothing
is printed for the first :data:`QUIET_SECONDS` seconds, nor more often than
every :data:`EVERY_SECONDS` seconds, nor when stderr is not a terminal (so
pipes and files stay clean). :class:`ElapsedTicker` does the same for a
computation that reports nothing itself: the time elapsed so far.
"""

from __future__ import annotations

import sys
import threading
import time

import click

#: Runs shorter than this print no progress at all.
QUIET_SECONDS = 2.0
#: Least time between two progress lines.
EVERY_SECONDS = 2.0


class ProgressLine:
    """``progress(what, amount)`` → ``realquad: <what>: <amount> so far (Ctrl-C stops)`` on stderr."""

    def __init__(self, force: bool = False) -> None:
        self.start = time.monotonic()
        self.last = self.start
        self.enabled = force or sys.stderr.isatty()

    def __enter__(self) -> ProgressLine:
        return self

    def __call__(self, what: str, amount: float) -> None:
        now = time.monotonic()
        if not self.enabled or now - self.start < QUIET_SECONDS or now - self.last < EVERY_SECONDS:
            return
        self.last = now
        shown = f"{amount:,}" if isinstance(amount, int) else f"{amount:.4g}"
        click.echo(f"realquad: {what}: {shown} so far (Ctrl-C stops)", err=True)

    def __exit__(self, *exc: object) -> None:
        return None


class ElapsedTicker:
    """Writes an elapsed-time line to a terminal's stderr every :data:`EVERY_SECONDS` seconds until stopped."""

    def __init__(self, what: str) -> None:
        self.what, self.stop = what, threading.Event()
        self.thread = (
            threading.Thread(target=self._run, daemon=True) if sys.stderr.isatty() else None
        )

    def _run(self) -> None:
        start = time.monotonic()
        while not self.stop.wait(EVERY_SECONDS):
            click.echo(
                f"realquad: {self.what}: {time.monotonic() - start:.0f} s so far (Ctrl-C stops)",
                err=True,
            )

    def __enter__(self) -> ElapsedTicker:
        if self.thread is not None:
            self.thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self.stop.set()
