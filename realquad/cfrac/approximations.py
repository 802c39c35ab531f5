"""Best rational approximations of a rational or real quadratic irrational, exactly.

Let ``p_k/q_k`` be the convergents of ``x = [a₀; a₁, a₂, …]``. Between
``p_{k−2}/q_{k−2}`` and ``p_k/q_k`` lie the *intermediate fractions*
(semiconvergents)

    (p_{k−2} + t·p_{k−1}) / (q_{k−2} + t·q_{k−1}),   1 ≤ t ≤ a_k,

``t = a_k`` giving the convergent itself. A fraction ``p/q`` (``q ≥ 1``) is a

* *best approximation of the first kind* if every other fraction ``r/s``
  with ``1 ≤ s ≤ q`` is strictly farther: ``|x − r/s| > |x − p/q|``;
* *best approximation of the second kind* if every other pair ``(r, s)``
  with ``1 ≤ s ≤ q`` has ``|s·x − r| > |q·x − p|``.

Lagrange's theorems (Khinchin, *Continued Fractions*, 1935, §6, Theorems
15–17; Perron §15): the best approximations of the second kind are the
convergents (apart from ``a₀/1`` when ``a₁ = 1`` and the tie at
``x = a₀ + 1/2``); those of the first kind are convergents or intermediate
fractions with ``t ≥ a_k/2`` — all those with ``t > a_k/2``, and the one with
``t = a_k/2`` exactly when it is closer to ``x`` than ``p_{k−1}/q_{k−1}``.

:func:`best_approximations` walks these candidates in increasing
denominator and keeps a candidate exactly when it is strictly closer than
every candidate of smaller or equal denominator: every comparison of
distances is decided exactly (the sign of ``s·x − r`` for integers ``r, s``
from one comparison of integers, :func:`sign_of`), never in floating point.

>>> [f"{p}/{q}" for p, q, *_ in best_approximations("sqrt(2)", 30)]
['1/1', '3/2', '4/3', '7/5', '17/12', '24/17', '41/29']
>>> [f"{p}/{q}" for p, q, *_ in best_approximations("sqrt(2)", 30, kind=2)]
['1/1', '3/2', '7/5', '17/12', '41/29']
>>> [f"{p}/{q}" for p, q, *_ in best_approximations("3/10", 10)]
['0/1', '1/2', '1/3', '2/7', '3/10']

References: A. Ya. Khinchin, *Continued Fractions* (1935; Dover 1997),
§6; O. Perron, *Die Lehre von den Kettenbrüchen*, §15.
"""

from __future__ import annotations

from collections.abc import Iterator
from fractions import Fraction
from typing import Literal, NamedTuple

from realquad.cfrac.expansion import QuadraticIrrational, exact_real, partial_quotients
from realquad.core.integers import as_integer
from realquad.errors import InputError


class Approximation(NamedTuple):
    """The fraction ``p/q`` with its place in the expansion.

    ``p/q = (p_{k−2} + t·p_{k−1})/(q_{k−2} + t·q_{k−1})`` with ``1 ≤ t ≤ a``,
    ``a = a_k`` the partial quotient; ``t == a`` for the convergent
    ``p_k/q_k`` (for ``k = 0``, ``a₀/1``, both are ``a₀``).
    """

    p: int
    q: int
    k: int
    t: int
    a: int

    @property
    def is_convergent(self) -> bool:
        """Whether ``p/q`` is the convergent ``p_k/q_k`` (``t = a_k``)."""
        return self.t == self.a


def sign_of(x: QuadraticIrrational | Fraction, s: int, r: int) -> int:
    """The sign (−1, 0 or 1) of ``s·x − r``, exactly.

    For ``x = (P + √D)/Q``: ``s·x − r = (A + s√D)/Q`` with ``A = sP − rQ``,
    whose sign is that of ``A`` or of ``s`` after comparing ``A²`` with ``s²D``.

    >>> sign_of(QuadraticIrrational(0, 2, 1), 5, 7), sign_of(QuadraticIrrational(0, 2, 1), 12, 17)
    (1, -1)
    >>> sign_of(Fraction(3, 10), 10, 3)
    0
    """
    if isinstance(x, Fraction):
        return _sign(s * x.numerator - r * x.denominator)
    a = s * x.P - r * x.Q
    if s == 0:
        sign = _sign(a)
    elif a == 0 or (a > 0) == (s > 0):
        sign = _sign(s)
    else:  # opposite signs: the larger of |A| and |s|·√D wins (never equal, D is not a square)
        sign = _sign(a) if a * a > s * s * x.D else _sign(s)
    return sign * _sign(x.Q)


def _sign(v: int) -> int:
    return (v > 0) - (v < 0)


def compare_distances(
    x: QuadraticIrrational | Fraction, a: tuple[int, int], b: tuple[int, int], kind: int
) -> int:
    """−1, 0 or 1 as ``a = (p, q)`` is closer to ``x`` than ``b``, as close, or farther.

    Kind 1 measures ``|x − p/q|``: ``(x − a)² − (x − b)² = (b − a)(2x − a − b)``.
    Kind 2 measures ``|q·x − p|``: the difference of squares is
    ``((q − q')x − (p − p'))·((q + q')x − (p + p'))``.

    >>> x = exact_real("sqrt(2)")
    >>> compare_distances(x, (4, 3), (3, 2), 1), compare_distances(x, (4, 3), (3, 2), 2)
    (-1, 1)
    """
    (p, q), (p2, q2) = a, b
    if kind == 1:
        toward = p2 * q - p * q2  # sign of b − a (denominators positive)
        return _sign(toward) * sign_of(x, 2 * q * q2, p * q2 + p2 * q)
    return sign_of(x, q - q2, p - p2) * sign_of(x, q + q2, p + p2)


def _candidates(
    x: QuadraticIrrational | Fraction, bound: int, kind: int
) -> Iterator[Approximation]:
    """The fractions that can be best approximations of ``x``, with ``q ≤ bound``.

    In nondecreasing denominator: the convergents, for kind 1 the
    intermediate fractions with ``2t ≥ a_k``, and ``(a₀ + 1)/1`` (``k = 1,
    t = 1``), the one fraction that can tie with ``a₀/1``.
    """
    p_prev, q_prev, p_last, q_last = 1, 0, 0, 1  # p_{k−2}, q_{k−2}, p_{k−1}, q_{k−1}
    for k, a in enumerate(partial_quotients(x)):
        if k == 0:
            p_prev, q_prev, p_last, q_last = 1, 0, a, 1
            yield Approximation(a, 1, 0, a, a)
            continue
        if q_prev + q_last > bound:
            return
        first = (a + 1) // 2 if kind == 1 else a
        last = min(a, (bound - q_prev) // q_last)
        if k == 1 and first > 1:
            yield Approximation(p_prev + p_last, q_prev + q_last, k, 1, a)
        for t in range(first, last + 1):
            yield Approximation(p_prev + t * p_last, q_prev + t * q_last, k, t, a)
        if last < a:
            return
        p_prev, q_prev, p_last, q_last = p_last, q_last, a * p_last + p_prev, a * q_last + q_prev


def best_approximations(x: object, bound: int, kind: Literal[1, 2] = 1) -> Iterator[Approximation]:
    """The best approximations of ``x`` of the given kind with denominator ``≤ bound``.

    In increasing denominator (and so, decreasing distance to ``x``); see the
    module docstring for the two kinds. ``x`` is anything
    :func:`~realquad.cfrac.expansion.continued_fraction` accepts. The last one
    is ``x`` itself when ``x`` is rational with denominator ``≤ bound``.
    Lazy: for ``x`` with a large partial quotient there can be up to about
    ``bound/2`` of the first kind.

    >>> [(a.p, a.q, a.is_convergent) for a in best_approximations("sqrt(61)", 16)]
    [(8, 1, True), (23, 3, False), (31, 4, False), (39, 5, True), (86, 11, False), (125, 16, True)]
    """
    bound = as_integer(bound, "the denominator bound")
    if bound < 1:
        raise InputError(f"the denominator bound must be a positive integer, got {bound}")
    if kind not in (1, 2):
        raise InputError(f"kind must be 1 or 2, got {kind!r}")
    value = exact_real(x)
    return _best(value, bound, kind)


def _best(value: QuadraticIrrational | Fraction, bound: int, kind: int) -> Iterator[Approximation]:
    """:func:`best_approximations` after the checks of its arguments (which so fail at once)."""
    best: Approximation | None = None  # the closest candidate seen so far
    group: list[Approximation] = []

    def settle(group: list[Approximation]) -> Iterator[Approximation]:
        nonlocal best
        winner = group[0]
        tie = False
        for c in group[1:]:
            order = compare_distances(value, (c.p, c.q), (winner.p, winner.q), kind)
            if order < 0:
                winner, tie = c, False
            elif order == 0 and (c.p, c.q) != (winner.p, winner.q):
                tie = True
        order = (
            -1
            if best is None
            else compare_distances(value, (winner.p, winner.q), (best.p, best.q), kind)
        )
        if order < 0:
            best = winner
            if not tie:
                yield winner

    for c in _candidates(value, bound, kind):
        if group and c.q != group[0].q:
            yield from settle(group)
            group = []
        group.append(c)
    if group:
        yield from settle(group)
