"""The one progress reporter of the command line: a line on a terminal's stderr now and then.

Commands hand an instance to the library as its ``progress`` callback
(:data:`realquad.core.progress.Progress`: ``progress(what, amount)``). Nothing
is printed for the first :data:`QUIET_SECONDS` seconds, nor more often than
every :data:`EVERY_SECONDS` seconds, nor when stderr is not a terminal (so
pipes and files stay clean).
"""

from __future__ import annotations

import sys
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
