"""Units from relations (``D > 0``): each relation's generator, and the regulator from the kernel.

**Generators.** A relation ``r`` found at ``x`` on the form ``f = (a, b, c)``
(:mod:`~realquad.relations.smooth`) comes with an element: for
``B = −(2ax + b)`` the number ``γ = (B + √D)/2 = −x·a + (−b + √D)/2`` lies in
``A = [a, (−b + √D)/2]`` and has norm ``a·n``, ``n = f(x, 1)``, so
``(γ) = A·J̄`` with ``J = [|n|, (−B + √D)/2]`` the ideal of ``(n, B, ·)``.
With ``P_p = [p, (−b_p + √D)/2]`` and ``P̄_p = p·P_p^{−1}``:
``A = M_a·∏ P_q^{σ_q}``, ``M_a = ∏_{σ_q = −1} q``, and
``J̄ = N₊·∏ P_p^{−s_p e_p}``, ``N₊ = ∏_{s_p = +1} p^{e_p}`` (``s_p``, ``σ_q``
the signs of :func:`~realquad.relations.smooth.sign_of`, ``+1`` for a
ramified prime). So the relation's ideal is principal::

    ∏ P_p^{r_p} = (ρ),   ρ = M_a·N₊/γ,   r = s·e − σ,

and ``N(ρ) = (M_a N₊)²/(a·n)`` has the sign of ``n``. A ramified prime gives
``P_p² = (p)``. :func:`relation_generator` rebuilds ``r`` from ``(a, b, x)``
this way and refuses a relation whose exponents differ.

**Units.** A vector ``c`` with ``Σ c_i r_i = 0`` (a kernel vector of the
relation matrix, :func:`realquad.core.lattice.lattice_kernel`) gives the unit
``∏ ρ_i^{c_i}``, whose logarithm ``Σ c_i log|ρ_i|`` is a multiple of the
regulator ``R``. :func:`unit_from_kernel` runs Euclid's algorithm on these
real numbers — ``x − round(x/y)·y`` is again the logarithm of a unit — in
fixed point with a rigorous error bound; every value below ``1/5`` is the
logarithm of ``±1`` (a real quadratic field has ``R ≥ log((1 + √5)/2) >
0.48``: its fundamental unit ``(u + v√D)/2`` has ``u, v ≥ 1`` and ``D ≥ 5``).
What is left is ``log ε*`` for a unit ``ε* = ∏ ρ_i^{k_i}`` generating the
units the kernel vectors reach: ``R`` itself once they reach ``ε``, which the
caller certifies (``h·R`` in the analytic class number formula's interval).
J. Buchmann, "A subexponential algorithm for the determination of class
groups and regulators of algebraic number fields", Séminaire de Théorie des
Nombres, Paris 1988–89; M. J. Jacobson Jr., *Subexponential class group
computation in quadratic orders*, PhD thesis, TU Darmstadt 1999, ch. 4 and 7.

>>> from fractions import Fraction
>>> from realquad.relations.factor_base import factor_base
>>> from realquad.relations.families import family
>>> from realquad.relations.smooth import relation_at
>>> fb = factor_base(4 * 10007, 60)
>>> rel = relation_at(fb, family(fb, [7, 13]), 0, -1, 10**6)   # a = 91, n = −2·53·13/7
>>> rel.exponents
{2: 1, 7: -1, 13: 1, 53: 1}
>>> rho, negative = relation_generator(fb, rel)
>>> rho, negative
(QuadraticNumber(-38, 1, 14, 40028), True)
>>> abs(rho.norm()) == Fraction(2 * 13 * 53, 7)
True
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import gmpy2
import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.relations.factor_base import FactorBase, prime_b
from realquad.relations.smooth import Relation, sign_of

#: Below this, a unit's logarithm is that of ±1 (every real quadratic regulator exceeds 0.48).
ZERO = 0.2


def a_primes(fb: FactorBase, a: int) -> list[int]:
    """The primes of ``a`` (a product of distinct factor-base primes), by trial division."""
    out, rest = [], a
    for p in fb.primes:
        if rest % p == 0:
            out.append(p)
            rest //= p
            if rest == 1:
                break
    if rest != 1:
        raise ArithmeticError(
            f"internal check failed: a = {a} does not factor over the factor base"
        )
    return out


def relation_generator(
    fb: FactorBase, relation: Relation, known_primes: list[int] | None = None
) -> tuple[QuadraticNumber, bool]:
    """``(ρ, N(ρ) < 0)`` with ``∏ P_p^{r_p} = (ρ)`` for a relation of a real field (module notes).

    ``known_primes``, the primes of ``relation.a``, are found by
    :func:`a_primes` when not given. Raises ``ArithmeticError`` if the exponents rebuilt from
    ``(a, b, x)`` are not the relation's.
    """
    D, a, b, x = fb.discriminant, relation.a, relation.b, relation.x
    primes = a_primes(fb, a) if known_primes is None else known_primes
    n, B = relation.value(D), relation.B
    rest = gmpy2.mpz(abs(n))
    rebuilt: dict[int, int] = {}
    M = 1
    for p in sorted(set(relation.exponents) | set(primes)):
        bp = fb.b[fb.index[p]] if p in fb.index else prime_b(D, p)
        rest, e = gmpy2.remove(rest, p)
        s = sign_of(B, p, bp, D)
        if e and s == 1:
            M *= p ** int(e)
        r = s * int(e)
        if p in primes:
            sigma = sign_of(b, p, bp, D)
            r -= sigma
            if sigma == -1:
                M *= p
        if r:
            rebuilt[p] = r
    if rest != 1 or rebuilt != relation.exponents:
        raise ArithmeticError(
            f"internal check failed: the relation at x = {x} on ({a}, {b}, ·) is not "
            f"{relation.exponents} (rebuilt: {rebuilt}, cofactor {rest})"
        )
    # ρ = M/γ = 2M/(B + √D) = 2M(B − √D)/(B² − D)
    return QuadraticNumber(2 * M * B, -2 * M, B * B - D, D), n < 0


def ramified_generator(D: int, p: int) -> QuadraticNumber:
    """``p``: the generator of ``P_p² = (p)`` for a ramified prime."""
    return QuadraticNumber(p, 0, 1, D)


@dataclass(frozen=True)
class KernelUnit:
    """``ε* = ± ∏ ρ_i^{exponents[i]}`` with ``|log|ε*| − log| ≤ error`` (``log > 0``)."""

    exponents: dict[int, int]
    log: mpmath.mpf
    error: mpmath.mpf
    norm: int


def fixed_logs(numbers: Sequence[QuadraticNumber], bits: int) -> list[gmpy2.mpz]:
    """``round(2^bits·log|ρ|)`` for each ``ρ``, each off by less than one unit."""
    digits = bits // 3 + 12
    scale = mpmath.mpf(2) ** bits
    out = []
    with mpmath.workprec(bits + 64):
        for rho in numbers:
            out.append(gmpy2.mpz(int(mpmath.nint(rho.log_abs_mpf(digits) * scale))))
    return out


def _combine(x: dict[int, int], y: Mapping[int, int], q: int) -> dict[int, int]:
    out = dict(x)
    for i, v in y.items():
        w = out.get(i, 0) - q * v
        if w:
            out[i] = w
        else:
            out.pop(i, None)
    return out


def unit_from_kernel(
    generators: Sequence[QuadraticNumber],
    negative: Sequence[bool],
    kernel: Sequence[Mapping[int, int]],
) -> KernelUnit | None:
    """The unit ``ε* > 1`` whose powers are the units ``∏ ρ_i^{c_i}`` of ``kernel`` (module notes).

    ``generators[i]`` generates relation ``i``'s ideal, ``negative[i]`` says
    whether its norm is negative. ``None`` when every kernel vector gives
    ``±1``. The norm of each kernel unit is checked to be ``N(ε*)`` to the
    power its logarithm is of ``log ε*``.

    >>> phi = QuadraticNumber(1, 1, 2, 5)                # (1 + √5)/2, norm −1; units φ⁶, φ⁴ give φ²
    >>> found = unit_from_kernel([phi**6, phi**4], [False, False], [{0: 1}, {1: 1}])
    >>> found.exponents, found.norm, mpmath.nstr(found.log, 8)
    ({0: -1, 1: 2}, 1, '0.96242365')
    """
    if not kernel:
        return None
    weight = max(sum(abs(v) for v in c.values()) for c in kernel)
    bits = 2 * weight.bit_length() + 80
    while True:
        found = _euclid(generators, kernel, bits)
        if found is not None:
            break
        bits *= 2  # pragma: no cover - the first precision covers the error growth
    items, unit_bits, start = found
    if not items:
        return None
    exponents, value, error = items[0]
    if value < 0:
        exponents, value = {i: -e for i, e in exponents.items()}, -value
    scale = mpmath.mpf(2) ** unit_bits
    with mpmath.workprec(unit_bits + 64):
        log = mpmath.mpf(value) / scale
        bound = mpmath.mpf(error) / scale
    norm = -1 if sum(e for i, e in exponents.items() if negative[i]) % 2 else 1
    powers = _powers(generators, kernel, exponents, value, start, unit_bits)
    for c, m in zip(kernel, powers, strict=True):
        n = -1 if sum(e for i, e in c.items() if negative[i]) % 2 else 1
        if n != (norm if m % 2 else 1):  # N(ε*)^m, read from the parity (m may be huge, < 0)
            raise ArithmeticError(
                "internal check failed: a unit from the relations has a norm that is not a "
                "power of the fundamental unit's"
            )
    return KernelUnit(exponents, log, bound, norm)


def _powers(
    generators: Sequence[QuadraticNumber],
    kernel: Sequence[Mapping[int, int]],
    exponents: Mapping[int, int],
    value: gmpy2.mpz,
    start: Sequence[gmpy2.mpz],
    bits: int,
) -> list[int]:
    """The ``m`` with ``∏ ρ_i^{c_i} = ±ε*^m`` for each kernel vector ``c`` (``ε*``: ``exponents``).

    At Euclid's ``bits`` bits (``value``: ``ε*``'s fixed-point logarithm there,
    ``start``: the kernel units') ``m`` is known to within a few units; the
    precision is then raised until the errors, ``Σ|c_i| + |m|·Σ|e_i| + 1``
    units, are below a tenth of ``log ε*``, where ``m = round(log|∏
    ρ_i^{c_i}|/log ε*)`` is exact and the remainder is checked to be that of
    ``±1`` (kernel vectors' units reach ``|m|`` of hundreds of bits at 80
    digits, beyond the precision Euclid needed).
    """
    rough = [abs(int(gmpy2.f_div(v, value))) + 2 for v in start]
    size_e = sum(abs(e) for e in exponents.values())
    need = max(sum(abs(v) for v in c.values()) + m * size_e for c, m in zip(kernel, rough))
    fine = bits + need.bit_length() + 8  # log ε* > 0.48: the errors stay below 2⁻⁸·ε*'s value
    support = sorted({i for c in kernel for i in c})  # ε* combines kernel vectors: within it
    logs = dict(zip(support, fixed_logs([generators[i] for i in support], fine), strict=True))
    *units, eps = [
        sum((v * logs[i] for i, v in c.items()), gmpy2.mpz(0)) for c in [*kernel, exponents]
    ]
    out = []
    for v in units:
        m = int(gmpy2.f_div(2 * v + eps, 2 * eps))
        if 10 * abs(v - m * eps) > eps:
            raise ArithmeticError(
                "internal check failed: a unit from the relations is not a power of ε*"
            )
        out.append(m)
    return out


def _euclid(
    generators: Sequence[QuadraticNumber], kernel: Sequence[Mapping[int, int]], bits: int
) -> tuple[list[tuple[dict[int, int], gmpy2.mpz, gmpy2.mpz]], int, list[gmpy2.mpz]] | None:
    """Euclid on the kernel units' fixed-point logarithms; ``None`` if the error grew too large.

    Also the kernel units' own fixed-point logarithms at ``bits`` (Euclid's start).
    """
    support = sorted({i for c in kernel for i in c})
    logs = dict(zip(support, fixed_logs([generators[i] for i in support], bits), strict=True))
    one = gmpy2.mpz(1) << bits
    zero = int(ZERO * (1 << 20)) * (one >> 20)
    items = []
    for c in kernel:
        value = sum((v * logs[i] for i, v in c.items()), gmpy2.mpz(0))
        error = sum(abs(v) for v in c.values()) + 1
        items.append((dict(c), value, gmpy2.mpz(error)))
    start = [value for _, value, _ in items]
    while True:
        if any(error * 20 > one for _, _, error in items):
            return None
        items = [t for t in items if abs(t[1]) > zero]
        if len(items) <= 1:
            return items, bits, start
        items.sort(key=lambda t: abs(t[1]))
        y, yv, ye = items[0]
        rest = [items[0]]
        for x, xv, xe in items[1:]:
            q = int(gmpy2.f_div(2 * xv + yv, 2 * yv))  # round(xv/yv)
            rest.append((_combine(x, y, q), xv - q * yv, xe + abs(q) * ye))
        items = rest
