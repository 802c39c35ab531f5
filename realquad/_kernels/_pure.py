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


# ---------------------------------------------------------------------------
# Binary quadratic forms (class groups): plain-int hot loops.
#
# A form is (a, b, c) with b² − 4ac = D > 0, D not a square; r = ⌊√D⌋.
# ``form_rho_b`` is the normalised middle coefficient of the rho step; the
# other functions reduce, walk cycles and compose without matrices. The
# matrix-tracking versions live in :mod:`realquad.forms`.
# ---------------------------------------------------------------------------


def form_rho_b(b: int, c: int, r: int) -> int:
    """The ``t ≡ −b (mod 2|c|)`` of the rho step (Buchmann–Vollmer's normalisation).

    ``√D − 2|c| < t < √D`` when ``|c| < √D``, else ``−|c| < t ≤ |c|``.
    """
    m = c if c > 0 else -c
    if m <= r:
        return r - (r + b) % (2 * m)
    t = (-b) % (2 * m)
    return t - 2 * m if t > m else t


def form_is_reduced(a: int, b: int, r: int) -> bool:
    """``|√D − 2|a|| < b < √D``, exactly (``r = ⌊√D⌋``, ``D`` not a square)."""
    m = 2 * (a if a > 0 else -a)
    return 0 < b <= r and r - b < m <= r + b


def form_reduce(a: int, b: int, c: int, D: int, r: int) -> tuple[int, int, int]:
    """Apply rho until ``(a, b, c)`` is reduced; return the reduced form."""
    while not form_is_reduced(a, b, r):
        t = form_rho_b(b, c, r)
        a, b, c = c, t, (t * t - D) // (4 * c)
    return a, b, c


def form_cycle(
    a: int, b: int, c: int, D: int, r: int, max_steps: int
) -> list[tuple[int, int]] | None:
    """The rho cycle ``[(a, b), …]`` of a reduced form, or ``None`` beyond ``max_steps``."""
    out = [(a, b)]
    append = out.append
    a0, b0 = a, b
    for _ in range(max_steps):
        t = form_rho_b(b, c, r)
        a, b, c = c, t, (t * t - D) // (4 * c)
        if a == a0 and b == b0:
            return out
        append((a, b))
    return None


def extended_gcd(x: int, y: int) -> tuple[int, int, int]:
    """``(g, u, v)`` with ``u x + v y = g = gcd(x, y) ≥ 0``."""
    u0, v0, u1, v1 = 1, 0, 0, 1
    while y:
        q, rem = divmod(x, y)
        x, y = y, rem
        u0, u1 = u1, u0 - q * u1
        v0, v1 = v1, v0 - q * v1
    if x < 0:
        return -x, -u0, -v0
    return x, u0, v0


def form_compose(a1: int, b1: int, a2: int, b2: int, D: int) -> tuple[int, int, int]:
    """Dirichlet composition of two forms of discriminant ``D`` (not reduced).

    With ``s = (b1 + b2)/2`` and ``e = gcd(a1, a2, s) = u a1 + v a2 + w s``, the
    composite is ``(A, B, C)`` with ``A = a1 a2 / e²`` and
    ``B ≡ (u a1 b2 + v a2 b1 + w (b1 b2 + D)/2)/e (mod 2A)``.
    """
    s = (b1 + b2) // 2
    g, x, y = extended_gcd(a1, a2)
    e, p, w = extended_gcd(g, s)
    u, v = p * x, p * y
    A = a1 * a2 // (e * e)
    B = (u * a1 * b2 + v * a2 * b1 + w * (b1 * b2 + D) // 2) // e
    m = 2 * (A if A > 0 else -A)
    B %= m
    if B > m // 2:
        B -= m
    return A, B, (B * B - D) // (4 * A)
