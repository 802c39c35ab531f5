"""Balanced product trees of 2×2 matrices.

Multiplying ``n`` matrices pairwise in a balanced tree keeps the operands of
each multiplication of similar size, so the total cost is that of a few
multiplications of full-size numbers (quasi-linear with GMP), instead of the
quadratic cost of the convergent recurrence.

>>> [int(x) for x in matrix_product([(1, 1, 1, 0)] * 10)]  # Fibonacci matrix, 10th power
[89, 55, 55, 34]
>>> [int(x) for x in matrix_product_column([(1, 1, 1, 0)] * 10)]  # its first column
[89, 55]

Where only the first column of the product is needed, the right spine of the
tree carries a column instead of a matrix: each product along it costs four
multiplications instead of eight, which saves about a third of the tree
(the top-level products are the largest).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import gmpy2

Matrix = tuple[Any, Any, Any, Any]


def _converted(matrices: Sequence[Matrix], convert: Any) -> list[Matrix]:
    return [(convert(a), convert(b), convert(c), convert(d)) for a, b, c, d in matrices]


def _pair_up(level: list[Matrix]) -> list[Matrix]:
    """One level of the tree: products of neighbours, an odd last matrix carried up."""
    nxt = [
        (a * e + b * g, a * f + b * h, c * e + d * g, c * f + d * h)
        for (a, b, c, d), (e, f, g, h) in zip(level[0::2], level[1::2], strict=False)
    ]
    if len(level) % 2:
        nxt.append(level[-1])
    return nxt


def matrix_product(matrices: Sequence[Matrix], convert: Any = gmpy2.mpz) -> Matrix:
    """The ordered product ``M₀ M₁ … M_{n−1}`` of row-major 2×2 matrices ``(a, b, c, d)``.

    ``convert`` maps each entry before multiplying (``gmpy2.mpz`` for exact
    products, an ``mpfr`` constructor for rounded ones). The empty product is
    the identity.
    """
    level = _converted(matrices, convert)
    if not level:
        return (convert(1), convert(0), convert(0), convert(1))
    while len(level) > 1:
        level = _pair_up(level)
    return level[0]


def matrix_product_column(matrices: Sequence[Matrix], convert: Any = gmpy2.mpz) -> tuple[Any, Any]:
    """The first column ``(a, c)`` of :func:`matrix_product`, computed with fewer products."""
    level = _converted(matrices, convert)
    if not level:
        return (convert(1), convert(0))
    while len(level) > 2:
        if len(level) % 2:  # the column (last) is carried up unchanged
            *full, last = level
            level = [*_pair_up(full), last]
            continue
        *full, (a, b, c, d), (e, _f, g, _h) = level
        level = [*_pair_up(full), (a * e + b * g, 0, c * e + d * g, 0)]
    if len(level) == 1:
        return level[0][0], level[0][2]
    (a, b, c, d), (e, _f, g, _h) = level
    return a * e + b * g, c * e + d * g
