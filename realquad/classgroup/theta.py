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
with ``q = 1``), and only some residue classes mod 8 are needed (``r₃`` at
``m ≡ 3`` to ``N`` and at ``m ≡ 1, 2, 5, 6`` to ``N/4``; the ``Q_q`` at
``m ≡ 7``). A value is ``≡ r`` when the binary value is ``≡ s`` and
``qz² ≡ t`` with ``s + t ≡ r``: ``qz² mod 8`` takes three values, so each
class is the sum of three products of series eight times shorter — the
binary form's values listed for the residue classes of ``x`` that give
``s`` (they depend only on ``x, y mod 8``), the ``qz²`` placed directly —
by the fast Fourier transform in binary64 (lengths ``2^a·3^b·5^c``), summed
before one inverse transform. Every coefficient is rounded to the nearest
integer and the computation is refused if any lies farther than ``1/4`` from
one — the values are integers below ``10⁷`` and the transforms' errors are
of the order ``10⁻¹⁰``, so the rounding is exact; the result is
unconditional. The work is ``O(N log N)`` for all ``N`` coefficients at once
(eight independent pieces, for a survey's workers), against about ``√|D|``
operations per field for the reduced forms.

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

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported where it is used: it costs 0.1 s of every start-up
    import numpy as np

from realquad.core.executors import InProcessExecutor
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
    return _binary_by_residue((a, b, c), n_max, 1)[0]


#: Values of the binary form counted per :func:`numpy.bincount` call (memory: 8 bytes each).
_BATCH = 1 << 23


def _binary_by_residue(
    form: tuple[int, int, int], n_max: int, modulus: int, residues: tuple[int, ...] = (0,)
) -> dict[int, np.ndarray]:
    """For each ``s`` in ``residues``: the number of ``(x, y)`` with ``ax² + bxy + cy² = s + modulus·k``,
    ``k = 0 … (n_max − s) // modulus``.

    The values are listed row by row (``y`` fixed, ``x`` between the roots);
    their residue depends only on ``x`` and ``y`` modulo ``modulus``, so only
    the residue classes of ``x`` that give a wanted ``s`` are listed, and
    counted in batches.
    """
    import numpy as np

    a, b, c = form
    disc = 4 * a * c - b * b
    sizes = {s: (n_max - s) // modulus + 1 for s in residues}
    counts = {s: np.zeros(max(size, 0), dtype=np.int64) for s, size in sizes.items()}
    pending: dict[int, list[np.ndarray]] = {s: [] for s in residues}
    held = 0

    def flush() -> None:
        nonlocal held
        for s, parts in pending.items():
            if parts and sizes[s] > 0:
                places = np.concatenate(parts)
                counts[s] += np.bincount(places, minlength=sizes[s])[: sizes[s]]
            parts.clear()
        held = 0

    wanted = set(residues)
    classes = [  # y mod modulus → [(x mod modulus, s)]
        [
            (rx, (a * rx * rx + b * rx * ry + c * ry * ry) % modulus)
            for rx in range(modulus)
            if (a * rx * rx + b * rx * ry + c * ry * ry) % modulus in wanted
        ]
        for ry in range(modulus)
    ]
    y_max = int(np.sqrt(4 * a * n_max / disc)) + 1
    for y in range(-y_max, y_max + 1):
        # a x² + b y x + (c y² − n) ≤ 0: x between the roots
        rest = disc * y * y
        if rest > 4 * a * n_max:
            continue
        half = np.sqrt((4 * a * n_max - rest) / (4.0 * a * a))
        centre = -b * y / (2.0 * a)
        lo, hi = int(np.floor(centre - half)) - 1, int(np.ceil(centre + half)) + 1
        for rx, s in classes[y % modulus]:
            xs = np.arange(lo + (rx - lo) % modulus, hi + 1, modulus, dtype=np.int64)
            values = a * xs * xs + b * y * xs + c * y * y
            values = values[(values >= 0) & (values <= n_max)]
            pending[s].append(values // modulus if modulus > 1 else values)
            held += values.size
        if held >= _BATCH:
            flush()
    flush()
    return counts


def _ternary_counts(form: tuple[int, int, int], q: int, n_max: int) -> np.ndarray:
    """The counts of ``ax² + bxy + cy² + qz²`` for every ``0 ≤ n ≤ n_max`` (one product by FFT)."""
    return _ternary_residue_counts(form, q, n_max, 0, 1)


def _ternary_residue_counts(
    form: tuple[int, int, int], q: int, n_max: int, residue: int, modulus: int = 8
) -> np.ndarray:
    """The counts of ``Q = ax² + bxy + cy² + qz²`` at ``n = residue + modulus·k ≤ n_max``.

    Split by residues: ``Q(x, y, z) ≡ residue`` exactly when the binary value is
    ``≡ s`` and ``qz² ≡ t`` with ``s + t ≡ residue``; each pair is one product of
    series ``modulus`` times shorter than the whole one (``qz² mod 8`` takes
    three values), summed before the one inverse transform.
    """
    import numpy as np

    size = (n_max - residue) // modulus + 1
    if size <= 0:
        return np.zeros(0, dtype=np.int64)
    length = _transform_length(2 * size + 1)
    zs = np.arange(0, int(np.sqrt(n_max / q)) + 2, dtype=np.int64)
    z_values = q * zs * zs
    z_values = z_values[z_values <= n_max]
    pairs = {}  # t → (s, carry)
    for t in sorted({int(v % modulus) for v in z_values}):
        s = (residue - t) % modulus
        pairs[t] = (s, (s + t - residue) // modulus)
    binaries = _binary_by_residue(
        form, n_max, modulus, tuple(sorted({s for s, _ in pairs.values()}))
    )
    total = None
    for t, (s, carry) in pairs.items():
        sparse = np.zeros(size)
        chosen = z_values[z_values % modulus == t]
        places = chosen // modulus + carry
        keep = places < size
        np.add.at(sparse, places[keep], np.where(chosen[keep] == 0, 1.0, 2.0))  # ±z; √n_max entries
        product = np.fft.rfft(binaries[s].astype(float), length)
        product *= np.fft.rfft(sparse, length)
        total = product if total is None else total + product
    assert total is not None
    return _rounded(np.fft.irfft(total, length)[:size]).astype(np.int64)


@dataclass(frozen=True)
class ThetaCounts:
    """The theta series up to ``n_max``: ``r₃`` at ``m ≡ 1, 2, 5, 6 (mod 8)`` to ``n_max/4``
    (for ``D = −4m``) and at ``m ≡ 3 (mod 8)`` to ``n_max``, and the counts of the forms
    ``Q_q`` at ``m ≡ 7 (mod 8)``; ``three_squares[r][k − start]`` is ``r₃(8k + r)``, with
    ``start`` :attr:`odd_start` for ``r = 3`` and the ternary forms and :attr:`even_start`
    for the others (0 for the whole series; a :meth:`window` keeps a slice)."""

    n_max: int
    three_squares: dict[int, np.ndarray]
    ternary: tuple[np.ndarray, ...]
    odd_start: int = 0
    even_start: int = 0

    def ternary_count(self, index: int, m: int) -> int:
        """The count of ``TERNARY_FORMS[index]`` at ``m ≡ 7 (mod 8)``."""
        import numpy as np

        return int(_entries(self.ternary[index], np.array([m // 8 - self.odd_start]))[0])

    def class_number(self, D: int) -> int | None:
        """``h(D)`` for a fundamental ``-n_max ≤ D < 0`` (in the window), or ``None`` when
        ``D ≡ 1 (mod 8)`` and 3, 5, 7 all split in ``Q(√D)``."""
        return self.class_numbers([D])[0] or None

    def class_numbers(self, discriminants: Sequence[int]) -> list[int]:
        """:meth:`class_number` of each fundamental ``D`` (``0`` for ``None``), computed on arrays
        (a survey asks for thousands at a time).

        >>> counts = theta_counts(400)
        >>> ds = [-3, -4, -20, -23, -311, -399, -303]
        >>> counts.class_numbers(ds) == [counts.class_number(D) or 0 for D in ds]
        True
        """
        import numpy as np

        D = np.asarray(discriminants, dtype=np.int64)
        h = np.zeros(D.size, dtype=np.int64)
        value = np.zeros(D.size, dtype=np.int64)
        parts = np.ones(D.size, dtype=np.int64)
        left = D % 8 == 1  # the ternary forms, the first q that does not split
        for index, (q, _, k) in enumerate(TERNARY_FORMS):
            squares = np.zeros(q, dtype=np.int64)
            squares[[x * x % q for x in range(1, q)]] = 1
            residue = D % q
            symbol = np.where(residue == 0, 0, np.where(squares[residue] == 1, 1, -1))
            take = left & (symbol != 1)
            value[take] = _entries(self.ternary[index], -D[take] // 8 - self.odd_start)
            parts[take] = k * (1 - symbol[take])
            left &= symbol == 1
        for even, residue_parts in ((True, 12), (False, 24)):
            take = (D % 4 == 0) if even else (D % 8 == 5)
            m = -D[take] // 4 if even else -D[take]
            start = self.even_start if even else self.odd_start
            column = np.zeros(m.size, dtype=np.int64)
            for r in np.unique(m % 8):
                where = m % 8 == r
                column[where] = _entries(self.three_squares[int(r)], m[where] // 8 - start)
            value[take] = column
            parts[take] = residue_parts
        given = (D % 8 != 1) | ~left
        if np.any(given & ((value % parts != 0) | (value == 0)) & (D < -4)):
            raise ArithmeticError("internal check failed: the theta series give no class number")
        h[given] = value[given] // parts[given]
        h[(D == -3) | (D == -4)] = 1
        return [int(v) for v in h]

    def window(self, odd: tuple[int, int], even: tuple[int, int]) -> ThetaCounts:
        """The counts for odd ``|D|`` in ``odd`` and ``|D|/4`` in ``even`` (closed intervals)
        alone: what one chunk of a survey needs, a few kilobytes to send to a worker.

        >>> whole = theta_counts(1000)
        >>> part = whole.window((900, 1000), (225, 250))
        >>> [part.class_number(D) for D in (-971, -947, -932, -904)] == [
        ...     whole.class_number(D) for D in (-971, -947, -932, -904)]
        True
        """
        (o_lo, o_hi), (e_lo, e_hi) = odd, even
        o_lo, o_hi, e_lo, e_hi = o_lo // 8, o_hi // 8 + 1, e_lo // 8, e_hi // 8 + 1
        odd_cut = slice(o_lo - self.odd_start, o_hi - self.odd_start)
        even_cut = slice(e_lo - self.even_start, e_hi - self.even_start)
        return ThetaCounts(
            self.n_max,
            {r: a[odd_cut if r == 3 else even_cut].copy() for r, a in self.three_squares.items()},
            tuple(a[odd_cut].copy() for a in self.ternary),
            o_lo,
            e_lo,
        )


def _entries(array: np.ndarray, places: np.ndarray) -> np.ndarray:
    """``array[places]``, refusing places outside it (a window's slice: no wrap-around)."""
    if places.size and (int(places.min()) < 0 or int(places.max()) >= array.size):
        raise IndexError("a discriminant outside the theta series' window")
    return array[places]


def theta_counts(n_max: int, executor: InProcessExecutor | None = None) -> ThetaCounts:
    """``r₃`` and the counts of ``Q₃``, ``Q₅``, ``Q₇`` that the class numbers to ``|D| = n_max`` need.

    The eight series (one per residue class needed) are independent pieces of
    work: ``executor`` (local processes or a cluster,
    :mod:`realquad.core.executors`) computes them side by side, the longest
    first; by default this process, one after the other.
    """
    if n_max < 0 or n_max > MAX_TERMS:
        three_square_counts(n_max)  # the same refusal
    pieces = [(q, form, n_max, 7) for q, form, _ in TERNARY_FORMS]
    pieces.append((1, (1, 0, 1), n_max, 3))
    pieces += [(1, (1, 0, 1), n_max // 4, r) for r in (1, 2, 5, 6)]
    found = {
        piece: series
        for piece, series, _ in (executor or InProcessExecutor()).map_unordered(pieces, _series)
    }
    return ThetaCounts(
        n_max,
        {piece[3]: found[piece] for piece in pieces[3:]},
        tuple(found[piece] for piece in pieces[:3]),
    )


def _series(piece: tuple[int, tuple[int, int, int], int, int]) -> np.ndarray:
    """One series of :func:`theta_counts`: ``(q, form, n_max, residue)``, modulo 8, as ``int32``
    (the counts are below ``2³¹``; half the bytes to send back)."""
    import numpy as np

    q, form, n_max, residue = piece
    return _ternary_residue_counts(form, q, n_max, residue).astype(np.int32)


def theta_class_numbers(D_min: int, D_max: int = -3) -> dict[int, int]:
    """``h(D)`` for every fundamental ``D`` with ``D_min ≤ D ≤ D_max < 0`` that the series give.

    >>> sorted(theta_class_numbers(-30, -20).items())
    [(-24, 2), (-23, 3), (-20, 2)]
    """
    if D_max >= 0 or D_min > D_max:
        return {}
    counts = theta_counts(-D_min)
    squarefree = _squarefree_flags(-D_min)
    fields = []
    for D in range(D_max, D_min - 1, -1):
        m = -D if D % 4 else -D // 4
        if (D % 4 == 1 or (D % 4 == 0 and m % 4 in (1, 2))) and squarefree[m]:
            fields.append(D)
    return {D: h for D, h in zip(fields, counts.class_numbers(fields), strict=True) if h}


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
