"""Every integer solution of ``a x² + b xy + c y² = n``, by reduction to a norm equation.

With ``Δ = b² − 4ac``, multiplying by ``4a`` gives
``(2ax + by)² − Δ y² = 4an``: the solutions are the solutions ``(X, Y)`` of
``X² − Δ Y² = 4an`` with ``X ≡ bY (mod 2a)``, mapped back by
``x = (X − bY)/(2a)``, ``y = Y``. The same engine,
:func:`solve_transformed`, serves the general conic (:mod:`realquad.conics`):
it takes any invertible integer substitution ``(P, Q) = S (x, y) + s₀`` that
turns the equation into ``P² − D Q² = K``.

For ``D > 0`` not a square, the solutions of ``P² − DQ² = K`` are the
classes ``{±α εᵏ}`` of :func:`realquad.norm_equations.norm_classes`. The
automorphs of the original equation are the maps induced by the powers of the
least unit ``η = (t + u√D)/2`` of norm +1 of the order of discriminant ``D``
(``t² − Du² = 4``); the least power ``η^p`` whose induced affine map
``T(v) = M v + t`` is integral generates the families, and the point
reflection through the centre joins them when it is integral. For a form
``(a, b, c)``, ``p = 1`` and ``M = [[(t − bu)/2, −cu], [au, (t + bu)/2]]``, its
proper automorphs (Gauss; Buell, *Binary Quadratic Forms*, Springer 1989,
§3.2). Each family's fundamental solution is the member with the least
``|Q|`` (then least ``|P|``, then ``Q ≥ 0``, ``P ≥ 0``): Nagell's choice in
the transformed coordinates.

>>> s = solve_binary_form(1, 1, -1, 1)           # x² + xy − y² = 1
>>> [(f.fundamental, f.automorph.matrix) for f in s.families]
[((1, 0), (1, 1, 1, 2))]
>>> s.bounded(10)
[(-1, -1), (-1, 0), (1, 0), (1, 1), (-2, 1), (2, -1), (-2, -3), (2, 3), (-5, 3), (5, -3), (-5, -8), (5, 8)]
>>> solve_binary_form(2, 0, 3, 35).solutions
[(-2, -3), (-2, 3), (2, -3), (2, 3), (-4, -1), (-4, 1), (4, -1), (4, 1)]
>>> [f.fundamental for f in solve_binary_form(1, 0, -4, 0).families]  # (x − 2y)(x + 2y) = 0
[(0, 0), (0, 0)]

References: C. F. Gauss, *Disquisitiones Arithmeticae* (1801), §§162, 200;
D. A. Buell, *Binary Quadratic Forms*, Springer 1989; T. Nagell,
*Introduction to Number Theory*, 1951, §57–58.
"""

from __future__ import annotations

from fractions import Fraction
from math import gcd, lcm

import gmpy2
import mpmath

from realquad._backend import kernels
from realquad.core.integers import as_integer, is_square, isqrt
from realquad.core.lfunction import estimated_period
from realquad.core.linalg import matrix_multiply
from realquad.core.numbers import pair_multiply, pair_power
from realquad.core.primes import divisors
from realquad.equations.families import (
    AffineMap,
    Family,
    LineFamily,
    OrbitFamily,
    ParabolaFamily,
    Point,
    QuadraticSolutions,
    sort_points,
)
from realquad.equations.finite import definite_solutions, square_solutions
from realquad.equations.norm import (
    MAX_CYCLE,
    balanced_representative,
    choose_norm_method,
    norm_classes,
    pell_units,
)
from realquad.equations.norm_compact import form_families_infrastructure
from realquad.equations.pell import pell
from realquad.errors import DomainError, TooLargeError
from realquad.infrastructure.table import compiled_table
from realquad.textio import about, decimal_digits, shown

Matrix = tuple[int, int, int, int]

#: Longest search for the least integral power of the unit.
MAX_UNIT_POWER = 1_000_000


class Substitution:
    """``(P, Q) = S (x, y) + s₀`` with ``det S ≠ 0``, and its rational inverse."""

    def __init__(self, S: Matrix, s0: Point) -> None:
        self.S, self.s0 = S, s0
        self.det = S[0] * S[3] - S[1] * S[2]
        assert self.det != 0

    def back(self, P: int, Q: int) -> Point | None:
        """``(x, y)`` if integral, else ``None``."""
        a, b, c, d = self.S
        u, v = P - self.s0[0], Q - self.s0[1]
        x, rx = divmod(d * u - b * v, self.det)
        y, ry = divmod(-c * u + a * v, self.det)
        return None if rx or ry else (x, y)

    def center(self) -> tuple[Fraction, Fraction]:
        a, b, c, d = self.S
        u, v = -self.s0[0], -self.s0[1]
        return (Fraction(d * u - b * v, self.det), Fraction(-c * u + a * v, self.det))

    def induced(
        self, g: int, h: int, D: int
    ) -> tuple[tuple[Fraction, ...], tuple[Fraction, Fraction]]:
        """Matrix and translation on ``(x, y)`` of multiplication by ``(g + h√D)/2`` on ``P + Q√D``."""
        a, b, c, d = self.S
        W = (Fraction(g, 2), Fraction(D * h, 2), Fraction(h, 2), Fraction(g, 2))
        det = Fraction(self.det)
        inv = (d / det, -b / det, -c / det, a / det)
        WS = matrix_multiply(W, (Fraction(a), Fraction(b), Fraction(c), Fraction(d)))
        M = matrix_multiply(inv, WS)
        s = self.s0
        ws = (W[0] * s[0] + W[1] * s[1] - s[0], W[2] * s[0] + W[3] * s[1] - s[1])
        t = (inv[0] * ws[0] + inv[1] * ws[1], inv[2] * ws[0] + inv[3] * ws[1])
        return M, t


def is_integral(values: tuple) -> bool:
    return all(Fraction(v).denominator == 1 for v in values)


def least_integral_power(sub: Substitution, g1: int, h1: int, D: int) -> int:
    """Least ``p ≥ 1`` with the map induced by ``η^p`` integral (``η = (g1 + h1√D)/2``).

    ``η^k = (g_k + h_k√D)/2`` with ``g_{k+1} = g1 g_k − g_{k−1}`` and the same
    recurrence for ``h_k``; integrality depends only on ``(g_k, h_k)`` modulo
    ``2|det S|``, so the walk runs in residues.
    """
    N = 2 * abs(sub.det)
    a, b, c, d = sub.S
    adj = (d, -b, -c, a)
    J = (0, D, 1, 0)  # 2W = g·I + h·J for η^k = (g + h√D)/2
    AJ = matrix_multiply(matrix_multiply(adj, J), sub.S)  # adj(S)·J·S; adj(S)·S = det·I
    s0 = sub.s0
    u0 = (adj[0] * s0[0] + adj[1] * s0[1], adj[2] * s0[0] + adj[3] * s0[1])
    Js0 = (D * s0[1], s0[0])
    u1 = (adj[0] * Js0[0] + adj[1] * Js0[1], adj[2] * Js0[0] + adj[3] * Js0[1])
    det = sub.det

    def integral(g: int, h: int) -> bool:
        # M = (g·det·I + h·AJ)/(2 det), t = (g·u0 + h·u1 − 2u0)/(2 det)
        return (
            (g * det + h * AJ[0]) % N == 0
            and (h * AJ[1]) % N == 0
            and (h * AJ[2]) % N == 0
            and (g * det + h * AJ[3]) % N == 0
            and (g * u0[0] + h * u1[0] - 2 * u0[0]) % N == 0
            and (g * u0[1] + h * u1[1] - 2 * u0[1]) % N == 0
        )

    g0, gk, h0, hk = 2 % N, g1 % N, 0, h1 % N
    seen_start = (g0, gk, h0, hk)
    for k in range(1, MAX_UNIT_POWER + 1):
        if integral(gk, hk):
            M, t = sub.induced(gk, hk, D)
            assert is_integral(M + t)
            return k
        g0, gk = gk, (g1 * gk - g0) % N
        h0, hk = hk, (g1 * hk - h0) % N
        if (g0, gk, h0, hk) == seen_start:  # pragma: no cover - the identity power is integral
            break
    raise TooLargeError(f"no power η^k with k ≤ {MAX_UNIT_POWER:,} gives an integral automorph")


def _unit_index(eta: Point, eps: Point, D: int) -> int:
    """``r`` with ``ε = η^r`` (``η`` as ``(g, h)`` over 2, ``ε`` integral)."""
    w = eta
    for r in range(1, 13):
        if w == (2 * eps[0], 2 * eps[1]):
            return r
        w = pair_multiply(w, eta, D, 2)
    raise ArithmeticError("internal check failed: ε is not a small power of η")  # pragma: no cover


def _orbit_families(
    sub: Substitution, D: int, K: int, classes: list[Point], method: str
) -> tuple[list[Family], str]:
    eps = pell_units(D).plus
    one = pell(D, 4)
    assert one.x is not None and one.y is not None
    eta = (one.x, one.y)
    r = _unit_index(eta, eps, D)
    p = least_integral_power(sub, eta[0], eta[1], D)
    step = pair_power(eta, p, D, 2)
    log_step = p * float(mpmath.log((mpmath.mpf(eta[0]) + mpmath.mpf(eta[1]) * mpmath.sqrt(D)) / 2))
    C = sub.center()
    reflect = (2 * C[0]).denominator == 1 and (2 * C[1]).denominator == 1
    M, t = sub.induced(step[0], step[1], D)
    generator = f"η^{p}"
    if not reflect and p % 2 == 0:
        # the integral automorphs may be generated by −η^(p/2) (the only other subgroup shape)
        half = pair_power(eta, p // 2, D, 2)
        M2, t2 = sub.induced(-half[0], -half[1], D)
        if is_integral(M2 + t2):
            step, M, t, log_step = (-half[0], -half[1]), M2, t2, log_step / 2
            generator = f"−η^{p // 2}"
    T = AffineMap(tuple(int(v) for v in M), (int(t[0]), int(t[1])))  # type: ignore[arg-type]
    step = (gmpy2.mpz(step[0]), gmpy2.mpz(step[1]))
    span = lcm(r, p) // r

    def key(w: Point) -> tuple[int, int, bool, bool, int]:
        # least |Q|, then |P|; ties (mirror images) go to y ≥ 0, then x ≥ 0 in the original
        # unknowns, and a tie left (P and −P in one orbit) to the least |x|
        xy = sub.back(*w)
        assert xy is not None
        return (abs(w[1]), abs(w[0]), xy[1] < 0, xy[0] < 0, abs(xy[0]))

    reps: dict[Point, Point] = {}
    for alpha in classes:
        for sign in (1, -1):
            beta = (sign * alpha[0], sign * alpha[1])
            for _ in range(span):
                if sub.back(*beta) is not None:
                    w = balanced_representative(beta, step, log_step, K, D, key, 2, reflect)
                    xy = sub.back(*w)
                    assert xy is not None and w[0] ** 2 - D * w[1] ** 2 == K
                    reps[w] = xy
                beta = pair_multiply(beta, eps, D)
    families = distinct_orbits(
        [
            OrbitFamily(xy, T, C, reflection=reflect)
            for xy in sorted(reps.values(), key=lambda v: (v[1], v[0]))
        ]
    )
    note = f"{method}; automorph from {generator}, η the fundamental unit of discriminant {D}"
    if decimal_digits(eta[0]) <= 60:  # small enough to say in words
        note += f" = ({eta[0]} + {eta[1]}√{D})/2"
    return list(families), note


#: Steps either way within which two balanced representatives of one orbit must meet.
ORBIT_REACH = 8


def distinct_orbits(families: list[OrbitFamily]) -> list[OrbitFamily]:
    """The families whose orbits differ: a family whose fundamental solution lies in the orbit
    of an earlier one (or its mirror image) is the same family and is dropped.

    Fundamental solutions are balanced (least ``|Q|`` in their orbit), so two of one orbit
    are within a few steps of each other; :data:`ORBIT_REACH` steps either way are checked.

    >>> T = AffineMap((8, 7, 1, 1))        # x² − 7xy − 7y² = −7: (7, 1) is T(0, 1)
    >>> zero = (Fraction(0), Fraction(0))
    >>> [f.fundamental for f in distinct_orbits([OrbitFamily((0, 1), T, zero, True), OrbitFamily((7, 1), T, zero, True)])]
    [(0, 1)]
    """
    kept: list[OrbitFamily] = []
    seen: set[Point] = set()
    for family in families:
        if family.fundamental in seen:
            continue
        kept.append(family)
        for step in (family.automorph, family.automorph.inverse()):
            v: Point = family.fundamental
            for _ in range(ORBIT_REACH + 1):
                seen.add(v)
                if family.reflection:
                    seen.add(family.mirror(v))
                w = step(v)
                v = (int(w[0]), int(w[1]))
    return kept


def integer_line(alpha: int, beta: int, gamma: int) -> LineFamily | None:
    """The integer points of ``αx + βy + γ = 0`` (not both ``α, β`` zero), or ``None``.

    >>> integer_line(2, 4, -6)
    LineFamily(point=(1, 1), direction=(2, -1))
    """
    g, u, v = kernels.extended_gcd(alpha, beta)
    if gamma % g:
        return None
    k = -gamma // g
    x0, y0 = u * k, v * k
    dx, dy = beta // g, -alpha // g
    if dx < 0 or (dx == 0 and dy < 0):
        dx, dy = -dx, -dy
    # normalise the base point: the least t-shift making x (or y) smallest non-negative
    if dx:
        s = x0 // dx
        x0, y0 = x0 - s * dx, y0 - s * dy
    else:
        s = y0 // dy
        x0, y0 = x0 - s * dx, y0 - s * dy
    return LineFamily((x0, y0), (dx, dy))


def solve_transformed(
    coefficients: tuple[int, int, int, int, int, int], S: Matrix, s0: Point, D: int, K: int
) -> QuadraticSolutions:
    """Solutions ``(x, y)`` of an equation equivalent to ``P² − D Q² = K``, ``(P, Q) = S(x, y) + s₀``.

    ``D ≠ 0``. Orbit families when ``D > 0`` is not a square and ``K ≠ 0``;
    finitely many solutions when ``D < 0``, or ``D`` a square and ``K ≠ 0``,
    or ``K = 0`` and ``D`` not a square; two lines when ``D`` is a square and
    ``K = 0``.
    """
    sub = Substitution(S, s0)

    def finite(points: list[Point], method: str) -> QuadraticSolutions:
        back = [sub.back(*pq) for pq in points]
        sols = sort_points([xy for xy in back if xy is not None])
        return QuadraticSolutions(coefficients, True, [], sols, method)

    if D < 0:
        return finite(
            definite_solutions(D, K),
            f"definite: x² + {-D}y² = {K} by square roots and reduction of forms",
        )
    if K == 0 and not is_square(D):
        return finite([(0, 0)], f"P² = {D}Q² forces P = Q = 0")
    if is_square(D):
        s = isqrt(D)
        if K:
            return finite(square_solutions(s, K), f"factorisation (P − {s}Q)(P + {s}Q) = {K}")
        lines: list[Family] = []
        for sign in (1, -1):  # P − sign·s·Q = 0
            a, b, c, d = S
            line = integer_line(a - sign * s * c, b - sign * s * d, s0[0] - sign * s * s0[1])
            if line is not None:
                lines.append(line)
        return QuadraticSolutions(
            coefficients, not lines, lines, [], "the equation factors into two linear equations"
        )
    try:
        beyond = choose_norm_method(D) == "infrastructure"
    except TooLargeError:  # beyond the infrastructure too (or its kernels are not compiled)
        beyond = True
    if beyond:  # refused at once, not after walking a cycle
        raise TooLargeError(
            f"the period of √{shown(D)} is beyond the continued fraction ("
            f"{about(estimated_period(4 * D, 2_000))} terms expected, limit {MAX_CYCLE:,}) "
            "and beyond the infrastructure's compiled reach"
        )
    classes, method = norm_classes(D, K)
    families, note = _orbit_families(sub, D, K, classes, method)
    return QuadraticSolutions(coefficients, not families, families, [], note)


def product_equation(b: int, d: int, e: int, f: int) -> QuadraticSolutions:
    """``b xy + d x + e y + f = 0`` (``b ≠ 0``): ``(bx + e)(by + d) = de − bf``.

    >>> product_equation(1, 1, 1, 1).families      # xy + x + y + 1 = (x + 1)(y + 1)
    [LineFamily(point=(-1, 0), direction=(0, 1)), LineFamily(point=(0, -1), direction=(1, 0))]
    """
    coefficients = (0, b, 0, d, e, f)
    N = d * e - b * f
    method = f"factorisation ({b}x + {e})({b}y + {d}) = {N}"
    if N == 0:
        fams: list[Family] = []
        for line in (integer_line(b, 0, e), integer_line(0, b, d)):
            if line is not None:
                fams.append(line)
        note = (
            ["the two lines meet in one point, listed in both families"] if len(fams) == 2 else []
        )
        return QuadraticSolutions(coefficients, not fams, fams, [], method, notes=note)
    sols = set()
    for u in divisors(N):
        for uu in (u, -u):
            v = N // uu
            x, rx = divmod(uu - e, b)
            y, ry = divmod(v - d, b)
            if not rx and not ry:
                sols.add((x, y))
    return QuadraticSolutions(coefficients, True, [], sort_points(sols), method)


def swap_solutions(s: QuadraticSolutions) -> QuadraticSolutions:
    """The solutions with ``x`` and ``y`` exchanged (for the equation with ``a ↔ c``, ``d ↔ e``)."""
    a, b, c, d, e, f = s.coefficients
    fams: list[Family] = []
    for fam in s.families:
        if isinstance(fam, OrbitFamily):
            m = fam.automorph.matrix
            tr = fam.automorph.translation
            T = AffineMap((m[3], m[2], m[1], m[0]), (tr[1], tr[0]))
            fams.append(
                OrbitFamily(fam.fundamental[::-1], T, fam.center[::-1], fam.reflection, fam.unit)
            )  # type: ignore[arg-type]
        elif isinstance(fam, LineFamily):
            fams.append(LineFamily(fam.point[::-1], fam.direction[::-1]))  # type: ignore[arg-type]
        elif isinstance(fam, ParabolaFamily):
            fams.append(ParabolaFamily(fam.y_polynomial, fam.x_polynomial))
        else:  # compact families solve x² − dy² = n, whose swap is not of that shape
            raise DomainError("a family in compact form cannot have x and y exchanged")
    sols = sort_points([(y, x) for x, y in s.solutions])
    return QuadraticSolutions(
        (c, b, a, e, d, f), s.finite, fams, sols, s.method, s.proof, list(s.notes)
    )


def _parallel_lines(a: int, b: int, c: int, n: int) -> QuadraticSolutions:
    """``Δ = 0``: ``4a(ax² + bxy + cy²) = (2ax + by)²``, so ``2ax + by = ±√(4an)``."""
    coefficients = (a, b, c, 0, 0, -n)
    method = "Δ = 0: the form is a square of a linear form"
    if a == 0:
        return swap_solutions(_parallel_lines(c, b, a, n))
    v = 4 * a * n
    if v < 0 or not is_square(v):
        return QuadraticSolutions(coefficients, True, [], [], method)
    s = isqrt(v)
    lines = [integer_line(2 * a, b, -sign * s) for sign in ((1, -1) if s else (1,))]
    fams: list[Family] = [line for line in lines if line is not None]
    return QuadraticSolutions(coefficients, not fams, fams, [], method)


def solve_binary_form(a: int, b: int, c: int, n: int) -> QuadraticSolutions:
    """Every integer solution of ``a x² + b xy + c y² = n`` (indefinite, definite or degenerate).

    >>> [f.fundamental for f in solve_binary_form(3, 5, -7, 11).families]
    []
    >>> [f.fundamental for f in solve_binary_form(3, 5, -7, -9).families]
    [(-1, 1), (-54, 21), (19, 21)]
    """
    a, b, c, n = (as_integer(v, name) for v, name in ((a, "a"), (b, "b"), (c, "c"), (n, "n")))
    coefficients = (a, b, c, 0, 0, -n)
    if a == b == c == 0:
        if n:
            return QuadraticSolutions(coefficients, True, [], [], "0 = n has no solution")
        raise DomainError("the equation 0 = 0 holds for every pair (x, y)")
    g = gcd(gcd(a, b), c)
    if n % g:
        return QuadraticSolutions(
            coefficients, True, [], [], f"gcd of the coefficients {g} does not divide {n}"
        )
    if g > 1:  # the primitive form has the larger automorph group
        sol = solve_binary_form(a // g, b // g, c // g, n // g)
        sol.coefficients = coefficients
        return sol
    Delta = b * b - 4 * a * c
    if Delta == 0:
        return _parallel_lines(a, b, c, n)
    if a == 0 and c != 0:
        return swap_solutions(solve_binary_form(c, b, a, n))
    if a == 0:  # b xy = n
        out = product_equation(b, 0, 0, -n)
        return QuadraticSolutions(
            coefficients, out.finite, out.families, out.solutions, out.method, notes=out.notes
        )
    hyperbolic = bool(n) and Delta > 0 and not is_square(Delta)
    if not hyperbolic or choose_norm_method(Delta) == "cfrac":
        try:
            return solve_transformed(coefficients, (2 * a, b, 0, 1), (0, 0), Delta, 4 * a * n)
        except TooLargeError:  # a period longer than its estimate: the infrastructure takes over
            if not hyperbolic or not compiled_table(4 * Delta):
                raise
    families, method, proof = form_families_infrastructure(a, b, c, n)
    found: list[Family] = list(families)
    return QuadraticSolutions(coefficients, not found, found, [], method, proof)
