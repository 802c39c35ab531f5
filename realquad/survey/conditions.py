"""What survey queries compare: group structures, p-ranks, primes, decimal regulators.

* :func:`parse_group` reads a finite abelian group as people write it —
  ``"C2 x C2"``, ``"C2×C4"``, ``"2,2"``, ``"Z/2 x Z/2Z"``, ``"C2^2"``,
  ``"[2, 4]"``, ``"1"`` or ``"trivial"`` — into its invariant factors
  ``d₁ | d₂ | … | d_k`` (each ``> 1``, increasing), the form in which a survey
  row stores ``class_group`` and ``narrow_class_group`` (a JSON list);
  factors that are not yet invariant (``C2 x C3``) are normalised (``[6]``).
* :func:`parse_p_rank` reads ``P=R``; :func:`p_rank` is the number of
  invariant factors divisible by the prime ``p`` (the dimension of ``G/G^p``
  over ``F_p``).
* :func:`register_functions` gives an SQLite connection the functions and
  collations that :class:`~realquad.survey.store.RowFilter` and the sorted
  queries use: ``rq_is_prime(n)``, ``rq_p_rank(invariants, p)``,
  ``rq_same_group(invariants, json)``, ``rq_decimal_cmp(text, bound)`` and the
  collations ``rq_decimal`` (decimal text by value) and ``rq_invariants``
  (invariant lists, lexicographically).

>>> parse_group("C2 x C2"), parse_group("Z/2 × Z/4Z"), parse_group("2,3"), parse_group("trivial")
((2, 2), (2, 4), (6,), ())
>>> parse_group("C6^2 x C4")
(2, 6, 12)
>>> p_rank((2, 6, 12), 3), p_rank((2, 6, 12), 2), parse_p_rank("2=1")
(2, 3, (2, 1))
>>> decimal_cmp("12.000000000000001", "12")
1

Primality is gmpy2's test (GMP's Baillie–PSW with Miller–Rabin rounds),
which has no known exception and none below ``2⁶⁴`` (J. Feitsma and
W. Galway's table of base-2 pseudoprimes; survey rows keep ``d ≤ 10¹⁵``).
The invariant factors follow from the primary decomposition (each ``C_n`` is
the product of its ``C_{p^e}``; the ``k``-th largest powers of every prime
multiply to the ``k``-th largest invariant factor), H. Cohen, *A Course in
Computational Algebraic Number Theory*, §2.4.3.
"""

from __future__ import annotations

import json
import re
import sqlite3
from decimal import Decimal, InvalidOperation
from functools import cmp_to_key

import gmpy2

from realquad.core.linalg import invariants_from_primary
from realquad.core.primes import factorize
from realquad.errors import InputError

#: Largest order of one cyclic factor accepted in a group structure.
MAX_FACTOR = 10**12
#: Most cyclic factors (after expanding powers) in a group structure.
MAX_FACTORS = 64
#: Largest prime accepted in a p-rank condition.
MAX_P = 10**9

_TRIVIAL = {"1", "c1", "trivial", "[]", "{1}", "{0}", "0", "z/1", "z/1z"}
_FACTOR = re.compile(r"(?:c|z/)?(\d{1,13})z?(?:\^(\d{1,3}))?")
_SEPARATORS = re.compile(r"[x×*,⊕+\s]+")


def _shown(text: str) -> str:
    return repr(text if len(text) <= 40 else text[:37] + "...")


def parse_group(text: str) -> tuple[int, ...]:
    """The invariant factors (increasing, each dividing the next) of a group written as text.

    Raises :class:`InputError` for anything else.

    >>> parse_group("[2, 4]"), parse_group("C4 x C2"), parse_group("(Z/2)^3")
    ((2, 4), (2, 4), (2, 2, 2))
    >>> parse_group("C2 x D4")
    Traceback (most recent call last):
    ...
    realquad.errors.InputError: cannot read the group 'C2 x D4': 'd4' is not a cyclic factor (write C2 x C4, 2,4 or Z/2 x Z/4)
    """
    if not isinstance(text, str):
        raise InputError(f"a group structure must be text, got {type(text).__name__}")
    plain = text.strip().lower().replace("ℤ", "z").replace("(", "").replace(")", "")
    if len(plain) > 1000:
        raise InputError(f"the group {_shown(text)} is too long")
    inner = plain.strip("[]{} ")
    if plain in _TRIVIAL or inner in _TRIVIAL or (plain and not inner):
        return ()
    plain = inner
    orders: list[int] = []
    for token in _SEPARATORS.split(plain):
        if not token:
            continue
        m = _FACTOR.fullmatch(token)
        if m is None:
            raise InputError(
                f"cannot read the group {_shown(text)}: {token[:20]!r} is not a cyclic factor "
                "(write C2 x C4, 2,4 or Z/2 x Z/4)"
            )
        n, power = int(m.group(1)), int(m.group(2) or 1)
        if n < 1 or n > MAX_FACTOR:
            raise InputError(f"cyclic factors must have order 1 to {MAX_FACTOR:,}, got {n}")
        if power < 1 or len(orders) + power > MAX_FACTORS:
            raise InputError(f"a group structure has at most {MAX_FACTORS} cyclic factors")
        orders += [n] * power
    if not orders:
        raise InputError(f"cannot read the group {_shown(text)}: no cyclic factor")
    return invariant_factors(orders)


def invariant_factors(orders: list[int] | tuple[int, ...]) -> tuple[int, ...]:
    """The invariant factors of ``C_{n₁} × C_{n₂} × …`` (increasing; trivial factors dropped).

    >>> invariant_factors([2, 3]), invariant_factors([4, 6, 1]), invariant_factors([1])
    ((6,), (2, 12), ())
    """
    powers: dict[int, list[int]] = {}
    for n in orders:
        for p, e in factorize(n).items():
            powers.setdefault(p, []).append(p**e)
    return tuple(invariants_from_primary(powers))


def p_rank(invariants: tuple[int, ...] | list[int], p: int) -> int:
    """The ``p``-rank: how many invariant factors ``p`` divides.

    >>> p_rank([2, 4], 2), p_rank([2, 4], 3), p_rank([], 5)
    (2, 0, 0)
    """
    return sum(1 for n in invariants if n % p == 0)


def parse_p_rank(text: str) -> tuple[int, int]:
    """``(p, r)`` from ``"P=R"`` with ``p`` prime and ``0 ≤ r ≤ 64``.

    >>> parse_p_rank(" 3 = 2 ")
    (3, 2)
    """
    m = re.fullmatch(r"\s*(\d{1,10})\s*=\s*(\d{1,3})\s*", text) if isinstance(text, str) else None
    if m is None:
        raise InputError(f"a p-rank condition is P=R (for example 2=2), got {_shown(str(text))}")
    p, r = int(m.group(1)), int(m.group(2))
    if p > MAX_P or not gmpy2.is_prime(p):
        raise InputError(f"the p of a p-rank must be a prime up to {MAX_P:,}, got {p}")
    if r > MAX_FACTORS:
        raise InputError(f"a p-rank is at most {MAX_FACTORS}, got {r}")
    return p, r


def parse_decimal(value: object, name: str) -> Decimal:
    """A finite decimal number from text, ``int``, ``float`` (its exact value) or ``Decimal``.

    Text may use the minus sign ``−`` (U+2212) as well as ``-``.

    >>> parse_decimal("2.5e1", "--regulator-min"), parse_decimal("−0.5", "--regulator-max")
    (Decimal('25'), Decimal('-0.5'))
    """
    if isinstance(value, bool):
        raise InputError(f"{name} must be a decimal number, got {value!r}")
    if isinstance(value, str):
        value = value.strip().replace("\u2212", "-")
    try:
        number = Decimal(value)  # type: ignore[arg-type]
    except (InvalidOperation, TypeError, ValueError):
        number = None
    if number is None or not number.is_finite() or (isinstance(value, str) and len(value) > 100):
        raise InputError(f"{name} must be a decimal number, got {_shown(str(value))}")
    return number.normalize() if number else Decimal(0)


def decimal_cmp(text: str, bound: str) -> int:
    """−1, 0 or 1 as the decimal ``text`` is below, equal to or above ``bound`` (exactly).

    >>> decimal_cmp("0.48121182505960345", "0.48121182505960345"), decimal_cmp("2", "10")
    (0, -1)
    """
    a, b = Decimal(text), Decimal(bound)
    return (a > b) - (a < b)


def _invariants(text: str | None) -> list[int] | None:
    return None if text is None else json.loads(text)


def _sql_is_prime(n: int | None) -> int | None:
    return None if n is None else int(n > 1 and bool(gmpy2.is_prime(n)))


def _sql_p_rank(text: str | None, p: int) -> int | None:
    values = _invariants(text)
    return None if values is None else p_rank(values, p)


def _sql_same_group(text: str | None, wanted: str) -> int | None:
    values = _invariants(text)
    return None if values is None else int(values == json.loads(wanted))


def _sql_decimal_cmp(text: str | None, bound: str) -> int | None:
    return None if text is None else decimal_cmp(text, bound)


def _collate_decimal(a: str, b: str) -> int:
    return decimal_cmp(a, b)


def _collate_invariants(a: str, b: str) -> int:
    x, y = json.loads(a) or [], json.loads(b) or []
    return (x > y) - (x < y)


#: Sort keys of the values of the collation ``rq_invariants`` (for tests and documentation).
invariants_key = cmp_to_key(_collate_invariants)


def register_functions(connection: sqlite3.Connection) -> None:
    """Give ``connection`` the SQL functions and collations of the module docstring."""
    for name, arity, function in (
        ("rq_is_prime", 1, _sql_is_prime),
        ("rq_p_rank", 2, _sql_p_rank),
        ("rq_same_group", 2, _sql_same_group),
        ("rq_decimal_cmp", 2, _sql_decimal_cmp),
    ):
        connection.create_function(name, arity, function, deterministic=True)
    connection.create_collation("rq_decimal", _collate_decimal)
    connection.create_collation("rq_invariants", _collate_invariants)
