"""``x² − d y² = n`` beyond the continued fraction: principal ideal tests in the infrastructure.

The classes of solutions of ``x² − d y² = n`` (Nagell) with ``gcd(x, y) = f``
are ``f`` times the classes of primitive solutions of ``x² − d y² = m``,
``m = n/f²``. A primitive solution ``α = x + y√d`` generates the ideal
``J_z = [|m|, z + √d]`` of ``Z[√d]`` (discriminant ``D = 4d``) for the one
square root ``z`` of ``d`` modulo ``|m|`` with ``x ≡ zy (mod |m|)``; so each
class belongs to exactly one ``z``, and ``z`` carries a class exactly when
``J_z`` is principal with a generator of norm ``m`` — a generator ``ν`` of
norm ``−m`` will do when the fundamental unit ``ε₀`` has norm −1 (``νε₀``).
:func:`realquad.infrastructure.principal.principal_ideal_test` decides
principality (unconditionally) and gives ``ν`` in compact form; ``J_z`` that
are not invertible (``gcd(|m|, 2z, (z² − d)/|m|) > 1``) are never principal.

Each class ``{±ν εᵏ}`` (``ε`` the least unit ``> 1`` of norm +1) then gets
its fundamental solution ``α = ν εᵏ`` at the balance point
``|α| ≈ |α'|``: ``k`` is the integer nearest to
``(log|ν'| − log|ν|)/(2 log ε)``, both logarithms taken from the compact form;
where the two neighbours tie (an ambiguous class), they have the same ``|x|``
and ``|y|`` and the signs decide, as in Nagell's choice. Nothing is expanded
unless it is small.

>>> fams, method, proof = norm_families_infrastructure(13, -4)
>>> [f.fundamental for f in fams], proof
([(-3, 1), (3, 1), (36, 10)], 'unconditional')
>>> fams[0].unit.expand()            # ε = 649 + 180√13, as (u + v√52)/2
(1298, 180)

References: T. Nagell, *Introduction to Number Theory*, Wiley 1951, §57–58;
M. J. Jacobson Jr. and H. C. Williams, *Solving the Pell Equation*,
Springer 2009, ch. 12–13 (compact representations, principal ideal testing
and the norm equation).
"""

from __future__ import annotations

import math

import gmpy2
import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.primes import divisors_from_factorization, factorize, square_roots_mod, valuation
from realquad.core.results import Proof
from realquad.equations.families import CompactOrbitFamily, Point, expand_point
from realquad.infrastructure.compact import Chain, CompactRepresentation
from realquad.infrastructure.principal import principal_ideal_test
from realquad.units import Unit, fundamental_unit

METHOD_INFRASTRUCTURE = (
    "principal ideal test in the infrastructure for every ideal [|m|, z + √d], z² ≡ d (mod |m|); "
    "fundamental unit by baby-step giant-step, both in compact form"
)

#: Most decimal digits of a fundamental solution written out as ``(x, y)``.
EXPANDED_DIGITS = 20_000

#: Digits after the point of the logarithms that place the members of a class.
LOG_DIGITS = 40


def primitive_parts(n: int) -> list[tuple[int, int, dict[int, int]]]:
    """``(f, m, factors of m)`` for every ``f > 0`` with ``f² | n`` and ``m = n/f²``.

    >>> [(f, m) for f, m, _ in primitive_parts(-72)]
    [(1, -72), (2, -18), (3, -8), (6, -2)]
    """
    factors = factorize(n)
    halves = {p: e // 2 for p, e in factors.items() if e >= 2}
    out = []
    for f in sorted(divisors_from_factorization(halves)):
        rest = {p: e - 2 * valuation(f, p) for p, e in factors.items()}
        out.append((f, n // (f * f), {p: e for p, e in rest.items() if e}))
    return out


def _scalar(D: int, f: int) -> CompactRepresentation:
    """The integer ``f > 0`` as a compact number (norm ``f²``)."""
    return CompactRepresentation(D, (Chain(((QuadraticNumber(f, 0, 1, D), 1),)),), 1, f * f)


def _log(number: CompactRepresentation, size: int) -> mpmath.mpf:
    """``log |number|`` to :data:`LOG_DIGITS` digits after the point (``size`` bounds its integer part)."""
    value, error = number.log(LOG_DIGITS + 2 * size + 10)
    with mpmath.workdps(LOG_DIGITS + size + 10):
        if error > mpmath.mpf(10) ** (-LOG_DIGITS):
            raise ArithmeticError("internal check failed: a logarithm is not precise enough")
        return +value


def _signs(number: CompactRepresentation, logs: tuple[mpmath.mpf, mpmath.mpf], n: int) -> Point:
    """The signs of ``x`` and ``y`` for ``number = x + y√d`` whose two logs differ by more than 1.

    ``x = (β + β')/2`` and ``y = (β − β')/(2√d)`` take the sign of the larger conjugate.
    """
    s = number.value_sign
    s_conj = s if n > 0 else -s
    return (s, s) if logs[0] > logs[1] else (s_conj, -s_conj)


def _nagell_member(
    nu: CompactRepresentation, unit: CompactRepresentation, R: mpmath.mpf, n: int, size: int
) -> tuple[CompactRepresentation, mpmath.mpf, Point | None]:
    """Nagell's fundamental solution in ``{±ν εᵏ}``: ``(α, log|α|, (x, y) when small)``."""
    with mpmath.workdps(LOG_DIGITS + size + 10):
        L = _log(nu, size)
        centre = (mpmath.log(abs(n)) - 2 * L) / (2 * R)  # |ν εᵏ| = |ν' ε⁻ᵏ| at k = centre
        k0 = int(mpmath.nint(centre))
        tie = abs(abs(centre - k0) - mpmath.mpf(1) / 2) < mpmath.mpf(10) ** (-20)
        ks = [k0, k0 + 1 if centre > k0 else k0 - 1] if tie else [k0]
        best: tuple[tuple, CompactRepresentation, mpmath.mpf, Point | None] | None = None
        for k in ks:
            alpha = nu if k == 0 else nu * unit.power(k)
            log_alpha = L + k * R
            logs = (log_alpha, mpmath.log(abs(n)) - log_alpha)
            top = max(logs)
            digits = int((top - mpmath.log(2)) / mpmath.log(10)) + 1
            if digits <= EXPANDED_DIGITS:
                x, y = expand_point(alpha)
                options = [((x, y), 1), ((-x, -y), -1)]
                (x, y), sign = min(options, key=lambda o: _nagell_key(o[0]))
                key: tuple = _nagell_key((x, y))
                point: Point | None = (x, y)
            else:  # on a tie both have the same |x| and |y|: the signs decide
                sx, sy = _signs(alpha, logs, n)
                sign = -1 if sy < 0 else 1
                key = (0, 0, False, sx * sign < 0)
                point = None
            if sign < 0:
                alpha = _negated(alpha)
            if best is None or key < best[0]:
                best = (key, alpha, log_alpha, point)
        assert best is not None
        return best[1], best[2], best[3]


def _negated(number: CompactRepresentation) -> CompactRepresentation:
    return CompactRepresentation(
        number.discriminant, number.chains, -number.sign, number.absolute_norm
    )


def _nagell_key(v: Point) -> tuple[int, int, bool, bool]:
    return (abs(v[1]), abs(v[0]), v[1] < 0, v[0] < 0)


def _start(
    bases: list[CompactRepresentation],
    m: int,
    eps: CompactRepresentation,
    unit_norm: int,
    R: mpmath.mpf,
    size: int,
) -> CompactRepresentation | None:
    """The generator of norm ``m`` nearest the balance point among the bases (times ``ε₀^{±1}`` when
    their norm is ``−m`` and ``N(ε₀) = −1``); ``None`` when every generator has norm ``−m``.

    Nearest means fewest steps of ``ε`` (log ``R``) to Nagell's member; on a
    draw a base itself wins over a product with ``ε₀``, whose expansion would
    pass through the unit.
    """
    candidates = [(base, 0) for base in bases if base.norm == m]
    if unit_norm == -1:
        candidates += [
            (base * unit, 1) for base in bases if base.norm != m for unit in (eps, eps.power(-1))
        ]
    if not candidates:
        return None

    def steps(candidate: tuple[CompactRepresentation, int]) -> tuple[int, int]:
        with mpmath.workdps(LOG_DIGITS + size + 10):
            centre = (mpmath.log(abs(m)) - 2 * _log(candidate[0], size)) / (2 * R)
            return abs(int(mpmath.nint(centre))), candidate[1]

    return min(candidates, key=steps)[0]


def _invertible(d: int, m: int, z: int) -> bool:
    """Whether ``[|m|, z + √d]`` is an invertible ideal of ``Z[√d]`` (its form is primitive)."""
    a = abs(m)
    return math.gcd(math.gcd(a, 2 * z), (z * z - d) // a) == 1


def norm_families_infrastructure(
    d: int, n: int, unit: Unit | None = None
) -> tuple[list[CompactOrbitFamily], str, Proof]:
    """One :class:`CompactOrbitFamily` per class of ``x² − d y² = n`` (``d > 0`` not a square, ``n ≠ 0``).

    Sorted by the size of the fundamental solution, then ``(y, x)`` for
    those written out; with the method and the proof (unconditional: the
    regulator search and every principal ideal test are certified). ``unit``
    is the fundamental unit of ``Z[√d]`` if already found.
    """
    D = 4 * d
    if unit is None:
        unit = fundamental_unit(Order(D), "bsgs")
    eps = unit.compact()
    assert eps is not None, "the infrastructure gives units in compact form"
    plus = eps if unit.norm == 1 else eps.power(2)
    size = len(str(int(float(unit.regulator(20).value)))) + 2
    R = _log(plus, size)
    families: list[CompactOrbitFamily] = []
    for f, m, factors in primitive_parts(n):
        a = abs(m)
        generators: dict[int, CompactRepresentation] = {}
        for z in square_roots_mod(d, a, factors):
            z = int(z)
            if _invertible(d, m, z):
                test = principal_ideal_test(D, a, 2 * z)
                if test.generator is not None:
                    generators[z] = test.generator
        for z, nu in generators.items():
            # J_z's generators ±ν εᵢ: the test's ν (log ≈ its distance x ∈ [0, R)) and the
            # conjugate of J_{−z}'s (log ≈ x − R), so the balanced one is at hand unexpanded
            bases = [nu, generators[-z % a].conjugate()]
            start = _start(bases, m, eps, unit.norm, R, size)
            if start is None:
                continue  # every generator has norm −m
            if f > 1:
                start = _scalar(D, f) * start
            alpha, log_alpha, point = _nagell_member(start, plus, R, n, size)
            families.append(CompactOrbitFamily(d, n, alpha, plus, log_alpha, R, point))
    families.sort(key=_family_order)
    return families, METHOD_INFRASTRUCTURE, unit.proof


def _family_order(family: CompactOrbitFamily) -> tuple:
    if family.fundamental is None:
        return (1, float(max(family._logs(0))), 0, 0)
    x, y = family.fundamental
    return (0, 0.0, gmpy2.mpz(y), gmpy2.mpz(x))
