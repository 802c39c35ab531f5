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

**Method.** (1) *Structured Gaussian elimination*
(:mod:`realquad.core.elimination`: pivots ``±1``, lightest columns first, a
Markowitz cost limit, stopping at a quarter filled). Its row operations are
unimodular, so the remaining *core* (``k`` columns, ``m ≥ k`` rows) has the same
group. (2) On the core, ``k`` rows ``B`` independent modulo a word prime ``p`` are
chosen; ``G' = Z^k/row(B)`` has order ``|det B|``. For a random integer matrix
``W`` (``k × t``) the map ``x ↦ x·B⁻¹W mod Z^t`` kills ``row(B)``; ``B⁻¹W`` comes
from Dixon's ``p``-adic lifting (Dixon 1982) and rational reconstruction, with
bounds on ``|det B|`` and ``‖B⁻¹‖`` proven from floating point
(``determinant_bound``; Hadamard's when the floats give none). The map is
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
is below ``n``. The modular algebra is :mod:`realquad.core.modular_linalg`.

**Kernel.** :func:`lattice_kernel` returns integer vectors ``c`` with
``Σ c[i]·rows[i] = 0``, each checked exactly; :func:`lattice_quotient_and_kernel`
gives both answers from one elimination and one basis ``B``. Elimination logs its
row operations; replayed backwards they rewrite a combination of the rows after
it on the original rows. Repeated and zero rows give vectors of one or two ±1
entries, rows that elimination made zero small ones (lightest first). The rest
come from the core: ``s`` other rows ``E`` drawn with ``seed``, in batches of
``BATCH``; the kernel of ``B ∪ E`` is ``{(x, y) : x = −y·Λ ∈ Z^k}``, ``Λ = E·B⁻¹``.
Its vectors are short, about ``|det B|^{1/s}``, so a few ``p``-adic digits of
``Λ`` (Dixon lifting on ``Bᵀ``) suffice: LLL (Lenstra, Lenstra and Lovász 1982;
brought in by the top bits first) finds them in a lattice of ``s + 4``
dimensions where they are the short vectors; ``s`` of them, checked, generate
the kernel of the rows they use. Failing that, ``Λ = N/δ`` exactly, a basis from
a Hermite form of ``{y : y·N ≡ 0 mod δ}`` and LLL. About 300-bit entries for
``s = 8`` and ``|det B| ≈ 2²⁵⁰⁰``.

**Membership.** :func:`lattice_solve` writes a vector ``t ∈ L`` on the rows:
``t`` is reduced by the pivot rows in the order they were taken (each
pivot's ``±1`` clears ``t``'s entry in its column), which leaves ``v`` on the
core's columns; the kernel of ``B ∪ {v} ∪ E`` for a batch ``E`` of other core
rows (as above) has coefficients on ``v`` that generate ``t_v·Z``, ``t_v`` the
order of ``v`` modulo the lattice of ``B ∪ E``; extended gcds combine its
basis into a vector with coefficient ``−1`` on ``v`` when ``t_v = 1``. Random
batches of 7, 15 and 31 rows generate the core's lattice with high
probability, then all the rows are taken, and ``t_v > 1`` with all of them
proves ``t ∉ L``. Replaying the elimination rewrites the answer on the
original rows, and it is checked.

References: B. A. LaMacchia and A. M. Odlyzko, "Solving large sparse linear
systems over finite fields", CRYPTO '90, LNCS 537 (1991); H. M. Markowitz,
"The elimination form of the inverse and its application to linear
programming", *Management Sci.* 3 (1957); J. D. Dixon, "Exact solution of
linear equations using p-adic expansions", *Numer. Math.* 40 (1982);
P. D. Domich, R. Kannan and L. E. Trotter, "Hermite normal form computation
using modulo determinant arithmetic", *Math. Oper. Res.* 12 (1987);
A. K. Lenstra, H. W. Lenstra and L. Lovász, "Factoring polynomials with
rational coefficients", *Math. Ann.* 261 (1982).
"""

from __future__ import annotations

import dataclasses
import math
import random
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import gmpy2

from realquad.core.elimination import Elimination, eliminate, normalised_rows, replay
from realquad.core.linalg import smith_normal_form
from realquad.core.modular_linalg import (
    SingularModP,
    coordinates_in,
    dense_rows_mod,
    dependent_column,
    determinant_bound,
    determinant_is,
    dixon_solve,
    hadamard_bound,
    hnf_mod,
    inverse_mod,
    kernel_mod,
    lifting_bounds,
    lll_gram,
    lll_rows,
    lu_mod,
    padic_lift,
    rank_profile_mod,
    vanishes_mod,
    word_prime,
)
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
    clean, _, _ = normalised_rows(rows, n)
    if len({j for r in clean for j in r}) < n or len(clean) < n:
        return None
    elimination = eliminate(clean, n, progress)
    return _quotient(elimination, n, _Core.of(elimination))


def lattice_kernel(
    rows: Sequence[Mapping[int, int]], n: int, count: int = 8, seed: int = 1
) -> list[dict[int, int]]:
    """Up to ``count`` independent integer vectors ``c`` with ``Σ c[i]·rows[i] = 0``, small ones first.

    Each vector is sparse (row index ↦ nonzero coefficient) and checked exactly
    before it is returned; ``[]`` when the rows are independent. ``seed`` picks
    the rows that the dense core's vectors combine (module notes: *Kernel*).

    >>> lattice_kernel([{0: 1, 1: 2}, {1: 1}, {0: 1}, {0: 2, 1: 3}], 2)
    [{0: 1, 1: 1, 2: 1, 3: -1}, {0: 1, 1: -2, 2: -1}]
    >>> lattice_kernel([{0: 2}, {0: 3}], 1)              # 3·(2) − 2·(3) = 0
    [{0: 3, 1: -2}]
    >>> lattice_kernel([{0: 1}, {1: 1}], 2)
    []
    """
    return lattice_quotient_and_kernel(rows, n, count, seed, quotient=False)[1]


def lattice_quotient_and_kernel(
    rows: Sequence[Mapping[int, int]],
    n: int,
    count: int = 8,
    seed: int = 1,
    progress: Progress | None = None,
    quotient: bool = True,
    kernel_if_finite: bool = False,
) -> tuple[LatticeQuotient | None, list[dict[int, int]]]:
    """:func:`lattice_quotient` and :func:`lattice_kernel` from one elimination.

    The dense core's basis (rows independent modulo a prime) serves both; with
    ``quotient=False`` the first answer is ``None`` and only the kernel is computed;
    with ``kernel_if_finite`` the kernel is ``[]`` when the quotient is infinite.

    >>> Q, kernel = lattice_quotient_and_kernel([{0: 2}, {0: 4}, {0: 1, 1: 1}], 2)
    >>> Q.invariants, kernel
    ([2], [{0: 2, 1: -1}])
    """
    if n < 0:
        raise InputError(f"the number of columns must be ≥ 0, not {n}")
    if count < 0:
        raise InputError(f"the number of kernel vectors must be ≥ 0, not {count}")
    clean, origin, trivial = normalised_rows(rows, n)
    elimination = eliminate(clean, n, progress)
    full = len(clean) >= n and len({j for r in clean for j in r}) == n
    core = _Core.of(elimination)
    found = _quotient(elimination, n, core) if quotient and full else None
    if kernel_if_finite and found is None:
        return None, []
    vectors = [_canonical(c) for c in sorted(trivial, key=_weight)[:count]]
    want = count - len(vectors)
    small = _smallest(elimination.steps, elimination.zero, want)
    want -= len(small)
    dense: list[dict[int, int]] = []
    if want > 0 and len(core.rows) > (len(core.basis.chosen) if core.basis else 0):
        found_in_core = _core_kernel(core, want, random.Random(seed))
        dense = [{core.index[i]: x for i, x in y.items()} for y in found_in_core]
    for vector in small + replay(elimination.steps, dense):
        c = _canonical({origin[i]: x for i, x in vector.items()})
        if c and _vanishes(c, rows):
            vectors.append(c)
    return found, vectors


def _canonical(vector: Mapping[int, int]) -> dict[int, int]:
    """The vector sorted by index, its first coefficient positive."""
    items = sorted(vector.items())
    sign = -1 if items and items[0][1] < 0 else 1
    return {i: sign * x for i, x in items}


def _weight(row: Mapping[int, int]) -> tuple[int, int]:
    """``(largest |entry|, number of entries)``: lighter rows and vectors first."""
    return max(abs(x) for x in row.values()), len(row)


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


@dataclass
class _Basis:
    """``k`` core rows independent modulo ``p``: positions, ``B⁻¹ mod p`` (rows in that order), ``det B mod p``."""

    p: int
    chosen: list[int]
    inverse: Any
    det: int
    bounds: tuple[int, int] | None = None

    def bound(self, B: list[list[int]]) -> tuple[int, int]:
        """Bounds on ``|det B|`` and ``‖B⁻¹‖∞`` (0: none), computed once (``B``: the chosen rows)."""
        if self.bounds is None:
            columns = [list(c) for c in zip(*B, strict=True)]
            hadamard = min(hadamard_bound(B), hadamard_bound(columns))
            self.bounds = determinant_bound(B) or (hadamard, 0)
        return self.bounds


@dataclass
class _Core:
    """The core rows (lightest first) and their indices among the eliminated rows; a basis."""

    rows: list[dict[int, int]]
    index: list[int]
    columns: list[int]
    rng: random.Random
    used: set[int]
    searched: bool = False
    found: _Basis | None = None

    @classmethod
    def of(cls, elimination: Elimination) -> _Core:
        """The core of ``elimination``."""
        index = sorted(elimination.core, key=lambda i: _weight(elimination.rows[i]))
        rows = [elimination.rows[i] for i in index]
        k = len(elimination.columns)
        return cls(rows, index, elimination.columns, random.Random(7919 * k + len(rows)), set())

    @property
    def basis(self) -> _Basis | None:
        """``k`` rows independent modulo a prime (looked for once), ``None`` when the rank is below ``k``."""
        if not self.searched:
            self.searched = True
            k = len(self.columns)
            if k and len(self.rows) >= k and len({j for r in self.rows for j in r}) == k:
                self.found = _core_basis(self)
        return self.found


def _core_basis(core: _Core) -> _Basis | None:
    """``k`` rows independent modulo a word prime, or ``None`` when the rank is below ``k`` (proven)."""
    import numpy as np

    rows, columns = core.rows, core.columns
    k = len(columns)
    index = {c: i for i, c in enumerate(columns)}
    while True:
        p = word_prime(core.rng, core.used)
        try:
            try:
                top = k + 32
                LU, perm, _ = lu_mod(dense_rows_mod(rows[:top], index, k, p), p)
            except SingularModP:
                LU, perm, _ = lu_mod(dense_rows_mod(rows, index, k, p), p)
            break
        except SingularModP as failed:
            if dependent_column(rows, columns, failed.column, failed.perm, core.rng, core.used):
                return None
    det = 1
    for x in np.diag(LU[:k]):
        det = det * int(x) % p
    inverse = inverse_mod(np.ascontiguousarray(LU[:k]), p)
    return _Basis(p, [int(i) for i in perm[:k]], inverse, det)


def _quotient(elimination: Elimination, n: int, core: _Core) -> LatticeQuotient | None:
    """The quotient from the eliminated rows, or ``None`` (rank below ``n``)."""
    k = len(core.columns)
    if k and core.basis is None:
        return None
    invariants, core_images = _dense_quotient(core) if k else ([], [])
    images: list[list[int] | None] = [None] * n
    for j, image in zip(core.columns, core_images, strict=True):
        images[j] = image
    s = len(invariants)
    for c, pivot in reversed(elimination.log):  # e_c = −ε Σ_{j≠c} pivot[j]·e_j, ε = pivot[c] = ±1
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


def _dense_quotient(core: _Core) -> tuple[list[int], list[list[int]]]:
    """Invariants and the coordinates of each core column, given a basis of the core."""
    basis = core.basis
    assert basis is not None
    rows, columns, rng, used = core.rows, core.columns, core.rng, core.used
    p, inverse = basis.p, basis.inverse
    k = len(columns)
    index = {c: i for i, c in enumerate(columns)}
    chosen = basis.chosen
    B = [[0] * k for _ in range(k)]
    for r, i in enumerate(chosen):
        for j, x in rows[i].items():
            B[r][index[j]] = x
    det_p = basis.det
    bound, norm = basis.bound(B)
    t = 0
    columns_of_nums: list[list[int]] = []  # the columns of B⁻¹W, times delta
    delta, want = 1, min(k, 4)
    while True:  # x ↦ x·B⁻¹W mod Z^t, injective on Z^k/row(B) once its image has order |det B|
        if want >= k:  # the identity: always injective
            columns_of_nums, delta, new = [], 1, [[int(i == j) for i in range(k)] for j in range(k)]
        else:
            new = [[rng.randint(-512, 512) for _ in range(k)] for _ in range(want - t)]
        nums, d = dixon_solve(B, inverse, p, [list(r) for r in zip(*new, strict=True)], bound, norm)
        g = delta * d // math.gcd(delta, d)
        columns_of_nums = [[x * (g // delta) for x in c] for c in columns_of_nums]
        columns_of_nums += [[x * (g // d) for x in c] for c in zip(*nums, strict=True)]
        delta, t = g, len(columns_of_nums)
        V = [[x % delta for x in r] for r in zip(*columns_of_nums, strict=True)]
        H1, _ = hnf_mod(V, [delta] * t)
        image = delta**t // math.prod(H1[i][i] for i in range(t))
        if determinant_is(B, image, bound, [(p, det_p)], rng, used):
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
    H2, _ = hnf_mod(others, [delta] * t)
    H3, _ = hnf_mod([coordinates_in(h, H1) for h in H2], [image] * t)
    invariants, coordinates = _smith(H3, math.prod(H3[i][i] for i in range(t)))
    return invariants, [coordinates(coordinates_in(v, H1)) for v in V]


# -- kernel vectors ----------------------------------------------------------------------------

#: Extra rows of the dense core whose combined kernel is found in one Hermite form.
BATCH = 16
#: Columns of the random projection in :func:`_short_kernel`.
SHORT_PROJECTION = 4


def _smallest(
    steps: list[tuple[int, list[tuple[int, int]]]], zero: list[int], want: int
) -> list[dict[int, int]]:
    """Up to ``want`` kernel vectors from rows that elimination made zero, the lightest first.

    The rows that became zero first are tried (four times as many as wanted).
    """
    if want <= 0 or not zero:
        return []
    found = replay(steps, [{i: 1} for i in zero[: 4 * want + 16]])
    return sorted(found, key=_weight)[:want]


def _combination(vector: Mapping[int, int], rows: Sequence[Mapping[int, int]]) -> dict[int, int]:
    """``Σ vector[i]·rows[i]`` in integers, without its zero entries."""
    total: dict[int, int] = {}
    get = total.get
    for i, c in vector.items():
        for j, x in rows[i].items():
            total[int(j)] = get(int(j), 0) + c * int(x)
    return {j: x for j, x in total.items() if x}


def _vanishes(vector: Mapping[int, int], rows: Sequence[Mapping[int, int]]) -> bool:
    """Whether ``Σ vector[i]·rows[i] = 0``, in integers."""
    return not _combination(vector, rows)


def _core_kernel(core: _Core, want: int, rng: random.Random) -> list[dict[int, int]]:
    """Up to ``want`` independent kernel vectors of the core rows (position ↦ coefficient).

    Rows ``B`` independent modulo ``p`` (on as many columns), ``want`` other rows ``E``
    drawn with ``rng``, in batches of ``BATCH``; the kernel of ``B ∪ E`` is
    ``{(x, y) : x·B + y·E = 0}``, ``x = −y·Λ`` with ``Λ = E·B⁻¹`` (:func:`_batch_kernel`).
    """
    system = _kernel_system(core, rng)
    if system is None:  # pragma: no cover - core rows are nonzero
        return []
    chosen = system.chosen
    taken = set(chosen)
    others = [i for i in range(len(core.rows)) if i not in taken]
    extra = sorted(rng.sample(others, min(want, len(others))))
    out = []
    for start in range(0, len(extra), BATCH):
        batch = extra[start : start + BATCH]
        V = _batch_kernel(core, system, batch, rng)
        if V is None:  # pragma: no cover - only with a rank lost modulo p
            continue
        for vector in V:
            out.append({i: int(x) for i, x in zip(chosen + batch, vector, strict=True) if x})
    return sorted(out, key=_weight)


@dataclass
class _KernelSystem:
    """Rows ``chosen`` independent modulo ``p`` on the columns ``on``: ``Bᵀ``, ``B⁻ᵀ mod p``, bounds."""

    p: int
    chosen: list[int]
    on: list[int]
    BT: list[list[int]]
    inverse_t: Any
    bounds: tuple[int, int]


def _kernel_system(core: _Core, rng: random.Random) -> _KernelSystem | None:
    """The core's basis (or, at lower rank, a rank profile modulo a word prime) for kernels."""
    import numpy as np

    rows, columns = core.rows, core.columns
    k = len(columns)
    index = {c: i for i, c in enumerate(columns)}
    if core.basis is not None:
        p, chosen, pivots = core.basis.p, core.basis.chosen, list(range(k))
        inverse = core.basis.inverse
    else:
        p = word_prime(rng, core.used)
        A = dense_rows_mod(rows, index, k, p)
        chosen, pivots = rank_profile_mod(A, p)
        if not chosen:
            return None
        LU, _, _ = lu_mod(np.ascontiguousarray(A[chosen][:, pivots]), p)
        inverse = inverse_mod(LU, p)
    on = [columns[j] for j in pivots]
    BT = [[rows[i].get(c, 0) for i in chosen] for c in on]
    if core.basis is not None:  # ‖B⁻ᵀ‖∞ = ‖B⁻¹‖₁ ≤ k·‖B⁻¹‖∞
        bound, norm = core.basis.bound([list(c) for c in zip(*BT, strict=True)])
        bounds = (bound, k * norm)
    else:
        bounds = determinant_bound(BT) or (0, 0)
    return _KernelSystem(p, chosen, on, BT, np.ascontiguousarray(inverse.T), bounds)


def _batch_kernel(core: _Core, system: _KernelSystem, batch: list[int], rng: random.Random) -> Any:
    """An LLL-reduced basis (rows ``(x | y)``) of the kernel of the rows ``chosen ∪ batch``.

    From :func:`_short_kernel` (few ``p``-adic digits of ``Λ``) or else from
    ``Λ = N/δ`` exactly (Dixon lifting on ``Bᵀ``,
    :func:`~realquad.core.modular_linalg.kernel_mod`); ``None`` when the batch's
    rows vanish on the basis' columns (a rank lost modulo ``p``).
    """
    import numpy as np

    W = [[core.rows[e].get(c, 0) for e in batch] for c in system.on]
    if not any(any(w) for w in W):
        return None
    p, BT, inverse_t, bounds = system.p, system.BT, system.inverse_t, system.bounds
    V = _short_kernel(core, system.chosen, batch, (BT, inverse_t, p, W), bounds, rng)
    if V is None:
        nums, delta = dixon_solve(BT, inverse_t, p, W, *bounds)
        N = np.array([[gmpy2.mpz(x) for x in c] for c in zip(*nums)], dtype=object)
        Y = kernel_mod(N, delta, rng)
        V = np.hstack([-(Y @ N) // delta, Y])  # the rows (x | y): x·B + y·E = 0
    return np.array(lll_gram((V @ V.T).tolist()), dtype=object) @ V


def _short_kernel(
    core: _Core,
    chosen: list[int],
    batch: list[int],
    system: tuple[list[list[int]], Any, int, list[list[int]]],
    bounds: tuple[int, int],
    rng: random.Random,
) -> Any:
    """A basis (rows ``(x | y)``) of the kernel of the rows ``chosen ∪ batch``, or ``None``.

    With ``U ≡ Λ (mod P)`` from ``L`` digits of Dixon lifting (``system``: ``Bᵀ``,
    ``B⁻ᵀ mod p``, ``p``, ``Eᵀ``), every kernel vector gives ``(y, x·R)`` in the lattice
    ``{(y, z) : z ≡ −y·U·R (mod P)}`` (``R`` random, ``r × t``, ``t = SHORT_PROJECTION``),
    of determinant ``P^t``. The kernel's vectors, of size about ``μ = |det B|^{1/s}``,
    are its shortest once ``P`` passes ``μ^{(s+t)/t}`` (``μ`` guessed from the bounds;
    ``L`` doubles while below the digits that exact reconstruction needs). A reduced
    basis vector whose ``x = −y·U mod P`` (balanced) satisfies ``x·R = z`` and
    ``x·B + y·E ≡ 0`` modulo two other primes is taken; ``s`` of them, part of a basis
    of a lattice in which the kernel is embedded, generate the kernel.
    that contains the whole kernel, generate it.
    """
    import numpy as np

    BT, inverse_t, p, W = system
    s, r = len(batch), len(BT)
    num, den = lifting_bounds(BT, W, *bounds)
    digit = p.bit_length() - 1
    most = (2 * num * den).bit_length() // digit + 1
    size = den.bit_length() // s + max(bounds[1], 1).bit_length() + s + 8
    t = SHORT_PROJECTION
    steps = ((s + t) * size // t + s + t + 64) // digit + 1
    columns = core.columns
    index = {c: i for i, c in enumerate(columns)}
    checks = []
    for _ in range(2):
        q = word_prime(rng, core.used)
        B_q = dense_rows_mod([core.rows[i] for i in chosen], index, len(columns), q)
        E_q = dense_rows_mod([core.rows[i] for i in batch], index, len(columns), q)
        checks.append((q, B_q, E_q))
    while steps < most:
        P = p**steps
        U = padic_lift(BT, inverse_t, p, W, steps).T  # s × r: the λ_e modulo P
        R = np.array([[rng.randint(-4, 4) for _ in range(t)] for _ in range(r)], dtype=object)
        M = np.zeros((s + t, s + t), dtype=object)
        M[:s, s:] = (-(U @ R)) % P
        for i in range(s + t):
            M[i, i] = 1 if i < s else P
        found = []
        for row in np.array(lll_rows(M.tolist(), s), dtype=object):
            y, z = row[:s], row[s:]
            if not y.any():
                continue
            x = np.array([v - P if 2 * v > P else v for v in (-(y @ U)) % P], dtype=object)
            if not (x @ R != z).any():
                found.append(np.concatenate([x, y]))
        if len(found) == s and all(vanishes_mod(found, r, *check) for check in checks):
            return np.array(found, dtype=object)
        steps *= 2
    return None


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
    H, combos = hnf_mod([], invariants)
    size = math.prod(H[i][i] for i in range(s))  # the index of the subgroup found so far
    for j, image in enumerate(images):
        if not any(image):
            continue
        H_j, combos_j = hnf_mod([*H, image], invariants, [*combos, {j: 1}])
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


# -- membership: a vector of L on the rows ------------------------------------------------------

#: Sizes of the random batches of core rows tried before all of them are.
BATCHES = (7, 15, 31)


def lattice_solve(
    rows: Sequence[Mapping[int, int]],
    n: int,
    target: Mapping[int, int],
    seed: int = 1,
    quotient: LatticeQuotient | None = None,
) -> dict[int, int] | None:
    """``c`` with ``Σ c[i]·rows[i] = target`` (sparse, checked), or ``None`` when there is none.

    ``rows`` and ``target`` map columns ``0 ≤ j < n`` to integers; ``seed``
    draws the batches of core rows; ``quotient``, when given, must be that of
    these rows (it refuses a target outside the lattice without solving).
    For many targets on the same rows, :class:`LatticeSolver` keeps the work
    they share.

    >>> lattice_solve([{0: 6}, {0: 10}], 1, {0: 2})       # 2·6 − 10 = 2
    {0: 2, 1: -1}
    >>> lattice_solve([{0: 6}, {0: 10}], 1, {0: 3}) is None
    True
    """
    return LatticeSolver(rows, n, seed).solve(target, quotient)


class LatticeSolver:
    """:func:`lattice_solve` for many targets on the same rows: the structured
    elimination, and the kernel system of its dense core, are computed once
    (when a first target needs them).

    >>> S = LatticeSolver([{0: 6, 1: 1}, {0: 10}], 2)
    >>> S.solve({0: 2, 1: 2}), S.solve({0: 6, 1: 1}), S.solve({0: 2}) is None
    ({0: 2, 1: -1}, {0: 1}, True)
    """

    def __init__(self, rows: Sequence[Mapping[int, int]], n: int, seed: int = 1) -> None:
        if n < 0:
            raise InputError(f"the number of columns must be ≥ 0, not {n}")
        self.rows, self.n, self.seed = rows, n, seed
        self._elimination: tuple[list[int], Elimination] | None = None
        self._core: tuple[_Core, _KernelSystem | None] | None = None

    def solve(
        self, target: Mapping[int, int], quotient: LatticeQuotient | None = None
    ) -> dict[int, int] | None:
        """``c`` with ``Σ c[i]·rows[i] = target``, or ``None`` (:func:`lattice_solve`)."""
        goal = {int(j): int(x) for j, x in target.items() if x}
        for j in goal:
            if not 0 <= j < self.n:
                raise InputError(f"column {j} is outside 0 … {self.n - 1}")
        if not goal:
            return {}
        if quotient is not None and any(quotient.coordinates(goal)):
            return None
        if self._elimination is None:
            clean, origin, _ = normalised_rows(self.rows, self.n)
            self._elimination = origin, eliminate(clean, self.n, None)
        origin, elimination = self._elimination
        v = dict(goal)
        combination: dict[int, int] = {}  # rows after elimination ↦ coefficient
        for (c, pivot), (best, _) in zip(elimination.log, elimination.steps, strict=True):
            x = v.get(c)
            if x:
                f = x * pivot[c]  # pivot[c] = ±1
                combination[best] = combination.get(best, 0) + f
                for j, z in pivot.items():
                    w = v.get(j, 0) - f * z
                    if w:
                        v[j] = w
                    else:
                        v.pop(j, None)
        if v:
            rng = random.Random(self.seed)
            if self._core is None:
                core = _Core.of(elimination)
                self._core = core, _kernel_system(core, rng)
            core, system = self._core
            if not set(v) <= set(core.columns):  # pragma: no cover - pivots clear their columns
                return None
            found = None if system is None else _core_solve(core, system, v, rng)
            if found is None:
                return None
            for i, x in found.items():
                row = core.index[i]
                combination[row] = combination.get(row, 0) + x
        rewritten = replay(elimination.steps, [combination])[0]
        out = {origin[i]: x for i, x in sorted(rewritten.items()) if x}
        if _combination(out, self.rows) != goal:
            raise ArithmeticError("internal check failed: the combination found is not the target")
        return out


def _core_solve(
    core: _Core, system: _KernelSystem, v: dict[int, int], rng: random.Random
) -> dict[int, int] | None:
    """``{core position: coefficient}`` with ``Σ c·core rows = v``, or ``None`` (``v`` not in their span)."""
    extended = dataclasses.replace(core, rows=[*core.rows, v], searched=True, found=core.basis)
    target = len(core.rows)
    taken = set(system.chosen)
    others = [i for i in range(len(core.rows)) if i not in taken]
    sizes = [s for s in BATCHES if s < len(others)] + [len(others)]
    for s in sizes:
        batch = [target, *sorted(rng.sample(others, s))]
        V = _batch_kernel(extended, system, batch, rng)
        if V is None:
            continue
        position = len(system.chosen)  # v's coefficient in each row (x | y)
        g, combined = gmpy2.mpz(0), None
        for row in V:
            t = row[position]
            if not t:
                continue
            g2, a, b = gmpy2.gcdext(g, t)
            combined = row * int(b) if combined is None else combined * int(a) + row * int(b)
            g = g2
        if g != 1 or combined is None:
            continue
        out: dict[int, int] = {}
        for i, x in zip(system.chosen + batch, combined, strict=True):
            if x and i != target:
                out[i] = out.get(i, 0) - int(x)  # x·B + 1·v + y·E = 0
        # checked on all columns: below full rank, B sees only its pivots' columns
        if _combination(out, core.rows) == v:
            return out
    return None
