"""Class numbers of many imaginary quadratic fields at once, from the sums of three squares.

Let ``r₃(n)`` be the number of ways of writing ``n`` as ``x² + y² + z²``
(signs and order counted), the coefficients of ``θ(q)³`` with
``θ(q) = Σ_{x∈Z} q^{x²}``. Gauss's theorem on sums of three squares, in the
form ``r₃(n) = 12·(H(4n) − 2·H(n))`` with the Hurwitz class numbers ``H``
(forms counted with weight ``2/w``), gives for squarefree ``m > 3``:

* ``m ≡ 1, 2 (mod 4)``: ``D = −4m`` is fundamental, ``H(m) = 0`` and
  ``H(4m) = h(−4m)``, so ``h(−4m) = r₃(m)/12``;
* ``m ≡ 3 (mod 8)``: ``D = −m`` is fundamental, ``H(m) = h(−m)`` and
  ``H(4m) = h(−4m) + h(−m) = 4·h(−m)`` (the order of conductor 2 has
  ``h(−4m) = (2 − (D/2))·h(−m) = 3·h(−m)``), so ``h(−m) = r₃(m)/24``;
* ``m ≡ 7 (mod 8)`` (``D = −m ≡ 1 (mod 8)``, a third of all fields):
  ``r₃(m) = 0`` and the sum of three squares says nothing. Three other
  ternary forms take over, each the direct sum of a binary form and ``qz²``,

  ``Q₃ = x² + xy + y² + 3z²``, ``Q₅ = 2x² + 2xy + 3y² + 5z²``,
  ``Q₇ = x² + xy + 2y² + 7z²``,

  the norm forms on the trace-zero part of the (Gross) lattices of the
  maximal orders of the quaternion algebras ramified at ``q`` and ``∞``;
  those algebras have class number one (from memory: exactly for
  ``q = 2, 3, 5, 7, 13``), their genus is one class and Siegel's formula
  gives ``r_Q(m) = k_q·(1 − (−m/q))·h(−m)`` with ``k₃ = 12``, ``k₅ = k₇ = 4``
  for squarefree ``m ≡ 7 (mod 8)``, ``m > 3``. The first ``q`` with
  ``(−m/q) ≠ 1`` gives ``h(−m)``; the fields in which 3, 5 and 7 all split
  (one in eight of them) are left to another method (the survey takes them
  one by one). The constants are checked in the tests against the reduced
  forms for every such ``m`` up to ``2·10⁵``.

The small fields: ``r₃(1) = 6`` (``D = −4``, ``w = 4``, ``h = 1``),
``r₃(3) = 8`` (``D = −3``, ``w = 6``, ``h = 1``).

**Method.** Each ternary form is a binary form plus ``qz²`` (``x² + y² + z²``
with ``q = 1``): the binary form's series by listing its values, then one
product with ``θ(q^q)`` by the fast Fourier transform in binary64 (of a
length ``2^a·3^b·5^c`` just above ``2N``); every coefficient is rounded to the nearest integer and the
computation is refused if any lies farther than ``1/4`` from one — the
values are integers below ``10⁷`` and the transforms' errors are of the order
``10⁻¹⁰``, so the rounding is exact; the result is unconditional. The work
is ``O(N log N)`` for all ``N`` coefficients at once, against about ``√|D|``
compositions per field for the reduced forms.

>>> h = theta_class_numbers(-100)
>>> [h[D] for D in (-3, -4, -8, -11, -19, -20, -23, -24, -35, -84)]
[1, 1, 1, 1, 1, 2, 3, 2, 2, 4]
>>> -311 in theta_class_numbers(-320)   # 3, 5, 7 all split in Q(√−311): not given
False
>>> three_square_counts(10).tolist()
[1, 6, 12, 8, 6, 24, 24, 0, 12, 30, 24]

References: C. F. Gauss, *Disquisitiones Arithmeticae*, art. 291–292; the
class-number form and its use for tabulation: A. S. Mosunov and M. J.
Jacobson Jr., "Unconditional class group tabulation of imaginary quadratic
fields to ``|Δ|`` < 2⁴⁰", *Math. Comp.* 85 (2016), 1983–2009, §2–3; ``r₃`` is OEIS
A005875, the Hurwitz class numbers ``12·H(n)`` OEIS A259825.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported where it is used: it costs 0.1 s of every start-up
    import numpy as np

from realquad.core.primes import kronecker
from realquad.errors import TooLargeError

#: Largest ``N = |D|`` (for ``D = −4m``: ``m``) the series is computed to (memory: about 80·N bytes).
MAX_TERMS = 2 * 10**8

METHOD = (
    "theta series of x² + y² + z² and of three ternary forms of class number one (fast Fourier "
    "transform), Gauss's and Siegel's class number relations"
)


def three_square_counts(n_max: int) -> np.ndarray:
    """``r₃(n)`` for ``0 ≤ n ≤ n_max``, exact, as ``int64`` (OEIS A005875)."""
    if n_max < 0:
        raise ValueError("n_max must be at least 0")
    if n_max > MAX_TERMS:
        raise TooLargeError(
            f"the sums-of-three-squares series stops at {MAX_TERMS:,} terms (asked for {n_max:,})"
        )
    return _ternary_counts((1, 0, 1), 1, n_max)  # x² + y² (listed) times θ(q)


def _transform_length(n: int) -> int:
    """The least ``2^a·3^b·5^c ≥ n`` (even): a length the transform handles fast, at most a few
    per cent above ``n`` where the next power of two may be twice it.

    >>> _transform_length(2 * 10**6 + 1), _transform_length(2 * 10**8 + 1), _transform_length(1)
    (2025000, 201326592, 2)
    """
    best = 1 << max(1, (n - 1).bit_length())
    p5 = 1
    while p5 < best:
        p35 = p5
        while p35 < best:
            m = p35
            while m < n:
                m *= 2
            if m % 2 == 0 and m < best:
                best = m
            p35 *= 3
        p5 *= 5
    return best


def _rounded(values: np.ndarray) -> np.ndarray:
    """``values`` rounded to integers, refused if any is not within ``1/4`` of one."""
    import numpy as np

    rounded = np.rint(values)
    if values.size and float(np.max(np.abs(values - rounded))) > 0.25:
        raise ArithmeticError("internal check failed: a theta coefficient is not near an integer")
    return rounded


#: ``(q, (a, b, c), k_q)``: ``Q_q = ax² + bxy + cy² + qz²`` and its constant (module notes).
TERNARY_FORMS = ((3, (1, 1, 1), 12), (5, (2, 2, 3), 4), (7, (1, 1, 2), 4))


def binary_theta(a: int, b: int, c: int, n_max: int) -> np.ndarray:
    """The number of ``(x, y)`` with ``ax² + bxy + cy² = n``, ``0 ≤ n ≤ n_max`` (positive definite form).

    >>> binary_theta(1, 1, 1, 12).tolist()   # OEIS A004016: 6·Σ_{d|n} (d/3)
    [1, 6, 0, 6, 6, 0, 0, 12, 0, 6, 0, 0, 6]
    """
    import numpy as np

    disc = 4 * a * c - b * b
    counts = np.zeros(n_max + 1, dtype=np.int64)
    y_max = int(np.sqrt(4 * a * n_max / disc)) + 1
    for y in range(-y_max, y_max + 1):
        # a x² + b y x + (c y² − n) ≤ 0: x between the roots
        rest = disc * y * y
        if rest > 4 * a * n_max:
            continue
        half = np.sqrt((4 * a * n_max - rest) / (4.0 * a * a))
        centre = -b * y / (2.0 * a)
        xs = np.arange(int(np.floor(centre - half)) - 1, int(np.ceil(centre + half)) + 2)
        values = a * xs * xs + b * y * xs + c * y * y
        np.add.at(counts, values[(values >= 0) & (values <= n_max)], 1)
    return counts


def _ternary_counts(form: tuple[int, int, int], q: int, n_max: int) -> np.ndarray:
    """The counts of ``ax² + bxy + cy² + qz²`` up to ``n_max`` (one product by FFT)."""
    import numpy as np

    size = _transform_length(2 * n_max + 1)
    binary = binary_theta(*form, n_max).astype(float)
    sparse = np.zeros(n_max + 1)
    zs = np.arange(1, int(np.sqrt(n_max / q)) + 2, dtype=np.int64)
    sparse[0] = 1
    sparse[q * zs[q * zs * zs <= n_max] ** 2] = 2
    product = np.fft.rfft(binary, size)
    del binary
    product *= np.fft.rfft(sparse, size)
    return _rounded(np.fft.irfft(product, size)[: n_max + 1]).astype(np.int64)


@dataclass(frozen=True)
class ThetaCounts:
    """The theta series up to ``n_max``: ``r₃`` and the counts of the forms ``Q_q``."""

    n_max: int
    three_squares: np.ndarray
    ternary: tuple[np.ndarray, ...]

    def class_number(self, D: int) -> int | None:
        """``h(D)`` for a fundamental ``-n_max·4 ≤ D < 0`` (``|D| ≤ n_max`` when ``D`` is odd),
        or ``None`` when ``D ≡ 1 (mod 8)`` and 3, 5, 7 all split in ``Q(√D)``."""
        if D == -3 or D == -4:
            return 1
        if D % 8 == 1:
            for (q, _, k), counts in zip(TERNARY_FORMS, self.ternary, strict=True):
                symbol = kronecker(D, q)
                if symbol != 1:
                    return _quotient(D, int(counts[-D]), k * (1 - symbol))
            return None
        if D % 4 == 0:
            return _quotient(D, int(self.three_squares[-D // 4]), 12)
        return _quotient(D, int(self.three_squares[-D]), 24)


def _quotient(D: int, value: int, parts: int) -> int:
    if value % parts or value == 0:
        raise ArithmeticError(
            f"internal check failed: the theta series give no class number for {D}"
        )
    return value // parts


def theta_counts(n_max: int) -> ThetaCounts:
    """``r₃`` and the counts of ``Q₃``, ``Q₅``, ``Q₇`` for ``0 ≤ n ≤ n_max``."""
    return ThetaCounts(
        n_max,
        three_square_counts(n_max),
        tuple(_ternary_counts(form, q, n_max) for q, form, _ in TERNARY_FORMS),
    )


def theta_class_numbers(D_min: int, D_max: int = -3) -> dict[int, int]:
    """``h(D)`` for every fundamental ``D`` with ``D_min ≤ D ≤ D_max < 0`` that the series give.

    >>> sorted(theta_class_numbers(-30, -20).items())
    [(-24, 2), (-23, 3), (-20, 2)]
    """
    if D_max >= 0 or D_min > D_max:
        return {}
    counts = theta_counts(-D_min)
    squarefree = _squarefree_flags(-D_min)
    found: dict[int, int] = {}
    for D in range(D_max, D_min - 1, -1):
        m = -D if D % 4 else -D // 4
        if (D % 4 == 1 or (D % 4 == 0 and m % 4 in (1, 2))) and squarefree[m]:
            h = counts.class_number(D)
            if h is not None:
                found[D] = h
    return found


def _squarefree_flags(n_max: int) -> np.ndarray:
    """``flags[m]`` is true when ``m`` is squarefree (``0 ≤ m ≤ n_max``; ``0`` is not)."""
    import numpy as np

    flags = np.ones(n_max + 1, dtype=bool)
    flags[0] = False
    k = 2
    while k * k <= n_max:
        flags[k * k :: k * k] = False
        k += 1
    return flags
