"""Pure-Python kernels: the reference twin of the compiled module.

Every function here has the same signature and the same results as its
compiled counterpart in ``_ckernels``; the tests compare the two directly.
These work for integers of any size, the compiled ones only below their
stated word-size limits (they raise ``OverflowError`` beyond them).
"""

from __future__ import annotations

from gmpy2 import isqrt

#: Largest discriminant the compiled kernels accept (the pure twin has no limit).
MAX_WORD_DISCRIMINANT = (1 << 62) - 1


def principal_half_cycle(D: int, max_steps: int) -> tuple[list[int], int, int, int] | None:
    """Walk the continued fraction of ω = (D mod 2 + √D)/2 to the cycle's symmetry point.

    The principal cycle of reduced quadratic irrationals (P + √D)/Q (Q = 2
    marking the principal ideal) is a palindrome, so half of it determines
    the fundamental unit. Returns ``(quotients, parity, q_mid, steps)``:

    * ``parity`` 1: the period ``l = 2m + 1`` is odd (found where
      ``Q_m = Q_{m+1}``); ``quotients`` holds ``a_0 … a_m`` and
      ``q_mid = Q_{m+1}``;
    * ``parity`` 0: the period ``l = 2m`` is even (found where
      ``P_m = P_{m+1}``, ``m ≥ 1``); ``quotients`` holds ``a_0 … a_{m-1}``
      and ``q_mid = Q_m``;

    ``steps`` is the period length ``l``. Returns ``None`` when more than
    ``max_steps`` steps would be needed.
    """
    r = int(isqrt(D))
    P = D & 1
    Q = 2
    a = (P + r) // Q
    quotients = [a]
    append = quotients.append
    P1 = a * Q - P
    Q1 = (D - P1 * P1) // Q
    # P1 == P cannot hold at k = 0 unless Q1 == Q (only D = 5), tested first.
    for k in range(max_steps // 2 + 2):
        if Q1 == Q:
            return quotients, 1, Q1, 2 * k + 1
        if P1 == P:
            quotients.pop()
            return quotients, 0, Q, 2 * k
        a = (P1 + r) // Q1
        append(a)
        P2 = a * Q1 - P1
        Q, Q1 = Q1, Q + a * (P1 - P2)
        P, P1 = P1, P2
    return None


def convergent_leaves(quotients: list[int], chunk: int) -> list[tuple[int, int, int, int]]:
    """Products of ``[[a, 1], [1, 0]]`` over consecutive blocks of ``chunk`` quotients.

    Each block's product ``[[p, p'], [q, q']]`` is returned as ``(p, p', q, q')``.
    """
    out: list[tuple[int, int, int, int]] = []
    n = len(quotients)
    for start in range(0, n, chunk):
        p, pp, q, qq = 1, 0, 0, 1
        for a in quotients[start : start + chunk]:
            p, pp = a * p + pp, p
            q, qq = a * q + qq, q
        out.append((p, pp, q, qq))
    return out
