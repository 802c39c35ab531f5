"""Pure-Python twin of ``form_kernels.c``: reduction, rho, cycles and composition of forms.

A form is ``(a, b, c)`` with ``b² − 4ac = D > 0``, ``D`` not a square;
``r = ⌊√D⌋``. ``form_rho_b`` is the normalised middle coefficient of the rho
step; the other functions reduce, walk cycles and compose without matrices
(the matrix-tracking versions live in :mod:`realquad.core.forms`).

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations


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


def form_compose_reduce(a1: int, b1: int, a2: int, b2: int, D: int, r: int) -> tuple[int, int, int]:
    """:func:`form_compose` followed by :func:`form_reduce` (``r = ⌊√D⌋``).

    >>> form_compose_reduce(2, 1, 2, 1, 17, 4)  # (2, 1, −2)² in discriminant 17
    (-1, 3, 2)
    """
    A, B, C = form_compose(a1, b1, a2, b2, D)
    return form_reduce(A, B, C, D, r)


def principal_b(D: int, r: int) -> int:
    """The ``b`` of the reduced principal form ``(1, b, ·)``: ``b < √D`` largest, ``b ≡ D (mod 2)``."""
    return r if (r - D) % 2 == 0 else r - 1
