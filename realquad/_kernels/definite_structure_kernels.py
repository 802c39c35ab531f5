"""The structures of the class groups of many ``D < 0`` whose class numbers are known — the
pure twin of ``definite_structure_kernels.c`` (same arguments, same results, same refusals).

For each ``p^e ‖ h``: ``e = 1`` gives ``Z/p``; the 2-Sylow subgroup is fixed by its order and
the 2-rank ``r`` unless ``2 ≤ r ≤ e − 2``; otherwise the ``p``-Sylow subgroup is walked alone
(the ``(h/p^e)``-th powers of the prime forms, stopping at ``p^e`` classes) and its cyclic
factors come from the Smith form of its relations over ``Z/p^e``: the relation lattice
contains ``p^e·Z^g`` (the quotient has exponent dividing ``p^e``), so the elimination works
modulo ``p^e`` with a pivot of least ``p``-adic valuation. Reference: H. Cohen, *A Course in
Computational Algebraic Number Theory*, Springer 1993, §2.4.3 and §5.4.
"""

from __future__ import annotations

from realquad._kernels.definite_kernels import (
    COUNT_LIMIT,
    definite_class_number,
    definite_class_relations,
)

_MAX_WORD = (1 << 62) - 1


def definite_structures(
    Ds: list[int],
    class_numbers: list[int],
    two_ranks: list[int],
    conductor: int,
    primes: list[int],
    first: int,
) -> tuple[list[int], list[tuple[int, ...]]]:
    """``(h, invariants)`` of ``Cl(D)`` for each ``D`` of ``Ds`` (orders of the same
    ``conductor``): ``h`` given (``0``: counted, maximal orders only), the invariants
    ``d₁ | d₂ | …`` found from it. ``two_ranks``: the 2-rank of each group (``−1``: not
    known); ``primes``: every prime up to ``√(|D|/3)``; a Sylow walk tries the ``first``
    primes before all of them.

    >>> definite_structures([-3299, -420, -23], [27, 8, 0], [0, 3, -1], 1, [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31], 4)
    ([27, 8, 3], [(3, 9), (2, 2, 2), (3,)])
    """
    if conductor <= 0 or first < 0:
        raise ValueError("the conductor must be positive and first not negative")
    if len(class_numbers) != len(Ds) or len(two_ranks) != len(Ds):
        raise ValueError("one class number and one 2-rank per discriminant")
    for D, h in zip(Ds, class_numbers, strict=True):
        if D >= 0 or D < -_MAX_WORD or (h == 0 and -D > COUNT_LIMIT):
            raise OverflowError("a discriminant outside the structure kernel's range")
        if h < 0 or (h == 0 and conductor != 1):
            raise ValueError("class numbers are positive (0: counted, maximal orders only)")
    hs, groups = [], []
    for D, h, r in zip(Ds, class_numbers, two_ranks, strict=True):
        if h == 0:
            h = definite_class_number(D, primes)
        hs.append(h)
        groups.append(_structure(D, conductor, h, r, primes, first))
    return hs, groups


def _structure(
    D: int, conductor: int, h: int, r: int, primes: list[int], first: int
) -> tuple[int, ...]:
    factors: list[int] = []
    twos = 0
    for p, e in _factor(h):
        q = p**e
        if p == 2:
            twos = e
        if e == 1:
            parts = [p]
        elif p == 2 and r >= 0 and not 2 <= r <= e - 2:
            if not 1 <= r <= e:
                raise ArithmeticError(f"internal check failed: 2-rank {r} with 2^{e} || h")
            parts = [2] * (r - 1) + [1 << (e - r + 1)]
        else:
            if q >= 1 << 31:
                raise OverflowError("a Sylow subgroup beyond the structure kernel's range")
            parts = _walked_sylow(D, conductor, primes, first, h, p, e, q)
        parts.sort(reverse=True)
        factors += [1] * (len(parts) - len(factors))
        for i, part in enumerate(parts):
            factors[i] *= part
    if r >= 0 and twos == 0 and r != 0:
        raise ArithmeticError(f"internal check failed: 2-rank {r} with h = {h} odd")
    return tuple(reversed(factors))


def _factor(n: int) -> list[tuple[int, int]]:
    """The primes of ``n ≥ 1`` with their exponents, by trial division (as the kernel)."""
    found = []
    d = 2
    while n > 1:
        p = n if d * d > n else d
        if n % p == 0:
            e = 0
            while n % p == 0:
                n //= p
                e += 1
            found.append((p, e))
        d += 1 if d == 2 else 2
    return found


def _walked_sylow(
    D: int, conductor: int, primes: list[int], first: int, h: int, p: int, e: int, q: int
) -> list[int]:
    """The cyclic factors of the ``p``-Sylow subgroup (order ``q = p^e``) of ``Cl(D)``."""
    found = None
    for some in (primes[: min(first, len(primes))], primes):  # the first few nearly always do
        found = definite_class_relations(D, conductor, some, q, q, h // q)
        if (found is not None and found[0] == q) or len(some) == len(primes):
            break
    if found is None or found[0] != q:
        raise ArithmeticError(
            f"internal check failed: the {p}-Sylow subgroup of Cl({D}) does not have {q} classes"
        )
    relations = found[2]
    g = len(relations)
    m = [[row[j] % q if j < len(row) else 0 for j in range(g)] for row in relations]
    parts = _sylow_factors(m, p, e, q)
    if parts is None:
        raise ArithmeticError(
            f"internal check failed: the {p}-Sylow relations of Cl({D}) do not give {q} classes"
        )
    return parts


def _valuation(x: int, p: int, e: int) -> int:
    if x == 0:
        return e
    v = 0
    while x % p == 0:
        x //= p
        v += 1
    return v


def _sylow_factors(m: list[list[int]], p: int, e: int, q: int) -> list[int] | None:
    """The orders ``p^k > 1`` of the cyclic factors of ``Z^g`` modulo the rows of ``m``
    (entries modulo ``q = p^e``), or ``None`` when their product is not ``q``.

    >>> _sylow_factors([[3, 0], [0, 3]], 3, 2, 9), _sylow_factors([[125, 0], [-117 % 625, 5]], 5, 4, 625)
    ([3, 3], [625])
    """
    g = len(m)
    out: list[int] = []
    for k in range(g):
        best, pr, pc = e + 1, -1, -1
        for i in range(k, g):
            for j in range(k, g):
                v = _valuation(m[i][j], p, e)
                if v < best:
                    best, pr, pc = v, i, j
        if best >= e:  # the rest is zero modulo q: a factor Z/q each
            out += [q] * (g - k)
            break
        m[pr], m[k] = m[k], m[pr]
        for row in m:
            row[pc], row[k] = row[k], row[pc]
        pk = p**best
        inverse = pow(m[k][k] // pk, -1, q)
        for j in range(k, g):
            m[k][j] = m[k][j] * inverse % q
        for i in range(k + 1, g):
            f = m[i][k] // pk
            if f:
                for j in range(k, g):
                    m[i][j] = (m[i][j] - f * m[k][j] % q) % q
        if pk > 1:
            out.append(pk)
    product = 1
    for part in out:
        product *= part
    return out if product == q else None
