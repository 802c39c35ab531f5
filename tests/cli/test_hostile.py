"""Hostile input: every command and option against malformed, huge, foreign and contradictory values.

Each case runs the command line in-process in an empty directory and checks
the contract: exit status 0 with an answer, or 2 with exactly one line
``realquad: error: …`` (containing the expected words) and nothing on
standard output; never a traceback; within :data:`TIME_LIMIT` seconds; and no
file left behind. The table is built from classes of bad values crossed with
every option that takes them, plus cases of their own (more than 400 in all).
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import pytest

from realquad._backend import COMPILED
from tests.cli.support import run

#: A conic with linear terms beyond the continued fraction: solved by the infrastructure with
#: the compiled giant steps, refused at once (saying why) on the pure kernels.
_CONIC = (0, "") if "infrastructure_giant_search" in COMPILED else (2, "beyond the continued")

#: No case may take longer than this (seconds), on either kernel.
TIME_LIMIT = 10.0

HUGE = "9" * 5000
LONG = "1" + "0" * 3998 + "1"  # 4000 digits: accepted, and refused by the method's reach

#: Values that are not integers, each with words its error line must contain.
NOT_INTEGERS = [
    ("", "integer"),
    (" ", "integer"),
    ("abc", "integer"),
    ("2.5", "integer"),
    ("1e5", "integer"),
    ("0x10", "integer"),
    ("1_", "integer"),
    ("_1", "integer"),
    ("1__0", "integer"),
    ("١٢", "integer"),  # Arabic-Indic digits: ASCII digits only, everywhere
    ("１２", "integer"),  # fullwidth digits
    ("+-3", "integer"),
    ("--3", "integer"),
    ("3-", "integer"),
    ("7/2", "integer"),
    ("∞", "integer"),
    ("nan", "integer"),
    ("1 2", "integer"),
    (HUGE, "5,000 digits"),
    ("-" + HUGE, "5,000 digits"),
]

#: (command prefix, option or None for the positional argument, the rest of a valid call).
INTEGER_SLOTS = [
    (["pell"], None, []),
    (["pell", "61"], "--norm", []),
    (["pell", "61"], "--max-digits", []),
    (["unit"], None, []),
    (["unit"], "--disc", []),
    (["unit", "94"], "--digits", []),
    (["unit", "94"], "--max-digits", []),
    (["classgroup"], None, []),
    (["classgroup"], "--disc", []),
    (["split"], None, []),
    (["split"], "--disc", []),
    (["split", "79"], "--prime", []),
    (["split", "79"], "--primes-up-to", []),
    (["split", "79"], "--max-digits", []),
    (["solve", "x^2 - 2y^2 = 1"], "--bound", []),
    (["solve", "x^2 - 2y^2 = 1"], "--member", []),
    (["cfrac", "61"], "--max-terms", []),
    (["survey", "run"], "--d-max", ["--db", "s.sqlite"]),
    (["survey", "run", "--d-max", "100"], "--d-min", ["--db", "s.sqlite"]),
    (["survey", "run", "--d-max", "100"], "--workers", ["--db", "s.sqlite"]),
    (["survey", "run", "--d-max", "100"], "--chunk-size", ["--db", "s.sqlite"]),
    (["survey", "query"], "--class-number", ["--db", "missing.sqlite"]),
    (["survey", "query"], "--d-max", ["--db", "missing.sqlite"]),
    (["survey", "report"], "--top", ["--db", "missing.sqlite"]),
]


def _integer_cases() -> list[tuple[list[str], int, str]]:
    cases = []
    for prefix, option, rest in INTEGER_SLOTS:
        for value, needle in NOT_INTEGERS:
            slot = [value] if option is None else [option, value]
            # click's own integer options say "not a valid integer"; ours say "integer": both fine
            cases.append(([*prefix, *slot, *rest], 2, needle if needle != "integer" else ""))
    return cases


#: Cases of their own: (arguments, exit status, words of the error line).
OWN_CASES: list[tuple[list[str], int, str]] = [
    # unknown, misspelled, repeated and incomplete options
    (["pell", "61", "--nrom", "-1"], 2, "no such option"),
    (["unit", "--dsic", "52"], 2, "no such option"),
    (["classgroup", "79", "--froms"], 2, "no such option"),
    (["split", "79", "--primes", "7"], 2, "option"),
    (["solve", "x=1", "--bond", "3"], 2, "no such option"),
    (["cfrac", "61", "--max-term", "3"], 2, "no such option"),
    (["survey", "query", "--discriminants"], 2, "no such option"),
    (["survey", "report", "--plott", "x.png"], 2, "no such option"),
    (["pell", "61", "--norm", "-1", "--norm", "4"], 2, "more than once"),
    (["pell", "61", "--json", "--json"], 2, "more than once"),
    (["unit", "--disc", "52", "--disc", "53"], 2, "more than once"),
    (["classgroup", "79", "--method", "exact", "--method", "bsgs"], 2, "more than once"),
    (["split", "79", "--prime", "3", "--prime", "5"], 2, "more than once"),
    (["solve", "x=1", "--bound", "3", "--bound=4"], 2, "more than once"),
    (["pell", "61", "--norm"], 2, "requires an argument"),
    (["unit", "--disc"], 2, "requires an argument"),
    (["pell"], 2, "missing argument"),
    (["cfrac"], 2, "missing argument"),
    (["solve"], 2, "missing argument"),
    (["frobnicate"], 2, "no such command"),
    (["survey"], 2, "missing command"),
    ([], 2, "missing command"),
    (["survey", "frobnicate"], 2, "no such command"),
    (["pell", "61", "62"], 2, "unexpected extra argument"),
    (["unit", "5", "--disc", "5"], 2, "either"),
    (["unit"], 2, "either"),
    (["unit", "94", "--method", "fast"], 2, "invalid value"),
    (["classgroup", "79", "--method", "cfrac"], 2, "invalid value"),
    (["unit", "94", "--digits", "0"], 2, "range"),
    (["unit", "94", "--digits", "100001"], 2, "range"),
    (["unit", "94", "--compact", "--method", "cfrac"], 2, "compact"),
    (["classgroup", "79", "--forms", "--method", "bsgs"], 2, "exact"),
    (["split", "79", "--primes-up-to", "10", "--prime", "3"], 2, "not both"),
    (["split", "79", "--primes-up-to", "1"], 2, "between"),
    (["split", "79", "--primes-up-to", "100000000"], 2, "between"),
    (["split", "79", "--prime", "9"], 2, "prime"),
    (["split", "79", "--prime", "-3"], 2, "prime"),
    (["split", "79", "--prime", "1"], 2, "prime"),
    (["solve", "x=1", "--member", "10000001"], 2, "member"),
    (["solve", "x^2 - 2y^2 = 1", "--bound", "-1"], 2, "non-negative"),
    (["solve", "x^2 - 2y^2 = 1", "--bound", "10^99999"], 2, "large"),
    (["survey", "run", "--db", "s.sqlite"], 2, "--d-max"),
    (["survey", "run", "--d-max", "10", "--d-min", "-5", "--db", "s.sqlite"], 2, "both signs"),
    (["survey", "run", "--d-max", "-5", "--db", "s.sqlite"], 2, "--d-min"),
    (["survey", "run", "--d-max", "10000000000000000", "--db", "s.sqlite"], 2, "at most"),
    (["survey", "run", "--d-max", "10", "--workers", "2000", "--db", "s.sqlite"], 2, "at most"),
    (["survey", "run", "--d-max", "10", "--scheduler", " ", "--db", "s.sqlite"], 2, "address"),
    (["survey", "query", "--db", "missing.sqlite"], 2, "no survey database"),
    (["survey", "report", "--db", "missing.sqlite"], 2, "no survey database"),
    (["survey", "query", "--unit-norm", "2", "--db", "missing.sqlite"], 2, "unit-norm"),
    (
        ["survey", "query", "--d-min", "9", "--d-max", "3", "--db", "missing.sqlite"],
        2,
        "empty range",
    ),
    (["survey", "query", "--csv", "--json", "--db", "missing.sqlite"], 2, "not both"),
    # numbers: signs, squares, zero, the wrong residue, huge but readable, the Unicode minus
    (["pell", "-5"], 0, ""),  # x² + 5y² = 1: the finite answer
    (["pell", "0"], 2, "not be 0"),
    (["pell", "−5", "--norm", "-1"], 0, ""),
    (["pell", "7", "--norm", "3"], 2, "norm"),
    (["pell", "7", "--norm", "0"], 2, "norm"),
    (["pell", "61", "--norm", "−1"], 0, ""),
    (["pell", "61", "--norm=-1"], 0, ""),
    (["pell", "1_000"], 0, ""),
    (["pell", "16"], 0, ""),
    (["pell", "16", "--norm", "-1"], 0, ""),
    (["pell", LONG], 2, "beyond reach"),
    (["pell", "100000000000000000000000000000049", "--norm", "-1"], 2, "giant steps"),
    (["unit", "9"], 2, "perfect square"),
    (["unit", "0"], 2, "non-zero"),
    (["unit", "1"], 2, "perfect square"),
    (["unit", "-3"], 0, ""),  # the roots of unity of Q(√−3)
    (["unit", "--disc", "7"], 2, "0 or 1 mod 4"),
    (["unit", "--disc", "16"], 2, "square"),
    (["unit", "--disc", "0"], 2, "not be 0"),
    (["unit", "--disc", "-20"], 0, ""),
    (["unit", "--disc", "-20", "--method", "bsgs"], 0, ""),
    (["unit", "--disc", LONG], 2, "beyond reach"),
    (["unit", "--disc", "1" + "0" * 99 + "1"], 2, "beyond reach"),
    (["unit", "1000000000000000000000000000001", "--method", "cfrac"], 0, ""),  # n² + 1: period 3
    (["unit", "1000000000000000000000000000057", "--method", "cfrac"], 2, "continued fraction"),
    (["classgroup", "16"], 2, "square"),
    (["classgroup", "--disc", "7"], 2, "0 or 1 mod 4"),
    (["classgroup", "--disc", "1000000000000000000000000000057", "--method", "bsgs"], 2, "beyond"),
    (["classgroup", "--disc", LONG], 2, "beyond"),
    (["classgroup", "--disc", "100000000000000000000000000001", "--method", "exact"], 2, "beyond"),
    (["split", "16"], 2, "square"),
    (["split", "--disc", "45", "--prime", "3"], 0, ""),
    (["cfrac", "61"], 0, ""),
    (["cfrac", "-5"], 2, "not real"),
    (["cfrac", "−5"], 2, "not real"),
    (["cfrac", "-5/3"], 0, ""),
    (["cfrac", "1+2/3"], 0, ""),
    (["cfrac", "sqrt(-3)"], 2, "negative"),
    (["cfrac", "1/0"], 2, "division by zero"),
    (["cfrac", "1/(sqrt(2)-sqrt(2))"], 2, "division by zero"),
    (["cfrac", "sqrt(2)+sqrt(3)"], 2, "one square root"),
    (["cfrac", "٣/4"], 2, "cannot read"),
    (["cfrac", "sqrt("], 2, "cannot read"),
    (["cfrac", "(" * 200 + "1" + ")" * 200], 2, "nested"),
    (["cfrac", "x" * 20000], 2, "longer than"),
    (["cfrac", "sqrt(" + "9" * 5000 + ")"], 2, "4000 digits"),
    (["cfrac", "sqrt(1" + "0" * 39 + "1)"], 0, ""),  # √(10⁴⁰ + 1) = √(n² + 1): period 1
    (["cfrac", "sqrt(1" + "0" * 29 + "57)"], 2, "period"),
    (["cfrac", "(1 + sqrt(1" + "0" * 29 + "57))/2"], 2, "period"),
    # equations
    (["solve", "x^2 - 13y^^2 = -4"], 2, "position"),
    (["solve", "x^3 = y"], 2, "degree"),
    (["solve", "x^2 = 1 = 2"], 2, "only one"),
    (["solve", "0 = 0"], 2, "every pair"),
    (["solve", "x*y = z"], 2, "position"),
    (["solve", "x / y = 2"], 2, "constant divisor"),
    (["solve", "x^" + "9" * 10 + " = 1"], 2, "exponent"),
    (["solve", "(" * 200 + "x" + ")" * 200 + " = 1"], 2, "nested"),
    (["solve", "x = " + "9" * 5000], 2, "digits"),
    (["solve", "x^2 − 13y² = −4"], 0, ""),
    (["solve", "x^2", "-", "13y^2", "=", "-4"], 0, ""),
    (["solve", "x^2 + x - 100000039y^2 = 0"], 0, ""),
    (["solve", "x^2 - 7xy - 7y^2 = -7"], 0, ""),
    (["solve", "x^2 - 1000000000000000000000049 y^2 + x = 3"], *_CONIC),
    (
        ["solve", "x^2 - 1298074214633706907132624082305025 y^2 + x = 3"],
        2,
        "beyond the continued fraction",
    ),
    (["solve", f"x^2 - {10**60 + 7} y^2 = 3"], 2, "giant steps"),
    # files
    (["pell", "61", "--output", ""], 2, "file name"),
    (["pell", "61", "--output", "/dev/null"], 2, "not a regular file"),
    (["pell", "61", "--output", "."], 2, "directory"),
    (["pell", "61", "--output", "missing/x.txt"], 2, "no such directory"),
    (["unit", "94", "--output", "n" * 300], 2, "longer than"),
    (["cfrac", "61", "--output", "/proc/self/x"], 2, "cannot write"),
    (["solve", "x=1", "--output", "/dev/zero"], 2, "not a regular file"),
]

CASES = _integer_cases() + OWN_CASES


def test_the_suite_is_large() -> None:
    assert len(CASES) >= 400


@pytest.mark.parametrize(
    ("args", "status", "needle"),
    CASES,
    ids=[f"{i}:{' '.join(a)[:40]}" for i, (a, _, _) in enumerate(CASES)],
)
def test_hostile_input(
    capsys: pytest.CaptureFixture[str],
    monkeypatch: pytest.MonkeyPatch,
    tmp_path: Path,
    args: list[str],
    status: int,
    needle: str,
) -> None:
    monkeypatch.chdir(tmp_path)
    before = sorted(os.listdir(tmp_path))
    start = time.monotonic()
    code, out, err = run(capsys, *args)
    elapsed = time.monotonic() - start
    assert elapsed < TIME_LIMIT, f"{elapsed:.1f} s"
    assert "Traceback" not in err and "internal error" not in err, err
    assert code == status, (code, err[:300])
    if status == 2:
        assert out == "", out[:200]
        assert err.startswith("realquad: error:") and err.count("\n") == 1, err[:300]
        assert needle.lower() in err.lower(), err[:300]
    assert sorted(os.listdir(tmp_path)) == before  # nothing created, nothing left behind
