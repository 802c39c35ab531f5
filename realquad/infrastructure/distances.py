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
reach. Binary64 distances drift by about ``10⁻¹⁶`` of the target at each of
the ``log₂ x`` doublings, so beyond ``x ≈ 10¹²`` the walk may end too far
from the ideal sought for a short search to find it; with ``digits`` the
walk carries its distance in ``mpmath`` instead, every step's logarithm taken
from its exact multiplier, and ends within a step or two of ``x`` at any size.

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


class _PreciseWalker(_Walker):
    """A :class:`_Walker` whose distance is an ``mpmath`` number at ``dps`` digits, each move's
    logarithm taken from its exact multiplier (so the walk's drift stays below a step)."""

    def __init__(self, cycle: Cycle, dps: int) -> None:
        super().__init__(cycle, exact=True)
        self.dps = dps
        self.distance = mpmath.mpf(0)  # type: ignore[assignment]

    def _log(self, number: QuadraticNumber) -> mpmath.mpf:
        return number.log_abs_mpf(self.dps)

    def _theta(self, a1: int, b1: int) -> QuadraticNumber:
        return QuadraticNumber(b1, 1, 2 * a1, self.cycle.discriminant)

    def forward(self) -> None:
        a1, b1 = self.cycle.rho(*self.ideal)
        theta = self._theta(a1, b1)
        with mpmath.workdps(self.dps):
            self.distance += self._log(theta)
        self.mu = self.mu * theta
        self.ideal = (a1, b1)

    def backward(self) -> None:
        a1, b1 = self.ideal
        theta = self._theta(a1, b1)
        with mpmath.workdps(self.dps):
            self.distance -= self._log(theta)
        self.mu = self.mu / theta
        self.ideal = self.cycle.rho_inverse(a1, b1)

    def next_distance(self) -> float:
        with mpmath.workdps(self.dps):
            return self.distance + self._log(self._theta(*self.cycle.rho(*self.ideal)))

    def square(self) -> None:
        c = self.cycle
        a, b = self.ideal
        d, a3, b3 = c.multiply(a, b, a, b)
        a4, b4, mu = c.reduce_exact(a3, b3)
        self.mu = QuadraticNumber(a * a, 0, d * a3, c.discriminant) * mu
        with mpmath.workdps(self.dps):
            self.distance = 2 * self.distance + self._log(self.mu)
        self.ideal = (a4, b4)


def bottom_radius(cycle: Cycle) -> float:
    """Distances up to this are reached by baby steps alone."""
    return max(8.0, 2.0 * math.log(cycle.discriminant))


def walk_to(
    cycle: Cycle, x: float | mpmath.mpf, exact: bool = False, digits: int | None = None
) -> NearIdeal:
    """The reduced principal lattice with the largest distance ``≤ x`` (``x ≥ 0``).

    With ``exact=True`` the relative generator comes as factors
    ``[(γ₀, 2^k), (α₁, 2^{k−1}), …, (α_k, 1)]``. With ``digits`` (and ``exact``) the
    distances are carried to that many significant digits (module notes); ``x`` may then
    be an ``mpmath`` number, and the distance returned is one.
    """
    if not x >= 0:
        raise ValueError("target distance must be non-negative")
    if digits is not None and not exact:
        raise ValueError("a walk with precise distances is exact")
    if digits is not None:
        with mpmath.workdps(digits):  # the targets x/2^i to the walk's precision
            return _walk(cycle, mpmath.mpf(x), exact, digits)
    return _walk(cycle, x, exact, None)


def _walk(cycle: Cycle, x: float | mpmath.mpf, exact: bool, digits: int | None) -> NearIdeal:
    T = bottom_radius(cycle)
    k = 0
    t = x
    while t > T:
        t /= 2
        k += 1
    w = _Walker(cycle, exact) if digits is None else _PreciseWalker(cycle, digits)
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


def exact_principal_at(
    cycle: Cycle, x: float | mpmath.mpf, steps: int | None = None, digits: int | None = None
) -> Factors:
    """Factors of a unit ``γ`` with ``O = γ·O`` at distance close to ``x`` (an estimate;
    with ``digits``, one good to that many digits, the walk's distances as precise).

    Raises ``ArithmeticError`` if ``O`` is not within ``steps`` baby steps of ``x``.
    """
    return exact_ideal_at(cycle, x, cycle.principal, steps, digits)


def search_radius(x: float) -> int:
    """Baby steps either way that cover the float error of two doubling walks to ``≈ x``.

    Each walk's float distance is off by at most ``1e-12·x`` (the bound the
    searches use), and the distance grows by more than ``log 2`` every two
    baby steps (``θ_{i+1}θ_{i+2} > 2``; from memory, cf. Jacobson–Williams
    2009, ch. 10); so ``64 + 6e-12·x`` steps cover the two walks' errors.
    """
    return 64 + int(6e-12 * x)


#: Baby steps either way a walk with precise distances searches (it ends within one or two).
PRECISE_RADIUS = 64


def exact_ideal_at(
    cycle: Cycle,
    x: float | mpmath.mpf,
    target: ReducedIdeal,
    steps: int | None = None,
    digits: int | None = None,
) -> Factors:
    """Factors of ``γ`` with ``L_target = γ·O``, for a reduced principal ``target`` near distance ``x``.

    Walks to ``x`` exactly and searches up to ``steps`` baby steps either way
    for ``target`` (default :func:`search_radius`), by float steps first, then
    repeats the steps needed with exact multipliers; raises ``ArithmeticError``
    if it is not there. With ``digits`` the walk's distances are precise (module
    notes) and the default search is :data:`PRECISE_RADIUS` steps.
    """
    if steps is None:
        steps = search_radius(float(x)) if digits is None else PRECISE_RADIUS
    near = walk_to(cycle, max(0, x), exact=True, digits=digits)
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
    # in integers: the exponents of a power product reach thousands of bits (80-digit fields)
    size = sum(abs(e) * (3 + int(abs(float(f.log_abs_mpf(5))))) for f, e in factors)
    prec = int(digits * 3.33) + max(1, size).bit_length() + 40
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
