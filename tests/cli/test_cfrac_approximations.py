"""``realquad cfrac --convergents K / --best B``: payload, limits, files, bad input, fuzz."""

from __future__ import annotations

import math
from fractions import Fraction
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from realquad_cli.main import main

from tests.cli.support import run, run_json

# OEIS A001333 / A000129 (from memory; the recurrence is checked in tests/cfrac)
A001333 = [1, 3, 7, 17, 41, 99, 239, 577, 1393, 3363]
A000129 = [1, 2, 5, 12, 29, 70, 169, 408, 985, 2378]


def test_convergents_of_sqrt2(capsys):
    data = run_json(capsys, "cfrac", "2", "--convergents", "10")
    assert data["convergents"] == [
        {"p": p, "q": q} for p, q in zip(A001333, A000129, strict=True)
    ]  # OEIS A001333 / A000129
    assert data["convergents_truncated"] is False
    assert data["period"] == [2] and data["proof"] == "unconditional"  # keys kept
    code, out, _ = run(capsys, "cfrac", "2", "--convergents", "3")
    assert code == 0 and "1/1" in out and "3/2" in out and "7/5" in out


def test_pell_solution_of_61_is_the_22nd_convergent(capsys, oeis):
    data = run_json(capsys, "cfrac", "61", "--convergents", "22")
    last = data["convergents"][-1]
    # OEIS A002350 / A002349 at n = 61
    assert (last["p"], last["q"]) == (oeis["A002350"]["terms"][60], oeis["A002349"]["terms"][60])


def test_rational_has_finitely_many(capsys):
    data = run_json(capsys, "cfrac", "355/113", "--convergents", "50")
    # 355/113 = [3; 7, 16] (brute force: 3 + 1/(7 + 1/16) = 355/113)
    assert data["convergents"] == [{"p": 3, "q": 1}, {"p": 22, "q": 7}, {"p": 355, "q": 113}]
    assert 3 + 1 / (7 + Fraction(1, 16)) == Fraction(355, 113)


def _brute_best(x: Fraction, bound: int) -> list[tuple[int, int]]:
    """Best approximations of the first kind of a rational, by their definition."""
    out, smallest = [], None
    for s in range(1, bound + 1):
        r = round(x * s)
        d = abs(x - Fraction(r, s))
        others = [abs(x - Fraction(r + i, s)) for i in (-1, 1)]
        if (smallest is None or d < smallest) and d not in others and math.gcd(r, s) == 1:
            out.append((r, s))
        smallest = d if smallest is None else min(smallest, d)
    return out


@pytest.mark.parametrize("text", ["355/113", "-17/40", "103993/33102", "7/2"])
def test_best_approximations_of_rationals(capsys, text):
    data = run_json(capsys, "cfrac", text, "--best", "200")
    got = [(e["p"], e["q"]) for e in data["best_approximations"]]
    assert got == _brute_best(Fraction(text), 200)  # brute force
    assert data["best_approximations_kind"] == 1


def test_best_approximations_of_sqrt7_both_kinds(capsys):
    # √7 = [2; (1, 1, 1, 4)]; convergents 3/1, 5/2, 8/3, 37/14, 45/17, 82/31, 127/48
    # (brute force: |q√7 − p| over all p, q ≤ 50 gives these, by hand with 10 digits)
    first = run_json(capsys, "cfrac", "7", "--best", "50")["best_approximations"]
    assert [(e["p"], e["q"], e["convergent"]) for e in first] == [
        (3, 1, True),
        (5, 2, True),
        (8, 3, True),
        (21, 8, False),
        (29, 11, False),
        (37, 14, True),
        (45, 17, True),
        (82, 31, True),
        (127, 48, True),
    ]
    second = run_json(capsys, "cfrac", "7", "--best", "50", "--kind", "2")["best_approximations"]
    assert [(e["p"], e["q"]) for e in second] == [
        (3, 1),
        (5, 2),
        (8, 3),
        (37, 14),
        (45, 17),
        (82, 31),
        (127, 48),
    ]
    for p, q in [(21, 8), (29, 11)]:  # brute force: 21/8 and 29/11 are closer than 8/3 …
        assert abs(math.sqrt(7) - p / q) < abs(math.sqrt(7) - 8 / 3)
    assert abs(8 * math.sqrt(7) - 21) > abs(3 * math.sqrt(7) - 8)  # … but not of the second kind


def test_lists_are_cut_by_max_terms(capsys):
    data = run_json(capsys, "cfrac", str(10**20 + 1), "--best", str(10**13), "--max-terms", "5")
    assert len(data["best_approximations"]) == 5 and data["best_approximations_truncated"] is True
    code, out, _ = run(capsys, "cfrac", "2", "--convergents", "100", "--max-terms", "4")
    assert code == 0 and "first 4; --max-terms 0 for all 100" in out


def test_long_integers_are_summarised_and_written_in_full(capsys, tmp_path: Path):
    out_file = tmp_path / "cf.txt"
    data = run_json(
        capsys,
        "cfrac",
        "2",
        "--convergents",
        "120",
        "--max-digits",
        "20",
        "--output",
        str(out_file),
    )
    last = data["convergents"][-1]
    assert last["p"]["digits"] > 20 and last["q"]["digits"] > 20  # summaries in place
    written = out_file.read_text().splitlines()
    assert written[2].startswith("convergents ")
    p, q = map(int, written[2].split()[-1].split("/"))
    assert p * p - 2 * q * q in (1, -1)  # brute force: convergents of √2 solve p² − 2q² = ±1
    assert str(p).startswith(last["p"]["leading"]) and str(p).endswith(last["p"]["trailing"])
    assert len(str(p)) == last["p"]["digits"]
    code, text, _ = run(capsys, "cfrac", "2", "--convergents", "120", "--max-digits", "20")
    assert "--max-digits 0 or --output FILE for all" in text and text.count("for all") == 1


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--convergents", "0"], "--convergents must be a positive integer"),
        (["--convergents", "x"], "--convergents must be an integer"),
        (["--best", "-5"], "--best must be a positive integer"),
        (["--best", "1.5"], "--best must be an integer"),
        (["--best", "9", "--kind", "3"], "--kind"),
    ],
)
def test_bad_options(capsys, args, message):
    code, out, err = run(capsys, "cfrac", "2", *args)
    assert code == 2 and out == ""
    assert err.startswith("realquad: error:") and message in err and err.count("\n") == 1


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(
    st.sampled_from(["2", "61", "(1+sqrt(13))/2", "355/113", "-3", "x"]),
    st.sampled_from(["--convergents", "--best", "--kind", "--max-digits", "--max-terms"]),
    st.text(max_size=12),
)
def test_fuzz_new_options(capsys, expr, option, value):
    code = main(["cfrac", expr, option, value, "--max-terms", "50"])
    out, err = capsys.readouterr()
    assert code in (0, 2) and "Traceback" not in err
    if code == 2:
        assert err.startswith("realquad: error:") and err.count("\n") == 1 and out == ""


def test_huge_lists_are_refused_before_anything_is_written(capsys, tmp_path: Path):
    out_file = tmp_path / "all.txt"
    args = ["cfrac", "2", "--convergents", "1000000", "--output", str(out_file)]
    code, out, err = run(capsys, *args)
    assert code == 2 and out == "" and not out_file.exists()
    assert err.startswith("realquad: error:") and "--convergents" in err and err.count("\n") == 1
