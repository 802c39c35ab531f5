"""Pure-Python twin of ``definite_kernels.c``: positive definite forms and the class groups of ``D < 0``.

A positive definite form ``(a, b, c)``, ``a > 0``, ``D = b² − 4ac < 0``, is
*reduced* when ``|b| ≤ a ≤ c`` and ``b ≥ 0`` if ``|b| = a`` or ``a = c``;
every class holds exactly one reduced form (Gauss; Cohen, §5.3.1), and its
``a`` is at most ``√(|D|/3)``. So the class group of the order of
discriminant ``D`` is walked by storing one reduced form per class, generated
by the prime forms (and, for primes dividing the conductor, the primitive
forms of prime-power norm) of norm at most ``√(|D|/3)``.

Every function here has the same signature and the same results as its
compiled counterpart (the C file of the same name, registered in
``_ckernels.c``); the tests compare the two directly. These work for integers
of any size, the compiled ones only below their stated word-size limits:
beyond them they raise ``OverflowError`` and :func:`realquad._backend.call_kernel`
falls back to these. Plain ints in, plain ints out. Reach them only through
:mod:`realquad._backend`.

References: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, Alg. 5.4.2 (reduction) and Def. 5.4.6 (composition);
J. Buchmann and U. Vollmer, *Binary Quadratic Forms*, Springer 2007, ch. 5.
"""

from __future__ import annotations

import math

from gmpy2 import kronecker

from realquad._kernels.form_kernels import form_compose
from realquad._kernels.prime_form_kernels import prime_form_b


def definite_reduce(a: int, b: int, c: int) -> tuple[int, int, int]:
    """The reduced form properly equivalent to the positive definite ``(a, b, c)``.

    Normalise ``b`` into ``(−a, a]``, swap ``(a, b, c) → (c, −b, a)`` while
    ``a > c``, and make ``b ≥ 0`` when ``a = c``.

    >>> definite_reduce(3, 10, 9), definite_reduce(1, 1, 6)
    ((1, 0, 2), (1, 1, 6))
    """
    D = b * b - 4 * a * c
    while True:
        if b <= -a or b > a:
            r = b % (2 * a)
            if r > a:
                r -= 2 * a
            b = r
            c = (b * b - D) // (4 * a)
        if a > c:
            a, b, c = c, -b, a
            continue
        if b < 0 and a == c:
            b = -b
        return a, b, c


def definite_compose_reduce(a1: int, b1: int, a2: int, b2: int, D: int) -> tuple[int, int, int]:
    """The reduced form of the Dirichlet composite of ``(a1, b1, ·)`` and ``(a2, b2, ·)``.

    >>> definite_compose_reduce(2, 2, 2, 2, -20)   # (2, 2, 3)² = 1 in Cl(−20) ≅ Z/2
    (1, 0, 5)
    """
    A, B, C = form_compose(a1, b1, a2, b2, D)
    return definite_reduce(A, B, C)


def definite_class_candidates(
    D: int, conductor: int, primes: list[int]
) -> list[tuple[int, int, int]]:
    """Generators of the class group of ``D < 0``, as reduced forms.

    For each prime ``p`` of ``primes`` with ``3p² ≤ |D|`` not dividing
    ``conductor`` its prime form (:func:`prime_form_b`), and for ``p`` dividing
    it every primitive ``(q, b, c)``, ``q = p^k``, ``3q² ≤ |D|``, ``−q < b ≤ q``.

    >>> definite_class_candidates(-20, 1, [2, 3, 5])
    [(2, 2, 3)]
    """
    out = []
    for p in primes:
        if 3 * p * p > -D:
            break
        if conductor % p:
            b = prime_form_b(D, p)
            if b >= 0:
                out.append(definite_reduce(p, b, (b * b - D) // (4 * p)))
            continue
        q = p
        while 3 * q * q <= -D:
            for b in range(-q + 1, q + 1):
                if (b - D) % 2 == 0 and (b * b - D) % (4 * q) == 0:
                    c = (b * b - D) // (4 * q)
                    if math.gcd(math.gcd(q, b), c) == 1:
                        out.append(definite_reduce(q, b, c))
            q *= p
    return out


def definite_class_table(
    D: int,
    candidates: list[tuple[int, int, int]],
    max_forms: int,
    progress: object = None,
) -> tuple[dict, list, list, list, list] | None:
    """Every class of ``D < 0`` (one reduced form each), reached from ``1`` by the ``candidates``.

    The ``candidates`` must be reduced forms (as :func:`definite_class_candidates` gives).

    Returns ``(index, representatives, vectors, generators, relations)``:
    ``index`` maps the reduced form ``(a, b)`` of class ``i`` to ``i``,
    ``representatives[i]`` is that form, ``vectors[i]`` writes class ``i`` on
    ``generators``, and the ``relations`` are triangular with
    ``∏ diagonal = h``. ``None`` when there are more than ``max_forms``
    classes. ``progress`` (a callable or ``None``) hears the class count
    every 1000 classes.

    >>> index, reps, vectors, gens, rels = definite_class_table(-56, [(2, 0, 7), (3, 2, 5)], 100)
    >>> reps, gens, rels
    ([(1, 0, 14), (2, 0, 7), (3, 2, 5), (3, -2, 5)], [(2, 0, 7), (3, 2, 5)], [[2], [-1, 2]])
    """
    return _walk(D, candidates, max_forms, progress, 0)


def _walk(
    D: int,
    candidates: list[tuple[int, int, int]],
    max_forms: int,
    progress: object,
    target: int,
) -> tuple[dict, list, list, list, list] | None:
    """:func:`definite_class_table`, stopping once ``target > 0`` classes are found."""
    b0 = D % 2
    start = (1, b0, (b0 - D) // 4)
    index = {(1, b0): 0}
    representatives = [start]
    vectors: list[tuple[int, ...]] = [()]
    generators: list[tuple[int, int, int]] = []
    relations: list[list[int]] = []
    for g in candidates:
        if target > 0 and len(representatives) >= target:
            break
        if (g[0], g[1]) in index:
            continue
        gi = len(generators)
        generators.append(g)
        n = len(representatives)
        x = g
        j = 1
        while True:
            hit = index.get((x[0], x[1]))
            if hit is not None:
                old = vectors[hit]
                relations.append([-v for v in old] + [0] * (gi - len(old)) + [j])
                break
            if len(representatives) + n > max_forms:
                return None
            for h in range(n):
                if h == 0:
                    y = x
                else:
                    rep = representatives[h]
                    y = definite_compose_reduce(x[0], x[1], rep[0], rep[1], D)
                cls = len(representatives)
                index[(y[0], y[1])] = cls
                representatives.append(y)
                old = vectors[h]
                vectors.append(old + (0,) * (gi - len(old)) + (j,))
                if progress is not None and cls % 1000 == 0:
                    progress(cls)  # type: ignore[operator]
            x = definite_compose_reduce(x[0], x[1], g[0], g[1], D)
            j += 1
    return index, representatives, vectors, generators, relations


def definite_power(a: int, b: int, c: int, n: int, D: int) -> tuple[int, int, int]:
    """``(a, b, c)^n`` reduced (``n ≥ 1``), by squaring and multiplying (as the compiled kernel).

    >>> definite_power(3, 2, 5, 2, -56), definite_power(3, 2, 5, 4, -56)
    ((2, 0, 7), (1, 0, 14))
    """
    b0 = D % 2
    result, x = (1, b0, (b0 - D) // 4), (a, b, c)
    while n > 0:
        if n & 1:
            result = definite_compose_reduce(result[0], result[1], x[0], x[1], D)
        n >>= 1
        if n > 0:
            x = definite_compose_reduce(x[0], x[1], x[0], x[1], D)
    return result


def definite_class_relations(
    D: int, conductor: int, primes: list[int], max_forms: int, target: int = 0, power: int = 1
) -> tuple[int, list[tuple[int, int, int]], list[list[int]]] | None:
    """``(h, generators, relations)`` of :func:`definite_class_table` without the per-class data.

    The candidates are :func:`definite_class_candidates` of ``primes``;
    ``None`` beyond ``max_forms`` classes. With ``target > 0`` (the class
    number, known by other means) the walk stops once it has ``target``
    classes (the compiled kernel then makes the candidates a block of primes
    at a time, so the primes beyond are never touched). With ``power > 1``
    every candidate is first raised to that power: the walk is then in the
    subgroup of ``power``-th powers (for ``power = h/p^e`` and
    ``target = p^e``, the ``p``-Sylow subgroup).

    >>> definite_class_relations(-56, 1, [2, 3, 5], 100)
    (4, [(2, 0, 7), (3, 2, 5)], [[2], [-1, 2]])
    >>> definite_class_relations(-56, 1, [2, 3, 5], 100, 2)
    (2, [(2, 0, 7)], [[2]])
    >>> definite_class_relations(-56, 1, [2, 3, 5], 100, 2, 2)   # the squares: Cl² ≅ Z/2
    (2, [(2, 0, 7)], [[2]])
    """
    if conductor <= 0 or power <= 0:
        raise ValueError("the conductor and the power must be positive")
    candidates = definite_class_candidates(D, conductor, primes)
    if power > 1:
        candidates = [definite_power(a, b, c, power, D) for a, b, c in candidates]
    table = _walk(D, candidates, max_forms, None, target)
    if table is None:
        return None
    _, representatives, _, generators, relations = table
    return len(representatives), generators, relations


#: Largest ``|D|`` the count of reduced forms takes (its table has ``√(|D|/3)`` entries).
COUNT_LIMIT = 10**14


def definite_class_number(D: int, primes: list[int]) -> int:
    """``h(D)`` for a fundamental ``D < 0``: the number of its reduced forms, counted without
    building them; ``primes`` must be every prime up to ``√(|D|/3)``.

    For ``a < √|D|/2`` every ``b ∈ (−a, a]`` with ``b² ≡ D (mod 4a)`` gives a reduced form
    (its ``c`` exceeds ``a``), and their number ``N(a)`` is multiplicative: the product over
    ``p^k ‖ a`` of ``1 + (D/p)`` when ``p ∤ D`` and of ``[k = 1]`` when ``p | D`` (``D``
    fundamental). A sieve over the primes gives every ``N(a)``. The forms with
    ``√|D|/2 < a ≤ √(|D|/3)`` (a few per cent of them) are found one by one: ``b`` runs over
    the square roots of ``D`` modulo the odd primes of ``a`` (Chinese remainders).

    >>> definite_class_number(-23, [2]), definite_class_number(-3299, [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31])
    (3, 27)
    """
    n = -D
    if D >= 0 or n > COUNT_LIMIT:
        raise ValueError("the count of reduced forms takes -10^14 <= D < 0")
    amax = math.isqrt(n // 3)
    if amax >= 2 and (not primes or primes[-1] ** 2 < amax):
        raise ValueError("the primes must be every prime up to sqrt(|D|/3)")
    counts = [1] * (amax + 1)
    for p in primes:
        if p > amax:
            break
        if D % p == 0:
            for a in range(p * p, amax + 1, p * p):
                counts[a] = 0
        else:
            factor = 1 + kronecker(D, p)
            for a in range(p, amax + 1, p):
                counts[a] *= factor
    total = 0
    for a in range(1, amax + 1):
        if counts[a]:
            total += counts[a] if 4 * a * a < n else _count_band(D, a, primes)
    return total


def _count_band(D: int, a: int, primes: list[int]) -> int:
    """The reduced forms ``(a, b, c)`` of ``D`` for one ``a ≥ √|D|/2``: with ``a = 2^k·m``, the
    square roots of ``D`` modulo the odd primes of ``a`` and the ``b mod 2^(k+1)`` with
    ``b² ≡ D (mod 2^(k+2))``, combined by Chinese remainders, give every candidate."""
    rest, modulus, roots, two = a, 1, [0], 2
    while rest % 2 == 0:
        rest, two = rest // 2, two * 2
    twos = [y for y in range(two) if (y * y - D) % (2 * two) == 0]
    for p in [*primes, a]:
        if rest == 1:
            break
        if p * p > rest:
            p = rest
        if rest % p:
            continue
        while rest % p == 0:
            rest //= p
        r = prime_form_b(D, p)
        if r < 0:
            return 0
        inverse = pow(modulus, -1, p)
        roots = [x + modulus * ((s - x) * inverse % p) for x in roots for s in {r % p, -r % p}]
        modulus *= p
    inverse, step, count = pow(modulus, -1, two), modulus * two, 0
    for x in [x + modulus * ((y - x) * inverse % two) for x in roots for y in twos]:
        for b in range(-a + (x + a) % step, a + 1, step):
            if b == -a or (b * b - D) % (4 * a):
                continue
            c = (b * b - D) // (4 * a)
            if c > a or (c == a and b >= 0):
                count += 1
    return count
