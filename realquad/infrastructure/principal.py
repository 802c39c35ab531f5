"""The principal ideal test: is an ideal principal, and if so, a generator in compact form.

The ideal ``I = [a, (b + √D)/2]`` (primitive, invertible) is first reduced,
``L_J = μ·L_I``. If it is principal, ``J`` lies on the principal cycle at some
distance ``x`` (mod ``R``). Baby steps give every cycle ideal with distance in
``[0, δ_B]`` (and, conjugated, in ``[R − δ_B, R]``); giant steps
``J_{j+1} = reduce(J_j·G₁)`` advance by at most ``2δ_B``, so within
``R + 2δ_B`` of travel some ``J_j`` falls into that window if and only if
``J`` is principal. The match gives ``x``; an exact doubling walk to ``x``
gives ``L_J = γ·O`` with ``γ`` in compact form, and the generator of ``I``
is ``ν = a·μ^{−1}·γ``, whose norm ``±a`` is checked exactly.

>>> from realquad.infrastructure.principal import principal_ideal_test
>>> principal_ideal_test(4 * 79, 3, 2).principal     # a prime above 3 in Q(√79), h = 3 (from memory)
False
>>> res = principal_ideal_test(4 * 79, 27, 44)        # its cube
>>> res.principal, res.generator.norm, res.generator.expand()   # (34 + 2√316)/2 = 17 + 2√79
(True, -27, (34, 2))

References: Jacobson–Williams, *Solving the Pell Equation*, Springer 2009,
ch. 10–12 (principal ideal testing in the infrastructure, compact
representations); J. Buchmann and H. C. Williams, "On principal ideal
testing in algebraic number fields", *J. Symbolic Comput.* 4 (1987).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from realquad.errors import DomainError, InputError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.distances import exact_ideal_at
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.regulator_search import BSGSResult, extend_for_sweep, search_regulator
from realquad.infrastructure.table import BabyStepTable


@dataclass(frozen=True)
class PrincipalityResult:
    """Whether ``[a, (b + √D)/2]`` is principal, and a generator ``ν`` (``I = νO``) when it is."""

    discriminant: int
    a: int
    b: int
    principal: bool
    generator: CompactRepresentation | None
    method: str = "infrastructure baby-step giant-step"
    proof: str = "unconditional"


def check_ideal(D: int, a: int, b: int) -> None:
    """Raise :class:`InputError`/:class:`DomainError` unless ``[a, (b+√D)/2]`` is a primitive invertible ideal."""
    if a <= 0:
        raise InputError(f"the norm a must be positive, got {a}")
    if (b * b - D) % (4 * a):
        raise DomainError(f"[{a}, ({b} + √{D})/2] is not an ideal: 4a must divide b² − D")
    c = (b * b - D) // (4 * a)
    if math.gcd(math.gcd(a, b), c) != 1:
        raise DomainError(
            f"[{a}, ({b} + √{D})/2] is not invertible in the order (gcd(a, b, c) ≠ 1)"
        )


def principal_ideal_test(D: int, a: int, b: int) -> PrincipalityResult:
    """Decide whether the ideal ``[a, (b + √D)/2]`` of the order of discriminant ``D`` is principal."""
    cycle = Cycle(D)
    D = cycle.discriminant
    check_ideal(D, a, b)
    aJ, bJ, mu = cycle.reduce_exact(a, b)
    found = _search(D)
    R = float(found.value)
    table = found.table
    assert table is not None
    x = _distance_on_cycle(cycle, table, aJ, bJ, R)
    if x is None:
        return PrincipalityResult(D, a, b, False, None)
    factors = exact_ideal_at(cycle, x, (aJ, bJ))
    # I = a·L_I = a·μ^{−1}·L_J = (a·μ^{−1}·γ)·O
    extra = mu.inverse() * a
    generator = CompactRepresentation.from_factors(D, factors, extra, absolute_norm=a)
    return PrincipalityResult(D, a, b, True, generator)


def principal_search(D: int) -> BSGSResult:
    """The regulator search of ``D`` whose baby-step table the principal ideal tests share (cached).

    Its factors give the fundamental unit (``realquad.units.bsgs.unit_from_search``), so a
    caller that tests ideals and needs the unit searches once.
    """
    return _search(D)


@lru_cache(maxsize=2)
def _search(D: int) -> BSGSResult:
    """The regulator search of ``D`` with its baby-step table (kept for repeated tests).

    The table is extended to balance the tests' giant steps over a whole period;
    at D ≈ 10³⁰ that is the memory budget (1.5 GiB), hence two fields kept at most.
    """
    found = search_regulator(D, 20)
    extend_for_sweep(found, float(found.value))
    return found


def _distance_on_cycle(
    cycle: Cycle, table: BabyStepTable, a: int, b: int, R: float
) -> float | None:
    """The distance in ``[0, R)`` of the reduced ideal ``(a, b)`` on the principal cycle, or ``None``."""
    hit = table.lookup(a, b)
    if hit is not None:
        return hit % R
    hit = table.lookup(a, cycle.conjugate(a, b))
    if hit is not None:
        return (-hit - math.log(a)) % R
    if table.period is not None:
        return None  # the table holds the whole cycle
    # giant ideal G₁ with distance s ≤ 2·cover − margin: the last baby ideal squared would be too far
    cover = table.distance
    margin = 8 * math.log(cycle.discriminant) + 8
    giant = table.giant(margin)
    found = table.search(
        a, b, giant, base=0.0, lo_step=0.0, hi_step=2 * cover - 1.0, stop=R + 2 * cover + margin
    )
    if found.status == "direct":
        return (found.found - found.distance) % R
    if found.status == "conjugate":
        return (-found.found - math.log(found.a) - found.distance) % R
    return None
