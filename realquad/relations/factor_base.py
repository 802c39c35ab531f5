"""The factor base: one prime ideal above each split or ramified prime up to a bound.

(For an order of conductor ``f > 1``: above each such prime not dividing ``f``.)

Prime ``p`` with ``(D/p) ≠ −1`` contributes the class of the prime form
``P_p = (p, b_p, c_p)`` (``0 ≤ b_p ≤ p``, :func:`realquad.core.forms.prime_form`);
the other prime ideal above a split ``p`` is its inverse ``(p, −b_p, c_p)``,
written with exponent ``−1``. Relations are exponent vectors on these classes.

The bound: the prime ideals of norm up to ``4 log² |D|`` generate the class
group under GRH (:func:`realquad.core.lfunction.generating_bound`); the
factor base reaches at least that far, so that once the relations have full
rank their quotient is the whole class group. Beyond that bound it may reach
further (more smooth values for the sieve); those primes are columns only
where relations meet them, as large primes are.

>>> fb = factor_base(-4 * 5, 12)
>>> fb.primes, fb.b, fb.ramified
([2, 3, 5, 7], [2, 2, 0, 6], [True, False, True, False])
>>> fb.index[7], fb.is_complete, factor_base(-20, 40).is_complete   # 4 log² 20 = 35.9
(3, False, True)
>>> factor_base(-20, 100).generating_count       # 2, 3, 5, 7, 23, 29 of the primes ≤ 35
6
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass, field

from realquad._backend import call_kernel
from realquad.core.lfunction import generating_bound
from realquad.core.primes import primes_below


@dataclass(frozen=True)
class FactorBase:
    """Split and ramified primes ``p ≤ bound`` with ``b_p`` of ``P_p = (p, b_p, ·)`` (module notes)."""

    discriminant: int
    bound: int
    primes: list[int]
    b: list[int]
    ramified: list[bool]
    index: dict[int, int] = field(repr=False)
    #: ``⌊4 log² |D|⌋``: the factor base is complete (generates Cl under GRH) when ``bound`` reaches it.
    generating: int = 0
    #: The conductor ``f`` of the order (``D = f²·D₀``); primes dividing it are left out.
    conductor: int = 1

    @property
    def size(self) -> int:
        return len(self.primes)

    @property
    def generating_count(self) -> int:
        """How many primes of the factor base are at most ``generating`` (each must be a column)."""
        return bisect.bisect_right(self.primes, self.generating)

    @property
    def is_complete(self) -> bool:
        """Whether every prime ideal below the generating bound is in (so the classes generate Cl)."""
        return self.bound >= self.generating

    def logs(self, scale: float) -> list[int]:
        """``round(scale·log₂ p)`` for every prime (the sieve's logarithms)."""
        return [max(1, round(scale * math.log2(p))) for p in self.primes]


def prime_b(D: int, p: int) -> int:
    """``b_p`` of the prime form ``(p, b_p, ·)`` of discriminant ``D`` (``−1`` when ``p`` is inert).

    >>> prime_b(-20, 7), prime_b(-20, 11)
    (6, -1)
    """
    return int(call_kernel("prime_form_b", D, p))


def factor_base(D: int, bound: int, conductor: int = 1) -> FactorBase:
    """The factor base of the order of discriminant ``D`` up to ``bound`` (module notes).

    For an order of conductor ``f > 1`` the primes dividing ``f`` are left
    out: the prime ideals above them are not invertible, and the invertible
    ideals prime to ``f`` already meet every class (D. A. Cox, *Primes of
    the form x² + ny²*, §7.C: every class holds an ideal of norm prime to
    any given integer).

    >>> factor_base(-20 * 9, 12, 3).primes      # D = −180 = 3²·(−20): 3 is left out
    [2, 5, 7]
    """
    all_primes = primes_below(bound + 1)
    symbols = call_kernel("kronecker_symbols", D, list(all_primes))
    primes: list[int] = []
    bs: list[int] = []
    ramified: list[bool] = []
    for p, chi in zip(all_primes, symbols, strict=True):
        if chi == -1 or conductor % p == 0:
            continue
        primes.append(p)
        bs.append(prime_b(D, p))
        ramified.append(chi == 0)
    index = {p: j for j, p in enumerate(primes)}
    return FactorBase(D, bound, primes, bs, ramified, index, generating_bound(D), conductor)
