"""Discriminants, conductors and orders of quadratic fields.

An order of a quadratic field is fixed by its discriminant ``D``,
``D ≡ 0, 1 (mod 4)``, ``D`` not a square: a real order for ``D > 0``, an
imaginary one for ``D < 0``. Writing ``D = f² D₀`` with ``D₀`` the fundamental
discriminant, ``f > 0`` is the conductor and the field is ``Q(√d)`` with ``d``
the squarefree radicand (``D₀ = d`` or ``4d``; ``d`` has the sign of ``D``).

>>> O = Order(52)
>>> (O.fundamental_discriminant, O.conductor, O.radicand, O.is_real)
(13, 2, 13, True)
>>> field(12).discriminant
12
>>> P = Order(-20)
>>> (P.fundamental_discriminant, P.conductor, P.radicand, P.is_real)
(-20, 1, -5, False)
>>> field(-5), field(-3), field(-12)
(Order(-20), Order(-3), Order(-3))

Each problem says which signs it handles and refuses the other in one clear
line (:meth:`Order.require_real`).

Reference: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §5.1–5.2.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

from realquad.core.integers import as_integer, is_square, isqrt
from realquad.core.primes import squarefree_decomposition
from realquad.core.results import JSONObject
from realquad.errors import DomainError, InputError


def check_discriminant(D: object, *, real: bool = False) -> int:
    """Validate a discriminant of a quadratic order (of a real one with ``real``) and return it.

    >>> check_discriminant(-20), check_discriminant("13")
    (-20, 13)
    >>> check_discriminant(-20, real=True)
    Traceback (most recent call last):
    ...
    realquad.errors.DomainError: discriminant -20 < 0 belongs to an imaginary quadratic order; this needs a real one (D > 0)
    """
    D = as_integer(D, "discriminant")
    if D == 0:
        raise InputError("discriminant must not be 0")
    if D % 4 not in (0, 1):
        raise InputError(f"discriminant must be 0 or 1 mod 4, got {D} (≡ {D % 4} mod 4)")
    if is_square(D):
        raise DomainError(f"discriminant {D} is a perfect square: it belongs to no quadratic field")
    if real and D < 0:
        raise DomainError(
            f"discriminant {D} < 0 belongs to an imaginary quadratic order; "
            "this needs a real one (D > 0)"
        )
    return D


def check_radicand(d: object) -> int:
    """Validate ``d`` (of ``Q(√d)``): a non-zero integer, not a square, not 1."""
    d = as_integer(d, "d")
    if d == 0:
        raise InputError("d must be a non-zero integer, got 0")
    if is_square(d):
        raise DomainError(f"d = {d} is a perfect square: Q(√{d}) = Q is not a quadratic field")
    return d


def fundamental_discriminant_of(d: int) -> int:
    """Discriminant of the maximal order of ``Q(√d)`` for squarefree ``d`` (either sign).

    >>> [fundamental_discriminant_of(d) for d in (5, 2, 3, -1, -3, -5)]
    [5, 8, 12, -4, -3, -20]
    """
    return d if d % 4 == 1 else 4 * d


@dataclass(frozen=True)
class Order:
    """The order of discriminant ``D`` in a quadratic field (real for ``D > 0``, imaginary for ``D < 0``).

    >>> Order(45)
    Order(45)
    >>> Order(45).conductor, Order(45).radicand
    (3, 5)
    """

    discriminant: int

    def __post_init__(self) -> None:
        object.__setattr__(self, "discriminant", check_discriminant(self.discriminant))

    @classmethod
    def from_conductor(cls, fundamental: int, conductor: int = 1) -> Order:
        """The order of conductor ``f`` in the field of fundamental discriminant ``D₀``, unfactored.

        For callers that know ``D₀`` is fundamental (a survey sieved it): the
        decomposition of ``D = D₀f²`` is taken as given instead of factoring
        ``D``.

        >>> Order.from_conductor(-20, 3) == Order(-180), Order.from_conductor(-20, 3).conductor
        (True, 3)
        """
        order = cls(fundamental * conductor * conductor)
        order.__dict__["_decomposition"] = (fundamental, conductor)  # the cached property's value
        return order

    @classmethod
    def of(cls, order: Order | int) -> Order:
        """``order`` itself, or the order of discriminant ``order``.

        >>> Order.of(5), Order.of(Order(8))
        (Order(5), Order(8))
        """
        return order if isinstance(order, Order) else cls(order)

    def __repr__(self) -> str:
        return f"Order({self.discriminant})"

    def to_dict(self) -> JSONObject:
        """The JSON shape of an order (``docs/json.md``, *Order*).

        >>> Order(52).to_dict()
        {'discriminant': 52, 'fundamental_discriminant': 13, 'conductor': 2, 'radicand': 13}
        """
        return {
            "discriminant": self.discriminant,
            "fundamental_discriminant": self.fundamental_discriminant,
            "conductor": self.conductor,
            "radicand": self.radicand,
        }

    @cached_property
    def _decomposition(self) -> tuple[int, int]:
        """(fundamental discriminant, conductor)."""
        D = self.discriminant
        s, f = squarefree_decomposition(abs(D))
        s = s if D > 0 else -s
        # D = s f², s squarefree. D0 = s if s ≡ 1 (mod 4), otherwise 4s with f halved.
        if s % 4 == 1:
            return s, f
        return 4 * s, f // 2

    @property
    def fundamental_discriminant(self) -> int:
        return self._decomposition[0]

    @property
    def conductor(self) -> int:
        return self._decomposition[1]

    @property
    def radicand(self) -> int:
        """The squarefree ``d`` with the order in ``Q(√d)`` (negative for an imaginary order)."""
        D0 = self.fundamental_discriminant
        return D0 if D0 % 4 == 1 else D0 // 4

    @property
    def is_real(self) -> bool:
        return self.discriminant > 0

    @property
    def is_maximal(self) -> bool:
        return self.conductor == 1

    @property
    def sqrt_factor(self) -> int:
        """The integer ``k`` with ``√D = k·√radicand``."""
        return isqrt(self.discriminant // self.radicand)

    def maximal_order(self) -> Order:
        return Order(self.fundamental_discriminant)

    def require_real(self, reason: str) -> Order:
        """This order if it is real; else :class:`DomainError` with ``reason`` (why ``D > 0`` is needed).

        >>> Order(-4).require_real("an imaginary quadratic order has no unit of infinite order")
        Traceback (most recent call last):
        ...
        realquad.errors.DomainError: an imaginary quadratic order has no unit of infinite order: a positive discriminant is needed, not D = -4
        """
        if self.discriminant < 0:
            raise DomainError(
                f"{reason}: a positive discriminant is needed, not D = {self.discriminant}"
            )
        return self


def field(d: int) -> Order:
    """The maximal order of ``Q(√d)``; ``d`` (either sign) need not be squarefree.

    >>> field(8), field(5), field(18), field(-1)
    (Order(8), Order(5), Order(8), Order(-4))
    """
    d = check_radicand(d)
    s, _ = squarefree_decomposition(abs(d))
    return Order(fundamental_discriminant_of(s if d > 0 else -s))
