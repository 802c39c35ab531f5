"""Pure-Python twin of ``sieve_kernels.c``: sieving a family of quadratic polynomials for smooth values.

The rules every twin keeps are in :mod:`realquad._kernels`.

The relation search of the sub-exponential class group method
(:mod:`realquad.relations`) sieves the values ``f_k(x) = a·x² + b_k·x + c_k``
of a family of polynomials sharing their leading coefficient ``a``
(self-initialising: polynomial ``k + 1`` differs from polynomial ``k`` by
``b_{k+1} = b_k ± 2·B_l``, so each root moves by ``∓B_l·a⁻¹`` modulo ``p``).
The caller works out the roots of the first polynomial and the shifts; the
kernel only adds logarithms and reports where they reach a threshold.

References: C. Pomerance, "The quadratic sieve factoring algorithm",
EUROCRYPT '84, LNCS 209 (1985); S. Contini, *Factoring integers with the
self-initializing quadratic sieve*, M.A. thesis, University of Georgia 1997
(the Gray-code switch of polynomials); M. J. Jacobson Jr., "Applying sieving
to the computation of quadratic class groups", *Math. Comp.* 68 (1999),
859–867 (sieving the values of forms for class group relations).
"""

from __future__ import annotations


def sieve_family(
    primes: list[int],
    logs: list[int],
    roots1: list[int],
    roots2: list[int],
    shifts: list[list[int]],
    steps: list[int],
    M: int,
    threshold: int,
) -> list[tuple[int, int, list[int]]]:
    """Candidates ``(k, x, hits)`` of the polynomials ``k = 0 … len(steps)`` over ``−M ≤ x < M``.

    For every prime ``p = primes[j]`` the roots of the first polynomial are
    ``roots1[j]``, ``roots2[j]`` (in ``[0, p)``; ``roots2[j] == roots1[j]``
    for a single root; ``roots1[j] == -1``: the prime is left out, neither
    sieved nor reported). Polynomial ``k ≥ 1`` is reached from polynomial
    ``k − 1`` by ``steps[k − 1] = ±(l + 1)``: both roots of every prime move
    by ``∓shifts[l][j]`` (``r ← (r − shifts[l][j]) mod p`` for ``+(l + 1)``,
    ``r ← (r + shifts[l][j]) mod p`` for ``−(l + 1)``).

    Each polynomial's sieve array counts, for every ``x``, the sum of
    ``logs[j]`` over the roots ``r`` of the primes with ``x ≡ r (mod p)``
    (a prime with ``logs[j] == 0`` is not sieved); the caller chooses the
    logarithms so that no sum exceeds 255. Every ``x`` whose sum is at least
    ``threshold`` is reported with ``hits``: the increasing indices ``j`` of
    every prime left in (sieved or not) with ``x ≡ roots1[j]`` or
    ``x ≡ roots2[j] (mod p)``. Candidates come in the order of ``k``, then
    ``x``.

    f(x) = x² + x + 5 (discriminant −19) has the roots 0, 4 modulo 5 and 1, 5
    modulo 7; with the threshold 2 + 3 both primes must divide: f(−6) = f(5) = 35.
    Then the family f(x), f(x + 1) = x² + 3x + 7 (each root moves down by 1),
    threshold 3: the values divisible by 7 (f(−2) = 7, f(1) = 7; 7, 7 again).

    >>> sieve_family([5, 7], [2, 3], [0, 1], [4, 5], [], [], 8, 5)
    [(0, -6, [0, 1]), (0, 5, [0, 1])]
    >>> sieve_family([5, 7], [2, 3], [0, 1], [4, 5], [[1, 1]], [1], 3, 3)
    [(0, -2, [1]), (0, 1, [1]), (1, -3, [1]), (1, 0, [1])]
    """
    n = len(primes)
    r1 = list(roots1)
    r2 = list(roots2)
    out: list[tuple[int, int, list[int]]] = []
    for k in range(len(steps) + 1):
        if k:
            step = steps[k - 1]
            l = abs(step) - 1
            sign = 1 if step > 0 else -1
            shift = shifts[l]
            for j in range(n):
                if r1[j] < 0:
                    continue
                p = primes[j]
                r1[j] = (r1[j] - sign * shift[j]) % p
                r2[j] = (r2[j] - sign * shift[j]) % p
        sums = [0] * (2 * M)
        for j in range(n):
            if r1[j] < 0 or logs[j] == 0:
                continue
            p, lg = primes[j], logs[j]
            for r in (r1[j], r2[j]) if r2[j] != r1[j] else (r1[j],):
                i = (r + M) % p  # the first index with x = i − M ≡ r (mod p)
                while i < 2 * M:
                    sums[i] += lg
                    i += p
        for i in range(2 * M):
            if sums[i] >= threshold:
                x = i - M
                hits = [
                    j
                    for j in range(n)
                    if r1[j] >= 0 and (x % primes[j] == r1[j] or x % primes[j] == r2[j])
                ]
                out.append((k, x, hits))
    return out
