"""Pure-Python kernels: the reference twin of the compiled module.

Every function here has the same signature and the same results as its
compiled counterpart in ``_ckernels`` (built from ``_ckernels.c``); the tests
compare the two directly. These work for integers of any size, the compiled
ones only below their stated word-size limits: beyond them they raise
``OverflowError`` and the caller falls back to these. The one exception to
"the same results" is :func:`principal_regulator`, whose rounded product is
computed in double here and in long double there: both return a rigorous
error bound, and the two values agree within the sum of their bounds.

:mod:`realquad._backend` builds the namespace ``kernels`` from this module:
every public name here is present there, replaced by the compiled function
where ``_ckernels`` provides one. To add a kernel, add its twin here (plain
ints in, plain ints out) in a marked section; it is used as it is until a
compiled version exists. The twins of the form and class-group kernels are
kept in :mod:`realquad._kernels._pure_forms` and bound here under the same
names, so this module stays the one namespace of twins.
"""

from __future__ import annotations

import math
import sys
from collections.abc import Callable

from gmpy2 import is_prime, isqrt, kronecker

from realquad._kernels import _pure_forms

# The form and class-group twins live in _pure_forms; they are this twin's too.
extended_gcd = _pure_forms.extended_gcd
form_class_candidates = _pure_forms.form_class_candidates
form_class_numbers = _pure_forms.form_class_numbers
form_class_relations = _pure_forms.form_class_relations
form_class_table = _pure_forms.form_class_table
form_compose = _pure_forms.form_compose
form_compose_reduce = _pure_forms.form_compose_reduce
form_cycle = _pure_forms.form_cycle
form_is_reduced = _pure_forms.form_is_reduced
form_reduce = _pure_forms.form_reduce
form_rho_b = _pure_forms.form_rho_b
prime_form_b = _pure_forms.prime_form_b
sqrt_mod_prime = _pure_forms.sqrt_mod_prime

#: Largest discriminant every compiled kernel accepts (the pure twin has no limit).
MAX_WORD_DISCRIMINANT = (1 << 62) - 1

#: Largest discriminant the compiled continued-fraction walks accept.
MAX_CFRAC_DISCRIMINANT = (1 << 63) - 1

# ---------------------------------------------------------------------------
# Continued fraction of ω: the principal cycle (units, regulators, Pell).
# ---------------------------------------------------------------------------


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
    ``max_steps`` steps would be needed. ``D`` must be a positive non-square
    (``ValueError`` otherwise).

    >>> principal_half_cycle(4 * 61, 100)
    ([7, 1, 4, 3, 1, 2], 1, 10, 11)
    """
    r = _check_walk(D)
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


def _check_walk(D: int) -> int:
    if D <= 0:
        raise ValueError("the discriminant must be positive")
    r = int(isqrt(D))
    if r * r == D:
        raise ValueError("the discriminant must not be a square")
    return r


def principal_period(D: int, max_steps: int) -> tuple[int, int, int] | None:
    """Period length, its parity and ``q_mid`` of the principal cycle, without quotients.

    The same walk and the same results as :func:`principal_half_cycle`
    (``(steps, parity, q_mid)``), storing nothing: for period lengths alone.

    >>> principal_period(4 * 61, 100)
    (11, 1, 10)
    """
    r = _check_walk(D)
    P = D & 1
    Q = 2
    P1 = ((P + r) // Q) * Q - P
    Q1 = (D - P1 * P1) // Q
    for k in range(max_steps // 2 + 2):
        if Q1 == Q:
            return 2 * k + 1, 1, Q1
        if P1 == P:
            return 2 * k, 0, Q
        a = (P1 + r) // Q1
        P2 = a * Q1 - P1
        Q, Q1 = Q1, Q + a * (P1 - P2)
        P, P1 = P1, P2
    return None


#: Unit roundoff of the floating type the pure regulator walk uses (double).
_UNIT_ROUNDOFF = 2.0**-53

#: Roundings in one complete quotient θ = (P + s)/Q: s = √D from float(D)
#: (2, counting the conversion of ``D`` and the square root), the sum and
#: the quotient.
_THETA_ROUNDINGS = 4

#: The running product is renormalised (exactly, by a power of 2) above this.
_RENORMALISE = 2.0**900


def principal_regulator(D: int, max_steps: int) -> tuple[int, int, int, int, int, float] | None:
    """The half-cycle walk with the regulator accumulated in floating point.

    Returns ``(steps, parity, q_mid, mantissa, exponent, log_error)``: the
    regulator is ``R = log(mantissa · 2^exponent) + log(q_mid / 2)`` up to an
    absolute error of at most ``log_error``, which rigorously bounds every
    rounding made here. The rounded product is
    ``∏_{i=1}^{m} θ_i² · θ_{m+1}^{parity}`` of the complete quotients
    ``θ_i = (P_i + √D)/Q_i`` of ω (``l = 2m + parity``): the palindrome of the
    period gives ``ε = ∏_{i=1}^{l} θ_i = (∏_{i=1}^{m} θ_i)² θ_{m+1}^{parity} · Q_{mid}/2``.
    Returns ``None`` beyond ``max_steps``.

    >>> steps, parity, q, mant, exp, err = principal_regulator(4 * 61, 100)
    >>> abs(math.log(mant) + exp * math.log(2) + math.log(q / 2) - 10.992655382659) < 1e-9
    True
    """
    r = _check_walk(D)
    s = math.sqrt(D)
    P = D & 1
    Q = 2
    P1 = ((P + r) // Q) * Q - P
    Q1 = (D - P1 * P1) // Q
    prod = 1.0
    exponent = 0
    frexp = math.frexp
    for k in range(max_steps // 2 + 2):
        if Q1 == Q or P1 == P:
            parity = 1 if Q1 == Q else 0
            mant, e = frexp(prod)
            value = mant * mant  # in [1/4, 1): exact exponent bookkeeping below
            exponent = 2 * (exponent + e)
            if parity:
                value *= (P1 + s) / Q1
            mant, e = frexp(value)
            exponent += e - 53
            roundings = 2 * k * (_THETA_ROUNDINGS + 1) + 1 + parity * (_THETA_ROUNDINGS + 1)
            return (
                2 * k + parity,
                parity,
                Q1 if parity else Q,
                int(mant * 2.0**53),
                exponent,
                _log_error(roundings, _UNIT_ROUNDOFF),
            )
        prod *= (P1 + s) / Q1
        if prod > _RENORMALISE:
            prod, e = frexp(prod)
            exponent += e
        a = (P1 + r) // Q1
        P2 = a * Q1 - P1
        Q, Q1 = Q1, Q + a * (P1 - P2)
        P, P1 = P1, P2
    return None


def _log_error(roundings: int, unit: float) -> float:
    """A bound on ``|log ∏(1 + δ_j)|`` for ``roundings`` factors with ``|δ_j| ≤ unit``.

    ``|log(1 + δ)| ≤ unit/(1 − unit)``; the factor 1.001 absorbs the rounding
    of this float computation itself.
    """
    return roundings * unit / (1.0 - unit) * 1.001


def convergent_leaves(quotients: list[int], chunk: int) -> list[tuple[int, int, int, int]]:
    """Products of ``[[a, 1], [1, 0]]`` over consecutive blocks of ``chunk`` quotients.

    Each block's product ``[[p, p'], [q, q']]`` is returned as ``(p, p', q, q')``.

    >>> convergent_leaves([1, 2, 3, 4, 5], 2)
    [(3, 1, 2, 1), (13, 3, 4, 1), (5, 1, 1, 0)]
    """
    out: list[tuple[int, int, int, int]] = []
    append = out.append
    n = len(quotients)
    for start in range(0, n, chunk):
        p, pp, q, qq = 1, 0, 0, 1
        for a in quotients[start : start + chunk]:
            p, pp = a * p + pp, p
            q, qq = a * q + qq, q
        append((p, pp, q, qq))
    return out


# ---------------------------------------------------------------------------
# Kronecker symbols in batches (Euler products of L(s, χ_D)).
# ---------------------------------------------------------------------------


def kronecker_symbols(a: int, moduli: list[int]) -> list[int]:
    """``[(a/n) for n in moduli]``, the Kronecker symbol for each modulus.

    >>> kronecker_symbols(5, [2, 3, 5, 7, 11, -1, 0, 1])
    [-1, -1, 0, -1, 1, 1, 0, 1]
    """
    return [kronecker(a, n) for n in moduli]


# ---------------------------------------------------------------------------
# Infrastructure (realquad.infrastructure): baby steps and fused giant steps
# on reduced principal ideals [a, (b + √D)/2], b normalised in (√D − 2a, √D),
# with binary64 distances. r = ⌊√D⌋, sq ≈ √D. Keys identify ideals as
# a·(2r + 2) + b.
# ---------------------------------------------------------------------------


def infrastructure_baby_steps(
    D: int, r: int, sq: float, a: int, b: int, dist: float, count: int
) -> tuple[list[int], list[float], int, int, float, int]:
    """Up to ``count`` baby steps (rho) from ``(a, b)`` at distance ``dist``.

    Returns ``(keys, distances, a, b, dist, back)``: the ideals passed (keys
    and distances, in order), the last ideal and its distance, and ``back = 1``
    when the walk reached the order itself (``a = 1``, not listed) and stopped
    there. Each step adds ``log θ₁``, ``θ₁ = (b₁ + √D)/(2a₁)``, computed as
    ``2a/(√D − b₁)`` when ``b₁ < 0`` (no cancellation).
    """
    log = math.log
    width = 2 * r + 2
    keys: list[int] = []
    dists: list[float] = []
    for _ in range(count):
        two_a = 2 * a
        bt = (b + r) % two_a - r
        a = (D - bt * bt) // (2 * two_a)
        b = -bt
        if b >= 0:
            dist += log((b + sq) / (2 * a))
        else:
            dist += log(two_a / (sq - b))
        if a == 1:
            return keys, dists, a, b, dist, 1
        keys.append(a * width + b)
        dists.append(dist)
    return keys, dists, a, b, dist, 0


def infrastructure_giant_step(
    D: int, r: int, sq: float, a: int, b: int, a2: int, b2: int
) -> tuple[int, int, float]:
    """``reduce([a, b]·[a₂, b₂])``: ``(a', b', c)`` with the distance change ``c``.

    Composition: for coprime norms ``b₃ ≡ b (2a)``, ``b₃ ≡ b₂ (2a₂)``;
    otherwise Dirichlet's formula with ``d = gcd(a, a₂, (b + b₂)/2)``. The
    lattice ``[1, (b₃ + √D)/(2a₃)]`` is ``(a a₂/(d a₃))`` times the product of
    the two, then reduced by ``L' = (1/θ̃)·L`` steps (``b̃`` centred while
    ``a > √D``, normalised after); the multipliers are collected in one
    float product and ``c`` is its logarithm.
    """
    g = math.gcd(a, a2)
    if g == 1:
        a3 = a * a2
        k = ((b - b2) >> 1) * pow(a2, -1, a) % a if a > 1 else 0
        b3 = b2 + 2 * a2 * k
        d = 1
    else:
        s = (b + b2) >> 1
        g, x1, y1 = extended_gcd(a, a2)
        d, x2, w = extended_gcd(g, s)
        a3 = (a * a2) // (d * d)
        b3 = ((x1 * x2 * a * b2 + y1 * x2 * a2 * b + w * ((b * b2 + D) >> 1)) // d) % (2 * a3)
    prod = a * a2 / (d * a3)
    a, b = a3, b3
    while a > r:  # norms fall by a factor ≥ 4 per step
        two_a = 2 * a
        bt = b % two_a
        if bt > a:
            bt -= two_a
        a_new = abs(D - bt * bt) // (2 * two_a)
        if bt >= 0:
            prod *= two_a / (bt + sq)
        else:  # |b̃ + √D| = 4a·a'/(√D − b̃)
            prod *= (sq - bt) / (2 * a_new)
        a, b = a_new, -bt
    while True:
        two_a = 2 * a
        b = r - (r - b) % two_a
        t = two_a - b
        if t < 0 or t * t < D:
            return a, b, math.log(prod)
        a_new = (D - b * b) // (2 * two_a)  # > 0: |b| < √D here
        if b >= 0:
            prod *= two_a / (b + sq)
        else:
            prod *= (sq - b) / (2 * a_new)
        a, b = a_new, -b


class _BabyStepTable:
    """The twin's baby-step table: a dict from ``a·(2r + 2) + b`` to the distance."""

    __slots__ = ("D", "r", "sq", "width", "index")

    def __init__(self, D: int, r: int, sq: float) -> None:
        self.D, self.r, self.sq = D, r, sq
        self.width = 2 * r + 2
        self.index: dict[int, float] = {}


def infrastructure_table_new(D: int, r: int, sq: float, capacity: int) -> _BabyStepTable:
    """A baby-step table for the field ``(D, r, sq)`` holding ``O`` at distance 0, sized for ``capacity`` ideals.

    (The compiled table is an open-addressing hash table in a capsule; the
    twin's is a dict, and ``capacity`` is only a hint.)
    """
    table = _BabyStepTable(D, r, sq)
    table.index[table.width + r - (r - D) % 2] = 0.0  # the order itself, (1, b₀)
    return table


def infrastructure_table_size(table: _BabyStepTable) -> tuple[int, int]:
    """``(ideals stored, bytes)``: for the twin the bytes are an estimate (dict, keys, floats)."""
    n = len(table.index)
    return n, sys.getsizeof(table.index) + n * (sys.getsizeof(table.width) + 24)


def infrastructure_table_get(table: _BabyStepTable, a: int, b: int) -> float | None:
    """The stored distance of the reduced ideal ``(a, b)`` (``b`` normalised), or ``None``."""
    r = table.r
    if not 0 < a <= r or not r - 2 * a < b <= r:
        return None
    return table.index.get(a * table.width + b)


def infrastructure_table_extend(
    table: _BabyStepTable, a: int, b: int, hi: float, lo: float, count: int
) -> tuple[int, int, float, float, int]:
    """Up to ``count`` baby steps from ``(a, b)`` at distance ``hi + lo``, stored in ``table``.

    Returns ``(a, b, hi, lo, back)`` like :func:`infrastructure_baby_steps`;
    each ideal passed is stored with the distance ``hi``. The distance is
    carried as an unevaluated sum ``hi + lo`` of two doubles (TwoSum, then
    FastTwoSum), so the running sum loses nothing to rounding; only each
    step's ``log θ₁`` is rounded.
    """
    D, r, sq, width, index = table.D, table.r, table.sq, table.width, table.index
    log = math.log
    for _ in range(count):
        two_a = 2 * a
        bt = (b + r) % two_a - r
        a = (D - bt * bt) // (2 * two_a)
        b = -bt
        x = log((b + sq) / (2 * a)) if b >= 0 else log(two_a / (sq - b))
        s = hi + x
        bp = s - hi
        lo += (hi - (s - bp)) + (x - bp)
        t = s + lo
        lo -= t - s
        hi = t
        if a == 1:
            return a, b, hi, lo, 1
        index[a * width + b] = hi
    return a, b, hi, lo, 0


def infrastructure_giant_search(
    table: _BabyStepTable,
    a: int,
    b: int,
    aG: int,
    bG: int,
    s: float,
    lo_step: float,
    hi_step: float,
    base: float,
    e0: float,
    e1: float,
    clog: float,
    stop: float,
    budget: int,
    progress: Callable[[float], object] | None,
) -> tuple[int, int, int, int, float, float, float]:
    """Giant steps ``(a, b) ← reduce((a, b)·(aG, bG))`` until one meets ``table``.

    Step ``j`` is at distance ``g = base + j·s + C``, ``C`` the sum of the
    distance changes ``c`` and ``C_error`` the sum of ``ulp·(|C| + clog)``;
    it is past ``stop`` when ``g − (e0 + j·e1 + C_error + ulp·g) > stop``, and
    every step length ``s + c`` must lie in ``(lo_step, hi_step)``. Returns
    ``(status, a, b, j, C, C_error, found)``: status 0 when ``budget`` steps
    found nothing, 1 when ``(a, b)`` is in the table at distance ``found``, 2
    when its conjugate is, 3 past ``stop``, 4 a step length out of bounds.
    ``progress(g)`` is called every 4096 steps.
    """
    D, r, sq, width, index = table.D, table.r, table.sq, table.width, table.index
    ulp = 2.0**-52
    C = C_error = 0.0
    j = 0
    while j < budget:
        a, b, c = infrastructure_giant_step(D, r, sq, a, b, aG, bG)
        if not (lo_step < s + c < hi_step):
            return 4, a, b, j, C, C_error, 0.0
        j += 1
        C += c
        C_error += ulp * (abs(C) + clog)
        g = base + j * s + C
        found = index.get(a * width + b)
        if found is not None:
            return 1, a, b, j, C, C_error, found
        found = index.get(a * width + r - (r + b) % (2 * a))
        if found is not None:
            return 2, a, b, j, C, C_error, found
        if g - (e0 + j * e1 + C_error + ulp * g) > stop:
            return 3, a, b, j, C, C_error, 0.0
        if j % 4096 == 0 and progress is not None:
            progress(g)
    return 0, a, b, j, C, C_error, 0.0


# ---------------------------------------------------------------------------
# Survey (realquad.survey): the numbers behind one row, for many fields per call.
# ---------------------------------------------------------------------------


def _proper_factor(n: int) -> int:
    """A proper factor of the odd squarefree composite ``n`` (Pollard's rho).

    >>> _proper_factor(1009 * 1013) in (1009, 1013)
    True
    """
    c = 1
    while True:
        x = y = 2
        g = 1
        while g == 1:
            x = (x * x + c) % n
            y = (y * y + c) % n
            y = (y * y + c) % n
            g = math.gcd(abs(x - y), n)
        if g != n:
            return g
        c += 1


def _prime_signature(d: int) -> tuple[int, int]:
    """``(t, 1 if no prime ≡ 3 (mod 4) divides D else 0)`` for ``D = disc Q(√d)``.

    ``t`` is the number of primes dividing ``D``. Trial division of the odd
    part ``m`` of ``d`` while ``p³ ≤ m``; ``m`` then has at most two prime
    factors (both at least ``p``): a prime, or two primes of which exactly one is
    ``≡ 3 (mod 4)`` when ``m ≡ 3 (mod 4)``, else split by Pollard's rho.

    >>> _prime_signature(79), _prime_signature(34), _prime_signature(5 * 13 * 17)
    ((2, 0), (2, 1), (3, 1))
    """
    t = 0 if d % 4 == 1 else 1  # D = 4d: the prime 2
    no_three = 1
    m, p = (d if d % 2 else d // 2), 3
    while p * p * p <= m:
        if m % p == 0:
            m //= p
            t += 1
            no_three &= int(p % 4 != 3)
        p += 2
    if m > 1:
        if is_prime(m):
            t += 1
            no_three &= int(m % 4 != 3)
        elif m % 4 == 3:
            t, no_three = t + 2, 0
        else:
            t += 2
            no_three &= int(_proper_factor(m) % 4 != 3)
    return t, no_three


def survey_numbers(
    radicands: list[int], primes: list[int], max_period: int, max_forms: int
) -> list[tuple[int, int, int, int, int, tuple[int, int, int, int, int, float] | None] | None]:
    """For each squarefree ``d > 1``: ``(D, t, j₃, h⁺, j, walk)``, or ``None`` beyond ``max_forms``.

    ``D = disc Q(√d)``; ``t`` and ``j₃`` as in :func:`_prime_signature`;
    ``(h⁺, j)`` of :func:`form_class_numbers` with conductor 1 and ``primes``
    (all primes below ``√max(radicands) + 2`` at least); ``walk`` is
    :func:`principal_regulator` of ``D`` (``None`` beyond ``max_period``).

    >>> survey_numbers([79], [2, 3, 5, 7], 100, 1000)[0][:5]
    (316, 2, 0, 6, 0)
    """
    out: list[tuple[int, int, int, int, int, tuple[int, int, int, int, int, float] | None] | None]
    out = []
    for d in radicands:
        if d < 2:
            raise ValueError("a radicand must be at least 2")
        D = d if d % 4 == 1 else 4 * d
        t, no_three = _prime_signature(d)
        found = form_class_numbers(D, 1, primes, max_forms)
        if found is None:
            out.append(None)
            continue
        out.append((D, t, no_three, found[0], found[1], principal_regulator(D, max_period)))
    return out
