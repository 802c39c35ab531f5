"""Continued fractions of rationals and quadratic irrationals ``(P + √D)/Q``.

:func:`continued_fraction` expands any rational or real quadratic irrational
(:mod:`realquad.cfrac.expansion`, the exact recurrence with Lagrange's period);
:func:`convergents` lists its convergents and :func:`best_approximations` the
best rational approximations of either kind (:mod:`realquad.cfrac.approximations`,
convergents and intermediate fractions, compared exactly); :func:`from_periodic`
goes back from a periodic expansion to the number. Text such as ``"(1+sqrt(13))/2"`` is read
by :mod:`realquad.cfrac.parser`.

>>> str(continued_fraction("sqrt(61)"))
'[7; (1, 4, 3, 1, 2, 2, 1, 3, 4, 1, 14)]'
>>> list(convergents("sqrt(2)", 4))
[(1, 1), (3, 2), (7, 5), (17, 12)]
>>> [(a.p, a.q) for a in best_approximations("sqrt(2)", 12)]
[(1, 1), (3, 2), (4, 3), (7, 5), (17, 12)]
"""

from __future__ import annotations

from realquad.cfrac.approximations import Approximation, best_approximations
from realquad.cfrac.expansion import (
    ContinuedFraction,
    QuadraticIrrational,
    complete_quotients,
    continued_fraction,
    convergents,
    exact_real,
    from_periodic,
    partial_quotients,
    to_reduced,
)
from realquad.cfrac.parser import parse_real_quadratic

__all__ = [
    "Approximation",
    "ContinuedFraction",
    "QuadraticIrrational",
    "best_approximations",
    "complete_quotients",
    "continued_fraction",
    "convergents",
    "exact_real",
    "from_periodic",
    "parse_real_quadratic",
    "partial_quotients",
    "to_reduced",
]
