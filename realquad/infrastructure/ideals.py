"""Reduced principal ideals of a real quadratic order and the steps between them.

An invertible primitive ideal of the order of discriminant ``D`` is written
``I = [a, (b + √D)/2]`` (``a > 0``, ``4a | b² − D``); it depends on ``b`` only
modulo ``2a``. Its lattice ``L = I/a = [1, θ]``, ``θ = (b + √D)/(2a)``, is
*reduced* when ``1`` is a minimum of ``L``; for the normalised representative
``b ∈ (√D − 2a, √D)`` that is the classical condition
``|√D − 2a| < b < √D``. A principal lattice is ``L = γ·O`` and its
*distance* is ``δ(L) = log |γ|``, defined modulo the regulator ``R``.

Three moves keep track of the relative generator exactly:

* ``rho`` (baby step): ``L₁ = θ₁ L`` with ``θ₁ = 1/(θ − ⌊θ⌋) > 1`` — the
  continued-fraction step, so the distance grows by ``log θ₁``;
* ``reduce``: from any lattice ``[1, θ̃]``, ``L' = (1/θ̃)·L`` with ``θ̃``
  normalised as in Buchmann–Vollmer (norms fall strictly until reduced);
* ``multiply``: ``I₁ I₂ = d·I₃`` (Gauss/Dirichlet composition), so that
  ``L₃ = (a₁a₂/(d a₃))·L₁L₂``.

>>> cyc = Cycle(5 * 4 * 19)            # discriminant 380 = 4·95
>>> cyc.principal
(1, 18)
>>> cyc.rho(*cyc.principal)
(14, 18)
>>> cyc.is_reduced(14, 18), cyc.conjugate(14, 18)
(True, 10)

References: D. Shanks, "The infrastructure of a real quadratic field and its
applications", Proc. 1972 Number Theory Conf., Boulder; J. Buchmann and
U. Vollmer, *Binary Quadratic Forms*, Springer 2007, ch. 6; M. J. Jacobson Jr.
and H. C. Williams, *Solving the Pell Equation*, Springer 2009, ch. 10.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import gmpy2

from realquad._backend import call_kernel
from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import check_discriminant

ReducedIdeal = tuple[int, int]


@dataclass(frozen=True)
class Cycle:
    """The reduced principal ideals of discriminant ``D`` and the moves between them."""

    discriminant: int
    root: int = field(init=False)  # ⌊√D⌋
    sqrt_float: float = field(init=False)

    def __post_init__(self) -> None:
        D = check_discriminant(self.discriminant, real=True)
        object.__setattr__(self, "discriminant", D)
        object.__setattr__(self, "root", int(gmpy2.isqrt(D)))
        object.__setattr__(self, "sqrt_float", float(gmpy2.sqrt(gmpy2.mpfr(D, 80))))

    # -- normal forms --------------------------------------------------------
    def normalize(self, a: int, b: int) -> int:
        """The representative of ``b`` modulo ``2a`` in ``(√D − 2a, √D)``."""
        r = self.root
        return r - (r - b) % (2 * a)

    def is_reduced(self, a: int, b: int) -> bool:
        """Whether the lattice ``[1, (b + √D)/(2a)]`` is reduced."""
        b = self.normalize(a, b)
        t = 2 * a - b  # reduced ⇔ t < √D
        return t < 0 or t * t < self.discriminant

    @property
    def principal(self) -> ReducedIdeal:
        """The order itself, ``(1, b₀)``."""
        return (1, self.normalize(1, self.discriminant & 1))

    def conjugate(self, a: int, b: int) -> int:
        """``b`` of the conjugate ideal ``[a, (−b + √D)/2]`` (normalised)."""
        return self.normalize(a, -b)

    def key(self, a: int, b: int) -> int:
        """One integer that identifies a reduced ideal ``(a, b)`` (``b`` normalised)."""
        return a * (2 * self.root + 2) + b

    # -- baby steps ----------------------------------------------------------
    def rho(self, a: int, b: int) -> ReducedIdeal:
        """The next reduced ideal of the cycle (the continued-fraction step)."""
        bt = b - 2 * a * ((b + self.root) // (2 * a))
        return (self.discriminant - bt * bt) // (4 * a), -bt

    def rho_inverse(self, a: int, b: int) -> ReducedIdeal:
        """The previous reduced ideal of the cycle."""
        prev = (self.discriminant - b * b) // (4 * a)
        return prev, self.normalize(prev, -b)

    def rho_log_float(self, a: int, b: int, a1: int, b1: int) -> float:
        """``log θ₁`` in binary64 for the step ``(a, b) → (a₁, b₁)``, without cancellation."""
        if b1 >= 0:
            return math.log((b1 + self.sqrt_float) / (2 * a1))
        # b₁ + √D = (D − b₁²)/(√D − b₁) = 4 a a₁/(√D − b₁)
        return math.log(2 * a) - math.log(self.sqrt_float - b1)

    # -- composition and reduction -------------------------------------------
    def multiply(self, a1: int, b1: int, a2: int, b2: int) -> tuple[int, int, int]:
        """``(d, a₃, b₃)`` with ``[a₁, (b₁+√D)/2]·[a₂, (b₂+√D)/2] = d·[a₃, (b₃+√D)/2]``.

        ``d = gcd(a₁, a₂, (b₁+b₂)/2) = u a₁ + v a₂ + w (b₁+b₂)/2`` and
        ``b₃ = (u a₁ b₂ + v a₂ b₁ + w (b₁b₂ + D)/2)/d`` modulo ``2a₃``,
        ``a₃ = a₁a₂/d²`` (Cohen, *A Course in Computational Algebraic Number
        Theory*, §5.4.2, written for ideals).
        """
        D = self.discriminant
        s = (b1 + b2) // 2
        g, x1, y1 = gmpy2.gcdext(a1, a2)
        d, x2, y2 = gmpy2.gcdext(g, s)
        u, v, w = x1 * x2, y1 * x2, y2
        a3 = (a1 * a2) // (d * d)
        b3 = (u * a1 * b2 + v * a2 * b1 + w * ((b1 * b2 + D) // 2)) // d
        return int(d), int(a3), int(b3 % (2 * a3))

    def reduction_step(self, a: int, b: int) -> tuple[int, int, int]:
        """One reduction step: ``(b̃, a', b')`` with ``L' = (1/θ̃)·L``, ``θ̃ = (b̃ + √D)/(2a)``."""
        if a > self.root:
            bt = b % (2 * a)
            if bt > a:
                bt -= 2 * a
        else:
            bt = self.normalize(a, b)
        a_new = (self.discriminant - bt * bt) // (4 * a)
        return bt, abs(a_new), -bt

    def reduction_multiplier(self, a: int, bt: int) -> QuadraticNumber:
        """``1/θ̃ = 2a/(b̃ + √D)`` exactly."""
        return QuadraticNumber(2 * a, 0, 1, self.discriminant) / QuadraticNumber(
            bt, 1, 1, self.discriminant
        )

    def log_theta_float(self, a: int, bt: int) -> float:
        """``log |(b̃ + √D)/(2a)|`` in binary64, without cancellation."""
        if bt >= 0:
            return math.log(bt + self.sqrt_float) - math.log(2 * a)
        n = abs(self.discriminant - bt * bt)  # |b̃ + √D| = n/(√D − b̃)
        return math.log(n) - math.log(self.sqrt_float - bt) - math.log(2 * a)

    def reduce_float(self, a: int, b: int) -> tuple[int, int, float]:
        """Reduce ``[1, (b + √D)/(2a)]``: ``(a', b', Δ)`` with the distance change ``Δ``.

        Norms fall strictly at every step (by a factor 4 while ``a > √D``), so
        the loop ends after ``O(log a)`` steps.
        """
        shift = 0.0
        for _ in range(4 * max(a, 2).bit_length() + 8):
            if self.is_reduced(a, b):
                return a, self.normalize(a, b), shift
            bt, a_new, b = self.reduction_step(a, b)
            shift -= self.log_theta_float(a, bt)
            a = a_new
        raise ArithmeticError("internal error: reduction did not terminate")  # pragma: no cover

    def reduce_exact(self, a: int, b: int) -> tuple[int, int, QuadraticNumber]:
        """Reduce ``[1, (b + √D)/(2a)]``: ``(a', b', μ)`` with ``L' = μ·L`` exactly."""
        mu = QuadraticNumber(1, 0, 1, self.discriminant)
        for _ in range(4 * max(a, 2).bit_length() + 8):
            if self.is_reduced(a, b):
                return a, self.normalize(a, b), mu
            bt, a_new, b = self.reduction_step(a, b)
            mu = mu * self.reduction_multiplier(a, bt)
            a = a_new
        raise ArithmeticError("internal error: reduction did not terminate")  # pragma: no cover


def giant_step_float(
    D: int, r: int, sq: float, a: int, b: int, a2: int, b2: int
) -> tuple[int, int, float]:
    """Fused ``reduce([a, b]·[a₂, b₂])``: ``(a', b', c)`` with the distance change ``c``.

    The same arithmetic as :meth:`Cycle.multiply` followed by
    :meth:`Cycle.reduce_float`, as one plain-integer kernel
    (``infrastructure_giant_step``; ``r = ⌊√D⌋``, ``sq ≈ √D``).
    """
    return call_kernel("infrastructure_giant_step", D, r, sq, a, b, a2, b2)  # type: ignore[no-any-return]
