"""Pure-Python twin of ``character_kernels.c``: Kronecker symbols in batches (Euler products of L(s, χ_D)).

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations

from gmpy2 import kronecker


def kronecker_symbols(a: int, moduli: list[int]) -> list[int]:
    """``[(a/n) for n in moduli]``, the Kronecker symbol for each modulus.

    >>> kronecker_symbols(5, [2, 3, 5, 7, 11, -1, 0, 1])
    [-1, -1, 0, -1, 1, 1, 0, 1]
    """
    return [kronecker(a, n) for n in moduli]
