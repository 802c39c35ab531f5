"""Every integer solution of ``a x² + b xy + c y² + d x + e y + f = 0``.

With ``Δ = b² − 4ac`` the cases are:

* **hyperbolic** (``Δ > 0`` not a square): completing both squares,
  ``U = 2ax + by + d`` and ``V = Δy + bd − 2ae`` satisfy
  ``V² − Δ U² = K = (2ae − bd)² + Δ(4af − d²)``; the norm equation's classes,
  the congruences that make ``x, y`` integral and the least integral
  automorph give finitely many orbit families
  (:func:`realquad.binary_quadratic_equations.solve_transformed`);
* **elliptic** (``Δ < 0``): the same substitution, finitely many solutions;
* **square discriminant** (``Δ = s² > 0``): ``(V − sU)(V + sU) = K``, finitely
  many solutions by factoring ``K``, or two lines when ``K = 0``; and
  ``b xy + dx + ey + f = 0`` as ``(bx + e)(by + d) = de − bf``;
* **parabolic** (``Δ = 0``): ``4a·(…) = U² + L y + (4af − d²)`` with
  ``L = 4ae − 2bd``; for ``L ≠ 0`` each admissible residue of ``U`` modulo
  ``|2aL|`` gives a family ``(x(t), y(t))`` of integer polynomials of degree
  two; for ``L = 0``, parallel lines;
* **linear** (``a = b = c = 0``): one line or nothing.

>>> s = solve_quadratic(1, 0, -2, 3, -5, -7)     # x² − 2y² + 3x − 5y = 7
>>> s.bounded(30)
[(1, -1), (2, -3), (-4, -1), (-5, -3), (5, 3), (7, -7), (-8, 3), (-10, -7), (16, 11), (-19, 11)]
>>> [f.kind for f in solve_quadratic(0, 1, 0, 1, 1, 1).families]   # xy + x + y + 1 = 0
['line', 'line']
>>> solve_quadratic(1, 0, 1, 0, 0, -25).solutions[:4]            # x² + y² = 25
[(-4, -3), (-4, 3), (-3, -4), (-3, 4)]
>>> f = solve_quadratic(1, 0, 0, 0, -1, 0).families[0]          # y = x²
>>> f.x_polynomial, f.y_polynomial
((0, 1, 0), (1, 0, 0))

References: L. E. Dickson, *History of the Theory of Numbers*, vol. II,
ch. XII (the general equation of the second degree in two unknowns);
T. Nagell, *Introduction to Number Theory*, 1951, §57–61.
"""

from __future__ import annotations

from math import gcd

from realquad.core.integers import as_integer, is_square, isqrt
from realquad.core.primes import square_roots_mod
from realquad.equations.binary import (
    integer_line,
    product_equation,
    solve_binary_form,
    solve_transformed,
    swap_solutions,
)
from realquad.equations.conics_compact import compact_conic_families
from realquad.equations.families import Family, ParabolaFamily, QuadraticSolutions
from realquad.equations.norm import choose_norm_method, solve_norm_equation
from realquad.errors import DomainError, TooLargeError

#: The method of a hyperbolic conic beyond the continued fraction.
METHOD_INFRASTRUCTURE = (
    "P² − ΔQ² = K by principal ideal tests in the infrastructure, the integral members and "
    "the least integral automorph found on residues; every number in compact form"
)

#: Most residues the parabolic case examines.
MAX_RESIDUES = 2_000_000

Coefficients = tuple[int, int, int, int, int, int]


def normalize(coefficients: Coefficients) -> Coefficients:
    """Divide by the content and make the first non-zero coefficient positive.

    >>> normalize((-2, 0, 26, 0, 0, -8))
    (1, 0, -13, 0, 0, 4)
    """
    g = 0
    for v in coefficients:
        g = gcd(g, v)
    if g == 0:
        return coefficients
    first = next(v for v in coefficients if v)
    if first < 0:
        g = -g
    return tuple(v // g for v in coefficients)  # type: ignore[return-value]


def _with(s: QuadraticSolutions, coefficients: Coefficients) -> QuadraticSolutions:
    s.coefficients = coefficients
    return s


def _linear(d: int, e: int, f: int) -> QuadraticSolutions:
    coefficients = (0, 0, 0, d, e, f)
    line = integer_line(d, e, f)
    fams: list[Family] = [line] if line else []
    return QuadraticSolutions(coefficients, not fams, fams, [], "linear equation: extended Euclid")


def _parabola(U0: int, M: int, a: int, b: int, d: int, c0: int, L: int) -> ParabolaFamily:
    """The family ``U = U0 + M t``: ``y = −(U² + c0)/L``, ``x = (U − by − d)/(2a)``."""
    y0 = -(U0 * U0 + c0) // L
    x0 = (U0 - b * y0 - d) // (2 * a)
    y2, y1 = -(M * M) // L, -(2 * U0 * M) // L
    x2, x1 = -(b * y2) // (2 * a), (M - b * y1) // (2 * a)
    return ParabolaFamily((x2, x1, x0), (y2, y1, y0))


def _least_step(valid: set[int], M: int, a: int, b: int, L: int) -> int:
    """The least divisor ``m`` of ``M`` such that the admissible residues are a union of classes mod ``m``
    and every family ``U0 + m t`` has integer polynomial coefficients."""
    if M > 100_000:
        return M
    for m in (k for k in range(1, M + 1) if M % k == 0):
        if (m * m) % L:
            continue
        ok = True
        for U0 in range(m):
            lifts = [U0 + k * m in valid for k in range(M // m)]
            if any(lifts) and not all(lifts):
                ok = False
                break
            if lifts[0]:
                y2, r2 = divmod(-(m * m), L)
                y1, r1 = divmod(-(2 * U0 * m), L)
                if r1 or r2 or (b * y2) % (2 * a) or (m - b * y1) % (2 * a):
                    ok = False
                    break
        if ok:
            return m
    return M  # pragma: no cover - M itself always qualifies


def _parabolic(a: int, b: int, c: int, d: int, e: int, f: int) -> QuadraticSolutions:
    """``Δ = 0``, ``a ≠ 0``."""
    coefficients = (a, b, c, d, e, f)
    L = 4 * a * e - 2 * b * d
    c0 = 4 * a * f - d * d
    if L == 0:  # U² = −c0: parallel lines 2ax + by + d = ±√(−c0)
        method = "parabolic, degenerate: 2ax + by + d = ±√(d² − 4af)"
        if -c0 < 0 or not is_square(-c0):
            return QuadraticSolutions(coefficients, True, [], [], method)
        s = isqrt(-c0)
        lines = [integer_line(2 * a, b, d - sign * s) for sign in ((1, -1) if s else (1,))]
        fams: list[Family] = [line for line in lines if line is not None]
        return QuadraticSolutions(coefficients, not fams, fams, [], method)
    M = abs(2 * a * L)
    # U² ≡ −c0 (mod |L|) makes y integral; each root lifts to 2|a| residues mod M, of which
    # those making x integral are kept
    roots = square_roots_mod(-c0, abs(L))
    if len(roots) * 2 * abs(a) > MAX_RESIDUES:
        raise TooLargeError(
            f"the parabolic case would examine {len(roots) * 2 * abs(a):,} residues (limit {MAX_RESIDUES:,})"
        )
    valid = {
        U0
        for r in roots
        for U0 in range(r, M, abs(L))
        if (U0 - b * (-(U0 * U0 + c0) // L) - d) % (2 * a) == 0
    }
    step = _least_step(valid, M, a, b, L)
    fams = [_parabola(U0, step, a, b, d, c0, L) for U0 in sorted(valid) if U0 < step]
    method = f"parabolic: U = 2ax + by + d runs through the admissible residues mod {M}"
    return QuadraticSolutions(coefficients, not fams, fams, [], method)


def _by_infrastructure(Delta: int) -> bool:
    """Whether ``P² − ΔQ² = K`` goes to the infrastructure (a refusal is left to the
    continued fraction's path, which says why)."""
    try:
        return choose_norm_method(Delta) == "infrastructure"
    except TooLargeError:
        return False


def solve_quadratic(a: int, b: int, c: int, d: int, e: int, f: int) -> QuadraticSolutions:
    """Every integer solution of ``a x² + b xy + c y² + d x + e y + f = 0``.

    The coefficients are normalised first (:func:`normalize`). Raises
    :class:`DomainError` for ``0 = 0``.

    >>> s = solve_quadratic(1, 0, -13, 0, 0, 4)          # x² − 13y² = −4
    >>> [fam.fundamental for fam in s.families]
    [(-3, 1), (3, 1), (36, 10)]
    """
    raw = tuple(as_integer(v, name) for v, name in zip((a, b, c, d, e, f), "abcdef", strict=True))
    coefficients: Coefficients = normalize(raw)  # type: ignore[arg-type]
    a, b, c, d, e, f = coefficients
    if d == 0 and e == 0:
        if a == b == c == 0 and f == 0:
            raise DomainError("the equation 0 = 0 holds for every pair (x, y)")
        if a == 1 and b == 0:  # x² − dy² = n itself
            return _with(solve_norm_equation(-c, -f), coefficients)
        return _with(solve_binary_form(a, b, c, -f), coefficients)
    if a == b == c == 0:
        return _linear(d, e, f)
    Delta = b * b - 4 * a * c
    if a == 0 and c != 0:
        return _with(swap_solutions(solve_quadratic(c, b, a, e, d, f)), coefficients)
    if a == 0:  # c = 0 too, so b ≠ 0
        return _with(product_equation(b, d, e, f), coefficients)
    if Delta == 0:
        return _parabolic(a, b, c, d, e, f)
    K = (2 * a * e - b * d) ** 2 + Delta * (4 * a * f - d * d)
    S = (0, Delta, 2 * a, b)
    s0 = (b * d - 2 * a * e, d)
    if K and Delta > 0 and not is_square(Delta) and _by_infrastructure(Delta):
        families = compact_conic_families(S, s0, Delta, K)
        found: list[Family] = list(families)
        return QuadraticSolutions(
            coefficients, not found, found, [], METHOD_INFRASTRUCTURE, "unconditional"
        )
    return solve_transformed(coefficients, S, s0, Delta, K)
