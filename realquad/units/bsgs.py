"""Fundamental units and regulators by baby-step giant-step in the infrastructure.

The search itself is shared machinery (:mod:`realquad.infrastructure.regulator_search`:
the baby-step table, the giant steps, the certification of ``R``); this module
turns its result into a :class:`~realquad.units.results.Unit` kept in compact
representation and a :class:`~realquad.units.results.Regulator` to any
precision. Unconditional; the cost is about ``√R`` steps, so it reaches
``D ≈ 10³⁰`` in seconds where the continued fraction would need ``R/1.19``
steps.

>>> u = fundamental_unit_bsgs(Order(4 * (10**9 + 7)))
>>> u.method, u.proof, u.norm
('infrastructure baby-step giant-step', 'unconditional', 1)
>>> str(regulator_bsgs(Order(4 * (10**12 + 39)), 30))[:12]
'631893.23081'

References: D. Shanks, "The infrastructure of a real quadratic field and its
applications", 1972; J. Buchmann, C. Thiel and H. C. Williams, "Short
representation of quadratic integers", 1995; M. J. Jacobson Jr. and
H. C. Williams, *Solving the Pell Equation*, Springer 2009, ch. 10–12.
"""

from __future__ import annotations

from realquad.core.lfunction import estimate_hR
from realquad.core.orders import Order
from realquad.core.progress import Progress
from realquad.errors import TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.distances import principal_near
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.regulator_search import (
    DEFAULT_MAX_TABLE,
    METHOD,
    BSGSResult,
    search_regulator,
)
from realquad.textio import about, shown
from realquad.units.results import MAX_EXPANDED_DIGITS, Regulator, Unit

#: Largest number of giant steps the infrastructure search is started for (hours of work).
MAX_GIANT_STEPS = 10**9


def check_reach(D: int) -> None:
    """Refuse, before starting, a search that would need more than :data:`MAX_GIANT_STEPS` giant steps.

    >>> check_reach(10**20 + 129)   # about 10⁴ giant steps: fine
    >>> try:
    ...     check_reach(10**60 + 1)
    ... except TooLargeError as exc:
    ...     print(str(exc)[:60])
    the regulator of D = 10000000000000000000…000000000000000000
    """
    E = estimate_hR(D, 2_000).value
    steps = E / (2 * 1.19 * DEFAULT_MAX_TABLE)
    if steps > MAX_GIANT_STEPS:
        raise TooLargeError(
            f"the regulator of D = {shown(D)} needs {about(steps)} giant steps of baby-step "
            f"giant-step (R may be {about(E)}); this is beyond reach of the methods "
            "implemented here (subexponential methods are planned)"
        )


def regulator_from_search(found: BSGSResult, digits: int | None = None) -> Regulator:
    """The :class:`Regulator` of a finished search (to its own digits, or fewer)."""
    shown = found.digits if digits is None else min(digits, found.digits)
    return Regulator(found.value, shown, found.error_bound, METHOD, found.proof)


def unit_from_search(order: Order, found: BSGSResult) -> Unit:
    """The :class:`Unit` of a finished baby-step giant-step regulator search (unit kept compact)."""
    D = order.discriminant
    eps = CompactRepresentation.from_factors(D, found.factors)

    def regulator_to(digits: int) -> Regulator:
        if digits <= found.digits:
            return regulator_from_search(found, digits)
        value, bound = eps.log(digits)
        return Regulator(value, digits, bound, METHOD, "unconditional")

    return Unit(
        order=order,
        norm=eps.norm,
        period_length=None,
        method=METHOD,
        proof="unconditional",
        _expander=lambda: eps.expand(MAX_EXPANDED_DIGITS),
        _regulator=regulator_to,
        _compact=lambda: eps,
        _denominator=lambda: _denominator(D, float(found.value), float(found.error_bound)),
    )


def _denominator(D: int, R: float, error: float) -> int:
    """``c`` of ``ε = (x + y√r)/c`` for odd ``D``: 1 exactly when ``ε ∈ Z[√D]``.

    The order ``Z[√D]`` (discriminant ``4D``) has the unit ``ε`` or ``ε³``
    (``(O/2O)^×`` has order 3 or 1), so ``ε ∈ Z[√D]`` exactly when its
    infrastructure has a copy of ``O`` at distance ``R`` (and not first at
    ``3R``): one doubling walk to ``R`` decides.
    """
    window = error + 1e-12 * R + 1e-6  # the doubling walk's own float error
    return 1 if principal_near(Cycle(4 * D), R, min(window, R / 2)) else 2


def fundamental_unit_bsgs(order: Order, progress: Progress | None = None) -> Unit:
    """The fundamental unit of ``order`` by baby-step giant-step (kept compact)."""
    check_reach(order.discriminant)
    return unit_from_search(order, search_regulator(order.discriminant, 30, progress=progress))


def regulator_bsgs(order: Order, digits: int = 30, progress: Progress | None = None) -> Regulator:
    """The regulator of ``order`` to ``digits`` significant digits by baby-step giant-step."""
    check_reach(order.discriminant)
    return regulator_from_search(search_regulator(order.discriminant, digits, progress=progress))
