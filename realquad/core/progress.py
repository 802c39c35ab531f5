"""The one shape of a progress callback.

Long computations accept ``progress``, a callable taking ``(what, amount)``:
``what`` names the quantity in words (``"distance searched"``, ``"classes
found"``) and ``amount`` is how far it has come. The library calls it now and
then (never more than a few times a second); the command line turns it into a
line on a terminal's stderr. ``None`` means nobody is listening.

>>> seen = []
>>> report: Progress = lambda what, amount: seen.append((what, amount))
>>> report("classes found", 12); seen
[('classes found', 12)]
"""

from __future__ import annotations

from collections.abc import Callable

#: ``progress(what, amount)``: a long computation reports how far it has come.
Progress = Callable[[str, float], None]
