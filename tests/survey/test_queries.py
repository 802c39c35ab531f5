"""``survey query`` by structure, p-rank, primes, regulator range, sorted: against brute force."""

from __future__ import annotations

import json
import math
from decimal import Decimal
from fractions import Fraction
from typing import Any

import pytest
import sympy
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from realquad_cli.main import main

from realquad.errors import InputError
from realquad.survey import RowFilter, SurveyStore
from realquad.survey.conditions import (
    decimal_cmp,
    invariant_factors,
    p_rank,
    parse_group,
    parse_p_rank,
)
from realquad.survey.store import COLUMNS

Row = dict[str, Any]


@pytest.fixture(scope="module")
def db(tmp_path_factory: pytest.TempPathFactory) -> str:
    path = str(tmp_path_factory.mktemp("queries") / "survey.sqlite")
    args = ["survey", "run", "--d-max", "2000", "--db", path, "--workers", "1", "--json"]
    assert main(args) == 0
    return path


@pytest.fixture(scope="module")
def every_row(db: str) -> list[Row]:
    with SurveyStore.open_for_reading(db) as store:
        rows = list(store.rows())
    for row in rows:
        row["class_group"] = json.loads(row["class_group"])
        row["narrow_class_group"] = json.loads(row["narrow_class_group"])
    return rows


def query(capsys: pytest.CaptureFixture[str], db: str, *args: str) -> list[Row]:
    status = main(["survey", "query", "--db", db, "--limit", "0", "--json", *args])
    out, err = capsys.readouterr()
    assert status == 0, err
    payload = json.loads(out)
    assert payload["matching"] == payload["shown"] == len(payload["rows"])
    return payload["rows"]  # type: ignore[no-any-return]


def ds(rows: list[Row]) -> list[int]:
    """The radicands, from rows of the store (``d``) or of ``--json`` (``radicand``)."""
    return [r["radicand"] if "radicand" in r else r["d"] for r in rows]


def test_counts(every_row: list[Row]) -> None:
    squarefree = [n for n in range(2, 2001) if max(sympy.factorint(n).values()) == 1]  # sympy
    assert ds(every_row) == squarefree


@pytest.mark.parametrize(
    ("spellings", "invariants"),
    [
        (["C2 x C2", "C2×C2", "2,2", "Z/2 x Z/2", "[2, 2]", "C2^2", "(Z/2Z)^2", "c2*c2"], [2, 2]),
        (["1", "trivial", "[]", "C1"], []),
        (["C4", "4", "Z/4"], [4]),
        (["C2 x C3", "6", "C6"], [6]),
    ],
)
def test_class_group_spellings(capsys, db, every_row, spellings, invariants):
    expected = [r["d"] for r in every_row if r["class_group"] == invariants]  # brute force
    assert expected  # each structure occurs below 2000
    for text in spellings:
        assert ds(query(capsys, db, "--class-group", text)) == expected, text


@pytest.mark.parametrize("text", ["C2 x C4", "C2 x C2", "C2", "C2 x C2 x C2", "C6"])
def test_narrow_class_group(capsys, db, every_row, text):
    wanted = list(parse_group(text))
    expected = [r["d"] for r in every_row if r["narrow_class_group"] == wanted]  # brute force
    assert ds(query(capsys, db, "--narrow-class-group", text)) == expected


@pytest.mark.parametrize("p", [2, 3, 5])
@pytest.mark.parametrize("r", [0, 1, 2, 3])
def test_p_rank(capsys, db, every_row, p, r):
    for option, column in (("--p-rank", "class_group"), ("--narrow-p-rank", "narrow_class_group")):
        # brute force: count the invariant factors divisible by p
        expected = [x["d"] for x in every_row if sum(n % p == 0 for n in x[column]) == r]
        assert ds(query(capsys, db, option, f"{p}={r}")) == expected


def test_p_rank_two_of_narrow_group_is_genus_theory(capsys, db, every_row):
    # Gauss's genus theory: the 2-rank of Cl⁺ is t − 1, t the number of primes dividing D
    for t in (1, 2, 3, 4):
        expected = [
            x["d"] for x in every_row if len(sympy.factorint(x["discriminant"])) == t
        ]  # sympy
        assert ds(query(capsys, db, "--narrow-p-rank", f"2={t - 1}")) == expected


def test_several_p_ranks_and_other_conditions(capsys, db, every_row):
    got = query(capsys, db, "--p-rank", "2=1", "--narrow-p-rank", "2=2", "--unit-norm", "+1")
    expected = [
        x["d"]
        for x in every_row
        if p_rank(x["class_group"], 2) == 1
        and p_rank(x["narrow_class_group"], 2) == 2
        and x["unit_norm"] == 1
    ]  # brute force
    assert ds(got) == expected


def test_prime_d_and_prime_discriminant(capsys, db, every_row):
    assert ds(query(capsys, db, "--prime-d")) == [
        x["d"] for x in every_row if sympy.isprime(x["d"])
    ]  # sympy
    prime_disc = query(capsys, db, "--prime-discriminant")
    assert ds(prime_disc) == [x["d"] for x in every_row if sympy.isprime(x["discriminant"])]
    assert all(x["radicand"] % 4 == 1 and x["class_number"] % 2 == 1 for x in prime_disc)  # genus
    # the same fields as the report's Cohen–Lenstra line
    status = main(["survey", "report", "--db", db, "--json"])
    report = json.loads(capsys.readouterr()[0])
    assert status == 0 and report["prime_discriminants"]["fields"] == len(prime_disc)
    h1 = query(capsys, db, "--prime-discriminant", "--class-number", "1")
    assert report["prime_discriminants"]["class_number_one"] == len(h1)


def test_regulator_range_is_exact(capsys, db, every_row):
    value = {x["d"]: Decimal(x["regulator"]) for x in every_row}
    for lo, hi in [("10", "10.5"), ("0", "1"), ("100", None), (None, "2.5e0")]:
        args = (["--regulator-min", lo] if lo else []) + (["--regulator-max", hi] if hi else [])
        expected = [
            d
            for d, r in value.items()
            if (lo is None or r >= Decimal(lo)) and (hi is None or r <= Decimal(hi))
        ]  # brute force in exact decimals
        assert ds(query(capsys, db, *args)) == expected
    # bounds equal to a stored value include it; one unit in the 18th digit beyond excludes it
    stored = every_row[100]["regulator"]
    just_above = str(Decimal(stored) + Decimal(10) ** (Decimal(stored).adjusted() - 17))
    assert every_row[100]["d"] in ds(query(capsys, db, "--regulator-min", stored))
    assert every_row[100]["d"] in ds(query(capsys, db, "--regulator-max", stored))
    assert every_row[100]["d"] not in ds(query(capsys, db, "--regulator-min", just_above))


def _sort_key(column: str):  # type: ignore[no-untyped-def]
    if column == "regulator":
        return lambda x: Decimal(x["regulator"])
    if column == "class_group":
        return lambda x: (x["class_number"], x["class_group"])
    if column == "narrow_class_group":
        return lambda x: (x["narrow_class_number"], x["narrow_class_group"])
    return lambda x: x[column]


@pytest.mark.parametrize("column", COLUMNS)
def test_sort_by_every_column(capsys, db, every_row, column):
    for descending in (False, True):
        # brute force: Python's stable sort, ties in increasing d
        expected = sorted(every_row, key=_sort_key(column), reverse=descending)
        args = ["--sort", column] + (["--desc"] if descending else [])
        got = query(capsys, db, *args, "--d-max", "2000")
        assert ds(got) == ds(expected), (column, descending)
    first = query(capsys, db, "--sort", column, "--desc")[:1]
    status = main(["survey", "query", "--db", db, "--sort", column, "--desc", "--limit", "1"])
    assert status == 0 and str(first[0]["radicand"]) in capsys.readouterr()[0]


#: The keys of a ``--json`` row and the store's columns they show (docs/json.md, SurveyRow).
ROW_KEYS = {
    "radicand": "d",
    "invariants": "class_group",
    "narrow_invariants": "narrow_class_group",
    "digits": "unit_digits",
}


@pytest.mark.parametrize(("key", "column"), ROW_KEYS.items())
def test_sort_by_the_keys_of_the_json_rows(capsys, db, key, column):
    for way in ([], ["--desc"]):
        assert ds(query(capsys, db, "--sort", key, *way)) == ds(
            query(capsys, db, "--sort", column, *way)
        )


def test_python_api(db, every_row):
    where = RowFilter(class_group="C2 x C2", prime_d=False, regulator_min=5)
    with SurveyStore.open_for_reading(db) as store:
        rows = list(store.rows(where, limit=5, sort="regulator", descending=True))
        count = store.count(where)
    expected = sorted(
        (
            x for x in every_row if x["class_group"] == [2, 2] and Decimal(x["regulator"]) >= 5
        ),  # brute force
        key=lambda x: Decimal(x["regulator"]),
        reverse=True,
    )
    assert [r["d"] for r in rows] == ds(expected[:5]) and count == len(expected)
    assert RowFilter(narrow_class_group=[4, 2]).narrow_class_group == (2, 4)
    with pytest.raises(InputError):
        RowFilter(p_ranks=((4, 1),))


# -- the parsing, against brute force ---------------------------------------------------------


def _torsion_counts(orders: list[int] | tuple[int, ...], exponent: int) -> list[int]:
    """|G[k]| = ∏ gcd(k, n_i) for every k dividing the exponent: they determine the group."""
    return [math.prod(math.gcd(k, n) for n in orders) for k in sympy.divisors(exponent)]


@given(st.lists(st.integers(1, 60), min_size=1, max_size=5))
def test_invariant_factors_by_brute_force(orders):
    factors = invariant_factors(orders)
    assert all(n > 1 for n in factors)
    assert all(b % a == 0 for a, b in zip(factors, factors[1:], strict=False))
    assert math.prod(factors) == math.prod(orders)
    bound = math.lcm(*orders)
    assert _torsion_counts(factors, bound) == _torsion_counts(orders, bound)  # brute force


@given(
    st.decimals(allow_nan=False, allow_infinity=False),
    st.decimals(allow_nan=False, allow_infinity=False),
)
def test_decimal_cmp_against_fractions(a, b):
    fa, fb = Fraction(a), Fraction(b)  # exact rationals
    assert decimal_cmp(str(a), str(b)) == (fa > fb) - (fa < fb)


@pytest.mark.parametrize(
    "text", ["", "C", "C2 x", "D4", "C0", "C2^0", "2;3", "x", "C10000000000000", "C2^65", "🙂"]
)
def test_bad_groups(text):
    if text in ("C2 x",):
        assert parse_group(text) == (2,)  # a trailing separator is harmless
        return
    with pytest.raises(InputError):
        parse_group(text)


@pytest.mark.parametrize("text", ["4=1", "2", "2=x", "=1", "2=65", "1=0", "p=2"])
def test_bad_p_ranks(text):
    with pytest.raises(InputError):
        parse_p_rank(text)


OPTIONS = [
    "--class-group",
    "--narrow-class-group",
    "--p-rank",
    "--narrow-p-rank",
    "--regulator-min",
    "--regulator-max",
    "--sort",
]


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.sampled_from(OPTIONS), st.text(max_size=20), st.booleans())
def test_fuzz_new_options(capsys, db, option, value, flag):
    extra = ["--prime-d", "--desc"] if flag else ["--prime-discriminant"]
    status = main(["survey", "query", "--db", db, option, value, *extra, "--limit", "3"])
    out, err = capsys.readouterr()
    assert status in (0, 2) and "Traceback" not in err
    if status == 2:
        assert err.startswith("realquad: error:") and err.count("\n") == 1 and out == ""


def test_negative_regulator_bounds(capsys, db, every_row):
    # every regulator is positive (brute force over the rows): −1 keeps all rows, or none
    assert all(Decimal(x["regulator"]) > 0 for x in every_row)
    assert len(query(capsys, db, "--regulator-min", "-1")) == len(every_row)
    assert query(capsys, db, "--regulator-max", "-1") == []
