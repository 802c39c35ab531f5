"""Independent slow counters for the survey tests, and a check of them against OEIS.

``brute_class_numbers(D)`` counts the cycles of reduced indefinite forms of a
fundamental discriminant ``D`` under the rho step (Buchmann–Vollmer, *Binary
Quadratic Forms*, 2007, §6.10: the cycles are the narrow classes, so their
number is ``h⁺``), decides the norm of the fundamental unit by whether the
principal cycle contains ``−(principal form)`` (Buchmann–Vollmer §6.12), and
returns ``h = h⁺`` when that norm is −1, ``h = h⁺/2`` otherwise. It shares no
code with realquad.
"""

from __future__ import annotations

import sqlite3
from math import isqrt
from pathlib import Path


def _reduced_forms(D: int) -> list[tuple[int, int, int]]:
    r = isqrt(D)
    forms = []
    for b in range(1, r + 1):
        if (b - D) % 2:
            continue
        ac = (b * b - D) // 4  # negative
        n = -ac
        for a in range(1, min(n, r) + 1):  # a reduced form has |a| < √D
            if n % a:
                continue
            c = -(n // a)
            for sa, sc in ((a, c), (-a, -c)):
                if _is_reduced(D, sa, b):
                    forms.append((sa, b, sc))
    return forms


def _is_reduced(D: int, a: int, b: int) -> bool:
    # reduced: |√D − 2|a|| < b < √D, i.e. b² < D and √D − b < 2|a| < √D + b, exactly
    if b <= 0 or b * b >= D:
        return False
    A = 2 * abs(a)
    lower = (A + b) ** 2 > D  # √D − b < A
    upper = A < b or (A - b) ** 2 < D  # A − b < √D
    return lower and upper


def _rho(D: int, form: tuple[int, int, int]) -> tuple[int, int, int]:
    a, b, c = form
    r = isqrt(D)
    m = 2 * abs(c)
    t = (-b) % m
    # largest t ≡ −b (mod 2|c|) with t < √D, then it lies in (√D − 2|c|, √D)
    t += ((r - t) // m) * m
    if t > r:
        t -= m
    return c, t, (t * t - D) // (4 * c)


def brute_class_numbers(D: int) -> tuple[int, int, int]:
    """``(h, h⁺, unit norm)`` of the fundamental discriminant ``D`` by counting cycles."""
    forms = set(_reduced_forms(D))
    seen: set[tuple[int, int, int]] = set()
    cycles = 0
    principal_cycle: set[tuple[int, int, int]] = set()
    r = isqrt(D)
    b0 = r if (r - D) % 2 == 0 else r - 1
    principal = (1, b0, (b0 * b0 - D) // 4)
    assert principal in forms
    for start in sorted(forms):
        if start in seen:
            continue
        cycles += 1
        f = start
        members = set()
        while f not in members:
            members.add(f)
            f = _rho(D, f)
        assert f == start and members <= forms
        seen |= members
        if principal in members:
            principal_cycle = members
    a, b, c = principal
    norm = -1 if (-a, b, -c) in principal_cycle else 1
    h_plus = cycles
    return (h_plus if norm == -1 else h_plus // 2), h_plus, norm


def fundamental_discriminant(d: int) -> int:
    return d if d % 4 == 1 else 4 * d


def stored_table(path: Path) -> list[tuple]:  # type: ignore[type-arg]
    """Every stored row (without the chunk that wrote it), in increasing d, read with plain sqlite3."""
    from realquad.survey.store import COLUMNS

    c = sqlite3.connect(path)
    rows = c.execute(f"SELECT {', '.join(COLUMNS)} FROM field_rows ORDER BY d").fetchall()
    c.close()
    return rows


def completed_chunks(path: Path) -> int:
    """Completed chunks so far, read while a run writes (0 before the store or its schema exists)."""
    if not path.exists():
        return 0
    try:
        c = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=5)
        try:
            return int(c.execute("SELECT COUNT(*) FROM chunks").fetchone()[0])
        finally:
            c.close()
    except sqlite3.Error:
        return 0


def test_brute_counter_matches_oeis_class_number_one(oeis) -> None:  # type: ignore[no-untyped-def]
    terms = oeis["A003172"]["terms"]  # OEIS A003172: squarefree n with h(Q(√n)) = 1
    squarefree = [
        d for d in range(2, terms[-1] + 1) if all(d % (p * p) for p in range(2, isqrt(d) + 1))
    ]
    found = [d for d in squarefree if brute_class_numbers(fundamental_discriminant(d))[0] == 1]
    assert found == terms


def test_brute_counter_known_values() -> None:
    # Q(√79): h = 3, N(ε) = +1, h⁺ = 6 (from memory; ε = 80 + 9√79 has norm +1)
    assert brute_class_numbers(316) == (3, 6, 1)
    # Q(√5): h = h⁺ = 1, N(ε) = −1 (ε = (1 + √5)/2)
    assert brute_class_numbers(5) == (1, 1, -1)
    # Q(√3): h = 1, h⁺ = 2, N(ε) = +1 (ε = 2 + √3)
    assert brute_class_numbers(12) == (1, 2, 1)
    # Q(√10): h = 2, N(ε) = −1 (ε = 3 + √10), h⁺ = 2 (from memory)
    assert brute_class_numbers(40) == (2, 2, -1)
