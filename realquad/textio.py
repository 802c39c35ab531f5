"""Text: exact conversions of big integers to and from decimal, and the house style of text output.

Python's own ``str``/``int`` refuse integers of more than 4300 digits; gmpy2
converts any size in quasi-linear time.

>>> decimal_digits(10**5000)
5001
>>> to_decimal(-12345)
'-12345'

Every command's text output writes negative numbers and differences with one
minus sign (:data:`MINUS`), groups as ``C2 × C6`` (:func:`group_text`) and
counts with the right plural (:func:`plural`).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterable, Sequence

import gmpy2


def to_decimal(n: object) -> str:
    """Decimal string of an integer of any size."""
    return gmpy2.mpz(n).digits(10)  # type: ignore[call-overload, no-any-return]


def decimal_digits(n: object) -> int:
    """Exact number of decimal digits of ``|n|`` (1 for zero)."""
    m = abs(gmpy2.mpz(n))  # type: ignore[call-overload]
    if m == 0:
        return 1
    k = int(gmpy2.num_digits(m, 10))  # exact or one too many
    if m < gmpy2.mpz(10) ** (k - 1):
        k -= 1
    return k


#: Digits kept at each end of a summarised integer.
EDGE = 20


def integer_summary(n: object, max_digits: int) -> tuple[int, str, str] | None:
    """``None`` if ``|n|`` has at most ``max_digits`` digits (0: no limit), else ``(digits, leading, trailing)``.

    The leading and trailing :data:`EDGE` digits come from one division and
    one remainder instead of a full decimal conversion. An integer of at most
    18 digits is always written in full (its summary would be no shorter).

    >>> integer_summary(12345, 10) is None, integer_summary(-(10**50 + 7), 30)
    (True, (51, '10000000000000000000', '00000000000000000007'))
    """
    m = abs(gmpy2.mpz(n))  # type: ignore[call-overload]
    # at most bit_length·log₁₀ 2 + 1 digits, and log₁₀ 2 < 0.30103
    if max_digits == 0 or m < 10**18 or m.bit_length() * 0.30103 + 1 < max_digits:
        return None
    k0 = int(gmpy2.num_digits(m, 10))  # exact or one too many
    if k0 <= EDGE + 1:
        k, lead = len(to_decimal(m)), m
    else:
        lead = m // gmpy2.mpz(10) ** (k0 - EDGE - 1)
        k = k0 if lead >= 10**EDGE else k0 - 1
    if k <= max_digits:
        return None
    trailing = to_decimal(m % 10**EDGE).zfill(EDGE)[-min(EDGE, k) :]
    return k, to_decimal(lead)[:EDGE], trailing


#: The minus sign of every text (not JSON) output: U+2212, as in printed mathematics.
MINUS = "−"


def signed(n: object) -> str:
    """An integer of any size in decimal, negative with :data:`MINUS`.

    >>> signed(-12), signed(7)
    ('−12', '7')
    """
    text = to_decimal(n)
    return MINUS + text[1:] if text.startswith("-") else text


def terms_text(
    terms: Iterable[tuple[int, str]],
    number: Callable[[int], str] = to_decimal,
    minus: str = MINUS,
) -> str:
    """``a·m₁ + b·m₂ + …`` written as people write it: ``x² − 13y² + 4``; ``0`` when empty.

    Coefficients ±1 are left out before a monomial; signs are ``minus`` and
    ``+``; ``number`` writes each coefficient's absolute value (the LaTeX of
    :mod:`realquad.latex` passes its own).

    >>> terms_text([(1, "x²"), (0, "xy"), (-13, "y²"), (4, "")])
    'x² − 13y² + 4'
    >>> terms_text([(-1, "t²"), (1, "t")]), terms_text([])
    ('−t² + t', '0')
    """
    parts = []
    for coefficient, monomial in terms:
        if coefficient == 0:
            continue
        size = abs(coefficient)
        body = monomial if size == 1 and monomial else f"{number(size)}{monomial}"
        parts.append((coefficient < 0, body))
    if not parts:
        return "0"
    negative, body = parts[0]
    text = (minus if negative else "") + body
    return text + "".join(f" {minus if neg else '+'} {b}" for neg, b in parts[1:])


def group_text(invariants: Sequence[int]) -> str:
    """A finite abelian group from its invariants ``d₁ | d₂ | …``: ``C2 × C6``; ``1`` when trivial.

    >>> group_text([2, 6]), group_text([3]), group_text([])
    ('C2 × C6', 'C3', '1')
    """
    return " × ".join(f"C{d}" for d in invariants) if invariants else "1"


def plural(count: int, word: str, words: str | None = None) -> str:
    """``1 digit``, ``3 digits``, ``1 family``, ``2 families`` (count written with separators).

    >>> plural(1, "digit"), plural(1234, "digit"), plural(2, "family", "families")
    ('1 digit', '1,234 digits', '2 families')
    """
    return f"{count:,} {word if count == 1 else (words or word + 's')}"


_LONG_NUMBER = re.compile(r"[0-9]{61,}")


def shown(n: object) -> str:
    """An integer for a message: in full up to 60 digits, else its ends and its length.

    >>> shown(-12), shown(10**70)
    ('-12', '10000000000000000000…00000000000000000000 (71 digits)')
    """
    text = to_decimal(n)
    return summarise_numbers(text)


def summarise_numbers(text: str) -> str:
    """``text`` with every run of more than 60 digits cut to its ends and its length.

    >>> summarise_numbers("d = " + "7" * 100 + " is too large")
    'd = 77777777777777777777…77777777777777777777 (100 digits) is too large'
    """
    return _LONG_NUMBER.sub(lambda m: f"{m[0][:20]}…{m[0][-20:]} ({len(m[0]):,} digits)", text)


def about(x: float) -> str:
    """A large estimate in words: ``about 7.9e+15``; beyond floating point, ``more than 1e+300``.

    >>> about(7.94e15), about(float("inf"))
    ('about 7.9e+15', 'more than 1e+300')
    """
    return f"about {x:.2g}" if x < 1e300 else "more than 1e+300"
