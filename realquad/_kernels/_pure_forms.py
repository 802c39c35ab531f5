"""Pure-Python twins of the form and class-group kernels (part of :mod:`realquad._kernels._pure`).

:mod:`realquad._kernels._pure` re-exports every function here, so the twin
stays one namespace (``realquad._backend.pure``); the kernels are split
across two files only to keep each readable. Same rules as there: plain ints
in, plain ints out, the same results as the compiled counterparts in
``prime_form_kernels.c``, ``class_kernels.c`` and ``form_kernels.c``.
"""

from __future__ import annotations

import math
import sys

from gmpy2 import isqrt, kronecker

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


def _principal_b(D: int, r: int) -> int:
    """The ``b`` of the reduced principal form ``(1, b, ·)``: ``b < √D`` largest, ``b ≡ D (mod 2)``."""
    return r if (r - D) % 2 == 0 else r - 1


def sqrt_mod_prime(n: int, p: int) -> int:
    """A square root of ``n`` modulo the prime ``p`` (Tonelli–Shanks), or ``−1`` if none."""
    n %= p
    if p == 2 or n == 0:
        return n
    if pow(n, (p - 1) // 2, p) != 1:
        return -1
    if p % 4 == 3:
        return pow(n, (p + 1) // 4, p)
    q, e = p - 1, 0
    while q % 2 == 0:
        q //= 2
        e += 1
    z = 2
    while pow(z, (p - 1) // 2, p) != p - 1:
        z += 1
    m, cc, t, root = e, pow(z, q, p), pow(n, q, p), pow(n, (q + 1) // 2, p)
    while t != 1:
        i, t2 = 0, t
        while t2 != 1:
            t2 = t2 * t2 % p
            i += 1
        bb = pow(cc, 1 << (m - i - 1), p)
        m, cc = i, bb * bb % p
        t, root = t * cc % p, root * bb % p
    return root


def prime_form_b(D: int, p: int) -> int:
    """The ``b`` (``0 ≤ b ≤ p``) of a primitive form ``(p, b, c)`` of discriminant ``D``, or ``−1``.

    ``p`` must be prime; there is none when ``(D/p) = −1`` or ``p`` divides the conductor.
    """
    if p == 2:
        residue = D % 8
        if residue == 1:
            b = 1
        elif residue == 0:
            b = 0
        elif residue == 4:
            b = 2
        else:
            return -1
    else:
        if kronecker(D, p) < 0:  # cheaper than Euler's criterion in the square root
            return -1
        t = sqrt_mod_prime(D, p)
        b = t if (t - D) % 2 == 0 else p - t
    c = (b * b - D) // (4 * p)
    if b % p == 0 and c % p == 0:
        return -1
    return b


def form_class_candidates(D: int, conductor: int, primes: list[int]) -> list[tuple[int, int, int]]:
    """Generators of the narrow class group of ``D``: ``J``, then forms of prime-power norm ``q``, ``4q² < D``.

    ``J = (−1, b₀, c₀)``; for each prime ``p`` of ``primes`` with ``4p² < D`` not
    dividing ``conductor`` its prime form, and for ``p | conductor`` every
    primitive ``(p^k, b, c)`` with ``4p^{2k} < D``.
    """
    r = int(isqrt(D))
    b0 = _principal_b(D, r)
    out = [(-1, b0, (D - b0 * b0) // 4)]
    for p in primes:
        if 4 * p * p >= D:
            break
        if conductor % p:
            b = prime_form_b(D, p)
            if b >= 0:
                out.append((p, b, (b * b - D) // (4 * p)))
            continue
        q = p
        while 4 * q * q < D:
            for b in range(-q + 1, q + 1):
                if (b - D) % 2 == 0 and (b * b - D) % (4 * q) == 0:
                    c = (b * b - D) // (4 * q)
                    if math.gcd(math.gcd(q, b), c) == 1:
                        out.append((q, b, c))
            q *= p
    return out


def form_class_table(
    D: int,
    candidates: list[tuple[int, int, int]],
    max_forms: int,
    progress: object = None,
    steps: object = None,
) -> tuple[dict, list, list, list, list] | None:
    """All narrow classes of ``D``, reached from the principal cycle by the ``candidates``.

    Returns ``(index, representatives, vectors, generators, relations)``:
    ``index`` maps every reduced form ``(a, b)`` to its class, ``vectors[i]``
    writes class ``i`` on ``generators``, ``relations`` are triangular with
    ``∏ diagonal = len(representatives) = h⁺``. ``None`` when more than
    ``max_forms`` reduced forms would be stored. ``progress`` (a callable or
    ``None``) receives the class count every 1000 classes. ``steps`` (default:
    this module) supplies ``form_reduce``, ``form_cycle`` and ``form_compose``,
    so the loop can run on compiled steps while it has no compiled twin itself
    (:func:`form_class_numbers` and :func:`form_class_relations` take their
    candidates from ``steps`` too).
    """
    ops = steps if steps is not None else sys.modules[__name__]
    form_reduce, form_cycle, form_compose = ops.form_reduce, ops.form_cycle, ops.form_compose  # type: ignore[attr-defined]
    r = int(isqrt(D))
    b0 = _principal_b(D, r)
    start = (1, b0, (b0 * b0 - D) // 4)
    walk = form_cycle(start[0], start[1], start[2], D, r, max_forms)
    if walk is None:
        return None
    index = dict.fromkeys(walk, 0)
    stored = len(walk)
    representatives = [start]
    vectors: list[tuple[int, ...]] = [()]
    generators: list[tuple[int, int, int]] = []
    relations: list[list[int]] = []
    for g in candidates:
        gred = form_reduce(g[0], g[1], g[2], D, r)
        if (gred[0], gred[1]) in index:
            continue
        gi = len(generators)
        generators.append(gred)
        n = len(representatives)
        x = gred
        j = 1
        while True:
            hit = index.get((x[0], x[1]))
            if hit is not None:
                old = vectors[hit]
                relations.append([-v for v in old] + [0] * (gi - len(old)) + [j])
                break
            for h in range(n):
                if h == 0:
                    y = x
                else:
                    rep = representatives[h]
                    y = form_compose(x[0], x[1], rep[0], rep[1], D)
                    y = form_reduce(y[0], y[1], y[2], D, r)
                walk = form_cycle(y[0], y[1], y[2], D, r, max_forms - stored)
                if walk is None:
                    return None
                stored += len(walk)
                cls = len(representatives)
                for key in walk:
                    index[key] = cls
                representatives.append(y)
                old = vectors[h]
                vectors.append(old + (0,) * (gi - len(old)) + (j,))
                if progress is not None and cls % 1000 == 0:
                    progress(cls)  # type: ignore[operator]
            x = form_compose(x[0], x[1], gred[0], gred[1], D)
            x = form_reduce(x[0], x[1], x[2], D, r)
            j += 1
    return index, representatives, vectors, generators, relations


def form_class_numbers(
    D: int, conductor: int, primes: list[int], max_forms: int, steps: object = None
) -> tuple[int, int] | None:
    """``(h⁺, 1 if J = (−1, b₀, c₀) is principal else 0)`` of ``D``, or ``None`` beyond ``max_forms``.

    The lean path of :func:`form_class_table` (a compiled twin may skip the vectors).
    ``h = h⁺`` when ``J`` is principal (unit of norm −1), else ``h⁺/2``; ``steps`` as in
    :func:`form_class_table`.
    """
    ops = steps if steps is not None else sys.modules[__name__]
    candidates = ops.form_class_candidates(D, conductor, primes)  # type: ignore[attr-defined]
    table = form_class_table(D, candidates, max_forms, None, steps)
    if table is None:
        return None
    index, representatives = table[0], table[1]
    r = int(isqrt(D))
    b0 = _principal_b(D, r)
    return len(representatives), int(index.get((-1, b0)) == 0)


def form_class_relations(
    D: int, conductor: int, primes: list[int], max_forms: int, steps: object = None
) -> tuple[int, int, list[tuple[int, int, int]], list[list[int]]] | None:
    """``(h⁺, j, generators, relations)`` of :func:`form_class_table` without the per-class data.

    ``j`` as in :func:`form_class_numbers`; ``generators`` (reduced triples) and the
    triangular ``relations`` are exactly those of the full table (same candidates,
    same order), so coordinates computed from either agree. ``None`` beyond ``max_forms``.
    ``steps`` as in :func:`form_class_table`.
    """
    ops = steps if steps is not None else sys.modules[__name__]
    candidates = ops.form_class_candidates(D, conductor, primes)  # type: ignore[attr-defined]
    table = form_class_table(D, candidates, max_forms, None, steps)
    if table is None:
        return None
    index, representatives, _, generators, relations = table
    r = int(isqrt(D))
    b0 = _principal_b(D, r)
    return len(representatives), int(index.get((-1, b0)) == 0), generators, relations


# ---------------------------------------------------------------------------
# Fused kernels: one call from Python where a hot loop would make two.
# ---------------------------------------------------------------------------


def form_compose_reduce(a1: int, b1: int, a2: int, b2: int, D: int, r: int) -> tuple[int, int, int]:
    """:func:`form_compose` followed by :func:`form_reduce` (``r = ⌊√D⌋``).

    >>> form_compose_reduce(2, 1, 2, 1, 17, 4)  # (2, 1, −2)² in discriminant 17
    (-1, 3, 2)
    """
    A, B, C = form_compose(a1, b1, a2, b2, D)
    return form_reduce(A, B, C, D, r)
