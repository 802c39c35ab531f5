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

The same serves a primitive form: ``a x² + bxy + cy² = n`` (``a > 0``) has
its solutions in the elements ``α = ax + y(b + √D)/2`` of norm ``a·n`` of
``I = [a, (b + √D)/2]``, so the ideals ``I·J`` with ``N(J) = |n|`` are tested
(:func:`form_families_infrastructure`); ``x² − dy² = n`` is the form
``(1, 0, −d)`` with ``I = O``.

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
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.principal import principal_ideal_test, principal_search
from realquad.units import Unit
from realquad.units.bsgs import check_reach, unit_from_search

METHOD_INFRASTRUCTURE = (
    "principal ideal test in the infrastructure for every ideal [|m|, z + √d], z² ≡ d (mod |m|); "
    "fundamental unit by baby-step giant-step, both in compact form"
)

METHOD_FORMS = (
    "principal ideal test in the infrastructure for every ideal [a, (b + √D)/2]·J, J of norm |n|; "
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


def _signs(
    number: CompactRepresentation, logs: tuple[mpmath.mpf, mpmath.mpf], form: tuple[int, int, int]
) -> Point:
    """The signs of ``x`` and ``y`` for ``number = ax + y(b + √D)/2`` whose two logs differ by more than 1.

    With ``number = β``: ``y = (β − β')/√D`` and ``x = (β(√D − b) + β'(√D + b))/(2a√D)`` take
    the sign of the larger conjugate's term (``a > 0``).
    """
    a, b, D = form
    s = number.value_sign
    s_conj = s if number.norm > 0 else -s
    below = 1 if b < 0 or b * b < D else -1  # the sign of √D − b
    above = 1 if b > 0 or b * b < D else -1  # the sign of √D + b
    return (s * below, s) if logs[0] > logs[1] else (s_conj * above, -s_conj)


def _nagell_member(
    nu: CompactRepresentation,
    unit: CompactRepresentation,
    R: mpmath.mpf,
    size: int,
    form: tuple[int, int, int],
) -> tuple[CompactRepresentation, mpmath.mpf, Point | None]:
    """Nagell's fundamental solution in ``{±ν εᵏ}``: ``(α, log|α|, (x, y) when small)``.

    Least ``|y|``, then ``|2ax + by|``, then ``y ≥ 0``, ``x ≥ 0``, then the least ``|x|``
    (for ``x² − dy² = n``: least ``|y|``, then ``|x|``).
    """
    a, b, _ = form
    with mpmath.workdps(LOG_DIGITS + size + 10):
        log_norm = mpmath.log(nu.absolute_norm)
        L = _log(nu, size)
        centre = (log_norm - 2 * L) / (2 * R)  # |ν εᵏ| = |ν' ε⁻ᵏ| at k = centre
        k0 = int(mpmath.nint(centre))
        tie = abs(abs(centre - k0) - mpmath.mpf(1) / 2) < mpmath.mpf(10) ** (-20)
        ks = [k0, k0 + 1 if centre > k0 else k0 - 1] if tie else [k0]
        best: tuple[tuple, CompactRepresentation, mpmath.mpf, Point | None] | None = None
        for k in ks:
            alpha = nu if k == 0 else nu * unit.power(k)
            log_alpha = L + k * R
            logs = (log_alpha, log_norm - log_alpha)
            top = max(logs)
            digits = int((top - mpmath.log(2)) / mpmath.log(10)) + 1
            if digits <= EXPANDED_DIGITS:
                x, y = expand_point(alpha, a, b)
                options = [((x, y), 1), ((-x, -y), -1)]
                (x, y), sign = min(options, key=lambda o: _nagell_key(o[0], a, b))
                key: tuple = _nagell_key((x, y), a, b)
                point: Point | None = (x, y)
            else:  # on a tie both have the same |x| and |y|: the signs decide
                sx, sy = _signs(alpha, logs, form)
                sign = -1 if sy < 0 else 1
                key = (0, 0, False, sx * sign < 0, 0)
                point = None
            if sign < 0:
                alpha = -alpha
            if best is None or key < best[0]:
                best = (key, alpha, log_alpha, point)
        assert best is not None
        return best[1], best[2], best[3]


def _nagell_key(v: Point, a: int, b: int) -> tuple[int, int, bool, bool, int]:
    P = 2 * a * v[0] + b * v[1]  # = u in α = (u + v√D)/2
    return (abs(v[1]), abs(P), v[1] < 0, v[0] < 0, abs(v[0]))


def _start(
    bases: list[CompactRepresentation],
    N: int,
    eps: CompactRepresentation,
    unit_norm: int,
    R: mpmath.mpf,
    size: int,
) -> CompactRepresentation | None:
    """The generator of norm ``N`` nearest the balance point among the bases (times ``ε₀^{±1}`` when
    their norm is ``−N`` and ``N(ε₀) = −1``); ``None`` when every generator has norm ``−N``.

    Nearest means fewest steps of ``ε`` (log ``R``) to Nagell's member; on a
    draw a base itself wins over a product with ``ε₀``, whose expansion would
    pass through the unit.
    """
    candidates = [(base, 0) for base in bases if base.norm == N]
    if unit_norm == -1:
        candidates += [
            (base * unit, 1) for base in bases if base.norm != N for unit in (eps, eps.power(-1))
        ]
    if not candidates:
        return None

    def steps(candidate: tuple[CompactRepresentation, int]) -> tuple[int, int]:
        with mpmath.workdps(LOG_DIGITS + size + 10):
            centre = (mpmath.log(abs(N)) - 2 * _log(candidate[0], size)) / (2 * R)
            return abs(int(mpmath.nint(centre))), candidate[1]

    return min(candidates, key=steps)[0]


def norm_families_infrastructure(
    d: int, n: int, unit: Unit | None = None
) -> tuple[list[CompactOrbitFamily], str, Proof]:
    """One :class:`CompactOrbitFamily` per class of ``x² − d y² = n`` (``d > 0`` not a square, ``n ≠ 0``).

    Sorted by the size of the fundamental solution, then ``(y, x)`` for
    those written out; with the method and the proof (unconditional: the
    regulator search and every principal ideal test are certified). ``unit``
    is the fundamental unit of ``Z[√d]`` if already found.
    """
    families, proof = _families(1, 0, -d, n, unit)
    return families, METHOD_INFRASTRUCTURE, proof


def form_families_infrastructure(
    a: int, b: int, c: int, n: int
) -> tuple[list[CompactOrbitFamily], str, Proof]:
    """One :class:`CompactOrbitFamily` per family of ``a x² + bxy + cy² = n``.

    The form is primitive with ``D = b² − 4ac > 0`` not a square, ``a ≠ 0``,
    ``n ≠ 0``. A solution is an element ``α = ax + y(b + √D)/2`` of norm
    ``a·n`` of the ideal ``I = [a, (b + √D)/2]`` (``a > 0``; else the equation
    is negated), so ``αO = I·J`` with ``J`` of norm ``|n|``: every ``I·J`` is
    tested. The families are the classes ``{±α ηᵏ}``, ``η`` the least unit of
    norm +1 of the order (the proper automorphs of a primitive form).

    >>> fams, _, _ = form_families_infrastructure(3, 5, -7, -9)
    >>> sorted(f.fundamental for f in fams)
    [(-54, 21), (-1, 1), (19, 21)]
    """
    if a < 0:
        a, b, c, n = -a, -b, -c, -n
    families, proof = _families(a, b, c, n, None)
    return families, METHOD_FORMS, proof


def _families(
    a: int, b: int, c: int, n: int, unit: Unit | None
) -> tuple[list[CompactOrbitFamily], Proof]:
    """The classes of ``a x² + bxy + cy² = n`` (``a > 0``, primitive) from the ideals ``I·J``."""
    D = b * b - 4 * a * c
    if unit is None:  # from the search the tests share: one regulator search in all
        check_reach(D)
        unit = unit_from_search(Order(D), principal_search(D))
    eps = unit.compact()
    assert eps is not None, "the infrastructure gives units in compact form"
    plus = eps if unit.norm == 1 else eps.power(2)
    size = len(str(int(float(unit.regulator(20).value)))) + 2
    R = _log(plus, size)
    cycle = Cycle(D)
    tests: dict[tuple[int, int], CompactRepresentation | None] = {}

    def generator(a1: int, b1: int, a2: int, b2: int) -> CompactRepresentation | None:
        """A generator of ``[a₁, (b₁ + √D)/2]·[a₂, (b₂ + √D)/2]``, if principal (each test once)."""
        g, a3, b3 = cycle.multiply(a1, b1, a2, b2)
        key = (a3, b3 % (2 * a3))
        if key not in tests:
            tests[key] = principal_ideal_test(D, a3, b3).generator
        nu = tests[key]
        return nu if nu is None or g == 1 else _scalar(D, g) * nu

    N = a * n
    families: list[CompactOrbitFamily] = []
    for f, m, factors in primitive_parts(n):
        am = abs(m)
        four = dict(factors)
        four[2] = four.get(2, 0) + 2
        for z in square_roots_mod(D, 4 * am, four):  # J = [|m|, (z + √D)/2], one per z mod 2|m|
            z = int(z)
            if z >= 2 * am or math.gcd(math.gcd(am, z), (z * z - D) // (4 * am)) != 1:
                continue
            nu = generator(a, b, am, z)
            if nu is None:
                continue
            # the generators ±ν εᵢ of I·J: the test's ν (log ≈ its distance x ∈ [0, R)) and the
            # conjugate of Ī·J̄'s (log ≈ x − R), so the balanced one is at hand unexpanded
            mu = generator(a, -b, am, -z)
            assert mu is not None, "the conjugate of a principal ideal is principal"
            bases = [nu, mu.conjugate()]
            if f > 1:
                bases = [_scalar(D, f) * base for base in bases]
            start = _start(bases, N, eps, unit.norm, R, size)
            if start is None:
                continue  # every generator has norm −N
            alpha, log_alpha, point = _nagell_member(start, plus, R, size, (a, b, D))
            d = -c if (a, b) == (1, 0) else D
            families.append(CompactOrbitFamily(d, n, alpha, plus, log_alpha, R, point, a, b))
    families.sort(key=_family_order)
    return families, unit.proof


def _family_order(family: CompactOrbitFamily) -> tuple:
    if family.fundamental is None:
        return (1, float(max(family._logs(0))), 0, 0)
    x, y = family.fundamental
    return (0, 0.0, gmpy2.mpz(y), gmpy2.mpz(x))
