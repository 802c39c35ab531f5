"""Small result types shared by the unit, regulator and class-group algorithms.

They live low in the stack so that every algorithm module (continued
fraction, infrastructure, ...) returns the same types without importing the
others. Each result says how it was obtained (``method``) and how sure it is
(``proof``: ``"unconditional"`` or ``"GRH"``).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.results import Proof
from realquad.textio import decimal_digits

#: Why an imaginary order is refused: its units are the roots of unity (``w = 2, 4, 6``).
NO_UNIT_OF_INFINITE_ORDER = (
    "an imaginary quadratic order has no unit of infinite order "
    "(its units are its w = 2, 4 or 6 roots of unity: unit_group)"
)


@dataclass(frozen=True)
class Regulator:
    """The regulator ``R = log ε`` of an order, rounded to ``digits`` significant digits.

    ``error_bound`` bounds ``|value − R|`` rigorously (absolute error of the
    unrounded value; the decimal string adds at most half a unit in its last
    place).
    """

    value: mpmath.mpf
    digits: int
    error_bound: mpmath.mpf
    method: str
    proof: Proof = "unconditional"

    def __str__(self) -> str:
        return mpmath.nstr(
            self.value, self.digits, strip_zeros=False, min_fixed=-mpmath.inf, max_fixed=mpmath.inf
        )

    def __float__(self) -> float:
        return float(self.value)


@dataclass(eq=False)
class Unit:
    """The fundamental unit ``ε > 1`` of an order, expanded only on request.

    ``ε = (u + v√D)/2`` where ``D`` is the order's discriminant; the same
    number is ``(x + y√radicand)/denominator`` in lowest terms
    (:meth:`expand`).
    """

    order: Order
    norm: int
    period_length: int | None
    method: str
    proof: Proof
    _expander: Callable[[], tuple[int, int]] = field(repr=False)
    _regulator: Callable[[int], Regulator] = field(repr=False)
    _cache: dict[str, object] = field(default_factory=dict, repr=False)
    _compact: Callable[[], Any] | None = field(default=None, repr=False)

    def compact(self) -> Any:
        """The compact representation of ``ε`` (units found in the infrastructure), else ``None``."""
        return None if self._compact is None else self._compact()

    def half_integer_coordinates(self) -> tuple[int, int]:
        """``(u, v)`` with ``ε = (u + v√D)/2`` and ``u² − D v² = ±4``."""
        if "uv" not in self._cache:
            self._cache["uv"] = self._expander()
        return self._cache["uv"]  # type: ignore[return-value]

    def expand(self) -> QuadraticNumber:
        """The exact unit as ``(x + y√radicand)/denominator``."""
        if "exact" not in self._cache:
            u, v = self.half_integer_coordinates()
            k = self.order.sqrt_factor
            self._cache["exact"] = QuadraticNumber(u, v * k, 2, self.order.radicand)
        return self._cache["exact"]  # type: ignore[return-value]

    @property
    def x(self) -> int:
        return int(self.expand().x)

    @property
    def y(self) -> int:
        return int(self.expand().y)

    @property
    def denominator(self) -> int:
        return int(self.expand().c)

    @property
    def digits(self) -> int:
        """Number of decimal digits of ``x`` in the expanded form."""
        if "digits" not in self._cache:
            self._cache["digits"] = decimal_digits(self.expand().x)
        return self._cache["digits"]  # type: ignore[return-value]

    def regulator(self, digits: int = 30) -> Regulator:
        """``log ε`` to ``digits`` significant digits, without expanding ``ε``."""
        key = f"regulator{digits}"
        if key not in self._cache:
            self._cache[key] = self._regulator(digits)
        return self._cache[key]  # type: ignore[return-value]

    def power(self, k: int) -> QuadraticNumber:
        """``ε^k`` exactly (``k`` may be negative)."""
        return self.expand() ** k
