"""The progress reporters of the command line: a line on a terminal's stderr now and then.

Commands hand an instance to the library as its ``progress`` callback
(:data:`realquad.core.progress.Progress`: ``progress(what, amount)``). Nothing
is printed for the first :data:`QUIET_SECONDS` seconds, nor more often than
every :data:`EVERY_SECONDS` seconds on a terminal; when stderr is a pipe or a
file, plain lines come at most every :data:`PLAIN_EVERY_SECONDS` seconds, so a
log shows a long run is alive without filling up. :class:`ElapsedTicker` does the same for a
computation that reports nothing itself: the time elapsed so far.
"""

from __future__ import annotations

import sys
import threading
import time

import click

#: Runs shorter than this print no progress at all.
QUIET_SECONDS = 2.0
#: Least time between two progress lines on a terminal.
EVERY_SECONDS = 2.0
#: Least time before the first and between two progress lines when stderr is not a terminal.
PLAIN_EVERY_SECONDS = 10.0


class ProgressLine:
    """``progress(what, amount)`` → ``realquad: <what>: <amount> so far (Ctrl-C stops)`` on stderr."""

    def __init__(self, force: bool = False) -> None:
        self.start = time.monotonic()
        self.last = self.start
        terminal = force or sys.stderr.isatty()
        self.quiet = QUIET_SECONDS if terminal else PLAIN_EVERY_SECONDS
        self.every = EVERY_SECONDS if terminal else PLAIN_EVERY_SECONDS

    def __enter__(self) -> ProgressLine:
        return self

    def __call__(self, what: str, amount: float, expected: float | None = None) -> None:
        now = time.monotonic()
        if now - self.start < self.quiet or now - self.last < self.every:
            return
        self.last = now
        shown = f"{amount:,}" if isinstance(amount, int) else f"{amount:.4g}"
        click.echo(
            f"realquad: {what}: {shown}{_remaining(amount, expected, now - self.start)} (Ctrl-C stops)",
            err=True,
        )

    def __exit__(self, *exc: object) -> None:
        return None


def _remaining(amount: float, expected: float | None, elapsed: float) -> str:
    """`` of about E, about N s left`` from the rate so far (empty without an estimate).

    >>> _remaining(25, 100.0, 10.0), _remaining(5, None, 3.0)
    (' of about 100 (25 %), about 30 s left', ' so far')
    """
    if not expected or amount <= 0:
        return " so far"
    share = min(amount / expected, 0.99)
    left = elapsed * (1 - share) / share
    return f" of about {expected:.4g} ({100 * share:.0f} %), about {left:,.0f} s left"


class ElapsedTicker:
    """Writes an elapsed-time line to a terminal's stderr every :data:`EVERY_SECONDS` seconds until stopped."""

    def __init__(self, what: str) -> None:
        self.what, self.stop = what, threading.Event()
        self.every = EVERY_SECONDS if sys.stderr.isatty() else PLAIN_EVERY_SECONDS
        self.thread = threading.Thread(target=self._run, daemon=True)

    def _run(self) -> None:
        start = time.monotonic()
        while not self.stop.wait(self.every):
            click.echo(
                f"realquad: {self.what}: {time.monotonic() - start:.0f} s so far (Ctrl-C stops)",
                err=True,
            )

    def __enter__(self) -> ElapsedTicker:
        self.thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self.stop.set()
