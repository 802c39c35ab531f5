"""Pure-Python twin of ``class_kernels.c``: every narrow class of D by walking the cycles of reduced forms.

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations

from gmpy2 import isqrt

from realquad._kernels.form_kernels import form_compose, form_cycle, form_reduce, principal_b
from realquad._kernels.prime_form_kernels import form_class_candidates


def form_class_table(
    D: int,
    candidates: list[tuple[int, int, int]],
    max_forms: int,
    progress: object = None,
) -> tuple[dict, list, list, list, list] | None:
    """All narrow classes of ``D``, reached from the principal cycle by the ``candidates``.

    Returns ``(index, representatives, vectors, generators, relations)``:
    ``index`` maps every reduced form ``(a, b)`` to its class, ``vectors[i]``
    writes class ``i`` on ``generators``, ``relations`` are triangular with
    ``∏ diagonal = len(representatives) = h⁺``. ``None`` when more than
    ``max_forms`` reduced forms would be stored. ``progress`` (a callable or
    ``None``) receives the class count every 1000 classes.
    """
    r = int(isqrt(D))
    b0 = principal_b(D, r)
    start = (1, b0, (b0 * b0 - D) // 4)
    walk = form_cycle(start[0], start[1], start[2], D, r, max_forms)
    if walk is None:
        return None
    index = dict.fromkeys(walk, 0)
    stored = len(walk)
    representatives = [start]
    vectors: list[tuple[int, ...]] = [()]
    generators: list[tuple[int, int, int]] = []
    relations: list[list[int]] = []
    for g in candidates:
        gred = form_reduce(g[0], g[1], g[2], D, r)
        if (gred[0], gred[1]) in index:
            continue
        gi = len(generators)
        generators.append(gred)
        n = len(representatives)
        x = gred
        j = 1
        while True:
            hit = index.get((x[0], x[1]))
            if hit is not None:
                old = vectors[hit]
                relations.append([-v for v in old] + [0] * (gi - len(old)) + [j])
                break
            for h in range(n):
                if h == 0:
                    y = x
                else:
                    rep = representatives[h]
                    y = form_compose(x[0], x[1], rep[0], rep[1], D)
                    y = form_reduce(y[0], y[1], y[2], D, r)
                walk = form_cycle(y[0], y[1], y[2], D, r, max_forms - stored)
                if walk is None:
                    return None
                stored += len(walk)
                cls = len(representatives)
                for key in walk:
                    index[key] = cls
                representatives.append(y)
                old = vectors[h]
                vectors.append(old + (0,) * (gi - len(old)) + (j,))
                if progress is not None and cls % 1000 == 0:
                    progress(cls)  # type: ignore[operator]
            x = form_compose(x[0], x[1], gred[0], gred[1], D)
            x = form_reduce(x[0], x[1], x[2], D, r)
            j += 1
    return index, representatives, vectors, generators, relations


def form_class_numbers(
    D: int, conductor: int, primes: list[int], max_forms: int
) -> tuple[int, int] | None:
    """``(h⁺, 1 if J = (−1, b₀, c₀) is principal else 0)`` of ``D``, or ``None`` beyond ``max_forms``.

    The lean path of :func:`form_class_table` (a compiled twin may skip the vectors).
    ``h = h⁺`` when ``J`` is principal (unit of norm −1), else ``h⁺/2``.
    """
    candidates = form_class_candidates(D, conductor, primes)
    table = form_class_table(D, candidates, max_forms)
    if table is None:
        return None
    index, representatives = table[0], table[1]
    r = int(isqrt(D))
    b0 = principal_b(D, r)
    return len(representatives), int(index.get((-1, b0)) == 0)


def form_class_relations(
    D: int, conductor: int, primes: list[int], max_forms: int
) -> tuple[int, int, list[tuple[int, int, int]], list[list[int]]] | None:
    """``(h⁺, j, generators, relations)`` of :func:`form_class_table` without the per-class data.

    ``j`` as in :func:`form_class_numbers`; ``generators`` (reduced triples) and the
    triangular ``relations`` are exactly those of the full table (same candidates,
    same order), so coordinates computed from either agree. ``None`` beyond ``max_forms``.
    """
    candidates = form_class_candidates(D, conductor, primes)
    table = form_class_table(D, candidates, max_forms)
    if table is None:
        return None
    index, representatives, _, generators, relations = table
    r = int(isqrt(D))
    b0 = principal_b(D, r)
    return len(representatives), int(index.get((-1, b0)) == 0), generators, relations
