"""A number in compact representation modulo any integer, without expanding it.

A compact representation ``β = s·∏ chains`` (:mod:`realquad.infrastructure.compact`) is
a product of numbers ``α = (x + y√D)/c`` of small height raised to enormous
powers. Reducing each ``α`` modulo ``m`` needs every ``c`` (and 2) invertible
modulo ``m``; :func:`coordinates_modulo` takes any ``m``. It writes
``β = (u + v√D)/2`` (``u, v`` integers for a number of the order) and finds
``u mod m`` and ``v mod m``: the part of ``m`` prime to 2 and to the
denominators directly, and each prime power ``p^k`` of the rest ``p``-adically,
in the completion of ``Q(√D)`` at ``p``:

* ``D`` a square in ``Q_p`` (``p`` splits, or ``D = p^{2t}·D₁`` with ``D₁`` a
  ``p``-adic square): the two embeddings ``√D ↦ ±r`` into ``Q_p``; each ``α``
  becomes ``p^v·w`` with ``v`` an exact integer and ``w`` a ``p``-adic unit known
  modulo ``p^N`` (``x ± yr`` computed to the precision that the valuation of
  ``N(x + y√D)`` calls for), products and powers are exact on both, and
  ``u = β₊ + β₋``, ``v = (β₊ − β₋)/r``;
* otherwise one prime lies above ``p``: each number is kept as ``p^w(a + b√D)``
  with ``a, b`` modulo ``p^P``, not both divisible by ``p``; a product loses at
  most ``v_p(D) + 2`` digits of precision to the common power of ``p`` it
  sheds (the numerators have valuation at most ``v_p(D)/2 + 1``), and a run
  that ends short of ``p^k`` is repeated with twice the precision.

The parts are joined by the Chinese remainder theorem. Checked in the tests
against the expanded numbers for every modulus up to 200 and for powers of the
primes of the denominators.

References: J. Buchmann, C. Thiel and H. C. Williams, "Short representation of
quadratic integers" (1995); M. J. Jacobson Jr. and H. C. Williams, *Solving the
Pell Equation*, Springer 2009, §12 (compact representations, and that their
numbers can be reduced modulo an integer); J. Neukirch, *Algebraic Number Theory*,
ch. II §8 (the completions of a quadratic field at ``p``).

>>> from realquad.core.numbers import QuadraticNumber
>>> phi = QuadraticNumber(1, 1, 2, 5)                        # (1 + √5)/2, u = v = 1
>>> coordinates_modulo(5, [((phi,), 10)], 1, 100)            # φ¹⁰ = (123 + 55√5)/2
(23, 55)
>>> coordinates_modulo(5, [((phi, phi, phi), 1)], -1, 8)     # −φ⁷ = −(29 + 13√5)/2
(3, 3)
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from realquad.core.integers import times_power
from realquad.core.numbers import QuadraticNumber
from realquad.core.primes import factorize, square_root_mod_prime, valuation
from realquad.errors import DomainError

#: ``(numbers α₁ … α_k, power)``: the chain ``(α₁^{2^{k−1}} ⋯ α_k)^power`` (Horner's rule).
ChainData = tuple[Sequence[QuadraticNumber], int]


def coordinates_modulo(D: int, chains: Sequence[ChainData], sign: int, m: int) -> tuple[int, int]:
    """``(u mod m, v mod m)`` for ``β = sign·∏ chains = (u + v√D)/2``, any ``m ≥ 1``.

    ``β`` must lie in the order of discriminant ``D`` (``u, v`` integers); a
    power of a chain may be negative.
    """
    if m < 1:
        raise DomainError("modulus must be at least 1")
    good = m
    for c in {int(alpha.c) for alphas, _ in chains for alpha in alphas} | {2}:
        g = math.gcd(good, c)
        while g > 1:
            good //= g
            g = math.gcd(good, g)
    parts: list[tuple[int, int, int]] = []  # (modulus, u, v)
    if good > 1:
        x, y = _prime_to_denominators(D, chains, sign, good)
        parts.append((good, 2 * x % good, 2 * y % good))
    for p, k in factorize(m // good).items():
        q = p**k
        u, v = (
            _split(D, chains, sign, p, k)
            if _is_padic_square(D, p)
            else _nonsplit(D, chains, sign, p, k)
        )
        parts.append((q, u % q, v % q))
    u = v = 0
    modulus = 1
    for q, uq, vq in parts:  # Chinese remainders
        t = pow(modulus, -1, q)
        u += modulus * ((uq - u) * t % q)
        v += modulus * ((vq - v) * t % q)
        modulus *= q
    return u % m, v % m


def _prime_to_denominators(
    D: int, chains: Sequence[ChainData], sign: int, m: int
) -> tuple[int, int]:
    """``(x, y)`` modulo ``m`` with ``β ≡ x + y√D``, ``m`` prime to 2 and every denominator."""
    d = D % m
    x, y = 1, 0
    for alphas, power in chains:
        cx, cy = 1, 0
        for alpha in alphas:  # Horner's rule: γ ← γ²·α
            cx, cy = (cx * cx + d * cy * cy) % m, 2 * cx * cy % m
            inv = pow(int(alpha.c), -1, m)
            ax, ay = int(alpha.x) * inv % m, int(alpha.y) * inv % m
            cx, cy = (cx * ax + d * cy * ay) % m, (cx * ay + cy * ax) % m
        if power < 0:
            n = (cx * cx - d * cy * cy) % m
            if math.gcd(n, m) != 1:
                raise DomainError(f"the number is not invertible modulo {m}")
            inv = pow(n, -1, m)
            cx, cy = cx * inv % m, -cy * inv % m
        px, py = _power(cx, cy, abs(power), d, m)
        x, y = (x * px + d * y * py) % m, (x * py + y * px) % m
    return sign * x % m, sign * y % m


def _power(x: int, y: int, e: int, d: int, m: int) -> tuple[int, int]:
    """``(x + y√d)^e`` modulo ``m``."""

    def times(f: tuple[int, int], g: tuple[int, int]) -> tuple[int, int]:
        return (f[0] * g[0] + d * f[1] * g[1]) % m, (f[0] * g[1] + f[1] * g[0]) % m

    return times_power((1, 0), (x, y), e, times)


# -- D a square in Q_p: two embeddings ---------------------------------------------------------


def _is_padic_square(D: int, p: int) -> bool:
    """Whether ``D ≠ 0`` is a square in ``Q_p``.

    >>> [p for p in (2, 3, 5, 7, 11, 13) if _is_padic_square(17, p)], _is_padic_square(-7 * 64, 2)
    ([2, 13], True)
    """
    t = valuation(D, p)
    unit = D // p**t
    if t % 2:
        return False
    if p == 2:
        return unit % 8 == 1
    return pow(unit % p, (p - 1) // 2, p) == 1


def _padic_sqrt(D: int, p: int, T: int) -> tuple[int, int]:
    """``(s, r)`` with ``r² ≡ D`` modulo ``p^T`` (``r = p^s·r₁``, ``r₁`` a unit), ``D`` a
    ``p``-adic square; ``r`` is exact modulo ``p^T`` (modulo ``2^{T−1}`` for ``p = 2``)."""
    t = valuation(D, p)
    s, unit = t // 2, D // p**t
    q = p ** (T + 1)
    if p == 2:
        r = 1
        for j in range(3, T + 2):  # r² ≡ unit (mod 2^j) → mod 2^{j+1}
            if (r * r - unit) % (1 << (j + 1)):
                r += 1 << (j - 1)
    else:
        root = square_root_mod_prime(unit % p, p)
        assert root is not None  # a p-adic square
        r, precision = root, 1
        while precision < T + 1:  # Newton: precision doubles
            precision = min(2 * precision, T + 1)
            modulus = p**precision
            r = (r - (r * r - unit) * pow(2 * r, -1, modulus)) % modulus
    return s, p**s * r % q


def _split(D: int, chains: Sequence[ChainData], sign: int, p: int, k: int) -> tuple[int, int]:
    """``(u, v)`` modulo ``p^k`` through the embeddings ``√D ↦ ±r`` into ``Q_p``."""
    s = valuation(D, p) // 2
    N = k + s + 1
    q = p**N
    roots: dict[int, int] = {}

    def root(T: int) -> int:
        best = min((t for t in roots if t >= T), default=None)
        if best is None:
            best = max(T, 2 * max(roots, default=0))
            roots[best] = _padic_sqrt(D, p, best + 1)[1]
        return roots[best]

    def embed(alpha: QuadraticNumber) -> tuple[int, int, int, int]:
        x, y, c = int(alpha.x), int(alpha.y), int(alpha.c)
        T = N + valuation(x * x - D * y * y, p) + 2 * s + 2
        r, modulus = root(T), p**T
        out: list[int] = []
        for z in ((x + y * r) % modulus, (x - y * r) % modulus):
            v = valuation(z, p)  # below T: v₊ + v₋ = v_p(x² − Dy²)
            out += [v - valuation(c, p), z // p**v]
        cu = c // p ** valuation(c, p)
        inv = pow(cu, -1, q)
        return out[0], out[1] * inv % q, out[2], out[3] * inv % q

    def mul(f: tuple[int, int, int, int], g: tuple[int, int, int, int]) -> tuple[int, ...]:
        return f[0] + g[0], f[1] * g[1] % q, f[2] + g[2], f[3] * g[3] % q

    total: tuple[int, ...] = (0, 1, 0, 1)
    for alphas, power in chains:
        gamma: tuple[int, ...] = (0, 1, 0, 1)
        for alpha in alphas:
            gamma = mul(mul(gamma, gamma), embed(alpha))  # type: ignore[arg-type]
        vp, up, vm, um = gamma
        gamma = (vp * power, pow(up, power, q), vm * power, pow(um, power, q))
        total = mul(total, gamma)  # type: ignore[arg-type]
    vp, up, vm, um = total
    if vp < 0 or vm < 0:
        raise ArithmeticError("internal check failed: the number is not integral at p")
    plus = sign * (p**vp * up if vp < N else 0) % q
    minus = sign * (p**vm * um if vm < N else 0) % q
    u = (plus + minus) % q
    difference = (plus - minus) % q
    if difference % p**s:
        raise ArithmeticError("internal check failed: β₊ − β₋ is not divisible by √D")
    r = root(N + 2)
    r1 = r // p**s
    v = difference // p**s * pow(r1, -1, p ** (N - s)) % p ** (N - s)
    return u % p**k, v % p**k


# -- one prime above p: numbers p^w (a + b√D), a and b not both divisible by p -------------------


class _PrecisionLost(Exception):
    """A product shed every digit the run carried: repeat with more precision."""


def _nonsplit(D: int, chains: Sequence[ChainData], sign: int, p: int, k: int) -> tuple[int, int]:
    """``(u, v)`` modulo ``p^k`` when one prime of ``Q(√D)`` lies above ``p``."""
    steps = sum(2 * len(alphas) + 2 * abs(power).bit_length() + 1 for alphas, power in chains)
    P = k + 8 + steps
    while True:
        try:
            w, a, b, precision = _nonsplit_value(D, chains, sign, p, P)
        except _PrecisionLost:
            P *= 2
            continue
        shift = w + (1 if p == 2 else 0)  # u = 2p^w·a, v = 2p^w·b
        if shift < 0:
            raise ArithmeticError("internal check failed: the number is not in the order")
        if precision + shift >= k:
            q = p**k
            scale = 2 * p**w if w >= 0 else 1  # p = 2 and w = −1: u = a, v = b
            return a * scale % q, b * scale % q
        P *= 2


def _nonsplit_value(
    D: int, chains: Sequence[ChainData], sign: int, p: int, P: int
) -> tuple[int, int, int, int]:
    """``(w, a, b, precision)``: ``β = p^w(a + b√D)`` with ``a, b`` exact modulo ``p^precision``."""
    Element = tuple[int, int, int, int]

    def normal(w: int, a: int, b: int, precision: int) -> Element:
        modulus = p**precision
        a, b = a % modulus, b % modulus
        if a == 0 and b == 0:
            raise _PrecisionLost
        h = min(valuation(a, p) if a else precision, valuation(b, p) if b else precision)
        return w + h, a // p**h, b // p**h, precision - h

    def embed(alpha: QuadraticNumber) -> Element:
        x, y, c = int(alpha.x), int(alpha.y), int(alpha.c)
        vc = valuation(c, p)
        inv = pow(c // p**vc, -1, p**P)
        return normal(-vc, x * inv, y * inv, P)

    def mul(f: Element, g: Element) -> Element:
        precision = min(f[3], g[3])
        return normal(
            f[0] + g[0], f[1] * g[1] + D * f[2] * g[2], f[1] * g[2] + f[2] * g[1], precision
        )

    def inverse(f: Element) -> Element:
        w, a, b, precision = f
        modulus = p**precision
        n = (a * a - D * b * b) % modulus
        if n == 0:
            raise _PrecisionLost
        h = valuation(n, p)
        inv = pow(n // p**h, -1, modulus)
        return normal(-w - h, a * inv, -b * inv, precision - h)

    def power(f: Element, e: int) -> Element:
        if e < 0:
            f, e = inverse(f), -e
        return times_power((0, 1, 0, P), f, e, mul)

    total: Element = (0, sign, 0, P)
    for alphas, e in chains:
        gamma: Element = (0, 1, 0, P)
        for alpha in alphas:
            gamma = mul(mul(gamma, gamma), embed(alpha))
        total = mul(total, power(gamma, e))
    return total
