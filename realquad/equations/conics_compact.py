"""Conics with linear terms beyond the continued fraction: orbit families in compact form.

``a x² + bxy + cy² + dx + ey + f = 0`` with ``Δ = b² − 4ac > 0`` not a square
becomes ``P² − ΔQ² = K`` under ``(P, Q) = S(x, y) + s₀``
(:mod:`realquad.equations.conics`). Where the period of ``√Δ`` is too long
for the continued fraction, the classes of ``P² − ΔQ² = K`` come from
principal ideal tests in the infrastructure
(:func:`~realquad.equations.norm_compact.norm_families_infrastructure`), with
``α`` and the least unit ``ε`` of norm +1 of ``Z[√Δ]`` in compact form, and
the conic's families follow as for the continued fraction
(:func:`realquad.equations.binary.solve_transformed`), every test made on
residues instead of written-out numbers:

* ``η``, the least unit ``> 1`` of norm +1 of the order of discriminant
  ``Δ`` (``ε = η^r``, ``r`` from the logarithms), in compact form; the least
  power ``η^p`` whose map on ``(x, y)`` is integral depends only on ``η``
  modulo ``2|det S|`` (:meth:`CompactRepresentation.coordinates_modulo`), and
  so does whether ``−η^{p/2}`` serves instead;
* each ``±α εʲ``, ``0 ≤ j < lcm(r, p)/r``, whose ``(x, y)`` is integral (a
  test modulo ``|det S|``) starts a family; its member nearest the balance
  ``|β| = |β'|`` (by logarithms) is the family's fundamental solution;
* two candidates ``β₁, β₂`` lie in one family when ``β₂ = ±β₁·stepᵏ`` for the
  ``k`` their logarithms give: both have norm ``K``, so if they have the same
  sign and ``e^{|δ|} − 1 < 1/√|K|`` (``δ`` the difference of the logarithms),
  then ``|N(β₂ − β₁·stepᵏ)| < 1`` and they are equal — exactly, since a
  non-zero element of ``Z[√Δ]`` has norm at least 1.

References: as :mod:`realquad.equations.conics` and
:mod:`realquad.equations.norm_compact`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from math import isqrt, lcm

import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.results import JSONObject
from realquad.equations.binary import Substitution, is_integral, least_integral_power
from realquad.equations.families import (
    MAX_LISTED,
    CompactOrbitFamily,
    Point,
    check_bound,
    sort_points,
)
from realquad.equations.norm_compact import norm_families_infrastructure
from realquad.errors import TooLargeError
from realquad.infrastructure.compact import Chain, CompactRepresentation
from realquad.latex import MAX_DIGITS, lines, surd
from realquad.textio import terms_text
from realquad.units import fundamental_unit

#: Decimal digits of the logarithms that place and compare the members.
LOG_DIGITS = 60

#: Most decimal digits of a fundamental solution written out.
EXPANDED_DIGITS = 20_000

Matrix = tuple[int, int, int, int]


@dataclass(frozen=True)
class CompactConicFamily(CompactOrbitFamily):
    """A family ``{β·stepᵏ}`` of solutions of a conic with linear terms, in compact form.

    ``β = P + Q√Δ`` (``generator``, over the discriminant ``4Δ``) solves
    ``P² − ΔQ² = K`` (``d = Δ``, ``n = K``) and ``(x, y) = S⁻¹((P, Q) − s₀)``
    (``matrix`` ``S``, ``shift`` ``s₀``); ``unit`` is the automorph's unit
    ``step`` (``η^p`` or ``−η^{p/2}``), ``mirrored`` says whether the images
    ``2C − (x, y)`` (``−β``) belong to the family too. ``fundamental`` is the
    member at the balance point, written out when small.
    """

    matrix: Matrix = (1, 0, 0, 1)
    shift: Point = (0, 0)
    mirrored: bool = False
    kind: str = field(default="compact_conic", init=False, repr=False)

    @property
    def reflection(self) -> bool:
        """``2C − (x, y)`` belongs to the family with ``(x, y)``."""
        return self.mirrored

    @property
    def _det(self) -> int:
        S = self.matrix
        return S[0] * S[3] - S[1] * S[2]

    def _back(self, P: int, Q: int) -> Point:
        S, (s0, s1), det = self.matrix, self.shift, self._det
        x, rx = divmod(S[3] * (P - s0) - S[1] * (Q - s1), det)
        y, ry = divmod(-S[2] * (P - s0) + S[0] * (Q - s1), det)
        if rx or ry:
            raise ArithmeticError("internal check failed: a member of the family is not integral")
        return x, y

    def _point(self, member: CompactRepresentation) -> Point:
        return self._back(*small_point(member, self.n))

    def _linear_form(self) -> tuple[mpmath.mpf, mpmath.mpf, mpmath.mpf]:
        # x = (S₃(P − s₀) − S₁(Q − s₁))/det with P = (β + β')/2, Q = (β − β')/(2√Δ)
        S, (s0, s1), det = self.matrix, self.shift, self._det
        root = mpmath.sqrt(self.d)
        c1 = (S[3] - S[1] / root) / (2 * det)
        c2 = (S[3] + S[1] / root) / (2 * det)
        return c1, c2, mpmath.mpf(S[1] * s1 - S[3] * s0) / det

    def residues(self, m: int) -> Point:
        """``(x mod m, y mod m)`` for the fundamental solution, from the compact form."""
        if self.fundamental is not None:
            return self.fundamental[0] % m, self.fundamental[1] % m
        det = abs(self._det)
        M = m * det
        U, V = self.generator.coordinates_modulo(2 * M)  # β = U/2 + V√Δ
        P, Q = U // 2 % M, V % M
        S, (s0, s1) = self.matrix, self.shift
        X = (S[3] * (P - s0) - S[1] * (Q - s1)) % M
        Y = (-S[2] * (P - s0) + S[0] * (Q - s1)) % M
        if X % det or Y % det:
            raise ArithmeticError("internal check failed: the solution is not integral")
        sign = 1 if self._det > 0 else -1
        return sign * (X // det) % m, sign * (Y // det) % m

    def bounded(self, B: int) -> list[Point]:
        """Every member with ``|x|, |y| ≤ B`` (and its mirror image when the family holds it),
        sorted; only members whose ``P, Q`` can lie in the matching box are written out."""
        B = check_bound(B)
        S, (s0, s1) = self.matrix, self.shift
        box = max((abs(S[0]) + abs(S[1])) * B + abs(s0), (abs(S[2]) + abs(S[3])) * B + abs(s1))
        with mpmath.workdps(LOG_DIGITS):
            limit = mpmath.log(2 * box * mpmath.sqrt(self.d) + isqrt(abs(self.n)) + 2)
        out: set[Point] = set()
        for step in (1, -1):
            k = 0 if step == 1 else -1
            while max(self._logs(k)) <= limit:
                P, Q = small_point(self.member(k), self.n)
                for pq in [(P, Q), (-P, -Q)] if self.mirrored else [(P, Q)]:
                    x, y = self._back(*pq)
                    if abs(x) <= B and abs(y) <= B:
                        out.add((x, y))
                if len(out) > MAX_LISTED:
                    raise TooLargeError(f"more than {MAX_LISTED:,} solutions in the box")
                k += step
        return sort_points(out)

    def to_latex(self, max_digits: int = MAX_DIGITS, with_unit: bool = True) -> str:
        r"""``P + Q√Δ = β·ηᵏ`` with ``(P, Q)`` from ``(x, y)``; ``β`` written out when the
        fundamental solution is, else compact; ``η`` compact."""
        S, (s0, s1) = self.matrix, self.shift
        P = terms_text([(S[0], "x"), (S[1], "y"), (s0, "")], minus="-")
        Q = terms_text([(S[2], "x"), (S[3], "y"), (s1, "")], minus="-")
        rows = [
            rf"P = {P},\quad Q = {Q}",
            rf"P + Q\sqrt{{{self.d}}} = "
            + (r"\pm" if self.mirrored else "")
            + r"\beta\,\eta^{k},\quad k \in \mathbb{Z}",
        ]
        if self.fundamental is not None:
            x, y = self.fundamental
            beta = surd(S[0] * x + S[1] * y + s0, S[2] * x + S[3] * y + s1, 1, self.d, max_digits)
            rows.append(rf"\beta = {beta}\quad (x, y) = ({x}, {y})")
        else:
            rows.append(rf"\beta = {self.generator.to_latex(max_digits)}")
        if with_unit:
            rows.append(rf"\eta = {self.unit.to_latex(max_digits)}")
        return lines(rows)

    def to_dict(self) -> JSONObject:
        """The JSON shape of a compact conic family (``docs/json.md``, *Family*)."""
        out = super().to_dict()
        out["mirrored"] = self.mirrored
        out["substitution"] = {"matrix": list(self.matrix), "shift": list(self.shift)}
        return out


def compact_conic_families(S: Matrix, s0: Point, D: int, K: int) -> list[CompactConicFamily]:
    """The families of the conic whose solutions are ``(P, Q) = S(x, y) + s₀`` with
    ``P² − DQ² = K`` (``D > 0`` not a square, ``K ≠ 0``), by the infrastructure."""
    classes, _, _ = norm_families_infrastructure(D, K)
    if not classes:
        return []
    sub = Substitution(S, s0)
    det = sub.det
    N = 2 * abs(det)
    eps = classes[0].unit  # least unit > 1 of norm +1 of Z[√D], over 4D
    eta_D = fundamental_unit(Order(D), method="bsgs").compact()  # over D: maybe ∉ Z[√D]
    if eta_D.norm == -1:
        eta_D = eta_D * eta_D
    eta = _over_4d(eta_D, D)
    with mpmath.workdps(LOG_DIGITS):
        log_eta, log_eps = eta.log(LOG_DIGITS)[0], eps.log(LOG_DIGITS)[0]
        r = int(mpmath.nint(log_eps / log_eta))
    g1, h1 = eta_D.coordinates_modulo(N)  # η = (g + h√D)/2
    p = least_integral_power(sub, g1, h1, D)
    step, log_step = eta.power(p), p * log_eta
    center = sub.center()
    mirrored = (2 * center[0]).denominator == 1 and (2 * center[1]).denominator == 1
    if not mirrored and p % 2 == 0:  # −η^{p/2} may generate the integral automorphs
        half = eta.power(p // 2)
        g, h = eta_D.power(p // 2).coordinates_modulo(N)
        M2, t2 = sub.induced(-g, -h, D)
        if is_integral(M2 + t2):
            step = -half
            log_step = log_step / 2
    span = lcm(r, p) // r
    kept: list[tuple[CompactRepresentation, mpmath.mpf]] = []
    with mpmath.workdps(LOG_DIGITS + 20):
        for family in classes:
            for sign in (1, -1):
                beta = family.generator if sign == 1 else -family.generator
                for j in range(span):
                    member = beta if j == 0 else beta * eps.power(j)
                    if _integral_back(member, sub):
                        rep, log_rep = _balanced(member, step, log_step, K, sub, mirrored)
                        if not any(
                            _same_orbit(rep, log_rep, other, log_other, step, log_step, K, mirrored)
                            for other, log_other in kept
                        ):
                            kept.append((rep, log_rep))
    out = []
    for rep, log_rep in kept:
        larger = max(log_rep, mpmath.log(abs(K)) - log_rep)  # log of the larger embedding
        digits = int(larger / mpmath.log(10)) + 1
        fundamental = sub.back(*small_point(rep, K)) if digits <= EXPANDED_DIGITS else None
        out.append(
            CompactConicFamily(
                d=D,
                n=K,
                generator=rep,
                unit=step,
                log_generator=log_rep,
                log_unit=log_step,
                fundamental=fundamental,
                matrix=S,
                shift=s0,
                mirrored=mirrored,
            )
        )
    return sorted(out, key=lambda f: (f.digits(), f.fundamental or (0, 0)))


def small_point(number: CompactRepresentation, K: int) -> Point:
    """``(P, Q)`` of ``β = P + Q√Δ`` (compact over ``4Δ``, norm ``K``) from its residues:
    ``|P| ≤ (|β| + |β'|)/2`` and ``|Q| ≤ |P|`` bound both by ``e^{max(L, L')}``, so
    ``β`` modulo any ``M`` above four times that gives them exactly — without the huge
    intermediate numbers of Horner's rule when the chains' product is small."""
    with mpmath.workdps(30):
        L = number.log(20)[0]
        big = max(L, mpmath.log(abs(K)) - L)
        bound = int(mpmath.exp(big) * (1 + mpmath.mpf(10) ** -15)) + 2
    M = 8 * bound + 8
    U, V = number.coordinates_modulo(M)  # β = U/2 + V√Δ
    U, V = (U - M if U > M // 2 else U), (V - M if V > M // 2 else V)
    if U % 2:
        raise ArithmeticError("internal check failed: a member is not in Z[√Δ]")
    return U // 2, V


def _over_4d(number: CompactRepresentation, D: int) -> CompactRepresentation:
    """``number`` (over the discriminant ``D``) over ``4D``: ``(x + y√D)/c = (2x + y√(4D))/(2c)``."""

    def convert(alpha: QuadraticNumber) -> QuadraticNumber:
        return QuadraticNumber(2 * int(alpha.x), int(alpha.y), 2 * int(alpha.c), 4 * D)

    chains = tuple(
        Chain(tuple((convert(alpha), e) for alpha, e in chain.factors), chain.power)
        for chain in number.chains
    )
    return CompactRepresentation(4 * D, chains, number.sign, number.absolute_norm)


def _integral_back(member: CompactRepresentation, sub: Substitution) -> bool:
    """Whether the member's ``(x, y)`` is integral (a test modulo ``|det S|``)."""
    S, (s0, s1), det = sub.S, sub.s0, sub.det
    M = abs(det)
    U, V = member.coordinates_modulo(2 * M)
    P, Q = U // 2 % M, V % M
    return (S[3] * (P - s0) - S[1] * (Q - s1)) % M == 0 and (
        -S[2] * (P - s0) + S[0] * (Q - s1)
    ) % M == 0


def _balanced(
    member: CompactRepresentation,
    step: CompactRepresentation,
    log_step: mpmath.mpf,
    K: int,
    sub: Substitution,
    mirrored: bool,
) -> tuple[CompactRepresentation, mpmath.mpf]:
    """The member of ``{member·stepᵏ}`` (and of its mirror image) nearest the balance
    ``|β| = |β'|``, and its log: when small, the one with the least ``|Q|``, then ``|P|``,
    then ``y ≥ 0``, ``x ≥ 0`` and the least ``|x|`` (as the continued fraction's path)."""
    L = member.log(LOG_DIGITS)[0]
    half = mpmath.log(abs(K)) / 2
    k0 = int(mpmath.nint((half - L) / log_step))
    near = [(k, L + k * log_step) for k in (k0 - 1, k0, k0 + 1)]
    if max(abs(log) for _, log in near) < EXPANDED_DIGITS:  # small: the exact order
        candidates = []
        for k, log in near:
            rep = member if k == 0 else member * step.power(k)
            for candidate in (rep, -rep) if mirrored else (rep,):
                P, Q = small_point(candidate, K)
                xy = sub.back(P, Q)
                assert xy is not None
                key = (abs(Q), abs(P), xy[1] < 0, xy[0] < 0, abs(xy[0]))
                candidates.append((key, candidate, log))
        _, rep, log = min(candidates, key=lambda c: c[0])
        return rep, log
    k, log = min(near, key=lambda c: (abs(c[1] - half), -c[1]))
    return (member if k == 0 else member * step.power(k)), log


def _same_orbit(
    a: CompactRepresentation,
    log_a: mpmath.mpf,
    b: CompactRepresentation,
    log_b: mpmath.mpf,
    step: CompactRepresentation,
    log_step: mpmath.mpf,
    K: int,
    mirrored: bool,
) -> bool:
    """Whether ``a = ±b·stepᵏ`` (``−`` only for a mirrored family), exactly (module notes)."""
    k = int(mpmath.nint((log_a - log_b) / log_step))
    delta = abs(log_a - log_b - k * log_step)
    if mpmath.exp(delta) - 1 >= 1 / mpmath.sqrt(abs(K)) / 2:
        return False
    sign = b.value_sign * (step.value_sign if k % 2 else 1)
    return a.value_sign == sign or mirrored
