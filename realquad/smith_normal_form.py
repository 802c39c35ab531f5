"""Smith normal form of an integer relation matrix, with the change of generators.

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

Reference: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §2.4.4 (Algorithm 2.4.14).
"""

from __future__ import annotations

from dataclasses import dataclass
from math import gcd


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
