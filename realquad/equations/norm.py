"""Every integer solution of the norm equation ``x² − d y² = n``.

For ``d > 0`` not a square and ``n ≠ 0`` the solutions fall into finitely
many *classes* (Nagell): two solutions are in one class when their quotient
``(x + y√d)/(x' + y'√d)`` is an element of norm ``+1`` of ``Z[√d]``. So
``±(x, y)`` share a class, and a class and its conjugate (``(x, −y)``) are
distinct unless they coincide. Each class is ``{±α ε^k}`` for the least unit
``ε > 1`` of norm ``+1`` of ``Z[√d]``, and has one *fundamental solution*:
the member with the least ``y ≥ 0`` (and ``x ≥ 0`` if the class is its own
conjugate). Its size obeys Nagell's bounds.

The method. Writing ``n = f² m``, the solutions with ``gcd(x, y) = f`` are
``f`` times the primitive solutions of ``x² − d y² = m``. A primitive
solution has ``x ≡ −z y (mod |m|)`` for exactly one square root ``z`` of ``d``
modulo ``|m|``, and ``x + y√d`` then generates the lattice
``J_z = [|m|, z + √d]``. The continued fraction of ``(z + √d)/|m|`` reduces in
``O(log |m|)`` steps to a reduced irrational; ``J_z`` has a generator of norm
``±m`` exactly when that reduced irrational lies on the principal cycle of
``√d`` (Lagrange; Serret's theorem on equivalent irrationals), and the
convergents up to the next ``Q = 1`` of the cycle give it (the LMM method of
Lagrange, Matthews and Mollin). The principal cycle is walked once and kept
in a table, so each square root costs a reduction and a look-up. For
``|m| < √d`` every primitive solution is a convergent of ``√d`` itself
(Lagrange), which is used as a shortcut.

>>> s = solve_norm_equation(13, -4)
>>> [f.fundamental for f in s.families]
[(-3, 1), (3, 1), (36, 10)]
>>> s.families[0].unit
(649, 180, 13)
>>> s.bounded(40)
[(-3, -1), (-3, 1), (3, -1), (3, 1), (-36, -10), (-36, 10), (36, -10), (36, 10)]
>>> solve_norm_equation(-5, 9).solutions      # finitely many when d < 0
[(-2, -1), (-2, 1), (2, -1), (2, 1), (-3, 0), (3, 0)]
>>> solve_norm_equation(9, 7).solutions       # (x − 3y)(x + 3y) = 7
[(-4, -1), (-4, 1), (4, -1), (4, 1)]

References: T. Nagell, *Introduction to Number Theory*, Wiley 1951, §57–58
(classes, fundamental solutions and their bounds); K. Matthews, "The
Diophantine equation x² − Dy² = N, D > 0", *Expositiones Math.* 18 (2000)
323–331; J. P. Robertson, "Solving the generalized Pell equation
x² − Dy² = N" (2004); R. A. Mollin, *Fundamental Number Theory with
Applications*, CRC 1998.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from functools import lru_cache

import gmpy2
import mpmath

from realquad._backend import kernels
from realquad.cfrac import complete_quotients, to_reduced
from realquad.core.integers import as_integer, is_square, isqrt
from realquad.core.lfunction import estimated_period
from realquad.core.linalg import matrix_multiply, matrix_product
from realquad.core.numbers import pair_multiply, pair_power
from realquad.core.primes import square_roots_mod
from realquad.core.results import check_method
from realquad.equations.families import (
    AffineMap,
    Family,
    LineFamily,
    OrbitFamily,
    Point,
    QuadraticSolutions,
)
from realquad.equations.finite import definite_solutions, square_solutions
from realquad.equations.norm_compact import norm_families_infrastructure, primitive_parts
from realquad.equations.pell import pell
from realquad.errors import TooLargeError
from realquad.infrastructure.table import compiled_table
from realquad.latex import MAX_DIGITS, integer, terms
from realquad.textio import about, shown, signed, terms_text
from realquad.units.bsgs import check_reach

#: Longest principal cycle of √d the solver walks (and keeps in memory).
MAX_CYCLE = 2_000_000

METHOD_CF = "continued fractions of (z + √d)/|m| for every square root z of d mod |m| (LMM), principal cycle table"
METHOD_SHORT = "convergents of √d (|m| < √d)"
METHOD_DEFINITE = "square roots of d mod |m| and reduction of positive definite forms"
METHOD_SQUARE = "factorisation (x − sy)(x + sy) = n with d = s²"


@dataclass(repr=False)
class NormEquationSolution(QuadraticSolutions):
    """The answer to ``x² − d y² = n``: one :class:`OrbitFamily` per class, or a finite list."""

    d: int = 0
    n: int = 0
    classes: list[Point] = field(default_factory=list)

    def equation_text(self) -> str:
        """``x² − dy² = n`` as text, as it was asked.

        >>> repr(solve_norm_equation(13, -4))[:50]
        "NormEquationSolution(equation='x² − 13y² = −4', fi"
        """
        return terms_text([(1, "x²"), (-self.d, "y²")]) + f" = {signed(self.n)}"

    def equation_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """``x² − dy² = n`` in LaTeX.

        >>> solve_norm_equation(13, -4).equation_latex()
        'x^{2} - 13y^{2} = -4'
        """
        return terms([(1, "x^{2}"), (-self.d, "y^{2}")], max_digits) + f" = {integer(self.n)}"


# ---------------------------------------------------------------------------
# the principal cycle of √d


@dataclass(frozen=True)
class _PrincipalCycle:
    d: int
    r: int
    quotients: list[int]
    Q: list[int]
    index: dict[int, int]  # key P·(2r + 2) + Q of each reduced state → its position

    @property
    def period(self) -> int:
        return len(self.quotients)

    def key(self, P: int, Q: int) -> int:
        return P * (2 * self.r + 2) + Q


@lru_cache(maxsize=2)
def _principal_cycle(d: int) -> _PrincipalCycle:
    """The reduced states ``(P_k + √d)/Q_k`` of the period of ``√d``, from ``⌊√d⌋ + √d``."""
    r = isqrt(d)
    width = 2 * r + 2
    quotients: list[int] = []
    Qs: list[int] = []
    index: dict[int, int] = {}
    for k, (a, P, Q) in enumerate(complete_quotients(r, d, 1)):
        if k and Q == 1:  # back at ⌊√d⌋ + √d, the one reduced state with Q = 1
            break
        index[P * width + Q] = k
        Qs.append(Q)
        quotients.append(a)
        if k > MAX_CYCLE:
            raise TooLargeError(
                f"the period of the continued fraction of √{d} exceeds {MAX_CYCLE:,} terms; "
                "the norm-equation solver walks the whole period and cannot finish in reasonable time"
            )
    return _PrincipalCycle(d, r, quotients, Qs, index)


def _convergent(quotients: list[int]) -> tuple[int, int, int, int]:
    """``(A_{i−1}, A_{i−2}, B_{i−1}, B_{i−2})`` for the quotients ``a_0 … a_{i−1}``."""
    p, pp, q, qq = matrix_product(kernels.convergent_leaves(quotients, 48))
    return int(p), int(pp), int(q), int(qq)


# ---------------------------------------------------------------------------
# units and fundamental solutions


@dataclass(frozen=True)
class PellUnits:
    d: int
    plus: tuple[int, int]  # least unit of norm +1 of Z[√d]
    minus: tuple[int, int] | None  # least unit of norm −1, if any
    log_plus: float
    plus_mpz: Point  # ``plus`` as gmpy2 integers, for the arithmetic


@lru_cache(maxsize=16)
def pell_units(d: int) -> PellUnits:
    one = pell(d, 1)
    neg = pell(d, -1)
    assert one.x is not None and one.y is not None
    minus = (neg.x, neg.y) if neg.solvable and neg.x is not None and neg.y is not None else None
    log_plus = float(mpmath.log(mpmath.mpf(one.x) + mpmath.mpf(one.y) * mpmath.sqrt(d)))
    return PellUnits(d, (one.x, one.y), minus, log_plus, (gmpy2.mpz(one.x), gmpy2.mpz(one.y)))


def _nagell_key(v: Point) -> tuple[int, int, bool, bool]:
    return (abs(v[1]), abs(v[0]), v[1] < 0, v[0] < 0)


def _log_sizes(v: Point, n: int, d: int) -> tuple[float, float]:
    """``(log|x + y√d|, log|x − y√d|)`` without cancellation."""
    x, y = v
    big = float(mpmath.log(mpmath.mpf(abs(x)) + mpmath.mpf(abs(y)) * mpmath.sqrt(d)))
    small = float(mpmath.log(abs(n))) - big
    same_sign = x == 0 or y == 0 or (x > 0) == (y > 0)
    return (big, small) if same_sign else (small, big)


def balanced_representative(
    v: Point,
    unit: Point,
    log_unit: float,
    n: int,
    d: int,
    key: Callable[[Point], tuple] = _nagell_key,
    den: int = 1,
    signs: bool = True,
) -> Point:
    """The member of ``{±v εᵏ}`` with the least ``key`` (``ε = unit/den``, of norm +1).

    Without ``signs`` only ``{v εᵏ}``. Every member must be integral.

    ``|y|`` along ``v εᵏ`` is ``|A εᵏ − B ε^{−k}|``: unimodal in ``k``, so the
    minimum lies next to the balance point ``|v εᵏ| = |v' ε^{−k}|``, which the
    logarithms locate.
    """
    mpz = gmpy2.mpz
    v = (mpz(v[0]), mpz(v[1]))
    if not isinstance(unit[0], type(v[0])):
        unit = (mpz(unit[0]), mpz(unit[1]))
    inverse = (unit[0], -unit[1])
    la, lc = _log_sizes(v, n, d)
    x0 = (lc - la) / (2 * log_unit)  # |y| is symmetric about the balance point x0
    k = round(x0)
    w = pair_multiply(v, pair_power(unit, k, d, den), d, den) if k else v
    if abs(abs(x0 - k) - 0.5) > 1e-6:  # the nearest integer is certain: no neighbour can win
        pool = [w, (-w[0], -w[1])] if signs else [w]
        x, y = min(pool, key=key)
        return int(x), int(y)
    cands = {0: w, 1: pair_multiply(w, unit, d, den), -1: pair_multiply(w, inverse, d, den)}
    lo, hi = -1, 1
    while True:
        best = min(cands, key=lambda j: abs(cands[j][1]))
        if best == lo:
            lo -= 1
            cands[lo] = pair_multiply(cands[lo + 1], inverse, d, den)
        elif best == hi:
            hi += 1
            cands[hi] = pair_multiply(cands[hi - 1], unit, d, den)
        else:
            break
    pool = list(cands.values())
    if signs:
        pool += [(-c[0], -c[1]) for c in pool]
    x, y = min(pool, key=key)
    return int(x), int(y)


# ---------------------------------------------------------------------------
# primitive solutions of x² − d y² = m, d > 0 not a square


_LEAF = 48
_CHECK_PRIME = gmpy2.mpz(2**127 - 1)


@lru_cache(maxsize=2)
def _cycle_leaves(d: int) -> list[tuple[int, int, int, int]]:
    """Products of the principal cycle's quotient matrices in blocks of :data:`_LEAF`."""
    return list(kernels.convergent_leaves(_principal_cycle(d).quotients, _LEAF))


def _segment(d: int, start: int, stop: int) -> tuple:
    """``∏ [[a_k, 1], [1, 0]]`` over the cycle quotients ``a_start … a_{stop−1}``."""
    q = _principal_cycle(d).quotients
    leaves = _cycle_leaves(d)
    lo, hi = -(-start // _LEAF), stop // _LEAF
    if lo >= hi:
        return matrix_product(kernels.convergent_leaves(q[start:stop], _LEAF))
    parts = list(kernels.convergent_leaves(q[start : lo * _LEAF], _LEAF)) + leaves[lo:hi]
    parts += list(kernels.convergent_leaves(q[hi * _LEAF : stop], _LEAF))
    return matrix_product(parts)


def _segments(d: int, positions: set[int]) -> dict[int, tuple]:
    """``M[0:j]`` for ``j ≤ L − j`` and ``M[j:L]`` otherwise, for every ``j`` in ``positions``.

    ``M[s:t]`` is the product of the cycle's quotient matrices ``a_s … a_{t−1}``.
    Sorted by position, each product extends the previous one by the short
    stretch between them, so all of them together cost about as much as
    writing them down.
    """
    L = _principal_cycle(d).period
    out: dict[int, tuple] = {}
    mpz = gmpy2.mpz
    run, at = (mpz(1), mpz(0), mpz(0), mpz(1)), 0
    for j in sorted(p for p in positions if p <= L - p):
        run = matrix_multiply(run, _segment(d, at, j))
        at = j
        out[j] = run
    run, at = (mpz(1), mpz(0), mpz(0), mpz(1)), L
    for j in sorted((p for p in positions if p > L - p), reverse=True):
        run = matrix_multiply(_segment(d, j, at), run)
        at = j
        out[j] = run
    return out


def _join_sign(d: int, Q0: int, steps_to_state: int, j: int) -> int:
    """The norm ``(−1)^(steps)·Q0`` of the element joining a lattice at ``S_j`` to the nearer ``Q = 1`` state."""
    L = _principal_cycle(d).period
    steps = steps_to_state - j if j <= L - j else steps_to_state + L - j
    return Q0 if steps % 2 == 0 else -Q0


def _join(d: int, P0: int, Q0: int, quot: list[int], j: int, m: int, segment: tuple) -> Point:
    """An element of norm ``m`` of ``[Q0, P0 + √d]`` whose reduced state is ``S_j``.

    ``quot`` are the partial quotients that took ``(P0 + √d)/Q0`` to ``S_j``;
    ``segment`` is ``M[0:j]`` (joined backwards to ``S_0``) or ``M[j:L]``
    (forwards to ``S_L``), as :func:`_segments` gives them. The norm is
    :func:`_join_sign`; a wrong sign is mended by the unit of norm −1 (the
    caller makes sure there is one).
    """
    L = _principal_cycle(d).period
    norm = _join_sign(d, Q0, len(quot), j)
    A, A2, B, B2 = _convergent(quot) if quot else (1, 0, 0, 1)
    if j <= L - j:
        _, _, q, qq = segment
        det = 1 if j % 2 == 0 else -1
        A1, B1 = det * (A * qq - A2 * q), det * (B * qq - B2 * q)
    else:
        p, _, q, _ = segment
        A1, B1 = A * p + A2 * q, B * p + B2 * q
    x, y = gmpy2.mpz(Q0 * A1 - P0 * B1), gmpy2.mpz(B1)
    xm, ym = x % _CHECK_PRIME, y % _CHECK_PRIME  # x² − dy² = norm, confirmed modulo a large prime
    if (xm * xm - d * ym * ym - norm) % _CHECK_PRIME:
        raise ArithmeticError("internal check failed: convergent norm")
    if norm != m:
        minus = pell_units(d).minus
        assert minus is not None
        x, y = pair_multiply((x, y), (gmpy2.mpz(minus[0]), gmpy2.mpz(minus[1])), d)
    return (x, y)


def _join_all(d: int, m: int, states: list[tuple[int, list[int], int]]) -> list[Point]:
    """:func:`_join` for every ``(P0, quot, j)`` whose sign can be made right."""
    am = abs(m)
    if pell_units(d).minus is None:
        states = [s for s in states if _join_sign(d, am, len(s[1]), s[2]) == m]
    segs = _segments(d, {j for _, _, j in states})
    return [_join(d, P0, am, quot, j, m, segs[j]) for P0, quot, j in states]


def _primitive_lmm(d: int, m: int, factors: dict[int, int]) -> list[Point]:
    """One solution (not yet canonical) in each class of primitive solutions."""
    cyc = _principal_cycle(d)
    am = abs(m)
    states: list[tuple[int, list[int], int]] = []
    for z in square_roots_mod(d, am, factors):
        quot, P, Q = to_reduced(z, d, am, MAX_CYCLE)
        j = cyc.index.get(cyc.key(P, Q))
        if j is not None:  # else J_z is not principal
            states.append((z, quot, j))
    return _join_all(d, m, states)


def _primitive_short(d: int, m: int) -> list[Point]:
    """Primitive solutions when ``|m| < √d``: the reduced states of the principal cycle with ``Q = |m|``.

    Every primitive solution with ``x, y > 0`` is then a convergent
    ``p_{k−1}/q_{k−1}`` of ``√d`` (Lagrange), with ``(−1)^k Q_k = m``; so each
    class meets a state ``S_k`` with ``Q_k = |m|``, and the state itself
    (no reduction needed) is joined to the principal state.
    """
    cyc = _principal_cycle(d)
    am = abs(m)
    states: list[tuple[int, list[int], int]] = []
    P, quotients = cyc.r, cyc.quotients
    for k, Qk in enumerate(cyc.Q):  # P_{k+1} = a_k Q_k − P_k along the way
        if Qk == am:
            states.append((P, [], k))
        P = quotients[k] * Qk - P
    return _join_all(d, m, states)


def norm_classes(d: int, n: int) -> tuple[list[Point], str]:
    """The fundamental solution of every class of ``x² − d y² = n`` (``d > 0`` non-square, ``n ≠ 0``).

    Sorted by ``(y, x)``; with the method used.

    >>> norm_classes(2445, -20)[0]
    [(-445, 9), (445, 9), (17625560, 356454)]
    """
    parts = primitive_parts(n)
    _principal_cycle(d)  # refuses an overlong period before the unit is sought
    units = pell_units(d)
    r = isqrt(d)
    classes: set[Point] = set()
    methods = set()
    for f, m, mf in parts:
        if abs(m) <= r:
            prim = _primitive_short(d, m)
            methods.add(METHOD_SHORT)
        else:
            prim = _primitive_lmm(d, m, mf)
            methods.add(METHOD_CF)
        for v in prim:
            w = balanced_representative(v, units.plus_mpz, units.log_plus, m, d)
            classes.add((f * w[0], f * w[1]))
    method = "; ".join(sorted(methods))
    return sorted(classes, key=lambda v: (v[1], v[0])), method


def _result(d: int, n: int, **kw: object) -> NormEquationSolution:
    return NormEquationSolution(coefficients=(1, 0, -d, 0, 0, -n), d=d, n=n, **kw)  # type: ignore[arg-type]


#: The methods of :func:`solve_norm_equation` for ``d > 0`` not a square (``"auto"`` chooses).
NORM_METHODS = ("auto", "cfrac", "infrastructure")


def choose_norm_method(d: int, method: str = "auto") -> str:
    """``"cfrac"`` or ``"infrastructure"`` for ``x² − dy² = n``, resolving ``"auto"``.

    ``"auto"`` walks the principal cycle of ``√d`` while its expected length
    (:func:`realquad.core.lfunction.estimated_period` of ``4d``, which is
    ``h`` times the period) is at most :data:`MAX_CYCLE`, and tests ideals in
    the infrastructure beyond — at once, without walking a cycle that is too
    long, and only where the infrastructure's giant steps run compiled; the
    infrastructure's own reach is checked first, so a refusal is immediate.

    >>> choose_norm_method(13)
    'cfrac'
    >>> from realquad._backend import BACKEND
    >>> choose_norm_method(10**24 + 49) if BACKEND == "compiled" else "infrastructure"
    'infrastructure'
    """
    check_method(method, NORM_METHODS)
    if method != "auto":
        return method
    D = 4 * d
    if estimated_period(D, 2_000) <= MAX_CYCLE:
        return "cfrac"
    check_reach(D)
    if not compiled_table(D):
        raise TooLargeError(
            f"x² − {shown(d)}y² = n: the principal cycle of √d may have "
            f"{about(estimated_period(D, 2_000))} terms (the continued fraction walks at most "
            f"{MAX_CYCLE:,}), and the infrastructure's giant steps run compiled only for "
            "D < 2¹⁰⁶ (here in pure Python, minutes to hours)"
        )
    return "infrastructure"


def solve_norm_equation(d: int, n: int, method: str = "auto") -> NormEquationSolution:
    """All integer solutions of ``x² − d y² = n``, for any integers ``d`` and ``n``.

    ``d > 0`` not a square, ``n ≠ 0``: one family per class, its
    ``fundamental`` solution Nagell's, mirrored by ``(x, y) ↦ (−x, −y)``.
    ``method`` (:func:`choose_norm_method`): ``"cfrac"`` gives an
    :class:`OrbitFamily` per class, whose ``automorph`` is multiplication by
    the least unit of norm +1 (``unit = (t, u, d)``); ``"infrastructure"``
    gives a :class:`CompactOrbitFamily` per class, with the fundamental
    solution and that unit in compact form (:mod:`realquad.equations.norm_compact`).
    ``d < 0``, ``d = s² > 0`` with ``n ≠ 0``, or
    ``n = 0`` with ``d`` not a square: finitely many solutions. ``d = s²``
    with ``n = 0`` and ``d = 0`` with ``n`` a square: lines.

    >>> s = solve_norm_equation(61, 1)
    >>> s.families[0].fundamental, s.families[0].solution(1)
    ((1, 0), (1766319049, 226153980))
    >>> solve_norm_equation(3, -1).families, solve_norm_equation(3, -1).finite
    ([], True)
    """
    d = as_integer(d, "d")
    n = as_integer(n, "n")
    if d == 0 or (d > 0 and is_square(d) and n == 0):
        return _lines(d, n)
    if d < 0:
        return _result(
            d,
            n,
            finite=True,
            families=[],
            solutions=definite_solutions(d, n),
            method=METHOD_DEFINITE,
        )
    if is_square(d):
        sols = square_solutions(isqrt(d), n)
        return _result(d, n, finite=True, families=[], solutions=sols, method=METHOD_SQUARE)
    if n == 0:
        return _result(
            d,
            n,
            finite=True,
            families=[],
            solutions=[(0, 0)],
            method="x² = d y² with d not a square",
        )
    chosen = choose_norm_method(d, method)
    if chosen == "cfrac":
        try:
            return _solve_cfrac(d, n)
        except TooLargeError:
            if method != "auto" or not compiled_table(4 * d):
                raise
    families, how, proof = norm_families_infrastructure(d, n)
    compact: list[Family] = list(families)
    return _result(
        d,
        n,
        finite=not compact,
        families=compact,
        solutions=[],
        method=how,
        proof=proof,
        classes=[f.fundamental for f in families if f.fundamental is not None],
    )


def _solve_cfrac(d: int, n: int) -> NormEquationSolution:
    classes, method = norm_classes(d, n)
    units = pell_units(d)
    t, u = units.plus
    T = AffineMap((t, d * u, u, t))
    zero = (Fraction(0), Fraction(0))
    fams: list = [OrbitFamily(c, T, zero, reflection=True, unit=(t, u, d)) for c in classes]
    return _result(
        d, n, finite=not fams, families=fams, solutions=[], method=method, classes=list(classes)
    )


def _lines(d: int, n: int) -> NormEquationSolution:
    method = "the equation factors into linear equations"
    if d == 0:  # x² = n
        if n < 0 or not is_square(n):
            return _result(d, n, finite=True, families=[], solutions=[], method=method)
        s = isqrt(n)
        fams = [LineFamily((s, 0), (0, 1))] + ([LineFamily((-s, 0), (0, 1))] if s else [])
        return _result(d, n, finite=False, families=fams, solutions=[], method=method)
    s = isqrt(d)  # x = ±s y
    fams = [LineFamily((0, 0), (s, 1)), LineFamily((0, 0), (-s, 1))]
    return _result(d, n, finite=False, families=fams, solutions=[], method=method)
