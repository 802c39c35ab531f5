"""Fundamental units and regulators of real quadratic fields by index calculus, under GRH.

The relations of :func:`realquad.relations.system.index_calculus` come with
generators of their principal ideals; the kernel of the relation matrix
gives units as power products of those generators, and Euclid's algorithm on
their logarithms gives the unit ``ε*`` that generates them all
(:mod:`realquad.relations.regulator`). Once ``h*·log ε*`` lies in the
GRH-explicit interval for ``h·R`` (whose upper end is below twice its lower
end), ``ε* = ε``: ``proof: "GRH"``. Sub-exponential in ``log D`` where the
infrastructure's baby-step giant-step needs about ``D^{1/4}`` steps.

The unit is exact: ``ε = ∏ ρ_i^{k_i}`` over the generators ``ρ_i`` of a few
thousand relations, ``k_i`` of a few dozen bits. Its logarithm (any precision)
comes from that product. The doubling walk of the infrastructure to distance
``R`` then reaches ``O`` and gives the unit in the compact representation of
Buchmann, Thiel and Williams (``O(log R)`` numbers of small height), checked
against the product's logarithm: with binary64 distances below
:data:`INFRASTRUCTURE_LIMIT`, beyond it with distances carried to the digits
``R`` needs (:mod:`realquad.infrastructure.distances`).

>>> u = fundamental_unit_subexp(Order(4 * (10**10 + 19)))
>>> u.norm, u.proof, str(u.regulator(15))
(1, 'GRH', '147160.386105857')
>>> u.compact().size < 40
True
"""

from __future__ import annotations

import mpmath

from realquad.core.orders import Order
from realquad.core.progress import Progress
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.distances import exact_principal_at
from realquad.infrastructure.ideals import Cycle
from realquad.relations.system import IndexCalculus, index_calculus
from realquad.units.results import MAX_EXPANDED_DIGITS, NO_UNIT_OF_INFINITE_ORDER, Regulator, Unit

METHOD = (
    "index calculus: relations among the {n} prime ideals of norm ≤ {bound} from a "
    "self-initialising sieve, the regulator from the units of the relation kernel, h·R "
    "certified by the analytic class number formula"
)

#: Largest ``R`` whose doubling walk uses binary64 distances (good to about ``10⁻¹²·R``);
#: beyond, the walk carries ``mpmath`` distances.
INFRASTRUCTURE_LIMIT = 10**12


def method_of(found: IndexCalculus) -> str:
    """The ``method`` text of a result from ``found``."""
    return METHOD.format(n=found.factor_base.size, bound=found.factor_base.bound)


def _denominator(found: IndexCalculus) -> int:
    """``c`` of ``ε = (x + y√D)/c``: 1 exactly when ``ε ∈ Z[√D]`` (``2`` only for ``D ≡ 5 mod 8``).

    For ``D ≡ 5 (mod 8)``, 2 is inert and ``O/2O = F₄ = {0, 1, ω, ω²}`` with
    ``ω = (1 + √D)/2``; ``ε ∈ Z + 2O = Z[√D]`` exactly when ``ε ≡ 1``. Each
    generator ``ρ = M·γ̄/(a·n)`` (:mod:`realquad.relations.regulator`) has
    ``M``, ``a·n`` odd and ``γ̄ = (B − √D)/2 ≡ (B + 1)/2 + ω``, that is ``ω``
    or ``ω²``; a ramified prime is odd, ``≡ 1``. For other ``D``, ``(O/2O)^×``
    is trivial or ``D`` is even, and ``c = 1``.
    """
    D = found.order.discriminant
    if D % 8 != 5:
        return 1
    unit = found.unit
    assert unit is not None
    total = 0
    for i, k in unit.exponents.items():
        source = found.matrix.sources[i]
        if isinstance(source, int):
            continue
        total += k * (1 if (source.B + 1) // 2 % 2 == 0 else 2)
    return 1 if total % 3 == 0 else 2


def unit_from_relations(found: IndexCalculus) -> Unit:
    """The :class:`Unit` of a finished index calculus of a real field (module notes)."""
    unit = found.unit
    assert unit is not None
    D = found.order.discriminant
    method = method_of(found)
    product = CompactRepresentation.from_power_product(
        D, [(found.generators[i], k) for i, k in sorted(unit.exponents.items())]
    )
    # the doubling walk to distance R reaches O, and its factors are the unit in
    # Buchmann–Thiel–Williams form: with binary64 distances up to INFRASTRUCTURE_LIMIT,
    # beyond with distances carried to the digits R needs
    digits = None if unit.log < INFRASTRUCTURE_LIMIT else len(str(int(unit.log))) + 20
    x = float(unit.log) if digits is None else unit.log
    try:
        factors = exact_principal_at(Cycle(D), x, digits=digits)
    except ArithmeticError:  # O not within the search: the product stays the representation
        return _unit(found, method, product, product)
    walked = CompactRepresentation.from_factors(D, factors)
    size = len(str(int(unit.log)))
    with mpmath.workdps(size + 30):
        gap = abs(walked.log(size + 15)[0] - unit.log)
    if gap > 1e-6 * (1 + (unit.log if digits is None else 0)):
        raise ArithmeticError(
            "internal check failed: the infrastructure's unit is not the relations' unit"
        )
    return _unit(found, method, product, walked)


def _unit(
    found: IndexCalculus,
    method: str,
    product: CompactRepresentation,
    compact: CompactRepresentation,
) -> Unit:
    """The :class:`Unit`: logarithms from the product of generators, the rest from ``compact``."""
    unit = found.unit
    assert unit is not None

    def regulator_to(digits: int) -> Regulator:
        with mpmath.workdps(digits + 10):
            value, bound = product.log(digits)
        return Regulator(value, digits, bound, method, "GRH")

    return Unit(
        order=found.order,
        norm=unit.norm,
        period_length=None,
        method=method,
        proof="GRH",
        _expander=lambda: compact.expand(MAX_EXPANDED_DIGITS),
        _regulator=regulator_to,
        _compact=lambda: compact,
        _denominator=lambda: _denominator(found),
    )


def fundamental_unit_subexp(
    order: Order,
    progress: Progress | None = None,
    seed: int = 1,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> Unit:
    """The fundamental unit of a real quadratic field by index calculus, under GRH (module notes).

    ``workers``, ``scheduler`` and ``relations_file`` are those of
    :func:`~realquad.relations.system.index_calculus`.
    """
    order = order.require_real(NO_UNIT_OF_INFINITE_ORDER)
    found = index_calculus(order, progress, seed, workers, scheduler, relations_file)
    return unit_from_relations(found)


def regulator_subexp(
    order: Order,
    digits: int = 30,
    progress: Progress | None = None,
    seed: int = 1,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> Regulator:
    """The regulator of a real quadratic field to ``digits`` digits by index calculus, under GRH."""
    unit = fundamental_unit_subexp(order, progress, seed, workers, scheduler, relations_file)
    return unit.regulator(digits)
