"""Balanced product trees of 2×2 matrices.

Multiplying ``n`` matrices pairwise in a balanced tree keeps the operands of
each multiplication of similar size, so the total cost is that of a few
multiplications of full-size numbers (quasi-linear with GMP), instead of the
quadratic cost of the convergent recurrence.

>>> [int(x) for x in matrix_product([(1, 1, 1, 0)] * 10)]  # Fibonacci matrix, 10th power
[89, 55, 55, 34]
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, TypeVar

import gmpy2

T = TypeVar("T")
Matrix = tuple[Any, Any, Any, Any]


def _mul(m: Matrix, n: Matrix) -> Matrix:
    a, b, c, d = m
    e, f, g, h = n
    return (a * e + b * g, a * f + b * h, c * e + d * g, c * f + d * h)


def matrix_product(matrices: Sequence[Matrix], convert: Any = gmpy2.mpz) -> Matrix:
    """The ordered product ``M₀ M₁ … M_{n−1}`` of row-major 2×2 matrices ``(a, b, c, d)``.

    ``convert`` maps each entry before multiplying (``gmpy2.mpz`` for exact
    products, an ``mpfr`` constructor for rounded ones). The empty product is
    the identity.
    """
    level = [tuple(convert(x) for x in m) for m in matrices]
    if not level:
        return (convert(1), convert(0), convert(0), convert(1))
    while len(level) > 1:
        nxt = [_mul(level[i], level[i + 1]) for i in range(0, len(level) - 1, 2)]
        if len(level) % 2:
            nxt.append(level[-1])
        level = nxt
    return level[0]  # type: ignore[return-value]
