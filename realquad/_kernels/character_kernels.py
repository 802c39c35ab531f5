"""Pure-Python twin of ``character_kernels.c``: Kronecker symbols in batches (Euler products of L(s, χ_D)).

Every function here has the same signature and the same results as its
compiled counterpart (the C file of the same name, registered in
``_ckernels.c``); the tests compare the two directly. These work for integers
of any size, the compiled ones only below their stated word-size limits:
beyond them they raise ``OverflowError`` and :func:`realquad._backend.call_kernel`
falls back to these. Plain ints in, plain ints out. Reach them only through
:mod:`realquad._backend`.
"""

from __future__ import annotations

from gmpy2 import kronecker


def kronecker_symbols(a: int, moduli: list[int]) -> list[int]:
    """``[(a/n) for n in moduli]``, the Kronecker symbol for each modulus.

    >>> kronecker_symbols(5, [2, 3, 5, 7, 11, -1, 0, 1])
    [-1, -1, 0, -1, 1, 1, 0, 1]
    """
    return [kronecker(a, n) for n in moduli]
