"""Exact integers at the boundary: reading them from text, square roots and square tests.

Every public function of realquad takes its integers through :func:`as_integer`,
so a decimal string, a Python ``int`` and a gmpy2 ``mpz`` are accepted alike
and anything else is refused with one clear :class:`~realquad.errors.InputError`.

>>> as_integer("12_345"), isqrt(10**20 + 1), is_square(144), is_square(-4)
(12345, 10000000000, True, False)
"""

from __future__ import annotations

import gmpy2

from realquad.errors import InputError


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
