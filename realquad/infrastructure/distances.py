"""Reaching a reduced principal ideal at a given distance, with its relative generator.

:func:`walk_to` finds the reduced principal lattice ``L = γ·O`` whose distance
``δ(L) = log |γ|`` is the largest one not exceeding a target ``x``, by binary
doubling: a lattice near ``x/2^k`` is reached by baby steps from ``O``, and
each level squares the lattice (composition + reduction) and corrects with a
few baby steps towards ``x/2^{k−i}``. Every move multiplies the relative
generator by an explicit number, so the walk can also return ``γ`` exactly as
``γ₀^{2^k} · α₁^{2^{k−1}} ⋯ α_k`` — a product of ``O(log x)`` numbers of small
height: this is the compact representation of Buchmann, Thiel and Williams.

Decisions (which way to step) use binary64 distances; only the exact
multipliers decide the result, so rounding can never make the answer wrong —
at worst the walk ends one step away from the ideal a perfect walk would
reach.

>>> from realquad.infrastructure.ideals import Cycle
>>> cyc = Cycle(4 * 4000003)
>>> near = walk_to(cyc, 300.0, exact=True)
>>> near.distance <= 300.0 < near.distance + 2 * cyc.rho_log_float(*near.ideal, *cyc.rho(*near.ideal))
True
>>> abs(float(log_of_product(near.factors, 60)[0]) - near.distance) < 1e-9
True

References: J. Buchmann, C. Thiel and H. C. Williams, "Short representation of
quadratic integers", *Computational Algebra and Number Theory*, Kluwer 1995;
Jacobson–Williams, *Solving the Pell Equation*, Springer 2009, ch. 10–11.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.infrastructure.ideals import Cycle, ReducedIdeal

Factors = list[tuple[QuadraticNumber, int]]


@dataclass
class NearIdeal:
    """A reduced principal lattice ``L = γ·O`` near a target distance.

    ``distance`` is a binary64 approximation of ``log |γ|``; ``factors``
    (only when asked for) give ``γ = ∏ α^e`` exactly.
    """

    ideal: ReducedIdeal
    distance: float
    factors: Factors | None


def _one(D: int) -> QuadraticNumber:
    return QuadraticNumber(1, 0, 1, D)


class _Walker:
    """A lattice with its float distance and (optionally) its exact multiplier."""

    def __init__(self, cycle: Cycle, exact: bool) -> None:
        self.cycle = cycle
        self.exact = exact
        self.ideal = cycle.principal
        self.distance = 0.0
        self.mu = _one(cycle.discriminant)

    def forward(self) -> None:
        c = self.cycle
        a, b = self.ideal
        a1, b1 = c.rho(a, b)
        self.distance += c.rho_log_float(a, b, a1, b1)
        if self.exact:
            self.mu = self.mu * QuadraticNumber(b1, 1, 2 * a1, c.discriminant)
        self.ideal = (a1, b1)

    def backward(self) -> None:
        c = self.cycle
        a1, b1 = self.ideal
        a, b = c.rho_inverse(a1, b1)
        self.distance -= c.rho_log_float(a, b, a1, b1)
        if self.exact:
            self.mu = self.mu / QuadraticNumber(b1, 1, 2 * a1, c.discriminant)
        self.ideal = (a, b)

    def next_distance(self) -> float:
        c = self.cycle
        a, b = self.ideal
        a1, b1 = c.rho(a, b)
        return self.distance + c.rho_log_float(a, b, a1, b1)

    def adjust(self, target: float) -> None:
        """Baby steps until ``distance ≤ target < distance of the next ideal``."""
        while self.distance > target:
            self.backward()
        while self.next_distance() <= target:
            self.forward()

    def square(self) -> None:
        """``L ← reduce(L²)``; the multiplier restarts at the square's scaling factor."""
        c = self.cycle
        a, b = self.ideal
        d, a3, b3 = c.multiply(a, b, a, b)
        a4, b4, shift = c.reduce_float(a3, b3)
        self.distance = 2 * self.distance + math.log(a * a / (d * a3)) + shift
        if self.exact:
            _, _, mu = c.reduce_exact(a3, b3)
            self.mu = QuadraticNumber(a * a, 0, d * a3, c.discriminant) * mu
        self.ideal = (a4, b4)


def bottom_radius(cycle: Cycle) -> float:
    """Distances up to this are reached by baby steps alone."""
    return max(8.0, 2.0 * math.log(cycle.discriminant))


def walk_to(cycle: Cycle, x: float, exact: bool = False) -> NearIdeal:
    """The reduced principal lattice with the largest distance ``≤ x`` (``x ≥ 0``).

    With ``exact=True`` the relative generator comes as factors
    ``[(γ₀, 2^k), (α₁, 2^{k−1}), …, (α_k, 1)]``.
    """
    if not x >= 0:
        raise ValueError("target distance must be non-negative")
    T = bottom_radius(cycle)
    k = 0
    t = x
    while t > T:
        t /= 2
        k += 1
    w = _Walker(cycle, exact)
    w.adjust(t)
    factors: Factors = []
    if exact:
        factors.append((w.mu, 1 << k))
    for i in range(1, k + 1):
        w.square()
        w.adjust(x / (1 << (k - i)))
        if exact:
            factors.append((w.mu, 1 << (k - i)))
    return NearIdeal(w.ideal, w.distance, factors if exact else None)


def principal_near(cycle: Cycle, x: float, window: float) -> list[float]:
    """Float distances of the copies of ``O`` with distance in ``[x − window, x + window]``."""
    start = max(0.0, x - window)
    near = walk_to(cycle, start)
    w = _Walker(cycle, exact=False)
    w.ideal, w.distance = near.ideal, near.distance
    found = []
    principal = cycle.principal
    while w.distance <= x + window:
        if w.ideal == principal and w.distance >= start:
            found.append(w.distance)
        w.forward()
    return found


def exact_principal_at(cycle: Cycle, x: float, steps: int | None = None) -> Factors:
    """Factors of a unit ``γ`` with ``O = γ·O`` at distance close to ``x`` (a float estimate).

    Raises ``ArithmeticError`` if ``O`` is not within ``steps`` baby steps of ``x``.
    """
    return exact_ideal_at(cycle, x, cycle.principal, steps)


def search_radius(x: float) -> int:
    """Baby steps either way that cover the float error of two doubling walks to ``≈ x``.

    Each walk's float distance is off by at most ``1e-12·x`` (the bound the
    searches use), and the distance grows by more than ``log 2`` every two
    baby steps (``θ_{i+1}θ_{i+2} > 2``; from memory, cf. Jacobson–Williams
    2009, ch. 10); so ``64 + 6e-12·x`` steps cover the two walks' errors.
    """
    return 64 + int(6e-12 * x)


def exact_ideal_at(
    cycle: Cycle, x: float, target: ReducedIdeal, steps: int | None = None
) -> Factors:
    """Factors of ``γ`` with ``L_target = γ·O``, for a reduced principal ``target`` near distance ``x``.

    Walks to ``x`` exactly and searches up to ``steps`` baby steps either way
    for ``target`` (default :func:`search_radius`), by float steps first, then
    repeats the steps needed with exact multipliers; raises ``ArithmeticError``
    if it is not there.
    """
    if steps is None:
        steps = search_radius(x)
    near = walk_to(cycle, max(0.0, x), exact=True)
    assert near.factors is not None
    for direction in ("forward", "backward"):
        w = _Walker(cycle, exact=False)
        w.ideal, w.distance = near.ideal, near.distance
        for count in range(steps + 1):
            if w.ideal == target:
                w = _Walker(cycle, exact=True)
                w.ideal, w.distance = near.ideal, near.distance
                for _ in range(count):
                    getattr(w, direction)()
                last, e = near.factors[-1]
                return near.factors[:-1] + [(last * w.mu, e)]
            getattr(w, direction)()
    raise ArithmeticError(f"internal error: ideal {target} not near distance {x}")


def log_of_product(factors: Factors, digits: int) -> tuple[mpmath.mpf, mpmath.mpf]:
    """``(Σ e·log |α|, error bound)`` to about ``digits`` significant digits.

    Each ``log |α|`` is evaluated without cancellation at ``prec`` bits (see
    :meth:`QuadraticNumber.log_abs_mpf`) so its absolute error is below
    ``2^{4−prec}·(1 + |log α|)``; the bound adds these, weighted by ``e``,
    and the rounding of the weighted sum.
    """
    total_weight = sum(e for _, e in factors)
    size = sum(e * (2 + abs(float(f.log_abs_mpf(5)))) for f, e in factors)
    prec = int(digits * 3.33) + max(1, int(size)).bit_length() + 40
    with mpmath.workprec(prec + 20):
        value = mpmath.mpf(0)
        bound = mpmath.mpf(0)
        eps = mpmath.mpf(2) ** (4 - prec)
        for f, e in factors:
            v = f.log_abs_mpf(prec // 3 + 1)
            value += e * v
            bound += e * eps * (1 + abs(v))
        bound += eps * (abs(value) + total_weight)
    return value, bound
