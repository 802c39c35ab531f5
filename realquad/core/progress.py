"""The one shape of a progress callback.

Long computations accept ``progress``, a callable taking ``(what, amount)``
or ``(what, amount, expected)``: ``what`` names the quantity in words
(``"distance searched"``, ``"classes found"``), ``amount`` is how far it has
come, and ``expected``, when the computation can estimate it, about where it
will end (an estimate for the listener, never a bound). The library calls it now and
then (never more than a few times a second); the command line turns it into a
line on a terminal's stderr. ``None`` means nobody is listening.

>>> seen = []
>>> report: Progress = lambda what, amount: seen.append((what, amount))
>>> report("classes found", 12); seen
[('classes found', 12)]
"""

from __future__ import annotations

from collections.abc import Callable

#: ``progress(what, amount[, expected])``: a long computation reports how far it has come.
Progress = Callable[..., None]


def expecting(progress: Progress | None, expected: float | None) -> Progress | None:
    """``progress`` with ``expected`` passed along on every call (``None`` stays ``None``).

    >>> seen = []
    >>> expecting(lambda *args: seen.append(args), 100.0)("classes found", 3); seen
    [('classes found', 3, 100.0)]
    """
    if progress is None or expected is None:
        return progress
    listener = progress

    def report(what: str, amount: float) -> None:
        listener(what, amount, expected)

    return report
