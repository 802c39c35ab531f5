"""Continued fractions of rationals and quadratic irrationals ``(P + √D)/Q``.

:func:`continued_fraction` expands any rational or real quadratic irrational
(:mod:`realquad.cfrac.expansion`, the exact recurrence with Lagrange's period);
:func:`convergents` lists its convergents; :func:`from_periodic` goes back from
a periodic expansion to the number. Text such as ``"(1+sqrt(13))/2"`` is read
by :mod:`realquad.cfrac.parser`.

>>> str(continued_fraction("sqrt(61)"))
'[7; (1, 4, 3, 1, 2, 2, 1, 3, 4, 1, 14)]'
>>> list(convergents("sqrt(2)", 4))
[(1, 1), (3, 2), (7, 5), (17, 12)]
"""

from __future__ import annotations

from realquad.cfrac.expansion import (
    ContinuedFraction,
    QuadraticIrrational,
    complete_quotients,
    continued_fraction,
    convergents,
    from_periodic,
    to_reduced,
)
from realquad.cfrac.parser import parse_real_quadratic

__all__ = [
    "ContinuedFraction",
    "QuadraticIrrational",
    "complete_quotients",
    "continued_fraction",
    "convergents",
    "from_periodic",
    "parse_real_quadratic",
    "to_reduced",
]
