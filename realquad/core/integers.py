"""Exact integers at the boundary: reading them from text, square roots and square tests.

Every public function of realquad takes its integers through :func:`as_integer`,
so a decimal string, a Python ``int`` and a gmpy2 ``mpz`` are accepted alike
and anything else is refused with one clear :class:`~realquad.errors.InputError`.

>>> as_integer("12_345"), isqrt(10**20 + 1), is_square(144), is_square(-4)
(12345, 10000000000, True, False)
"""

from __future__ import annotations

import re
from collections.abc import Callable
from typing import TypeVar

import gmpy2

from realquad.errors import InputError

#: The most decimal digits an integer argument may have (a larger one could not be worked with,
#: and could not be printed with Python's own conversions either).
MAX_INPUT_DIGITS = 4000

_INTEGER = re.compile(r"[+\-−]?[0-9]+(_[0-9]+)*")


def as_integer(value: object, name: str = "value", max_digits: int = MAX_INPUT_DIGITS) -> int:
    """Convert ``value`` to ``int`` exactly, or raise :class:`InputError`.

    Accepts ints, gmpy2 integers and decimal strings: ASCII digits, an optional
    sign (``+``, ``-`` or the minus sign ``−``), single underscores between
    digits, surrounding spaces. Integers of more than ``max_digits`` digits
    are refused (the message says how long they are, not what they are).

    >>> as_integer(" -1_000 "), as_integer("−7")
    (-1000, -7)
    >>> as_integer("2.5")
    Traceback (most recent call last):
    ...
    realquad.errors.InputError: value must be an integer, got '2.5'
    >>> as_integer("1_")
    Traceback (most recent call last):
    ...
    realquad.errors.InputError: value must be an integer, got '1_'
    >>> as_integer("9" * 5000, "d")
    Traceback (most recent call last):
    ...
    realquad.errors.InputError: d has 5,000 digits; at most 4,000 are accepted
    """
    if isinstance(value, bool):
        raise InputError(f"{name} must be an integer, got {value!r}")
    if isinstance(value, int) or type(value).__name__ == "mpz":
        number = gmpy2.mpz(value)  # type: ignore[call-overload]
    elif isinstance(value, str):
        text = value.strip()
        if not _INTEGER.fullmatch(text):
            shown = value if len(value) <= 40 else value[:37] + "..."
            raise InputError(f"{name} must be an integer, got {shown!r}")
        digits = len(text) - text.count("_") - (text[0] in "+-−")
        if digits > max_digits:
            raise InputError(f"{name} has {digits:,} digits; at most {max_digits:,} are accepted")
        number = gmpy2.mpz(text.replace("_", "").replace("−", "-"))
    else:
        raise InputError(f"{name} must be an integer, got {type(value).__name__}")
    if number and gmpy2.num_digits(number, 10) > max_digits:
        size = len(gmpy2.mpz(abs(number)).digits(10))
        if size > max_digits:
            raise InputError(f"{name} has {size:,} digits; at most {max_digits:,} are accepted")
    return int(number)


def is_square(n: int) -> bool:
    """Exact perfect-square test (``False`` for negative ``n``)."""
    return n >= 0 and bool(gmpy2.is_square(n))


def isqrt(n: int) -> int:
    """Floor of the square root of ``n ≥ 0``."""
    return int(gmpy2.isqrt(n))


_T = TypeVar("_T")


def times_power(total: _T, x: _T, e: int, times: Callable[[_T, _T], _T]) -> _T:
    """``total·x^e`` (``e ≥ 0``) by square-and-multiply, with the product ``times``.

    >>> times_power(3, 2, 10, lambda a, b: a * b)
    3072
    """
    while e:
        if e & 1:
            total = times(total, x)
        e >>= 1
        if e:
            x = times(x, x)
    return total
