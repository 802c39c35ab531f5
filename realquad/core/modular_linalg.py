"""Dense linear algebra modulo word primes in floats, Dixon lifting, Hermite forms modulo ``N``.

The exact machinery beneath :mod:`realquad.core.lattice`: matrices are ``numpy``
float arrays holding integers in ``[0, p)`` for primes ``p`` below ``2²⁰``, so that
products stay below ``2⁴⁰`` and sums of ``INNER`` of them below ``2⁵²`` (exact in
doubles). On top of them: a recursive LU factorization modulo ``p`` (its
updates are matrix products), inverses, determinants and a rank profile modulo
``p``; proven bounds on ``|det B|`` and ``‖B⁻¹‖∞`` from floating point; exact
rational solutions of ``B·X = W`` by ``p``-adic lifting and rational
reconstruction, and the checks built on them (``det B = ±d``, a column
dependent on the others); the Hermite normal form of a lattice containing
``N·Z^t`` computed modulo ``N``; LLL reduction of a few vectors through their
Gram matrix in exact integers.

>>> import numpy as np
>>> A = np.array([[2.0, 1.0], [1.0, 1.0]])
>>> inverse_mod(lu_mod(A, 7)[0], 7).tolist()             # [[1, −1], [−1, 2]] mod 7
[[1.0, 6.0], [6.0, 2.0]]
>>> dixon_solve([[2, 1], [1, 1]], inverse_mod(lu_mod(A, 7)[0], 7), 7, [[1], [0]])
([[1], [-1]], 1)
>>> hnf_mod([[2, 4]], [6, 6])[0]                          # the rows (2, 4), 6e₀, 6e₁
[[2, 4], [0, 6]]

References: J. D. Dixon, "Exact solution of linear equations using p-adic
expansions", *Numer. Math.* 40 (1982); P. D. Domich, R. Kannan and L. E. Trotter,
"Hermite normal form computation using modulo determinant arithmetic", *Math.
Oper. Res.* 12 (1987); H. Cohen, *A Course in Computational Algebraic Number
Theory*, Springer 1993, §2.4.2 (Hermite forms modulo ``D``) and §2.6 (LLL, the
integral version); P. S. Wang, M. J. T. Guy and J. H. Davenport, "P-adic
reconstruction of rational numbers", *SIGSAM Bull.* 16 (1982); N. J. Higham, *Accuracy and
Stability of Numerical Algorithms*, SIAM 2002, §3.5 (rounding errors of products);
A. K. Lenstra, H. W. Lenstra and L. Lovász, "Factoring polynomials with rational
coefficients", *Math. Ann.* 261 (1982); B. M. M. de Weger, "Solving exponential
diophantine equations using lattice basis reduction algorithms", *J. Number
Theory* 26 (1987) (the integral version).
"""

from __future__ import annotations

import math
import random
from collections.abc import Mapping, Sequence
from typing import Any

import gmpy2

#: Word primes in ``[2¹⁹, 2²⁰)``: products stay below ``2⁴⁰``, sums of ``INNER`` of them below ``2⁵²``.
PRIME_LOW, PRIME_HIGH, INNER = 2**19, 2**20, 4000


class SingularModP(Exception):
    """No pivot modulo the prime in ``column``; ``perm`` orders the rows as far as it got.

    >>> import numpy as np
    >>> try:
    ...     lu_mod(np.array([[1.0, 2.0], [2.0, 4.0]]), 7)
    ... except SingularModP as e:
    ...     print(e.column)
    1
    """

    def __init__(self, column: int, perm: Any) -> None:
        super().__init__(column)
        self.column, self.perm = column, perm


def word_prime(rng: random.Random, used: set[int]) -> int:
    """A random prime in ``[PRIME_LOW, PRIME_HIGH)`` not in ``used`` (then added to it).

    >>> used: set[int] = set()
    >>> q = word_prime(random.Random(1), used)
    >>> PRIME_LOW <= q < PRIME_HIGH and bool(gmpy2.is_prime(q)) and used == {q}
    True
    """
    while True:
        q = int(gmpy2.next_prime(rng.randrange(PRIME_LOW, PRIME_HIGH - 4096)))
        if q not in used:
            used.add(q)
            return q


def mod_floats(x: Any, p: int) -> Any:
    """``x mod p`` for a float array of integers below ``2⁵²`` in size (``p = 0``: ``x`` itself).

    >>> import numpy as np
    >>> mod_floats(np.array([-1.0, 7.0, 2.0**40 + 3]), 7).tolist()   # 2⁴⁰ ≡ 2⁴ ≡ 2 (mod 7)
    [6.0, 0.0, 5.0]
    """
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


def matmul_mod(A: Any, B: Any, p: int) -> Any:
    """``A·B mod p`` of float arrays with entries in ``[0, p)``, exact (inner sums cut at ``INNER``).

    >>> import numpy as np
    >>> matmul_mod(np.array([[3.0, 4.0]]), np.array([[5.0], [6.0]]), 7).tolist()  # 39 mod 7
    [[4.0]]
    """
    out = mod_floats(A[:, :INNER] @ B[:INNER], p)
    for s in range(INNER, A.shape[1], INNER):
        out = mod_floats(out + A[:, s : s + INNER] @ B[s : s + INNER], p)
    return out


def unit_lower_solve(L: Any, Y: Any, p: int) -> Any:
    """``L⁻¹·Y mod p`` for ``L`` unit lower triangular (only its strictly lower part is read).

    >>> import numpy as np
    >>> unit_lower_solve(np.array([[9.0, 0.0], [3.0, 9.0]]), np.array([[1.0], [0.0]]), 7).tolist()
    [[1.0], [4.0]]
    """
    import numpy as np

    h = L.shape[0]
    if h <= 16:
        X = Y.copy()
        for i in range(1, h):
            X[i] = mod_floats(X[i] - L[i, :i] @ X[:i], p)
        return X
    s = h // 2
    X1 = unit_lower_solve(L[:s, :s], Y[:s], p)
    X2 = unit_lower_solve(L[s:, s:], mod_floats(Y[s:] - matmul_mod(L[s:, :s], X1, p), p), p)
    return np.vstack([X1, X2])


def lu_mod(A: Any, p: int) -> tuple[Any, Any, int]:
    """``P·A = L·U`` modulo ``p`` for ``A`` (m × k, m ≥ k): (L and U in one array, perm, swaps).

    Recursive on the columns (the updates are matrix products); raises :class:`SingularModP`
    when the rank modulo ``p`` is below ``k``. With ``p = 0``, in floating point with
    partial pivoting (the largest entry of the column).

    >>> import numpy as np
    >>> LU, perm, swaps = lu_mod(np.array([[0.0, 1.0], [2.0, 3.0]]), 7)
    >>> LU.tolist(), perm.tolist(), swaps                  # rows swapped: U = [[2, 3], [0, 1]]
    ([[2.0, 3.0], [0.0, 1.0]], [1, 0], 1)
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
                raise SingularModP(j, perm.copy())
            r = j + (int(nz[0]) if p else int(np.argmax(np.abs(A[j:, j]))))
            if r != j:
                A[[j, r]] = A[[r, j]]
                perm[[j, r]] = perm[[r, j]]
                swaps += 1
            scale = pow(int(A[j, j]), p - 2, p) if p else 1.0 / A[j, j]
            A[j + 1 :, j] = mod_floats(A[j + 1 :, j] * scale, p)
            if j + 1 < c1:
                update = np.outer(A[j + 1 :, j], A[j, j + 1 : c1])
                A[j + 1 :, j + 1 : c1] = mod_floats(A[j + 1 :, j + 1 : c1] - update, p)

    def factor(c0: int, c1: int) -> None:
        if c1 - c0 <= 16:
            panel(c0, c1)
            return
        h = (c0 + c1) // 2
        factor(c0, h)
        A[c0:h, h:c1] = unit_lower_solve(A[c0:h, c0:h], A[c0:h, h:c1], p)
        A[h:, h:c1] = mod_floats(A[h:, h:c1] - matmul_mod(A[h:, c0:h], A[c0:h, h:c1], p), p)
        factor(h, c1)

    if k:
        factor(0, k)
    return A, perm, swaps


def inverse_mod(LU: Any, p: int) -> Any:
    """``(L·U)⁻¹ mod p`` from a square factorization (unit ``L``).

    >>> import numpy as np
    >>> inverse_mod(lu_mod(np.array([[3.0]]), 7)[0], 7).tolist()   # 3·5 ≡ 1
    [[5.0]]
    """
    import numpy as np

    k = LU.shape[0]
    identity = np.eye(k)
    dinv = np.array([pow(int(x), p - 2, p) for x in np.diag(LU)], dtype=float)
    upper = mod_floats(np.triu(LU, 1) * dinv[:, None], p)  # D⁻¹U, unit upper triangular
    upper_inv = unit_lower_solve(np.ascontiguousarray(upper[::-1, ::-1]), identity, p)[::-1, ::-1]
    return matmul_mod(
        mod_floats(upper_inv * dinv[None, :], p), unit_lower_solve(LU, identity, p), p
    )


def dense_rows_mod(
    rows: Sequence[Mapping[int, int]], index: Mapping[int, int], k: int, p: int
) -> Any:
    """The rows as a dense float array modulo ``p`` on the columns of ``index``.

    >>> dense_rows_mod([{4: -1, 9: 8}], {9: 0, 4: 1}, 2, 7).tolist()
    [[1.0, 6.0]]
    """
    import numpy as np

    A = np.zeros((len(rows), k))
    for i, row in enumerate(rows):
        for j, x in row.items():
            A[i, index[j]] = x % p
    return A


def det_mod(B: list[list[int]], p: int) -> int:
    """``det B mod p`` (0 when singular).

    >>> det_mod([[0, 1], [1, 0]], 7), det_mod([[2, 4], [1, 2]], 7)
    (6, 0)
    """
    import numpy as np

    try:
        LU, _, swaps = lu_mod(np.array([[x % p for x in row] for row in B], dtype=float), p)
    except SingularModP:
        return 0
    det = (-1) ** swaps
    for x in np.diag(LU):
        det = det * int(x) % p
    return det % p


def determinant_bound(B: list[list[int]]) -> tuple[int, int] | None:
    """Proven upper bounds on ``|det B|`` (close to it) and on ``‖B⁻¹‖∞``, from floating point.

    With ``P·B ≈ L·D·V`` in floats, ``X ≈ L⁻¹`` and ``Y ≈ V⁻¹`` forced unit triangular
    have determinant 1, so ``det(X·P·B·Y) = ±det B`` while ``X·P·B·Y`` is nearly diagonal:
    Hadamard's bound on its rows is tight. The rows are those of the computed product
    plus its rounding error, bounded by ``γ·|X|·|P·B|·|Y|`` (Higham, *Accuracy and
    Stability of Numerical Algorithms*, 2002, §3.5), taken with a wide margin. The
    same product, diagonally dominant, bounds ``‖B⁻¹‖∞ ≤ ‖Y‖∞·‖F⁻¹‖∞·‖X‖∞``. ``None``:
    the floats give no bound (huge entries, overflow, no dominance).

    >>> det, norm = determinant_bound([[2, 1], [1, 1]])    # det 1, B⁻¹ = [[1, −1], [−1, 2]]
    >>> 1 <= det <= 2 and 3 <= norm <= 100
    True
    """
    import numpy as np

    k = len(B)
    if max(abs(x) for row in B for x in row) >= 2**50:
        return None
    M = np.array(B, dtype=float)
    try:
        LU, perm, _ = lu_mod(M, 0)
    except SingularModP:
        return None
    identity = np.eye(k)
    with np.errstate(all="ignore"):
        X = np.tril(unit_lower_solve(LU, identity, 0), -1) + identity
        V = np.triu(LU, 1) / np.diag(LU)[:, None]
        Y = np.triu(
            unit_lower_solve(np.ascontiguousarray(V[::-1, ::-1]), identity, 0)[::-1, ::-1], 1
        )
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


def hadamard_bound(M: Sequence[Sequence[int]], extra: int = 0) -> int:
    """``∏ ⌈√(‖row‖² + extra²)⌉`` over the rows: a bound on the determinants of ``M``'s rows.

    >>> hadamard_bound([[3, 4], [1, 0]]), hadamard_bound([[3, 4]], 12)
    (5, 13)
    """
    out = 1
    for row in M:
        out *= math.isqrt(sum(x * x for x in row) + extra * extra - 1) + 1 if any(row) else 1
    return out


def rational_reconstruction(u: int, P: int, num: int, den: int) -> tuple[int, int]:
    """``a/b ≡ u (mod P)`` with ``|a| ≤ num``, ``0 < b ≤ den`` (unique as ``P > 2·num·den``).

    >>> rational_reconstruction(-2 * pow(3, -1, 101) % 101, 101, 5, 5)    # −2/3
    (-2, 3)
    """
    r0, r1, t0, t1 = gmpy2.mpz(P), gmpy2.mpz(u % P), gmpy2.mpz(0), gmpy2.mpz(1)
    while r1 > num:
        q = r0 // r1
        r0, r1 = r1, r0 - q * r1
        t0, t1 = t1, t0 - q * t1
    if t1 == 0 or abs(t1) > den:  # pragma: no cover - the bounds exclude it
        raise ArithmeticError("internal check failed: no rational reconstruction")
    return (int(r1), int(t1)) if t1 > 0 else (-int(r1), -int(t1))


def dixon_solve(
    B: list[list[int]], inverse: Any, p: int, W: list[list[int]], den: int = 0, norm: int = 0
) -> tuple[list[list[int]], int]:
    """``B⁻¹W = num/δ`` exactly: ``p``-adic lifting with ``inverse = B⁻¹ mod p`` (Dixon 1982).

    ``den`` and ``norm``, when given, bound ``|det B|`` and ``‖B⁻¹‖∞`` (else Hadamard's
    bounds do); the numerators ``det B·B⁻¹w`` are bounded by ``den·norm·max|w|`` then.

    >>> import numpy as np
    >>> B = [[2, 0], [0, 3]]
    >>> dixon_solve(B, inverse_mod(lu_mod(np.array(B, dtype=float), 7)[0], 7), 7, [[1], [1]])
    ([[3], [2]], 6)
    """
    k, t = len(B), len(W[0])
    num, den = lifting_bounds(B, W, den, norm)
    P, steps = 1, 0
    while P <= 2 * num * den:
        P, steps = P * p, steps + 1
    Y = padic_lift(B, inverse, p, W, steps)
    delta, nums = 1, [[0] * t for _ in range(k)]
    for i in range(k):
        for j in range(t):
            z = delta * int(Y[i, j]) % P
            z = z - P if 2 * z > P else z
            if abs(z) > num:  # a larger denominator: multiply it in
                a, b = rational_reconstruction(z, P, num, den)
                delta *= b
                nums = [[x * b for x in row] for row in nums]
                z = a
            nums[i][j] = z
    return nums, delta


def lifting_bounds(
    B: list[list[int]], W: list[list[int]], den: int = 0, norm: int = 0
) -> tuple[int, int]:
    """Bounds on the numerators and the denominator of ``B⁻¹W = num/δ`` (``δ | det B``).

    ``den`` and ``norm`` as in :func:`dixon_solve`; without ``norm``, Hadamard's bound
    on ``det B`` with a column replaced by one of ``W`` (Cramer's rule).

    >>> lifting_bounds([[2, 0], [0, 3]], [[1], [1]])       # Cramer: |det| ≤ 6, numerators ≤ 6
    (6, 6)
    """
    t = len(W[0])
    top_w = max(abs(x) for row in W for x in row)
    if norm:
        return den * norm * top_w, den
    columns = [list(c) for c in zip(*B, strict=True)]
    norm_w = math.isqrt(max(sum(row[j] ** 2 for row in W) for j in range(t))) + 1
    den = den or min(hadamard_bound(B), hadamard_bound(columns))
    num = min(
        hadamard_bound(B, top_w), math.prod(max(hadamard_bound([c]), norm_w) for c in columns)
    )
    return num, den


def padic_lift(B: list[list[int]], inverse: Any, p: int, W: list[list[int]], steps: int) -> Any:
    """``B⁻¹W mod p^steps`` (an object array, entries in ``[0, p^steps)``): Dixon's digits.

    Each step solves ``B·X ≡ R (mod p)`` with ``inverse`` and passes ``R ← (R − B·X)/p``
    on, exactly; the digits are summed in a balanced tree.

    >>> import numpy as np
    >>> B = [[2, 0], [0, 3]]
    >>> padic_lift(B, inverse_mod(lu_mod(np.array(B, dtype=float), 7)[0], 7), 7, [[1], [1]], 2)
    array([[25],
           [33]], dtype=object)
    """
    import numpy as np

    k = len(B)
    top = max(abs(x) for row in B for x in row)
    kind: Any = float if top * k * p < 2**52 else np.int64 if top * k * p < 2**62 else object
    Bx = np.array(B, dtype=kind)
    R = np.array(W, dtype=kind)
    digits = []
    for _ in range(steps):
        X = matmul_mod(inverse, (R % p).astype(float), p)
        digits.append(X.astype(np.int64))
        if kind is float:
            R = (R - matmul_mod(Bx, X, 0)) / p
        else:
            R = (R - Bx @ X.astype(np.int64).astype(kind)) // p
    if not digits:
        return np.zeros((k, len(W[0])), dtype=object)
    level = [d.astype(object) for d in digits]
    base = p
    while len(level) > 1:  # the p-adic digits summed in a balanced tree
        pairs = [level[i] + level[i + 1] * base for i in range(0, len(level) - 1, 2)]
        level = pairs + level[len(level) - len(level) % 2 :]
        base *= base
    return level[0]


def determinant_is(
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
    force ``c = ±1``. ``known``: pairs (prime, ``det B`` modulo it) already computed.

    >>> B = [[2, 1], [0, 3]]
    >>> determinant_is(B, 6, 6, [], random.Random(1), set()), determinant_is(B, 2, 6, [], random.Random(1), set())
    (True, False)
    """
    sign, product = 0, 1
    pending = list(known)
    while product <= bound // image + 1:
        if pending:
            q, det_q = pending.pop()
        else:
            q = word_prime(rng, used)
            det_q = -1 if image % q == 0 else det_mod(B, q)
        if image % q == 0:
            continue
        s = 1 if det_q == image % q else -1 if det_q == -image % q else 0
        if s == 0 or sign not in (0, s):
            return False
        sign, product = s, product * q
    return True


def dependent_column(
    rows: list[dict[int, int]],
    columns: list[int],
    column: int,
    perm: Any,
    rng: random.Random,
    used: set[int],
) -> bool:
    """Whether column ``columns[column]`` of ``rows`` is a rational combination of those before it.

    The rows ``perm[:column]`` were independent on those columns modulo a prime;
    the combination solving them is lifted exactly and checked on every row.

    >>> rows = [{0: 1, 1: 2}, {0: 3, 1: 6}, {0: 1, 1: 1}]
    >>> dependent_column(rows[:2], [0, 1], 1, [0, 1], random.Random(1), set())
    True
    >>> dependent_column(rows, [0, 1], 1, [0, 1, 2], random.Random(1), set())
    False
    """
    import numpy as np

    if column == 0:
        return False  # every core column has a nonzero entry
    before, last = columns[:column], columns[column]
    picked = [rows[int(i)] for i in perm[:column]]
    B = [[row.get(c, 0) for c in before] for row in picked]
    while True:
        p = word_prime(rng, used)
        try:
            LU, _, _ = lu_mod(np.array([[x % p for x in r] for r in B], dtype=float), p)
            break
        except SingularModP:
            continue
    y, delta = dixon_solve(B, inverse_mod(LU, p), p, [[-row.get(last, 0)] for row in picked])
    vector = {c: y[i][0] for i, c in enumerate(before) if y[i][0]}
    vector[last] = delta
    return all(sum(x * vector.get(j, 0) for j, x in row.items()) == 0 for row in rows)


# -- Hermite normal forms modulo a multiple of the determinant ---------------------------------


def hnf_mod(
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

    >>> hnf_mod([[3, 1], [1, 1]], [4, 4], [{0: 1}, {1: 1}])   # (3, 1) + (1, 1) ≡ (0, 2) mod 4e₀
    ([[1, 1], [0, 2]], [{1: 1}, {1: 1, 0: 1}])
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
            new_c = combine(pc, a, vc, b)
            vc = combine(vc, u, pc, -w)
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
                out[r] = combine(out[r], 1, out[c], -q)
    return H, out


def combine(x: dict[int, int], a: int, y: dict[int, int], b: int) -> dict[int, int]:
    """``a·x + b·y`` of sparse vectors.

    >>> combine({0: 1, 1: 2}, 3, {1: 3, 2: 1}, -2)
    {0: 3, 2: -2}
    """
    out = {j: a * v for j, v in x.items()} if a != 1 else dict(x)
    for j, v in y.items():
        out[j] = out.get(j, 0) + b * v
    return {j: v for j, v in out.items() if v}


def coordinates_in(v: Sequence[int], H: list[list[int]]) -> list[int]:
    """``z`` with ``z·H = v`` for ``H`` upper triangular (``v`` in its row lattice).

    >>> coordinates_in([2, 7], [[1, 2], [0, 3]])
    [2, 1]
    """
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


def rank_profile_mod(A: Any, p: int) -> tuple[list[int], list[int]]:
    """Rows and columns of a nonsingular square submatrix of full rank modulo ``p``.

    Gaussian elimination on ``A`` (``m × k`` floats in ``[0, p)``), column by
    column, pivot the first row left with a nonzero entry; columns without one
    are skipped. Returns (pivot rows, pivot columns), both of length the rank of
    ``A`` modulo ``p``, the rows in the order they were chosen.

    >>> import numpy as np
    >>> rank_profile_mod(np.array([[1.0, 2.0, 3.0], [2.0, 4.0, 6.0], [0.0, 0.0, 1.0]]), 7)
    ([0, 2], [0, 2])
    """
    import numpy as np

    A = A.copy()
    m, k = A.shape
    perm = list(range(m))
    rows: list[int] = []
    columns: list[int] = []
    r = 0
    for j in range(k):
        if r == m:
            break
        nz = np.flatnonzero(A[r:, j])
        if nz.size == 0:
            continue
        i = r + int(nz[0])
        if i != r:
            A[[r, i]] = A[[i, r]]
            perm[r], perm[i] = perm[i], perm[r]
        A[r, j:] = mod_floats(A[r, j:] * pow(int(A[r, j]), p - 2, p), p)
        below = A[r + 1 :, j].copy()
        if below.any():
            A[r + 1 :, j:] = mod_floats(A[r + 1 :, j:] - np.outer(below, A[r, j:]), p)
        rows.append(perm[r])
        columns.append(j)
        r += 1
    return rows, columns


def kernel_mod(N: Any, delta: int, rng: random.Random) -> Any:
    """A basis (rows of an object array) of ``{y ∈ Z^s : y·N ≡ 0 (mod δ)}`` (``N``: ``s × r``).

    The rows ``(N_j·P mod δ | e_j)`` for a random ``r × t`` matrix ``P`` and the
    ``δ·e_i`` span ``{(u, y) : u ≡ y·N·P}``; the last ``s`` rows of its Hermite form
    (modulo ``δ``) are a basis of the kernel of ``y ↦ y·N·P mod δ``, which contains
    the wanted kernel and equals it when the check passes; else ``t`` doubles
    (``P = 1`` at the end: exact).

    >>> import numpy as np
    >>> Y = kernel_mod(np.array([[1], [2], [3]], dtype=object), 6, random.Random(1))
    >>> [[int(x) for x in y] for y in Y]                    # y₀ + 2y₁ + 3y₂ ≡ 0 (mod 6)
    [[1, 1, 1], [0, 3, 0], [0, 0, 2]]
    """
    import numpy as np

    s, r = N.shape
    t = min(r, s + 4)
    while True:
        if t >= r:
            M = N % delta
        else:
            P = np.array([[rng.randrange(-(2**30), 2**30) for _ in range(t)] for _ in range(r)])
            M = (N @ P.astype(object)) % delta
        t = M.shape[1]
        units = [[int(i == j) for i in range(s)] for j in range(s)]
        rows = [[int(x) for x in m] + u for m, u in zip(M, units, strict=True)]
        H, _ = hnf_mod(rows, [delta] * (t + s))
        Y = np.array([[gmpy2.mpz(x) for x in H[t + j][t:]] for j in range(s)], dtype=object)
        if not ((Y @ N) % delta).any():
            return Y
        t = min(r, 2 * t)


def vanishes_mod(vectors: list[Any], r: int, q: int, B_q: Any, E_q: Any) -> bool:
    """Whether ``x·B + y·E ≡ 0 (mod q)`` for every vector ``(x | y)`` (``x`` of length ``r``).

    ``B_q`` and ``E_q`` hold ``B`` and ``E`` modulo ``q`` as float arrays.

    >>> import numpy as np
    >>> B, E = np.array([[1.0, 2.0]]), np.array([[3.0, 6.0]])
    >>> vanishes_mod([[-3, 1]], 1, 7, B, E), vanishes_mod([[3, 1]], 1, 7, B, E)
    (True, False)
    """
    import numpy as np

    X = np.array([[int(a) % q for a in v[:r]] for v in vectors], dtype=float)
    Y = np.array([[int(a) % q for a in v[r:]] for v in vectors], dtype=float)
    return not (mod_floats(matmul_mod(X, B_q, q) + matmul_mod(Y, E_q, q), q)).any()


# -- LLL reduction from a Gram matrix ----------------------------------------------------------


def lll_gram(gram: Sequence[Sequence[int]]) -> list[list[int]]:
    """A unimodular ``U`` such that the rows of ``U·b`` are an LLL-reduced basis (``δ = 3/4``).

    ``gram[i][j] = ⟨b_i, b_j⟩`` for independent integer vectors ``b_i``; only the
    Gram matrix is updated (size reductions and swaps act on its rows and columns),
    so the vectors themselves are transformed once at the end. Exact integer
    arithmetic throughout: the integral version of the algorithm keeps the Gram
    determinants ``d_i`` and ``λ_ij = d_j·μ_ij`` (Lenstra, Lenstra and Lovász 1982;
    de Weger 1987; Cohen, *A Course in Computational Algebraic Number Theory*, §2.6).

    >>> lll_gram([[1, 100], [100, 10001]])        # b₁ = (1, 0), b₂ = (100, 1)
    [[1, 0], [-100, 1]]
    """
    G = [[gmpy2.mpz(x) for x in row] for row in gram]  # GMP: fast products, exact quotients
    s = len(G)
    U = [[gmpy2.mpz(int(i == j)) for j in range(s)] for i in range(s)]
    if s == 0:
        return []
    d = [gmpy2.mpz(1)] * (s + 1)  # d[i + 1]: the Gram determinant of the first i + 1 vectors
    lam = [[gmpy2.mpz(0)] * s for _ in range(s)]
    d[1] = G[0][0]

    def reduce(k: int, l: int) -> None:
        if 2 * abs(lam[k][l]) <= d[l + 1]:
            return
        q = (2 * lam[k][l] + d[l + 1]) // (2 * d[l + 1])
        U[k] = [a - q * b for a, b in zip(U[k], U[l], strict=True)]
        G[k][k] += q * q * G[l][l] - 2 * q * G[k][l]
        for i in range(s):
            if i != k:
                G[k][i] -= q * G[l][i]
                G[i][k] = G[k][i]
        lam[k][l] -= q * d[l + 1]
        for i in range(l):
            lam[k][i] -= q * lam[l][i]

    def swap(k: int) -> None:
        U[k], U[k - 1] = U[k - 1], U[k]
        G[k], G[k - 1] = G[k - 1], G[k]
        for row in G:
            row[k], row[k - 1] = row[k - 1], row[k]
        for j in range(k - 1):
            lam[k][j], lam[k - 1][j] = lam[k - 1][j], lam[k][j]
        la = lam[k][k - 1]
        B = gmpy2.divexact(d[k - 1] * d[k + 1] + la * la, d[k])
        for i in range(k + 1, top + 1):
            t = lam[i][k]
            lam[i][k] = gmpy2.divexact(d[k + 1] * lam[i][k - 1] - la * t, d[k])
            lam[i][k - 1] = gmpy2.divexact(B * t + la * lam[i][k], d[k + 1])
        d[k] = B

    k, top = 1, 0
    while k < s:
        if k > top:  # incremental Gram–Schmidt
            top = k
            for j in range(k + 1):
                u = G[k][j]
                for i in range(j):
                    u = gmpy2.divexact(d[i + 1] * u - lam[k][i] * lam[j][i], d[i])
                if j < k:
                    lam[k][j] = u
                else:
                    if u == 0:
                        raise ArithmeticError("the vectors are dependent")
                    d[k + 1] = u
        reduce(k, k - 1)
        if 4 * d[k + 1] * d[k - 1] < 3 * d[k] * d[k] - 4 * lam[k][k - 1] ** 2:
            swap(k)
            k = max(1, k - 1)
        else:
            for l in range(k - 2, -1, -1):
                reduce(k, l)
            k += 1
    return [[int(x) for x in row] for row in U]


def lll_rows(M: Sequence[Sequence[int]], large: int, chunk: int = 64) -> list[list[int]]:
    """An LLL-reduced basis of the lattice spanned by the (independent) rows of ``M``.

    The coordinates from ``large`` on, the big ones, come in gradually: the rows
    with those coordinates shifted right by ``e`` bits are reduced (:func:`lll_gram`)
    and the transformation applied to ``M``, for ``e`` falling by ``chunk`` to 0.
    Each round starts from a basis reduced for the one before, so most of the work
    is done on short numbers (a known acceleration for knapsack-like bases).

    >>> lll_rows([[1, 0, 12345], [0, 1, 54321], [0, 0, 100003]], 2, chunk=8)
    [[3, 3, -8], [16, -11, 1], [-278, -421, -262]]
    """
    rows = [list(map(int, row)) for row in M]
    top = max((abs(x).bit_length() for row in rows for x in row[large:]), default=0)
    e = max(0, top - chunk)
    while True:
        cut = [row[:large] + [x >> e for x in row[large:]] for row in rows]
        gram = [[sum(a * b for a, b in zip(u, v, strict=True)) for v in cut] for u in cut]
        try:
            U = lll_gram(gram)
        except ArithmeticError:  # the cut rows are dependent: a finer cut
            if e == 0:
                raise
            U = [[int(i == j) for j in range(len(rows))] for i in range(len(rows))]
        rows = [
            [sum(c * row[j] for c, row in zip(u, rows, strict=True) if c) for j in range(len(row))]
            for u, row in zip(U, rows, strict=True)
        ]
        if e == 0:
            return rows
        e = max(0, e - chunk)
