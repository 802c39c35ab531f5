"""Integer linear algebra: 2×2 matrices, balanced product trees, the Smith normal form.

**2×2 matrices** ``(α, β, γ, δ)`` stand for ``[[α, β], [γ, δ]]``:
:func:`matrix_multiply` and :func:`matrix_inverse` (determinant 1).

**Product trees.** Multiplying ``n`` matrices pairwise in a balanced tree keeps the
operands of each multiplication of similar size, so the total cost is that of a few
multiplications of full-size numbers (quasi-linear with GMP), instead of the
quadratic cost of the convergent recurrence (:func:`matrix_product`). Where only the
first column of the product is needed, the right spine of the tree carries a column
instead of a matrix (:func:`matrix_product_column`): each product along it costs four
multiplications instead of eight, which saves about a third of the tree (the
top-level products are the largest).

>>> [int(x) for x in matrix_product([(1, 1, 1, 0)] * 10)]  # Fibonacci matrix, 10th power
[89, 55, 55, 34]
>>> [int(x) for x in matrix_product_column([(1, 1, 1, 0)] * 10)]  # its first column
[89, 55]
>>> matrix_multiply((1, 1, 1, 0), (1, 1, 1, 0)), matrix_inverse((2, 1, 1, 1))
((2, 1, 1, 1), (1, -1, -1, 2))

**Smith normal form.**
A finite abelian group given by generators ``g₁ … gₙ`` and relations
``Σⱼ R[i][j] gⱼ = 0`` (the rows of ``R`` span all relations) is
``⊕ Z/dₜ`` with ``d₁ | d₂ | …``, the diagonal of the Smith normal form
``U R V``. The new generators are the rows of ``W = V⁻¹`` (as exponent
vectors over the old ones); ``V`` turns old exponent vectors into new
coordinates: ``x ↦ x V``.

>>> S = smith_normal_form([[2, 0], [0, 3]], 2)
>>> S.invariants, S.generators
([6], [[1, 1]])
>>> S.coordinates([1, 0])          # g₁ = 3·h₁ in Z/6, with h₁ = g₁ + g₂
[3]

References: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §2.4.4 (Algorithm 2.4.14).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from math import gcd
from typing import Any

import gmpy2

#: A 2×2 integer matrix ``(α, β, γ, δ)`` = ``[[α, β], [γ, δ]]``.
Matrix = tuple[int, int, int, int]
IDENTITY_MATRIX: Matrix = (1, 0, 0, 1)
#: A 2×2 matrix of any ring elements (``mpz``, ``mpfr``).
AnyMatrix = tuple[Any, Any, Any, Any]


def matrix_multiply(M: AnyMatrix, N: AnyMatrix) -> AnyMatrix:
    """``M N`` (entries of any ring: integers, fractions, ``mpz``, ``mpfr``)."""
    a, b, c, d = M
    e, f, g, h = N
    return (a * e + b * g, a * f + b * h, c * e + d * g, c * f + d * h)


def matrix_inverse(M: AnyMatrix) -> AnyMatrix:
    """The inverse of a matrix of determinant 1."""
    a, b, c, d = M
    return (d, -b, -c, a)


def _converted(matrices: Sequence[AnyMatrix], convert: Any) -> list[AnyMatrix]:
    return [(convert(a), convert(b), convert(c), convert(d)) for a, b, c, d in matrices]


def _pair_up(level: list[AnyMatrix]) -> list[AnyMatrix]:
    """One level of the tree: products of neighbours, an odd last matrix carried up."""
    nxt = [matrix_multiply(M, N) for M, N in zip(level[0::2], level[1::2], strict=False)]
    if len(level) % 2:
        nxt.append(level[-1])
    return nxt


def matrix_product(matrices: Sequence[AnyMatrix], convert: Any = gmpy2.mpz) -> AnyMatrix:
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


def matrix_product_column(
    matrices: Sequence[AnyMatrix], convert: Any = gmpy2.mpz
) -> tuple[Any, Any]:
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


@dataclass(frozen=True)
class SmithForm:
    """Invariants ``d₁ | d₂ | …`` (all > 1), generators of those orders, and the coordinate map."""

    invariants: list[int]
    generators: list[list[int]]
    _V: list[list[int]]
    _keep: list[int]

    def coordinates(self, exponents: list[int]) -> list[int]:
        """Coordinates (modulo the invariants) of ``Σ exponents[i]·gᵢ`` on the new generators."""
        n = len(self._V)
        x = list(exponents) + [0] * (n - len(exponents))
        out = []
        for t, d in zip(self._keep, self.invariants, strict=True):
            out.append(sum(x[i] * self._V[i][t] for i in range(n)) % d)
        return out


def diagonal_smith(invariants: list[int]) -> SmithForm:
    """The Smith form of ``⊕ Z/dᵢ`` already in invariant factors (one generator per factor).

    >>> diagonal_smith([2, 6]).invariants, diagonal_smith([]).invariants
    ([2, 6], [])
    """
    n = len(invariants)
    if not n:
        return SmithForm([], [], [], [])
    return smith_normal_form(
        [[d if i == j else 0 for j in range(n)] for i, d in enumerate(invariants)], n
    )


def invariants_from_primary(powers: dict[int, list[int]]) -> list[int]:
    """The invariant factors ``d₁ | d₂ | …`` (increasing) of ``⊕ Z/q`` over the prime powers ``q``.

    ``powers`` maps each prime ``p`` to the orders ``p^e`` of the cyclic
    ``p``-groups (the primary decomposition); orders 1 are ignored.

    >>> invariants_from_primary({2: [2, 4], 3: [9]})
    [2, 36]
    >>> invariants_from_primary({})
    []
    """
    columns = [sorted((q for q in qs if q > 1), reverse=True) for qs in powers.values()]
    factors = [1] * max((len(c) for c in columns), default=0)  # factors[0] the largest
    for qs in columns:
        for i, q in enumerate(qs):
            factors[i] *= q
    return list(reversed(factors))


def smith_normal_form(relations: list[list[int]], n: int) -> SmithForm:
    """The Smith normal form of the relations (rows of length ``≤ n``, padded with zeros).

    The relations must have full rank ``n`` (a finite group).
    """
    if n == 1:  # cyclic: the gcd of the relations is the order
        d = 0
        for row in relations:
            d = gcd(d, row[0] if row else 0)
        if d == 0:
            raise ValueError("relations do not have full rank")
        return SmithForm([d] if d > 1 else [], [[1]] if d > 1 else [], [[1]], [0] if d > 1 else [])
    A = [list(row) + [0] * (n - len(row)) for row in relations]
    W = [[int(i == j) for j in range(n)] for i in range(n)]  # rows: new generators
    V = [[int(i == j) for j in range(n)] for i in range(n)]  # W⁻¹ = V
    rows = len(A)

    def swap_cols(i: int, j: int) -> None:
        for row in A:
            row[i], row[j] = row[j], row[i]
        W[i], W[j] = W[j], W[i]
        for row in V:
            row[i], row[j] = row[j], row[i]

    def add_col(src: int, dst: int, q: int) -> None:
        """col_dst += q col_src; generators: g_src ← g_src − q g_dst."""
        for row in A:
            row[dst] += q * row[src]
        W[src] = [x - q * y for x, y in zip(W[src], W[dst], strict=True)]
        for row in V:
            row[dst] += q * row[src]

    diagonal: list[int] = []
    for t in range(n):
        while True:
            entries = [(abs(A[i][j]), i, j) for i in range(t, rows) for j in range(t, n) if A[i][j]]
            if not entries:
                raise ValueError("relations do not have full rank")
            _, i, j = min(entries)
            A[t], A[i] = A[i], A[t]
            if j != t:
                swap_cols(t, j)
            p = A[t][t]
            done = True
            for i in range(t + 1, rows):
                q = A[i][t] // p
                if q:
                    A[i] = [x - q * y for x, y in zip(A[i], A[t], strict=True)]
                if A[i][t]:
                    done = False
            for j in range(t + 1, n):
                q = A[t][j] // p
                if q:
                    add_col(t, j, -q)
                if A[t][j]:
                    done = False
            if not done:
                continue
            bad = next(
                (i for i in range(t + 1, rows) for j in range(t + 1, n) if A[i][j] % p), None
            )
            if bad is None:
                break
            A[t] = [x + y for x, y in zip(A[t], A[bad], strict=True)]
        diagonal.append(abs(A[t][t]))
    keep = [t for t in range(n) if diagonal[t] > 1]
    return SmithForm([diagonal[t] for t in keep], [W[t] for t in keep], V, keep)
