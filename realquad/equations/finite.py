"""The finite cases of ``x² − d·y² = n``: a definite form (``d < 0``) or a square ``d``.

Both have finitely many solutions, found without any unit: for ``d < 0`` each
primitive solution lies in an ideal ``[m, z + √d]`` with ``z² ≡ d (mod m)``
whose reduced form is principal (reduction of positive definite forms); for
``d = s²`` the equation factors as ``(x − sy)(x + sy) = n``. The Pell equations
(:mod:`~realquad.equations.pell`) and the norm equations
(:mod:`~realquad.equations.norm`) share them.

>>> definite_solutions(-5, 9)
[(-2, -1), (-2, 1), (2, -1), (2, 1), (-3, 0), (3, 0)]
>>> square_solutions(3, 7)                  # (x − 3y)(x + 3y) = 7
[(-4, -1), (-4, 1), (4, -1), (4, 1)]

References: T. Nagell, *Introduction to Number Theory*, 1951, §57; H. Cohen,
*A Course in Computational Algebraic Number Theory*, §5.3 (reduction of definite forms).
"""

from __future__ import annotations

from realquad.core.forms import definite_reduce_with_matrix
from realquad.core.primes import (
    divisors,
    divisors_from_factorization,
    factorize,
    square_roots_mod,
    valuation,
)
from realquad.equations.families import Point, sort_points


def definite_solutions(d: int, n: int) -> list[Point]:
    """All solutions of ``x² + |d| y² = n`` (``d < 0``)."""
    if n < 0:
        return []
    if n == 0:
        return [(0, 0)]
    factors = factorize(n)
    out: set[Point] = set()
    fs = divisors_from_factorization({p: e // 2 for p, e in factors.items() if e >= 2})
    for f in fs:
        m = n // (f * f)
        mf = {p: e - 2 * valuation(f, p) for p, e in factors.items()}
        for z in square_roots_mod(d, m, {p: e for p, e in mf.items() if e}):
            # elements X m + Y (z + √d) of J_z; norm = m·(m X² + 2z XY + ((z² − d)/m) Y²)
            (A, B, C), U = definite_reduce_with_matrix(m, 2 * z, (z * z - d) // m)
            if A != 1:
                continue
            for X1 in (-1, 0, 1):
                for Y1 in (-1, 0, 1):
                    if X1 * X1 + B * X1 * Y1 + C * Y1 * Y1 == 1:
                        X, Y = U[0] * X1 + U[1] * Y1, U[2] * X1 + U[3] * Y1
                        out.add((f * (X * m + Y * z), f * Y))
    return sort_points(out)


def square_solutions(s: int, n: int) -> list[Point]:
    """All solutions of ``(x − sy)(x + sy) = n`` with ``s ≥ 1``, ``n ≠ 0``."""
    out: set[Point] = set()
    for e in divisors(n):
        for u in (e, -e):
            v = n // u  # u = x − sy, v = x + sy
            if (u + v) % 2 == 0 and (v - u) % (2 * s) == 0:
                out.add(((u + v) // 2, (v - u) // (2 * s)))
    return sort_points(out)
