"""Discriminants, conductors, orders and the Kronecker symbol.

An order of a real quadratic field is fixed by its discriminant ``D > 0``,
``D ≡ 0, 1 (mod 4)``, ``D`` not a square. Writing ``D = f² D₀`` with ``D₀``
the fundamental discriminant, ``f`` is the conductor and the field is
``Q(√d)`` with ``d`` the squarefree radicand (``D₀ = d`` or ``4d``).

>>> O = Order(52)
>>> (O.fundamental_discriminant, O.conductor, O.radicand)
(13, 2, 13)
>>> field(12).discriminant
12
>>> kronecker(5, 11)
1

Reference: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §5.1–5.2.
"""

from __future__ import annotations

from dataclasses import dataclass
from dataclasses import field as dataclass_field
from functools import cached_property

import gmpy2

from realquad.errors import DomainError, InputError
from realquad.factoring import factorize, squarefree_decomposition


def as_integer(value: object, name: str = "value") -> int:
    """Convert ``value`` to ``int`` exactly, or raise :class:`InputError`.

    Accepts ints, gmpy2 integers and decimal strings (with an optional sign,
    underscores and surrounding spaces).

    >>> as_integer(" -1_000 ")
    -1000
    >>> as_integer("2.5")
    Traceback (most recent call last):
    ...
    realquad.errors.InputError: value must be an integer, got '2.5'
    """
    if isinstance(value, bool):
        raise InputError(f"{name} must be an integer, got {value!r}")
    if isinstance(value, int):
        return value
    if type(value).__name__ == "mpz":
        return int(value)  # type: ignore[call-overload]
    if isinstance(value, str):
        text = value.strip().replace("_", "")
        body = text[1:] if text[:1] in "+-" else text
        if body and body.isascii() and body.isdigit():
            try:
                return int(gmpy2.mpz(text))
            except ValueError:
                pass
        shown = value if len(value) <= 40 else value[:37] + "..."
        raise InputError(f"{name} must be an integer, got {shown!r}")
    raise InputError(f"{name} must be an integer, got {type(value).__name__}")


def is_square(n: int) -> bool:
    """Exact perfect-square test (``False`` for negative ``n``)."""
    return n >= 0 and bool(gmpy2.is_square(n))


def isqrt(n: int) -> int:
    """Floor of the square root of ``n ≥ 0``."""
    return int(gmpy2.isqrt(n))


def kronecker(a: int, n: int) -> int:
    """The Kronecker symbol (a/n), for any integers ``a`` and ``n``.

    >>> [kronecker(-4, p) for p in (3, 5, 7)]
    [-1, 1, -1]
    """
    return int(gmpy2.kronecker(a, n))


def check_discriminant(D: int) -> int:
    """Validate a discriminant of a real quadratic order and return it as ``int``."""
    D = as_integer(D, "discriminant")
    if D <= 0:
        raise InputError(f"discriminant must be positive, got {D}")
    if D % 4 not in (0, 1):
        raise InputError(f"discriminant must be 0 or 1 mod 4, got {D} (≡ {D % 4} mod 4)")
    if is_square(D):
        raise DomainError(f"discriminant {D} is a perfect square: it belongs to no quadratic field")
    return D


def check_radicand(d: int) -> int:
    """Validate ``d > 0`` non-square (radicand of ``Q(√d)``) and return it."""
    d = as_integer(d, "d")
    if d <= 0:
        raise InputError(f"d must be a positive integer, got {d}")
    if is_square(d):
        raise DomainError(f"d = {d} is a perfect square: Q(√{d}) = Q is not a quadratic field")
    return d


def fundamental_discriminant_of(d: int) -> int:
    """Discriminant of the maximal order of ``Q(√d)`` for squarefree ``d``."""
    return d if d % 4 == 1 else 4 * d


@dataclass(frozen=True)
class Order:
    """The order of discriminant ``D`` in a real quadratic field.

    >>> Order(45)
    Order(45)
    >>> Order(45).conductor, Order(45).radicand
    (3, 5)
    """

    discriminant: int
    _factors: dict[int, int] | None = dataclass_field(default=None, compare=False, repr=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "discriminant", check_discriminant(self.discriminant))

    def __repr__(self) -> str:
        return f"Order({self.discriminant})"

    @cached_property
    def _decomposition(self) -> tuple[int, int]:
        """(fundamental discriminant, conductor)."""
        D = self.discriminant
        s, f = squarefree_decomposition(D)
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
        D0 = self.fundamental_discriminant
        return D0 if D0 % 4 == 1 else D0 // 4

    @property
    def is_maximal(self) -> bool:
        return self.conductor == 1

    @property
    def sqrt_factor(self) -> int:
        """The integer ``k`` with ``√D = k·√radicand``."""
        return isqrt(self.discriminant // self.radicand)

    def maximal_order(self) -> Order:
        return Order(self.fundamental_discriminant)

    def factored_discriminant(self) -> dict[int, int]:
        return factorize(self.discriminant)


def field(d: int) -> Order:
    """The maximal order of ``Q(√d)``; ``d > 0`` need not be squarefree.

    >>> field(8), field(5), field(18)
    (Order(8), Order(5), Order(8))
    """
    d = check_radicand(d)
    s, _ = squarefree_decomposition(d)
    return Order(fundamental_discriminant_of(s))
