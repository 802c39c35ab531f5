"""Exact conversions of big integers to and from decimal text.

Python's own ``str``/``int`` refuse integers of more than 4300 digits; gmpy2
converts any size in quasi-linear time.

>>> decimal_digits(10**5000)
5001
>>> to_decimal(-12345)
'-12345'
"""

from __future__ import annotations

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
