"""Continued fractions of rationals and quadratic irrationals ``(P + √D)/Q``.

Every real quadratic irrational can be written ``θ = (P + √D)/Q`` with
integers ``P, Q ≠ 0``, ``D > 0`` not a square and ``Q | D − P²``; its partial
quotients follow from the exact recurrence

    a = ⌊θ⌋,   P' = aQ − P,   Q' = (D − P'²)/Q.

By Lagrange the expansion is eventually periodic and by Galois the purely
periodic part starts at the first *reduced* complete quotient
(``θ > 1`` and ``−1 < θ' < 0``).

>>> cf = continued_fraction("sqrt(61)")
>>> cf.preperiod, cf.period
([7], [1, 4, 3, 1, 2, 2, 1, 3, 4, 1, 14])
>>> str(continued_fraction("(1+sqrt(13))/2"))
'[2; (3)]'
>>> continued_fraction("355/113").preperiod
[3, 7, 16]
>>> str(from_periodic([1], [2]))
'√2'
>>> list(convergents("sqrt(2)", 4))
[(1, 1), (3, 2), (7, 5), (17, 12)]

References: O. Perron, *Die Lehre von den Kettenbrüchen*, Teubner 1913/1954;
H. Cohen, *A Course in Computational Algebraic Number Theory*, §5.7.
"""

from __future__ import annotations

import itertools
from collections.abc import Iterator
from dataclasses import dataclass
from fractions import Fraction

from realquad.cfrac.parser import parse_real_quadratic
from realquad.core.integers import is_square, isqrt
from realquad.core.lfunction import estimated_period
from realquad.core.numbers import QuadraticNumber
from realquad.core.primes import square_factor
from realquad.core.results import JSONObject, Proof
from realquad.errors import DomainError, InputError, TooLargeError
from realquad.latex import (
    MAX_DIGITS,
    MAX_TERMS,
    Display,
    brief_repr,
    continued_fraction_rows,
    fraction,
    integer,
    lines,
    sqrt,
    terms,
)

#: Default bound on the number of states a period search may visit.
DEFAULT_MAX_TERMS = 20_000_000

#: Terms walked before a period estimated far beyond the limit is refused (short periods, as for
#: ``√(n² + 1)``, are found first whatever the estimate says).
_FIRST_TERMS = 100_000


@dataclass(frozen=True)
class QuadraticIrrational:
    """``(P + √D)/Q`` with ``Q | D − P²`` (the normal form used by the recurrence)."""

    P: int
    D: int
    Q: int

    def __post_init__(self) -> None:
        if self.Q == 0:
            raise InputError("denominator must not be zero")
        if self.D <= 0 or is_square(self.D):
            raise DomainError(f"√{self.D} is not irrational")
        if (self.D - self.P * self.P) % self.Q:
            raise InputError("normal form needs Q | D − P²")

    @classmethod
    def normalize(cls, p: int, k: int, n: int, q: int) -> QuadraticIrrational:
        """The normal form of ``(p + k√n)/q``."""
        if k == 0 or q == 0 or n <= 0 or is_square(n):
            raise DomainError("not a quadratic irrational")
        if k < 0:
            p, q, k = -p, -q, -k
        D = k * k * n
        if (D - p * p) % q:
            aq = abs(q)
            p, D, q = p * aq, D * q * q, q * aq
        return cls(p, D, q)

    def floor(self) -> int:
        return floor_of(self.P, self.Q, isqrt(self.D))

    def is_reduced(self) -> bool:
        """``θ > 1`` and ``−1 < θ' < 0`` (exactly; reduced implies ``Q > 0``)."""
        return is_reduced(self.P, self.Q, isqrt(self.D))

    def same_number(self, other: QuadraticIrrational) -> bool:
        """Whether both normal forms denote the same real number.

        >>> QuadraticIrrational(0, 8, 2).same_number(QuadraticIrrational(0, 2, 1))
        True
        """
        return (
            Fraction(self.P, self.Q) == Fraction(other.P, other.Q)
            and Fraction(self.D, self.Q * self.Q) == Fraction(other.D, other.Q * other.Q)
            and (self.Q > 0) == (other.Q > 0)
        )

    def as_number(self) -> QuadraticNumber:
        return QuadraticNumber(self.P, 1, self.Q, self.D)

    def __str__(self) -> str:
        return _format(self.P, self.D, self.Q)


def floor_of(P: int, Q: int, r: int) -> int:
    """``⌊(P + √D)/Q⌋`` for ``r = ⌊√D⌋``, ``D`` not a square.

    >>> floor_of(0, 1, 7), floor_of(3, -5, 3)     # ⌊√61⌋, ⌊(3 + √13)/(−5)⌋
    (7, -2)
    """
    return (P + r) // Q if Q > 0 else (-P - r - 1) // (-Q)


def is_reduced(P: int, Q: int, r: int) -> bool:
    """Whether ``θ = (P + √D)/Q`` is reduced (``θ > 1``, ``−1 < θ' < 0``), for ``r = ⌊√D⌋``.

    >>> is_reduced(7, 1, 7), is_reduced(0, 1, 7)   # 7 + √61 is, √61 is not
    (True, False)
    """
    return Q > 0 and P <= r and r >= Q - P and r < P + Q


def complete_quotients(P: int, D: int, Q: int) -> Iterator[tuple[int, int, int]]:
    """``(a_k, P_k, Q_k)`` for the complete quotients ``(P_k + √D)/Q_k`` of ``(P + √D)/Q``, forever.

    ``Q | D − P²`` is kept by the recurrence ``a = ⌊θ⌋``, ``P' = aQ − P``,
    ``Q' = (D − P'²)/Q``; every walk along a continued fraction in the package
    (expansions, the principal cycle of the norm equations) is this one.

    >>> from itertools import islice
    >>> list(islice(complete_quotients(0, 13, 1), 4))
    [(3, 0, 1), (1, 3, 4), (1, 1, 3), (1, 2, 3)]
    """
    r = isqrt(D)
    while True:
        a = floor_of(P, Q, r)
        yield a, P, Q
        P = a * Q - P
        Q = (D - P * P) // Q


def to_reduced(P: int, D: int, Q: int, max_terms: int) -> tuple[list[int], int, int]:
    """The partial quotients before the first reduced complete quotient, and that one's ``(P, Q)``.

    A bounded number of steps, about the logarithm of the height (Galois).

    >>> to_reduced(0, 61, 1, 100)
    ([7], 7, 12)
    """
    r = isqrt(D)
    quotients: list[int] = []
    for a, P1, Q1 in complete_quotients(P, D, Q):
        if is_reduced(P1, Q1, r):
            return quotients, P1, Q1
        if len(quotients) >= max_terms:
            break
        quotients.append(a)
    raise TooLargeError("pre-period longer than the term limit")


def _format(P: int, D: int, Q: int) -> str:
    """``(P + √D)/Q`` in lowest terms, with the square part of ``D`` taken out of the root."""
    k, s = square_factor(D)
    return str(QuadraticNumber(P, k, Q, s))


@dataclass(frozen=True)
class ContinuedFraction(Display):
    """The expansion ``[a₀; a₁, …]``: ``preperiod`` then ``period`` repeated forever.

    For a rational number ``period`` is empty and ``preperiod`` holds all
    partial quotients (the last one ≥ 2, except for the integer 1... as usual
    the shorter of the two expansions).
    """

    value: QuadraticIrrational | Fraction
    preperiod: list[int]
    period: list[int]

    @property
    def is_rational(self) -> bool:
        return isinstance(self.value, Fraction)

    @property
    def method(self) -> str:
        if self.is_rational:
            return "Euclidean algorithm"
        return "exact recurrence P' = aQ − P, Q' = (D − P'²)/Q"

    proof: Proof = "unconditional"

    def to_dict(self, max_terms: int = 0) -> JSONObject:
        """The JSON shape of an expansion (``docs/json.md``, *ContinuedFraction*).

        ``max_terms`` (0: all) keeps at most that many partial quotients in
        ``preperiod`` and ``period`` together; the lengths are always the full ones.

        >>> continued_fraction("(1+sqrt(13))/2").to_dict()["normal_form"]
        {'P': 1, 'D': 13, 'Q': 2}
        """
        pre, per = self.preperiod, self.period
        if max_terms and len(pre) + len(per) > max_terms:
            pre, per = pre[:max_terms], per[: max(0, max_terms - len(pre))]
        value = self.value
        return {
            "value": str(value),
            "normal_form": None
            if isinstance(value, Fraction)
            else {"P": value.P, "D": value.D, "Q": value.Q},
            "preperiod": list(pre),
            "period": list(per),
            "preperiod_length": len(self.preperiod),
            "period_length": len(self.period),
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS, max_terms: int = MAX_TERMS) -> str:
        r"""``value = [a_0; a_1, …, \overline{…}]``, at most ``max_terms`` partial quotients (0: all).

        >>> print(continued_fraction("(1+sqrt(13))/2").to_latex())
        \frac{1 + \sqrt{13}}{2} = [2; \overline{3}]
        >>> print(continued_fraction("-7/3").to_latex())
        -\frac{7}{3} = [-3; 1, 2]
        """
        value = self.value
        if isinstance(value, Fraction):
            sign = "-" if value < 0 else ""
            shown = sign + fraction(integer(abs(value.numerator), max_digits), value.denominator)
        else:
            s = 1 if value.Q > 0 else -1
            pairs = [(s * value.P, ""), (s, sqrt(value.D, max_digits))]
            shown = fraction(terms(pairs, max_digits), abs(value.Q), max_digits)
        rows = continued_fraction_rows(self.preperiod, self.period, max_terms, max_digits)
        return lines([f"{shown} = {rows[0]}", *rows[1:]])

    def __repr__(self) -> str:
        return brief_repr(
            "ContinuedFraction", value=str(self.value), preperiod=self.preperiod, period=self.period
        )

    def terms(self) -> Iterator[int]:
        """All partial quotients, the period repeated without end."""
        yield from self.preperiod
        if self.period:
            yield from itertools.cycle(self.period)

    def __str__(self) -> str:
        head = ", ".join(map(str, self.preperiod[1:]))
        a0 = self.preperiod[0] if self.preperiod else self.period[0]
        if not self.period:
            return f"[{a0}; {head}]" if head else f"[{a0}]"
        per = ", ".join(map(str, self.period))
        if not self.preperiod:
            return f"[({per})]"
        return f"[{a0}; {head + ', ' if head else ''}({per})]"


def exact_real(x: object) -> QuadraticIrrational | Fraction:
    """``x`` as an exact real number: a ``Fraction`` or a :class:`QuadraticIrrational`.

    Accepts what :func:`continued_fraction` accepts.

    >>> exact_real("(2+sqrt(8))/4"), exact_real("6/4")
    (QuadraticIrrational(P=2, D=8, Q=4), Fraction(3, 2))
    """
    if isinstance(x, (QuadraticIrrational, Fraction)):
        return x
    if isinstance(x, int):
        return Fraction(x)
    if isinstance(x, str):
        parsed = parse_real_quadratic(x)
        if isinstance(parsed, Fraction):
            return parsed
        return QuadraticIrrational.normalize(*parsed)
    if isinstance(x, QuadraticNumber):
        if x.y == 0:
            return Fraction(int(x.x), int(x.c))
        return QuadraticIrrational.normalize(int(x.x), int(x.y), x.d, int(x.c))
    raise InputError(f"cannot expand {type(x).__name__} as a continued fraction")


def _rational_expansion(q: Fraction) -> list[int]:
    n, d = q.numerator, q.denominator
    out = []
    while d:
        a = n // d
        out.append(a)
        n, d = d, n - a * d
    return out


def continued_fraction(x: object, max_terms: int = DEFAULT_MAX_TERMS) -> ContinuedFraction:
    """The continued fraction of a rational or quadratic irrational.

    ``x`` may be a :class:`QuadraticIrrational`, a ``Fraction``/``int``, a
    :class:`QuadraticNumber` or a string such as ``"sqrt(61)"``,
    ``"(1+sqrt(13))/2"``, ``"355/113"``; a bare integer string ``"61"`` means
    ``√61``. Raises :class:`TooLargeError` when the period is longer than
    ``max_terms``.
    """
    value = exact_real(x)
    if isinstance(value, Fraction):
        return ContinuedFraction(value, _rational_expansion(value), [])
    D = value.D
    # 1. advance until reduced, 2. walk the purely periodic part until that state returns
    pre, P0, Q0 = to_reduced(value.P, D, value.Q, max_terms)
    period: list[int] = []
    append = period.append
    for a, P, Q in complete_quotients(P0, D, Q0):
        if period and P == P0 and Q == Q0:
            return ContinuedFraction(value, pre, period)
        if len(period) >= max_terms:
            break
        if len(period) == _FIRST_TERMS and estimated_period(D, 2_000) > 100 * max_terms:
            break  # a period estimated hopelessly long: refuse now rather than after max_terms
        append(a)
    raise TooLargeError(
        f"the period is longer than {max_terms:,} terms; raise the limit or use the unit "
        "and regulator commands, which need only half of the period"
    )


def partial_quotients(x: object) -> Iterator[int]:
    """The partial quotients ``a₀, a₁, …`` of ``x``, lazily (without looking for the period).

    Finite for a rational, endless for a quadratic irrational.

    >>> from itertools import islice
    >>> list(partial_quotients("355/113")), list(islice(partial_quotients("sqrt(13)"), 7))
    ([3, 7, 16], [3, 1, 1, 1, 1, 6, 1])
    """
    value = exact_real(x)
    if isinstance(value, Fraction):
        yield from _rational_expansion(value)
        return
    for a, _, _ in complete_quotients(value.P, value.D, value.Q):
        yield a


def convergents(
    x: object, count: int | None = None, bound: int | None = None
) -> Iterator[tuple[int, int]]:
    """Convergents ``(p_k, q_k)`` of ``x``: at most ``count`` of them, or while ``q_k ≤ bound``.

    ``p_k/q_k = [a₀; a₁, …, a_k]``, from ``p_k = a_k p_{k−1} + p_{k−2}`` and the
    same for ``q_k`` (Perron §1). A rational has finitely many, the last one itself.

    >>> list(convergents("sqrt(61)", bound=100))
    [(7, 1), (8, 1), (39, 5), (125, 16), (164, 21), (453, 58)]
    """
    p0, p1, q0, q1 = 1, 0, 0, 1
    for i, a in enumerate(partial_quotients(x)):
        if count is not None and i >= count:
            return
        p0, p1 = a * p0 + p1, p0
        q0, q1 = a * q0 + q1, q0
        if bound is not None and q0 > bound:
            return
        yield p0, q0


def from_periodic(preperiod: list[int], period: list[int]) -> QuadraticIrrational | Fraction:
    """The number whose continued fraction is ``preperiod`` then ``period`` repeated.

    >>> str(from_periodic([7], [1, 4, 3, 1, 2, 2, 1, 3, 4, 1, 14]))
    '√61'
    """
    if not preperiod and not period:
        raise InputError("empty continued fraction")
    for i, a in enumerate(itertools.chain(preperiod, period)):
        if i > 0 and a <= 0:
            raise InputError("partial quotients after the first must be positive")
    if not period:
        value = Fraction(preperiod[-1])
        for a in reversed(preperiod[:-1]):
            value = a + 1 / value
        return value
    # purely periodic φ = [b0; …, b_{n−1}, φ] satisfies q φ² + (q' − p) φ − p' = 0
    p, pp, q, qq = 1, 0, 0, 1
    for b in period:
        p, pp = b * p + pp, p
        q, qq = b * q + qq, q
    disc = (qq - p) ** 2 + 4 * q * pp
    phi = QuadraticNumber(p - qq, 1, 2 * q, disc)
    # θ = [a0; …, a_{k−1}, φ] = (A φ + B)/(C φ + E)
    A, B, C, E = 1, 0, 0, 1
    for a in preperiod:
        A, B = a * A + B, A
        C, E = a * C + E, C
    theta = (phi * A + B) / (phi * C + E)
    return QuadraticIrrational.normalize(int(theta.x), int(theta.y), theta.d, int(theta.c))
