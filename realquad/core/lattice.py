"""The finite abelian group ``Z^n / L`` for a lattice ``L`` given by many sparse integer rows.

A relation ``r`` (a sparse vector: column ``j`` ↦ ``r[j]``) says ``Σ r[j]·e_j = 0``;
the group is ``Z^n`` modulo the lattice ``L`` the rows span. It is finite exactly
when the rows have rank ``n``; :func:`lattice_quotient` returns ``None`` otherwise.
The answer gives the invariants ``d₁ | d₂ | …`` (all > 1), one sparse exponent
vector per invariant generating that cyclic factor, and the coordinate map
``Z^n → ⊕ Z/dᵢ`` (a homomorphism with kernel ``L``).

>>> Q = lattice_quotient([{0: 2, 1: 1}, {1: 3}], 2)      # e₁ = −2e₀, 6e₀ = 0
>>> Q.order, Q.invariants, Q.generators
(6, [6], [{0: 1}])
>>> Q.coordinates({1: 1}), Q.coordinates({0: 2, 1: 1})
([4], [0])
>>> lattice_quotient([{0: 1, 1: 1}], 2) is None         # rank 1 < 2: infinite
True

**Method.** (1) *Structured Gaussian elimination* (LaMacchia and Odlyzko 1990): a
column with an entry ``±1`` is eliminated with the sparsest such row as pivot (the
row expresses the column through the others, which ``coordinates`` replays);
columns are taken lightest first (singletons cost nothing), a pivot whose
Markowitz cost ``(column weight − 1)(row weight − 1)`` (Markowitz 1957) passes
``COST_LIMIT`` or that would make an entry pass ``2¹⁶`` waits, and the elimination
stops when a quarter of the active part is filled. These row operations are
unimodular, so the remaining *core* (``k`` columns, ``m ≥ k`` rows) has the same
group. (2) On the core, ``k`` rows ``B`` independent modulo a word prime ``p`` are
chosen; ``G' = Z^k/row(B)`` has order ``|det B|``. For a random integer matrix
``W`` (``k × t``) the map ``x ↦ x·B⁻¹W mod Z^t`` kills ``row(B)``; ``B⁻¹W`` comes
from Dixon's ``p``-adic lifting (Dixon 1982) and rational reconstruction, with
bounds on ``|det B|`` and ``‖B⁻¹‖`` proven from floating point
(``_determinant_bound``; Hadamard's when the floats give none). The map is
injective on ``G'`` exactly when its image has order ``|det B|``: the image's
order divides ``det B``, and ``det B`` modulo ``p`` (and more primes while their
product is below the bound over the image's order) settles it; otherwise ``t``
doubles. The group is then the image modulo the images of the other rows:
Hermite normal forms modulo a multiple of the determinant in ``t`` columns
(Domich, Kannan and Trotter 1987; Cohen, *A Course in Computational Algebraic
Number Theory*, Springer 1993, §2.4.2) and the Smith normal form of
:mod:`realquad.core.linalg`. Modular linear algebra runs in ``numpy`` floats with
primes below ``2²⁰`` (sums of up to 4000 products stay below ``2⁵²``, exact).
When ``B`` cannot be found, a kernel vector lifted the same way proves the rank
is below ``n``.

References: B. A. LaMacchia and A. M. Odlyzko, "Solving large sparse linear
systems over finite fields", CRYPTO '90, LNCS 537 (1991); H. M. Markowitz,
"The elimination form of the inverse and its application to linear
programming", *Management Sci.* 3 (1957); J. D. Dixon, "Exact solution of
linear equations using p-adic expansions", *Numer. Math.* 40 (1982);
P. D. Domich, R. Kannan and L. E. Trotter, "Hermite normal form computation
using modulo determinant arithmetic", *Math. Oper. Res.* 12 (1987).
"""

from __future__ import annotations

import heapq
import math
import random
import time
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import gmpy2

from realquad.core.linalg import smith_normal_form
from realquad.core.progress import Progress
from realquad.errors import InputError


@dataclass(frozen=True)
class LatticeQuotient:
    """``Z^n / L ≅ ⊕ Z/dᵢ``: order, invariants ``d₁ | d₂ | …`` (> 1), generators, coordinates.

    ``generators[i]`` is a sparse exponent vector (column ↦ exponent) whose image
    generates the factor ``Z/dᵢ``; ``images[j]`` holds the coordinates of ``e_j``.
    """

    order: int
    invariants: list[int]
    generators: list[dict[int, int]]
    columns: int
    images: list[list[int]]

    def coordinates(self, vector: Mapping[int, int]) -> list[int]:
        """The image of ``Σ vector[j]·e_j`` on the generators, each reduced modulo its invariant.

        >>> Q = lattice_quotient([{0: 4}, {1: 2}], 2)
        >>> Q.invariants, Q.coordinates({0: 3, 1: 1}), Q.coordinates({0: 4})
        ([2, 4], [1, 3], [0, 0])
        """
        out = [0] * len(self.invariants)
        for j, x in vector.items():
            if not 0 <= j < self.columns:
                raise InputError(f"column {j} is outside 0 … {self.columns - 1}")
            for i, y in enumerate(self.images[j]):
                out[i] += x * y
        return [x % d for x, d in zip(out, self.invariants, strict=True)]


def lattice_quotient(
    rows: Sequence[Mapping[int, int]], n: int, progress: Progress | None = None
) -> LatticeQuotient | None:
    """``Z^n`` modulo the lattice spanned by ``rows``, or ``None`` when they do not have rank ``n``.

    Each row maps columns ``0 ≤ j < n`` to integers (zeros may be left out).
    ``progress`` hears ``("columns eliminated", count, n)`` now and then.

    >>> Q = lattice_quotient([{0: 2}, {1: 4}, {0: 1, 1: 2, 2: 1}], 3)   # e₂ = −e₀ − 2e₁
    >>> Q.invariants, Q.order, [Q.coordinates(g) for g in Q.generators]
    ([2, 4], 8, [[1, 0], [0, 1]])
    >>> lattice_quotient([], 0).order, lattice_quotient([{0: 1}], 1).invariants
    (1, [])
    """
    if n < 0:
        raise InputError(f"the number of columns must be ≥ 0, not {n}")
    clean = _normalised(rows, n)
    if len({j for r in clean for j in r}) < n or len(clean) < n:
        return None
    log, core_columns, core_rows = _eliminate(clean, n, progress)
    if len({j for r in core_rows for j in r}) < len(core_columns) or len(core_rows) < len(
        core_columns
    ):
        return None
    found = _dense_quotient(core_rows, core_columns)
    if found is None:
        return None
    invariants, core_images = found
    images: list[list[int] | None] = [None] * n
    for j, image in zip(core_columns, core_images, strict=True):
        images[j] = image
    s = len(invariants)
    for c, pivot in reversed(log):  # e_c = −ε Σ_{j≠c} pivot[j]·e_j with ε = pivot[c] = ±1
        eps = pivot[c]
        acc = [0] * s
        for j, x in pivot.items():
            if j != c:
                known = images[j]
                assert known is not None
                for i in range(s):
                    acc[i] -= x * known[i]
        images[c] = [eps * y % d for y, d in zip(acc, invariants, strict=True)]
    full = [image if image is not None else [0] * s for image in images]
    generators, full = _sparse_generators(full, invariants)
    return LatticeQuotient(math.prod(invariants), invariants, generators, n, full)


def _normalised(rows: Sequence[Mapping[int, int]], n: int) -> list[dict[int, int]]:
    """The nonzero rows without zero entries, each once up to sign; checks the column range."""
    seen: set[tuple[tuple[int, int], ...]] = set()
    out = []
    for row in rows:
        clean = {}
        for j, x in row.items():
            j, x = int(j), int(x)
            if not 0 <= j < n:
                raise InputError(f"column {j} is outside 0 … {n - 1}")
            if x:
                clean[j] = x
        if not clean:
            continue
        key = tuple(sorted(clean.items()))
        if key[0][1] < 0:
            key = tuple((j, -x) for j, x in key)
        if key not in seen:
            seen.add(key)
            out.append(clean)
    return out


# -- structured Gaussian elimination ---------------------------------------------------------

#: Entries of at most this size after an elimination step (the core stays cheap to lift).
ENTRY_LIMIT = 2**16
#: Largest Markowitz cost of a pivot, and the density of the active part where elimination stops.
COST_LIMIT = 20_000
DENSITY_LIMIT = 0.25


def _eliminate(
    rows: list[dict[int, int]], n: int, progress: Progress | None
) -> tuple[list[tuple[int, dict[int, int]]], list[int], list[dict[int, int]]]:
    """Structured Gaussian elimination with pivots ``±1``: (log of pivots, core columns, core rows)."""
    rows = [dict(r) for r in rows]
    where: list[set[int]] = [set() for _ in range(n)]
    for i, r in enumerate(rows):
        for j in r:
            where[j].add(i)
    alive = set(range(len(rows)))
    top = [max(abs(x) for x in r.values()) for r in rows]  # upper bounds on the rows' entries
    active = [True] * n
    heap = [(len(where[j]), j) for j in range(n)]
    heapq.heapify(heap)
    log: list[tuple[int, dict[int, int]]] = []
    nonzeros = sum(len(r) for r in rows)
    clock = time.monotonic()
    while heap:
        w, c = heapq.heappop(heap)
        if not active[c] or len(where[c]) != w:
            if active[c]:
                heapq.heappush(heap, (len(where[c]), c))
            continue
        columns = n - len(log)
        if w > 1 and nonzeros > DENSITY_LIMIT * columns * len(alive):
            break
        best, size = -1, 0
        for i in where[c]:
            row = rows[i]
            if (row[c] == 1 or row[c] == -1) and (best < 0 or len(row) < size):
                best, size = i, len(row)
        if best < 0 or (w - 1) * (size - 1) > COST_LIMIT:
            continue  # back on the heap when one of its rows changes
        pivot = rows[best]
        for i in where[c]:
            if abs(rows[i][c]) * top[best] + top[i] > ENTRY_LIMIT:
                top[i] = max(abs(x) for x in rows[i].values())
        if w > 1 and any(
            abs(rows[i][c]) * top[best] + top[i] > ENTRY_LIMIT for i in where[c] if i != best
        ):
            continue
        eps = pivot[c]
        for j in pivot:
            where[j].discard(best)
        alive.discard(best)
        nonzeros -= len(pivot)
        for i in list(where[c]):
            row = rows[i]
            f = row[c] * eps
            before, top[i] = len(row), top[i] + abs(f) * top[best]
            for j, x in pivot.items():
                y = row.get(j, 0) - f * x
                if y:
                    if j not in row:
                        where[j].add(i)
                    row[j] = y
                else:
                    row.pop(j, None)
                    where[j].discard(i)
            nonzeros += len(row) - before
            if not row:
                alive.discard(i)
        active[c] = False
        log.append((c, pivot))
        for j in pivot:
            if active[j]:
                heapq.heappush(heap, (len(where[j]), j))
        if progress is not None and time.monotonic() - clock > 0.5:
            clock = time.monotonic()
            progress("columns eliminated", len(log), n)
    core_columns = [j for j in range(n) if active[j]]
    return log, core_columns, [rows[i] for i in sorted(alive)]


# -- modular linear algebra in floats ----------------------------------------------------------

#: Word primes in ``[2¹⁹, 2²⁰)``: products stay below ``2⁴⁰``, sums of ``INNER`` of them below ``2⁵²``.
PRIME_LOW, PRIME_HIGH, INNER = 2**19, 2**20, 4000


class _Singular(Exception):
    """No pivot modulo the prime in ``column``; ``perm`` orders the rows as far as it got."""

    def __init__(self, column: int, perm: Any) -> None:
        super().__init__(column)
        self.column, self.perm = column, perm


def _prime(rng: random.Random, used: set[int]) -> int:
    while True:
        q = int(gmpy2.next_prime(rng.randrange(PRIME_LOW, PRIME_HIGH - 4096)))
        if q not in used:
            used.add(q)
            return q


def _mod(x: Any, p: int) -> Any:
    """``x mod p`` for a float array of integers below ``2⁵²`` in size (``p = 0``: ``x`` itself)."""
    import numpy as np

    if not p:
        return x
    q = x * (1.0 / p)
    np.floor(q, out=q)
    q *= p
    r = x - q
    r[r < 0] += p
    r[r >= p] -= p
    return r


def _mm(A: Any, B: Any, p: int) -> Any:
    """``A·B mod p`` of float arrays with entries in ``[0, p)``, exact (inner sums cut at ``INNER``)."""

    out = _mod(A[:, :INNER] @ B[:INNER], p)
    for s in range(INNER, A.shape[1], INNER):
        out = _mod(out + A[:, s : s + INNER] @ B[s : s + INNER], p)
    return out


def _trsm(L: Any, Y: Any, p: int) -> Any:
    """``L⁻¹·Y mod p`` for ``L`` unit lower triangular (only its strictly lower part is read)."""
    import numpy as np

    h = L.shape[0]
    if h <= 16:
        X = Y.copy()
        for i in range(1, h):
            X[i] = _mod(X[i] - L[i, :i] @ X[:i], p)
        return X
    s = h // 2
    X1 = _trsm(L[:s, :s], Y[:s], p)
    X2 = _trsm(L[s:, s:], _mod(Y[s:] - _mm(L[s:, :s], X1, p), p), p)
    return np.vstack([X1, X2])


def _lu(A: Any, p: int) -> tuple[Any, Any, int]:
    """``P·A = L·U`` modulo ``p`` for ``A`` (m × k, m ≥ k): (L and U in one array, perm, swaps).

    Recursive on the columns (the updates are matrix products); raises :class:`_Singular`
    when the rank modulo ``p`` is below ``k``. With ``p = 0``, in floating point with
    partial pivoting (the largest entry of the column).
    """
    import numpy as np

    A = A.copy()
    m, k = A.shape
    perm = np.arange(m)
    swaps = 0

    def panel(c0: int, c1: int) -> None:
        nonlocal swaps
        for j in range(c0, c1):
            nz = np.flatnonzero(A[j:, j])
            if nz.size == 0:
                raise _Singular(j, perm.copy())
            r = j + (int(nz[0]) if p else int(np.argmax(np.abs(A[j:, j]))))
            if r != j:
                A[[j, r]] = A[[r, j]]
                perm[[j, r]] = perm[[r, j]]
                swaps += 1
            scale = pow(int(A[j, j]), p - 2, p) if p else 1.0 / A[j, j]
            A[j + 1 :, j] = _mod(A[j + 1 :, j] * scale, p)
            if j + 1 < c1:
                update = np.outer(A[j + 1 :, j], A[j, j + 1 : c1])
                A[j + 1 :, j + 1 : c1] = _mod(A[j + 1 :, j + 1 : c1] - update, p)

    def factor(c0: int, c1: int) -> None:
        if c1 - c0 <= 16:
            panel(c0, c1)
            return
        h = (c0 + c1) // 2
        factor(c0, h)
        A[c0:h, h:c1] = _trsm(A[c0:h, c0:h], A[c0:h, h:c1], p)
        A[h:, h:c1] = _mod(A[h:, h:c1] - _mm(A[h:, c0:h], A[c0:h, h:c1], p), p)
        factor(h, c1)

    if k:
        factor(0, k)
    return A, perm, swaps


def _inverse(LU: Any, p: int) -> Any:
    """``(L·U)⁻¹ mod p`` from a square factorization (unit ``L``)."""
    import numpy as np

    k = LU.shape[0]
    identity = np.eye(k)
    dinv = np.array([pow(int(x), p - 2, p) for x in np.diag(LU)], dtype=float)
    upper = _mod(np.triu(LU, 1) * dinv[:, None], p)  # D⁻¹U, unit upper triangular
    upper_inv = _trsm(np.ascontiguousarray(upper[::-1, ::-1]), identity, p)[::-1, ::-1]
    return _mm(_mod(upper_inv * dinv[None, :], p), _trsm(LU, identity, p), p)


def _reduced(rows: Sequence[Mapping[int, int]], index: Mapping[int, int], k: int, p: int) -> Any:
    """The rows as a dense float array modulo ``p`` on the columns of ``index``."""
    import numpy as np

    A = np.zeros((len(rows), k))
    for i, row in enumerate(rows):
        for j, x in row.items():
            A[i, index[j]] = x % p
    return A


def _det_mod(B: list[list[int]], p: int) -> int:
    """``det B mod p`` (0 when singular)."""
    import numpy as np

    try:
        LU, _, swaps = _lu(np.array([[x % p for x in row] for row in B], dtype=float), p)
    except _Singular:
        return 0
    det = (-1) ** swaps
    for x in np.diag(LU):
        det = det * int(x) % p
    return det % p


def _determinant_bound(B: list[list[int]]) -> tuple[int, int] | None:
    """Proven upper bounds on ``|det B|`` (close to it) and on ``‖B⁻¹‖∞``, from floating point.

    With ``P·B ≈ L·D·V`` in floats, ``X ≈ L⁻¹`` and ``Y ≈ V⁻¹`` forced unit triangular
    have determinant 1, so ``det(X·P·B·Y) = ±det B`` while ``X·P·B·Y`` is nearly diagonal:
    Hadamard's bound on its rows is tight. The rows are those of the computed product
    plus its rounding error, bounded by ``γ·|X|·|P·B|·|Y|`` (Higham, *Accuracy and
    Stability of Numerical Algorithms*, 2002, §3.5), taken with a wide margin. The
    same product, diagonally dominant, bounds ``‖B⁻¹‖∞ ≤ ‖Y‖∞·‖F⁻¹‖∞·‖X‖∞``. ``None``:
    the floats give no bound (huge entries, overflow, no dominance).
    """
    import numpy as np

    k = len(B)
    if max(abs(x) for row in B for x in row) >= 2**50:
        return None
    M = np.array(B, dtype=float)
    try:
        LU, perm, _ = _lu(M, 0)
    except _Singular:
        return None
    identity = np.eye(k)
    with np.errstate(all="ignore"):
        X = np.tril(_trsm(LU, identity, 0), -1) + identity
        V = np.triu(LU, 1) / np.diag(LU)[:, None]
        Y = np.triu(_trsm(np.ascontiguousarray(V[::-1, ::-1]), identity, 0)[::-1, ::-1], 1)
        Y += identity
        for T in (X, Y):
            T[np.abs(T) < 2.0**-500] = 0.0  # no underflow in the products below
        P = M[perm]
        F = (X @ P) @ Y
        E = (np.abs(X) @ np.abs(P)) @ np.abs(Y) * (64.0 * (k + 2) * 2.0**-53) + 2.0**-900
        rows = (np.sqrt((F * F).sum(axis=1)) + np.sqrt((E * E).sum(axis=1))) * (1 + 2.0**-30)
        logs = np.log2(rows)
        diagonal = np.abs(np.diag(F))  # F = diag·(1 + Z), ‖Z‖∞ ≤ rho: ‖F⁻¹‖∞ ≤ max 1/|d|/(1 − rho)
        rho = float(((np.abs(F - np.diag(np.diag(F))) + E).sum(axis=1) / diagonal).max())
        norms = [float(np.abs(T).sum(axis=1).max()) for T in (X, Y)]
        inverse = norms[0] * norms[1] / float(diagonal.min()) / (1 - rho) * (1 + 2.0**-30)
    if not np.isfinite(logs).all() or not 0 <= rho < 0.5 or not np.isfinite(inverse):
        return None
    total = float(logs.sum()) + 2.0**-20 * (k + 1 + float(np.abs(logs).sum()))
    e = math.floor(total)
    mantissa = math.ceil(2.0 ** (total - e) * 2**52) + 1
    det = mantissa << (e - 52) if e >= 52 else -(-mantissa >> (52 - e))
    return det, math.ceil(inverse) + 1


def _hadamard(M: Sequence[Sequence[int]], extra: int = 0) -> int:
    """``∏ ⌈√(‖row‖² + extra²)⌉`` over the rows: a bound on the determinants of ``M``'s rows."""
    out = 1
    for row in M:
        out *= math.isqrt(sum(x * x for x in row) + extra * extra - 1) + 1 if any(row) else 1
    return out


def _ratrecon(u: int, P: int, num: int, den: int) -> tuple[int, int]:
    """``a/b ≡ u (mod P)`` with ``|a| ≤ num``, ``0 < b ≤ den`` (unique as ``P > 2·num·den``)."""
    r0, r1, t0, t1 = gmpy2.mpz(P), gmpy2.mpz(u % P), gmpy2.mpz(0), gmpy2.mpz(1)
    while r1 > num:
        q = r0 // r1
        r0, r1 = r1, r0 - q * r1
        t0, t1 = t1, t0 - q * t1
    if t1 == 0 or abs(t1) > den:  # pragma: no cover - the bounds exclude it
        raise ArithmeticError("internal check failed: no rational reconstruction")
    return (int(r1), int(t1)) if t1 > 0 else (-int(r1), -int(t1))


def _dixon(
    B: list[list[int]], inverse: Any, p: int, W: list[list[int]], den: int = 0, norm: int = 0
) -> tuple[list[list[int]], int]:
    """``B⁻¹W = num/δ`` exactly: ``p``-adic lifting with ``inverse = B⁻¹ mod p`` (Dixon 1982).

    ``den`` and ``norm``, when given, bound ``|det B|`` and ``‖B⁻¹‖∞`` (else Hadamard's
    bounds do); the numerators ``det B·B⁻¹w`` are bounded by ``den·norm·max|w|`` then.
    """
    import numpy as np

    k, t = len(B), len(W[0])
    top_w = max(abs(x) for row in W for x in row)
    if norm:
        num = den * norm * top_w
    else:
        columns = [list(c) for c in zip(*B, strict=True)]
        norm_w = math.isqrt(max(sum(row[j] ** 2 for row in W) for j in range(t))) + 1
        den = den or min(_hadamard(B), _hadamard(columns))
        # Cramer: a column of B replaced by one of W
        num = min(_hadamard(B, top_w), math.prod(max(_hadamard([c]), norm_w) for c in columns))
    P, steps = 1, 0
    while P <= 2 * num * den:
        P, steps = P * p, steps + 1
    top = max(abs(x) for row in B for x in row)
    kind: Any = float if top * k * p < 2**52 else np.int64 if top * k * p < 2**62 else object
    Bx = np.array(B, dtype=kind)
    R = np.array(W, dtype=kind)
    digits = []
    for _ in range(steps):
        X = _mm(inverse, (R % p).astype(float), p)
        digits.append(X.astype(np.int64))
        if kind is float:
            R = (R - _mm(Bx, X, 0)) / p
        else:
            R = (R - Bx @ X.astype(np.int64).astype(kind)) // p
    level = [d.astype(object) for d in digits]
    base = p
    while len(level) > 1:  # the p-adic digits summed in a balanced tree
        pairs = [level[i] + level[i + 1] * base for i in range(0, len(level) - 1, 2)]
        level = pairs + level[len(level) - len(level) % 2 :]
        base *= base
    Y = level[0]
    delta, nums = 1, [[0] * t for _ in range(k)]
    for i in range(k):
        for j in range(t):
            z = delta * int(Y[i, j]) % P
            z = z - P if 2 * z > P else z
            if abs(z) > num:  # a larger denominator: multiply it in
                a, b = _ratrecon(z, P, num, den)
                delta *= b
                nums = [[x * b for x in row] for row in nums]
                z = a
            nums[i][j] = z
    return nums, delta


# -- Hermite normal forms modulo a multiple of the determinant ---------------------------------


def _hnf_mod(
    vectors: Sequence[Sequence[int]],
    moduli: Sequence[int],
    combos: Sequence[dict[int, int]] | None = None,
) -> tuple[list[list[int]], list[dict[int, int]]]:
    """The Hermite normal form of the rows spanned by ``vectors`` and the ``moduli[i]·e_i``.

    Column by column: the rows with an entry in column ``i`` and the untouched
    ``moduli[i]·e_i`` are merged by extended gcds into one pivot row; entries of
    later columns ``c`` are reduced modulo ``moduli[c]`` (subtracting the untouched
    ``moduli[c]·e_c``), so they stay small (Domich, Kannan and Trotter 1987).
    ``combos`` (optional) are carried along: the pivot rows' combinations of the vectors.
    """
    t = len(moduli)
    rows = [[x % m for x, m in zip(v, moduli, strict=True)] for v in vectors]
    carried = [dict(c) for c in combos] if combos is not None else [{} for _ in rows]
    H: list[list[int]] = []
    out: list[dict[int, int]] = []
    for i in range(t):
        pivot, pc = [0] * t, dict[int, int]()
        pivot[i] = moduli[i]
        rest, rest_c = [], []
        for v, vc in zip(rows, carried, strict=True):
            if v[i] == 0:
                if any(v):
                    rest.append(v)
                    rest_c.append(vc)
                continue
            g, a, b = (int(x) for x in gmpy2.gcdext(pivot[i], v[i]))
            u, w = pivot[i] // g, v[i] // g
            new = [(a * x + b * y) % m for x, y, m in zip(pivot, v, moduli, strict=True)]
            v = [(u * y - w * x) % m for x, y, m in zip(pivot, v, moduli, strict=True)]
            new[i] = g
            new_c = _combine(pc, a, vc, b)
            vc = _combine(vc, u, pc, -w)
            pivot, pc = new, new_c
            if any(v):
                rest.append(v)
                rest_c.append(vc)
        rows, carried = rest, rest_c
        H.append(pivot)
        out.append(pc)
    for c in range(t):  # entries above each pivot reduced modulo it
        for r in range(c):
            q = H[r][c] // H[c][c]
            if q:
                H[r] = [x - q * y for x, y in zip(H[r], H[c], strict=True)]
                out[r] = _combine(out[r], 1, out[c], -q)
    return H, out


def _combine(x: dict[int, int], a: int, y: dict[int, int], b: int) -> dict[int, int]:
    """``a·x + b·y`` of sparse vectors."""
    out = {j: a * v for j, v in x.items()} if a != 1 else dict(x)
    for j, v in y.items():
        out[j] = out.get(j, 0) + b * v
    return {j: v for j, v in out.items() if v}


def _coordinates_in(v: Sequence[int], H: list[list[int]]) -> list[int]:
    """``z`` with ``z·H = v`` for ``H`` upper triangular (``v`` in its row lattice)."""
    v = list(v)
    z = []
    for i, row in enumerate(H):
        q, r = divmod(v[i], row[i])
        if r:  # pragma: no cover - the vectors handed in lie in the lattice
            raise ArithmeticError("internal check failed: a vector outside the lattice")
        z.append(q)
        if q:
            v = [x - q * y for x, y in zip(v, row, strict=True)]
    return z


def _smith(H: list[list[int]], N: int) -> tuple[list[int], Any]:
    """Invariants of ``Z^t / row(H)`` (``H`` in Hermite form, determinant ``N``) and ``z ↦ coordinates``.

    Pivots 1 are eliminated first (``e_i = −Σ H[i][c]·e_c``), the rest goes to
    :func:`realquad.core.linalg.smith_normal_form`.
    """
    t = len(H)
    big = [i for i in range(t) if H[i][i] > 1]
    place = {i: s for s, i in enumerate(big)}
    expr: list[list[int]] = [[] for _ in range(t)]  # e_i in terms of the e_c, c in big
    for i in reversed(range(t)):
        if i in place:
            expr[i] = [int(s == place[i]) for s in range(len(big))]
            continue
        acc = [0] * len(big)
        for c in range(i + 1, t):
            if H[i][c]:
                acc = [(a - H[i][c] * e) % N for a, e in zip(acc, expr[c], strict=True)]
        expr[i] = acc
    relations = []
    for i in big:
        acc = [H[i][i] * x for x in expr[i]]
        for c in range(i + 1, t):
            if H[i][c]:
                acc = [(a + H[i][c] * e) % N for a, e in zip(acc, expr[c], strict=True)]
        relations.append(acc)
    relations += [[N * int(r == s) for s in range(len(big))] for r in range(len(big))]
    smith = smith_normal_form(relations, len(big)) if big else None

    def coordinates(z: Sequence[int]) -> list[int]:
        if smith is None:
            return []
        y = [0] * len(big)
        for zi, e in zip(z, expr, strict=True):
            if zi:
                y = [a + zi * b for a, b in zip(y, e, strict=True)]
        return smith.coordinates(y)

    return (smith.invariants if smith else []), coordinates


# -- the dense core ----------------------------------------------------------------------------


def _dense_quotient(
    core_rows: list[dict[int, int]], columns: list[int]
) -> tuple[list[int], list[list[int]]] | None:
    """Invariants and the coordinates of each core column, or ``None`` (rank below ``k``)."""
    import numpy as np

    k = len(columns)
    if k == 0:
        return [], []
    index = {c: i for i, c in enumerate(columns)}
    rows = sorted(core_rows, key=lambda r: (max(abs(x) for x in r.values()), len(r)))
    rng = random.Random(7919 * k + len(rows))
    used: set[int] = set()
    while True:
        p = _prime(rng, used)
        try:
            try:
                candidates = rows[: k + 32]
                LU, perm, _ = _lu(_reduced(candidates, index, k, p), p)
            except _Singular:
                candidates = rows
                LU, perm, _ = _lu(_reduced(candidates, index, k, p), p)
            break
        except _Singular as failed:
            if _dependent(rows, columns, failed.column, failed.perm, rng, used):
                return None
    chosen = [int(i) for i in perm[:k]]
    B = [[0] * k for _ in range(k)]
    for r, i in enumerate(chosen):
        for j, x in candidates[i].items():
            B[r][index[j]] = x
    inverse = _inverse(np.ascontiguousarray(LU[:k]), p)
    det_p = 1
    for x in np.diag(LU[:k]):
        det_p = det_p * int(x) % p
    floats = _determinant_bound(B)
    bound, norm = floats or (min(_hadamard(B), _hadamard([list(c) for c in zip(*B)])), 0)
    t = 0
    columns_of_nums: list[list[int]] = []  # the columns of B⁻¹W, times delta
    delta, want = 1, min(k, 4)
    while True:  # x ↦ x·B⁻¹W mod Z^t, injective on Z^k/row(B) once its image has order |det B|
        if want >= k:  # the identity: always injective
            columns_of_nums, delta, new = [], 1, [[int(i == j) for i in range(k)] for j in range(k)]
        else:
            new = [[rng.randint(-512, 512) for _ in range(k)] for _ in range(want - t)]
        nums, d = _dixon(B, inverse, p, [list(r) for r in zip(*new, strict=True)], bound, norm)
        g = delta * d // math.gcd(delta, d)
        columns_of_nums = [[x * (g // delta) for x in c] for c in columns_of_nums]
        columns_of_nums += [[x * (g // d) for x in c] for c in zip(*nums, strict=True)]
        delta, t = g, len(columns_of_nums)
        V = [[x % delta for x in r] for r in zip(*columns_of_nums, strict=True)]
        H1, _ = _hnf_mod(V, [delta] * t)
        image = delta**t // math.prod(H1[i][i] for i in range(t))
        if _determinant_is(B, image, bound, [(p, det_p)], rng, used):
            break
        if t >= k:  # pragma: no cover - W = 1 is injective
            raise ArithmeticError("internal check failed: det B is not the order of Z^k/B")
        want = min(2 * t, k)
    skip = set(chosen)
    others = []
    for i, row in enumerate(rows):
        if i in skip:
            continue
        acc = [0] * t
        for j, x in row.items():
            for s, y in enumerate(V[index[j]]):
                acc[s] += x * y
        others.append([a % delta for a in acc])
    H2, _ = _hnf_mod(others, [delta] * t)
    H3, _ = _hnf_mod([_coordinates_in(h, H1) for h in H2], [image] * t)
    invariants, coordinates = _smith(H3, math.prod(H3[i][i] for i in range(t)))
    return invariants, [coordinates(_coordinates_in(v, H1)) for v in V]


def _determinant_is(
    B: list[list[int]],
    image: int,
    bound: int,
    known: list[tuple[int, int]],
    rng: random.Random,
    used: set[int],
) -> bool:
    """Whether ``det B = ±image``, given ``|det B| ≤ bound`` and ``image | det B``.

    ``det B = ±image·c`` with ``|c| ≤ bound/image``: residues ``±image`` (one sign)
    modulo primes not dividing ``image`` whose product passes ``bound/image + 1``
    force ``c = ±1``.
    """
    sign, product = 0, 1
    pending = list(known)
    while product <= bound // image + 1:
        if pending:
            q, det_q = pending.pop()
        else:
            q = _prime(rng, used)
            det_q = -1 if image % q == 0 else _det_mod(B, q)
        if image % q == 0:
            continue
        s = 1 if det_q == image % q else -1 if det_q == -image % q else 0
        if s == 0 or sign not in (0, s):
            return False
        sign, product = s, product * q
    return True


def _dependent(
    rows: list[dict[int, int]],
    columns: list[int],
    column: int,
    perm: Any,
    rng: random.Random,
    used: set[int],
) -> bool:
    """Whether core column ``columns[column]`` is a rational combination of those before it.

    The rows ``perm[:column]`` were independent on those columns modulo a prime;
    the combination solving them is lifted exactly and checked on every row.
    """
    import numpy as np

    if column == 0:
        return False  # every core column has a nonzero entry
    before, last = columns[:column], columns[column]
    picked = [rows[int(i)] for i in perm[:column]]
    B = [[row.get(c, 0) for c in before] for row in picked]
    while True:
        p = _prime(rng, used)
        try:
            LU, _, _ = _lu(np.array([[x % p for x in r] for r in B], dtype=float), p)
            break
        except _Singular:
            continue
    y, delta = _dixon(B, _inverse(LU, p), p, [[-row.get(last, 0)] for row in picked])
    vector = {c: y[i][0] for i, c in enumerate(before) if y[i][0]}
    vector[last] = delta
    return all(sum(x * vector.get(j, 0) for j, x in row.items()) == 0 for row in rows)


# -- generators --------------------------------------------------------------------------------


def _sparse_generators(
    images: list[list[int]], invariants: list[int]
) -> tuple[list[dict[int, int]], list[list[int]]]:
    """Generators (sparse, few columns) and the images of the columns on them.

    A cyclic group takes the first column whose image generates it (the coordinates
    are rescaled so that it maps to 1); otherwise columns are added in order until
    the Hermite form of their images and the ``dᵢ·eᵢ`` is the identity, whose rows'
    combinations are the generators.
    """
    s = len(invariants)
    if s == 0:
        return [], images
    if s == 1:
        d = invariants[0]
        for j, (a,) in enumerate(images):
            if math.gcd(a, d) == 1:
                inverse = pow(a, -1, d)
                return [{j: 1}], [[x * inverse % d] for (x,) in images]
    H, combos = _hnf_mod([], invariants)
    size = math.prod(H[i][i] for i in range(s))  # the index of the subgroup found so far
    for j, image in enumerate(images):
        if not any(image):
            continue
        H_j, combos_j = _hnf_mod([*H, image], invariants, [*combos, {j: 1}])
        size_j = math.prod(H_j[i][i] for i in range(s))
        if size_j < size:  # the column enlarges the subgroup: keep it
            H, combos, size = H_j, combos_j, size_j
        if size == 1:
            e = invariants[-1]
            generators = [
                {c: (x + e // 2) % e - e // 2 for c, x in combo.items() if x % e}
                for combo in combos
            ]
            return generators, images
    raise ArithmeticError("internal check failed: the columns do not generate the group")
