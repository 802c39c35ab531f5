"""Compact representations of units (Buchmann–Thiel–Williams).

A unit found in the infrastructure comes as one or more *chains*
``γ₀^{2^k} α₁^{2^{k−1}} ⋯ α_k`` of numbers of small height (see
:mod:`realquad.infrastructure.distances`), each raised to an integer power,
times a sign. The size is ``O(log R)`` numbers of ``O(log D)`` bits, while the
expanded unit has about ``R/log 10`` digits. Everything below works on the
chains without expanding them: sign and norm exactly, the logarithm to any
precision, the unit modulo an integer, products and powers; exact expansion
(Horner's rule on each chain, so intermediate sizes double per level) only on
request.

>>> from realquad.infrastructure.regulator_search import search_regulator
>>> D = 4 * 61
>>> eps = CompactRepresentation.from_factors(D, search_regulator(D, 20).factors)
>>> eps.norm, eps.expand()
(-1, (59436, 3805))
>>> (eps * eps).expand() == eps.power(2).expand()
True
>>> half = pow(2, -1, 101)
>>> eps.modulo(101) == (59436 * half % 101, 3805 * half % 101)
True

Reference: J. Buchmann, C. Thiel and H. C. Williams, "Short representation of
quadratic integers", in *Computational Algebra and Number Theory* (Sydney
1992), Kluwer 1995, 159–185; Jacobson–Williams 2009, ch. 12.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

import gmpy2
import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.core.results import JSONObject
from realquad.errors import DomainError, TooLargeError
from realquad.infrastructure.distances import Factors, log_of_product
from realquad.infrastructure.residues import coordinates_modulo
from realquad.latex import MAX_DIGITS, factor, power, product


@dataclass(frozen=True)
class Chain:
    """``∏ α^e`` for ``(α, e)`` in ``factors`` (exponents ``2^k, …, 2, 1``), raised to ``power``."""

    factors: tuple[tuple[QuadraticNumber, int], ...]
    power: int = 1


@dataclass(frozen=True)
class CompactRepresentation:
    """``sign · ∏ chains`` — a unit of the order of discriminant ``discriminant``."""

    discriminant: int
    chains: tuple[Chain, ...]
    sign: int = 1
    absolute_norm: int = 1  # |N|: 1 for units, the ideal's norm for a generator

    @classmethod
    def from_factors(
        cls, D: int, factors: Factors, extra: QuadraticNumber | None = None, absolute_norm: int = 1
    ) -> CompactRepresentation:
        """The positive number ``|∏ α^e · extra|`` for factors from the doubling walk.

        Its absolute norm is checked to be ``absolute_norm`` exactly.
        """
        chains: tuple[Chain, ...] = (Chain(tuple(factors)),)
        if extra is not None:
            chains += (Chain(((extra, 1),)),)
        raw = cls(D, chains, 1, absolute_norm)
        out = cls(D, chains, raw._raw_sign(), absolute_norm)
        out._check_norm()
        return out

    @classmethod
    def from_power_product(
        cls, D: int, terms: list[tuple[QuadraticNumber, int]]
    ) -> CompactRepresentation:
        """The positive number ``|∏ α^e|``, one chain per term (exponents of any size and sign).

        A negative exponent is stored as the inverse raised to ``−e``, so every
        power is positive (as the compact files promise). The caller vouches for the norm (a unit from a vanishing combination of
        relations has ``|N| = 1`` by construction); checking it here would
        factor every norm against every other.

        >>> from realquad.core.numbers import QuadraticNumber
        >>> phi = QuadraticNumber(1, 1, 2, 5)
        >>> eps = CompactRepresentation.from_power_product(5, [(phi**3, 2), (phi, -5)])
        >>> eps.expand(), eps.norm, eps.size
        ((1, 1), -1, 2)
        """
        chains = tuple(
            Chain(((alpha, 1),), e) if e > 0 else Chain(((alpha.inverse(), 1),), -e)
            for alpha, e in terms
            if e
        )
        raw = cls(D, chains, 1, 1)
        return cls(D, chains, raw._raw_sign(), 1)

    def to_dict(self) -> JSONObject:
        """The JSON shape of a compact representation (``docs/json.md``, *CompactRepresentation*).

        The number is ``sign · ∏_chains (∏_factors number^exponent)^power``; each
        factor's ``number`` is ``(x + y√D)/denominator`` with ``D`` the discriminant.
        """
        return {
            "discriminant": self.discriminant,
            "sign": self.sign,
            "norm": self.norm,
            "chains": [
                {
                    "power": chain.power,
                    "factors": [
                        {"number": alpha.to_dict(), "exponent": e} for alpha, e in chain.factors
                    ],
                }
                for chain in self.chains
            ],
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""The number as ``±∏ ((x + y√D)/z)^e`` in LaTeX, each chain's power outside its product.

        >>> from realquad.infrastructure.regulator_search import search_regulator
        >>> eps = CompactRepresentation.from_factors(244, search_regulator(244, 20).factors)
        >>> eps.to_latex().count(r"\sqrt{244}") == eps.size
        True
        """
        flat: list[str] = []
        for chain in self.chains:
            factors = [factor(a.to_latex(max_digits), e, max_digits) for a, e in chain.factors]
            if chain.power == 1:
                flat += factors
            else:
                flat.append(power(product(factors), chain.power, max_digits))
        return ("-" if self.sign < 0 else "") + product(flat)

    def to_text(self, d: int, scale: int, title: str) -> str:
        """``scale`` times this number as ``x + y√d`` in the plain-text compact format.

        The format (``docs/pell.md``, *Compact files*) reads
        ``x + y√d = scale · sign · ∏_chains (∏_factors ((a + b√d)/c)^e)^power``:
        lines ``d``, ``n`` (the norm of ``x + y√d``), ``scale``, ``sign``, then
        per chain a ``chain POWER`` line and its ``factor A B C E`` lines;
        ``#`` starts a comment. ``d`` is the discriminant over a square.

        >>> from realquad.infrastructure.regulator_search import search_regulator
        >>> eps = CompactRepresentation.from_factors(244, search_regulator(244, 20).factors)
        >>> print(eps.to_text(61, 1, "x^2 - 61y^2 = -1").splitlines()[2:6])
        ['d 61', 'n -1', 'scale 1', 'sign 1']
        """
        k = math.isqrt(self.discriminant // d)
        if d * k * k != self.discriminant:
            raise DomainError(f"{self.discriminant} is not {d} times a square")
        lines = [
            f"# {title}, written by realquad in compact form",
            "# x + y*sqrt(d) = scale * sign * prod over chains of "
            "(prod over the chain's factors of ((a + b*sqrt(d))/c)^e)^power",
            f"d {d}",
            f"n {self.norm * scale * scale}",
            f"scale {scale}",
            f"sign {self.sign}",
        ]
        for chain in self.chains:
            lines.append(f"chain {chain.power}")
            lines += [f"factor {int(a.x)} {int(a.y) * k} {int(a.c)} {e}" for a, e in chain.factors]
        return "\n".join(lines) + "\n"

    # -- exact invariants ------------------------------------------------------
    def _raw_sign(self) -> int:
        sign = 1
        for chain in self.chains:
            for alpha, e in chain.factors:
                if (e * chain.power) % 2 and alpha.sign() < 0:
                    sign = -sign
        return sign

    def _norm_terms(self) -> list[tuple[Fraction, int]]:
        return [
            (alpha.norm(), e * chain.power) for chain in self.chains for alpha, e in chain.factors
        ]

    def _check_norm(self) -> None:
        terms = self._norm_terms() + [(Fraction(1, self.absolute_norm), 1)]
        if not abs_product_is_one(terms):
            raise ArithmeticError("internal error: compact representation has the wrong norm")

    @property
    def norm(self) -> int:
        """The norm (``±1`` for a unit), its sign decided exactly from the factors' norms."""
        sign = 1
        for n, e in self._norm_terms():
            if e % 2 and n < 0:
                sign = -sign
        return sign * self.absolute_norm

    def conjugate(self) -> CompactRepresentation:
        """The conjugate number, factor by factor (conjugation is a ring automorphism: the sign stays).

        >>> from realquad.core.numbers import QuadraticNumber
        >>> CompactRepresentation.from_factors(52, [], QuadraticNumber(3, 1, 1, 52), 43).conjugate().expand()
        (6, -2)
        """
        chains = tuple(
            Chain(tuple((alpha.conjugate(), e) for alpha, e in chain.factors), chain.power)
            for chain in self.chains
        )
        return CompactRepresentation(self.discriminant, chains, self.sign, self.absolute_norm)

    @property
    def value_sign(self) -> int:
        """The sign of the represented number: ``sign`` times the signs of the factors."""
        return self.sign * self._raw_sign()

    @property
    def size(self) -> int:
        """Number of stored factors."""
        return sum(len(c.factors) for c in self.chains)

    def log(self, digits: int = 30) -> tuple[mpmath.mpf, mpmath.mpf]:
        """``(log |ε|, error bound)`` to ``digits`` significant digits."""
        terms = [(alpha, e * chain.power) for chain in self.chains for alpha, e in chain.factors]
        pos = [(a, e) for a, e in terms if e > 0]
        neg = [(a, -e) for a, e in terms if e < 0]
        v1, b1 = log_of_product(pos, digits)
        if not neg:
            return v1, b1
        v2, b2 = log_of_product(neg, digits)
        return v1 - v2, b1 + b2

    def digits_estimate(self) -> int:
        """About how many decimal digits ``ε`` has (from its logarithm)."""
        return int(float(self.log(15)[0]) / math.log(10)) + 1

    # -- arithmetic --------------------------------------------------------------
    def __mul__(self, other: CompactRepresentation) -> CompactRepresentation:
        if other.discriminant != self.discriminant:
            raise DomainError("units of different orders cannot be multiplied")
        return CompactRepresentation(
            self.discriminant,
            self.chains + other.chains,
            self.sign * other.sign,
            self.absolute_norm * other.absolute_norm,
        )

    def __neg__(self) -> CompactRepresentation:
        """``−β``: the same chains, the sign flipped."""
        return CompactRepresentation(self.discriminant, self.chains, -self.sign, self.absolute_norm)

    def power(self, k: int) -> CompactRepresentation:
        """``ε^k`` (``k`` any integer), still compact."""
        if k < 0 and self.absolute_norm != 1:
            raise DomainError("only units have inverses in the order")
        chains = tuple(Chain(c.factors, c.power * k) for c in self.chains)
        return CompactRepresentation(
            self.discriminant, chains, self.sign ** (k % 2), self.absolute_norm ** abs(k)
        )

    def coordinates_modulo(self, m: int) -> tuple[int, int]:
        """``(u mod m, v mod m)`` with ``β = (u + v√D)/2``, for any modulus ``m ≥ 1``.

        The part of ``m`` prime to 2 and to the denominators directly, the
        rest ``p``-adically (:mod:`realquad.infrastructure.residues`).
        """
        return coordinates_modulo(
            self.discriminant,
            [([alpha for alpha, _ in chain.factors], chain.power) for chain in self.chains],
            self.sign,
            m,
        )

    def modulo(self, m: int) -> tuple[int, int]:
        """``(x mod m, y mod m)`` with ``β = x + y√D``, for any modulus ``m ≥ 2``.

        An even ``m`` needs ``x`` and ``y`` integers (``u`` and ``v`` of
        :meth:`coordinates_modulo` even); a number with half-integer ``x, y``
        modulo an even ``m`` raises :class:`DomainError`.
        """
        if m < 2:
            raise DomainError("modulus must be at least 2")
        if m % 2:
            u, v = self.coordinates_modulo(m)
            half = (m + 1) // 2
            return u * half % m, v * half % m
        u, v = self.coordinates_modulo(2 * m)
        if u % 2 or v % 2:
            raise DomainError(
                f"the number is (u + v√{self.discriminant})/2 with u, v odd: x + y√D has "
                f"half-integer x, y, which an even modulus ({m}) cannot reduce"
            )
        return u // 2 % m, v // 2 % m

    def expand(self, max_digits: int = 0) -> tuple[int, int]:
        """Exact ``(u, v)`` with ``ε = (u + v√D)/2``.

        Refused with :class:`TooLargeError` when ``ε`` would have more than
        ``max_digits`` digits (0: no limit).
        """
        if max_digits:
            n = self.digits_estimate()
            if n > max_digits:
                raise TooLargeError(
                    f"the unit has about {n} digits, more than --max-digits {max_digits}; it stays in compact form"
                )
        D = self.discriminant
        total = QuadraticNumber(self.sign, 0, 1, D)
        for chain in self.chains:
            gamma = QuadraticNumber(1, 0, 1, D)
            for alpha, _ in chain.factors:  # exponents 2^k, …, 1: Horner's rule
                gamma = gamma * gamma * alpha
            total = total * gamma**chain.power
        # (x + y√D)/c = (u + v√D)/2 with u = 2x/c, v = 2y/c integers for a unit of the order
        u, v = gmpy2.mpz(2) * total.x, gmpy2.mpz(2) * total.y
        if u % total.c or v % total.c:
            raise ArithmeticError("internal error: expanded unit is not in the order")
        return int(u // total.c), int(v // total.c)


def coprime_base(numbers: list[int]) -> list[int]:
    """A set of pairwise coprime integers ``> 1`` that multiplicatively generates every number.

    >>> sorted(coprime_base([12, 18]))
    [2, 3]
    """
    base: list[int] = []
    for n in numbers:
        n = abs(n)
        pending = [n] if n > 1 else []
        while pending:
            x = pending.pop()
            for i, b in enumerate(base):
                g = math.gcd(x, b)
                if g > 1:
                    base.pop(i)
                    pending.extend(v for v in (g, b // g, x // g) if v > 1)
                    break
            else:
                base.append(x)
    return base


def abs_product_is_one(terms: list[tuple[Fraction, int]]) -> bool:
    """Whether ``∏ |r|^e = 1`` exactly (exponents may be huge), by a coprime base.

    >>> abs_product_is_one([(Fraction(4, 9), 1), (Fraction(3, 2), 2)])
    True
    """
    base = coprime_base([t.numerator for t, _ in terms] + [t.denominator for t, _ in terms])
    for p in base:
        total = 0
        for t, e in terms:
            total += e * (
                int(gmpy2.remove(abs(t.numerator), p)[1]) - int(gmpy2.remove(t.denominator, p)[1])
            )
        if total:
            return False
    return True
