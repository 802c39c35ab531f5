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
* ``m ≡ 7 (mod 8)``: ``r₃(m) = 0`` and the series says nothing: the fields
  with ``D ≡ 1 (mod 8)``, a third of all, need another method (the survey
  takes them one by one).

The small fields: ``r₃(1) = 6`` (``D = −4``, ``w = 4``, ``h = 1``),
``r₃(3) = 8`` (``D = −3``, ``w = 6``, ``h = 1``).

**Method.** ``θ(q)³`` to ``q^N`` by two products of polynomials with the
fast Fourier transform in binary64 (``θ²`` rounded to integers, then
``θ²·θ``); every coefficient is rounded to the nearest integer and the
computation is refused if any lies farther than ``1/4`` from one — the
values are integers below ``10⁷`` and the transforms' errors are of the order
``10⁻¹⁰``, so the rounding is exact; the result is unconditional. The work
is ``O(N log N)`` for all ``N`` coefficients at once, against about ``√|D|``
compositions per field for the reduced forms.

>>> h = theta_class_numbers(-100)
>>> [h[D] for D in (-3, -4, -8, -11, -19, -20, -24, -35, -84)]
[1, 1, 1, 1, 1, 2, 2, 2, 4]
>>> -23 in h   # D ≡ 1 (mod 8): not given by the series
False
>>> three_square_counts(10).tolist()
[1, 6, 12, 8, 6, 24, 24, 0, 12, 30, 24]

References: C. F. Gauss, *Disquisitiones Arithmeticae*, art. 291–292; the
class-number form and its use for tabulation: A. S. Mosunov and M. J.
Jacobson Jr., "Unconditional class group tabulation of imaginary quadratic
fields to |Δ| < 2⁴⁰", *Math. Comp.* 85 (2016), 1983–2009, §2–3; ``r₃`` is OEIS
A005875, the Hurwitz class numbers ``12·H(n)`` OEIS A259825.
"""

from __future__ import annotations

import numpy as np

from realquad.errors import TooLargeError

#: Largest ``N = |D|`` (for ``D = −4m``: ``m``) the series is computed to (memory: about 80·N bytes).
MAX_TERMS = 2 * 10**8

METHOD = "sums of three squares (θ(q)³ by fast Fourier transform, Gauss's class number relation)"


def three_square_counts(n_max: int) -> np.ndarray:
    """``r₃(n)`` for ``0 ≤ n ≤ n_max``, exact, as ``int64`` (OEIS A005875)."""
    if n_max < 0:
        raise ValueError("n_max must be at least 0")
    if n_max > MAX_TERMS:
        raise TooLargeError(
            f"the sums-of-three-squares series stops at {MAX_TERMS:,} terms (asked for {n_max:,})"
        )
    size = 1 << (2 * n_max + 1).bit_length()
    theta = np.zeros(n_max + 1)
    squares = np.arange(1, int(np.sqrt(n_max)) + 2, dtype=np.int64) ** 2
    theta[0] = 1
    theta[squares[squares <= n_max]] = 2
    spectrum = np.fft.rfft(theta, size)
    del theta
    two = _rounded(np.fft.irfft(spectrum * spectrum, size)[: n_max + 1])
    product = np.fft.rfft(two, size)
    del two
    product *= spectrum
    del spectrum
    return _rounded(np.fft.irfft(product, size)[: n_max + 1]).astype(np.int64)


def _rounded(values: np.ndarray) -> np.ndarray:
    """``values`` rounded to integers, refused if any is not within ``1/4`` of one."""
    rounded = np.rint(values)
    if values.size and float(np.max(np.abs(values - rounded))) > 0.25:
        raise ArithmeticError("internal check failed: a theta coefficient is not near an integer")
    return rounded


def class_number_from_counts(D: int, counts: np.ndarray) -> int | None:
    """``h(D)`` for a fundamental ``D < 0`` from ``r₃`` (``counts``), or ``None`` when ``D ≡ 1 (mod 8)``.

    ``counts`` must reach ``|D|/4`` for even ``D`` and ``|D|`` for odd ``D``.
    """
    if D == -3 or D == -4:
        return 1
    if D % 8 == 1:
        return None
    if D % 4 == 0:
        value, parts = int(counts[-D // 4]), 12
    else:
        value, parts = int(counts[-D]), 24
    if value % parts or value == 0:
        raise ArithmeticError(f"internal check failed: r₃ gives no class number for {D}")
    return value // parts


def theta_class_numbers(D_min: int, D_max: int = -3) -> dict[int, int]:
    """``h(D)`` for every fundamental ``D`` with ``D_min ≤ D ≤ D_max < 0`` and ``D ≢ 1 (mod 8)``.

    >>> sorted(theta_class_numbers(-30, -20).items())
    [(-24, 2), (-20, 2)]
    """
    if D_max >= 0 or D_min > D_max:
        return {}
    counts = three_square_counts(-D_min)
    squarefree = _squarefree_flags(-D_min)
    found: dict[int, int] = {}
    for D in range(D_max, D_min - 1, -1):
        m = -D if D % 4 else -D // 4
        if (D % 4 == 1 or (D % 4 == 0 and m % 4 in (1, 2))) and squarefree[m] and D % 8 != 1:
            h = class_number_from_counts(D, counts)
            if h is not None:
                found[D] = h
    return found


def _squarefree_flags(n_max: int) -> np.ndarray:
    """``flags[m]`` is true when ``m`` is squarefree (``0 ≤ m ≤ n_max``; ``0`` is not)."""
    flags = np.ones(n_max + 1, dtype=bool)
    flags[0] = False
    k = 2
    while k * k <= n_max:
        flags[k * k :: k * k] = False
        k += 1
    return flags
