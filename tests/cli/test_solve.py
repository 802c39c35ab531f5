"""``realquad solve``: in-process runs, JSON contract, bad input, fuzzing, one subprocess smoke test."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from tests.cli.support import run, run_json


def test_norm_equation_json(capsys):
    data = run_json(capsys, "solve", "x^2 - 13y^2 = -4", "--bound", "100")
    assert data["equation"]["coefficients"] == {"a": 1, "b": 0, "c": -13, "d": 0, "e": 0, "f": 4}
    assert data["equation"]["text"] == "x² − 13y² + 4 = 0"
    assert data["finite"] is False
    # fundamental solutions (−3, 1), (3, 1), (36, 10): see tests/test_norm_equations.py
    fundamentals = [(f["fundamental"]["x"], f["fundamental"]["y"]) for f in data["families"]]
    assert fundamentals == [(-3, 1), (3, 1), (36, 10)]
    for fam in data["families"]:
        # 649 + 180√13: the fundamental solution of x² − 13y² = 1 (OEIS A002350/A002349 at 13)
        assert fam["unit"] == {"x": 649, "y": 180, "denominator": 1, "radicand": 13}
        assert fam["automorph"] == {"matrix": [649, 2340, 180, 649], "translation": [0, 0]}
        assert fam["mirrored"] is True
    sols = [(s["x"], s["y"]) for s in data["solutions"]]
    assert all(x * x - 13 * y * y == -4 for x, y in sols) and len(sols) == 8
    assert data["method"] and data["proof"] == "unconditional"


def test_written_forms_agree(capsys):
    a = run_json(capsys, "solve", "x^2-13*y^2=-4")
    b = run_json(capsys, "solve", "x² − 13y² = −4")
    c = run_json(capsys, "solve", "x^2", "-", "13y^2", "=", "-4")  # unquoted words are joined
    assert a["families"] == b["families"] == c["families"]


def test_general_and_degenerate(capsys):
    data = run_json(capsys, "solve", "x^2 - 2y^2 + 3x - 5y = 7", "--bound", "20")
    sols = {(s["x"], s["y"]) for s in data["solutions"]}
    assert (1, -1) in sols and all(x * x - 2 * y * y + 3 * x - 5 * y == 7 for x, y in sols)
    data = run_json(capsys, "solve", "xy + x + y + 1 = 0", "--bound", "1")
    assert [f["kind"] for f in data["families"]] == ["line", "line"]
    assert len(data["solutions"]) == 5  # (−1, t) and (t, −1) with |t| ≤ 1: 3 + 3 − 1
    data = run_json(capsys, "solve", "x^2 + y^2 = 25")
    assert data["finite"] is True and len(data["solutions"]) == 12  # r₂(25) = 12, OEIS A004018
    data = run_json(capsys, "solve", "3x^2 + 5xy - 7y^2 = 11")
    assert data["families"] == [] and data["finite"] is True and data["solutions"] == []
    data = run_json(capsys, "solve", "y = x^2", "--member", "3")
    assert data["families"][0]["kind"] == "parabola" and data["families"][0]["member"]["y"] == 9


def test_text_output(capsys):
    code, out, _ = run(capsys, "solve", "x^2 - 2y^2 = 7", "--bound", "50", "--member", "1")
    assert code == 0 and "families of solutions" in out and "proof: unconditional" in out
    assert "(13, 9)" in out  # (3 + √2)(3 + 2√2) = 13 + 9√2


def test_max_digits_and_output_file(capsys, tmp_path):
    target = tmp_path / "full.json"
    data = run_json(
        capsys,
        "solve",
        "x^2 - 61y^2 = 1",
        "--member",
        "40",
        "--max-digits",
        "30",
        "--output",
        str(target),
    )
    member = data["families"][0]["member"]
    assert member["x"]["digits"] > 30 and data["truncated"] is True
    full = json.loads(target.read_text())
    x, y = full["families"][0]["member"]["x"], full["families"][0]["member"]["y"]
    assert x * x - 61 * y * y == 1


BAD = [
    ["solve", "x^2 - 13y^^2 = -4"],
    ["solve", "x^3 = y"],
    ["solve", "x^2 = 2", "--bound", "-1"],
    ["solve", "x^2 = 2", "--bound", "ten"],
    ["solve", "0 = 0"],
    ["solve"],
    ["solve", "x^2 - 2y^2 = 1", "--bound", "10^100000"],
]


@pytest.mark.parametrize("argv", BAD)
def test_bad_input_one_line(capsys, argv):
    code, out, err = run(capsys, *argv)
    assert code == 2 and out == ""
    assert err.startswith("realquad: error:") or "Usage" in err
    if err.startswith("realquad: error:"):
        assert err.count("\n") == 1 and "Traceback" not in err


def test_error_names_the_position(capsys):
    code, _, err = run(capsys, "solve", "x^2 + 3yy^ = 1")
    assert code == 2 and "position 12" in err  # the "=" where the exponent should be


def test_unfactorable_right_hand_side(capsys):
    import gmpy2

    n = gmpy2.next_prime(10**40) * gmpy2.next_prime(10**35)  # 76 digits, past the 60-digit limit
    code, _, err = run(capsys, "solve", f"x^2 - 2y^2 = {n}")
    assert code == 2 and "60 digits" in err


TOKENS = st.sampled_from(
    list("xy0123456789+-*/^()= ²−") + ["**", "x^2", "13", "--bound", "5", "--json", "-4"]
)


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=60)
@given(st.lists(TOKENS, min_size=1, max_size=25).map("".join), st.booleans())
@example("x^2 - 2y^2 = 1", True)
@example("((x))^2 = (y)^2", False)
@example("x^2 - 999999999999y^2 = 7", True)
def test_fuzz_never_a_traceback(capsys, text, with_bound):
    args = ["solve", text] + (["--bound", "30"] if with_bound else [])
    code, out, err = run(capsys, *args)
    assert code in (0, 2)
    assert "Traceback" not in err and "internal error" not in err
    if code == 2 and err.startswith("realquad: error:"):
        assert err.count("\n") == 1


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=30)
@given(st.text(max_size=40))
def test_fuzz_arbitrary_text(capsys, text):
    code, _, err = run(capsys, "solve", text)
    assert code in (0, 2) and "internal error" not in err and "Traceback" not in err


def test_subprocess_smoke():
    env = dict(os.environ)
    proc = subprocess.run(
        [sys.executable, "-m", "realquad", "solve", "x^2 - 13y^2 = -4", "--json"],
        capture_output=True,
        text=True,
        env=env,
        timeout=60,
    )
    assert proc.returncode == 0, proc.stderr
    assert json.loads(proc.stdout)["families"][0]["fundamental"]["x"] == -3


def test_power_bound(capsys):
    # x² − 61y² = 1: the k-th solution has about 9.25·k digits (ε = 1766319049 + 226153980√61,
    # OEIS A002350/A002349 at 61), so |x|, |y| ≤ 10¹⁰⁰ holds for |k| ≤ 10: 21 values of k, times ±
    data = run_json(capsys, "solve", "x^2 - 61y^2 = 1", "--bound", "10^100")
    assert len(data["solutions"]) == 42 and data["bound"] == 10**100


def test_sizer_summaries_are_exact():
    # the fast --max-digits summaries (one division, one remainder) against the full decimal text,
    # including at 10^k
    import random

    import gmpy2
    from realquad_cli.output import Sizer

    rng = random.Random(4)
    values = [10**k + e for k in (18, 19, 20, 59, 60, 61, 62, 200, 3000) for e in (-1, 0, 1)]
    values += [rng.randint(1, 10**k) for k in (25, 80, 1500) for _ in range(5)]
    for n in values + [-v for v in values]:
        text = gmpy2.mpz(abs(n)).digits(10)  # the full decimal expansion, gmpy2
        for md in (0, 5, 20, 60, 100, 1000):
            summary = Sizer(md).summary(n)
            if md == 0 or len(text) <= md or abs(n) < 10**18:
                assert summary is None
            else:
                assert summary == {
                    "digits": len(text),
                    "leading": text[:20],
                    "trailing": text[-20:],
                }
            shown = Sizer(md).text(n)
            assert shown.startswith("−" if n < 0 else text[:1])
            assert (text in shown) if summary is None else (f"{len(text):,} digits" in shown)


@pytest.mark.skipif(
    __import__("realquad._backend")._backend.BACKEND != "compiled",
    reason="the infrastructure's giant steps run compiled (the pure twin would take minutes)",
)
def test_compact_families_json_and_text(capsys):
    from tests.cli.test_json_schema import _validate

    d = 10**24 + 49
    equation = f"x^2 - {d}y^2 = {1 - d}"  # (±1, ±1) solve it, the other classes are huge
    data = run_json(capsys, "solve", equation, "--bound", "10^20", "--member", "1")
    _validate("solve", data)
    assert data["proof"] == "unconditional" and data["method"].startswith("principal ideal test")
    assert {(p["x"], p["y"]) for p in data["solutions"]} == {(1, 1), (1, -1), (-1, 1), (-1, -1)}
    kinds = {f["kind"] for f in data["families"]}
    assert kinds == {"compact_orbit"}
    small = [f for f in data["families"] if f["fundamental"] is not None]
    assert sorted((f["fundamental"]["x"], f["fundamental"]["y"]) for f in small) == [
        (-1, 1),
        (1, 1),
    ]
    for fam in data["families"]:
        assert fam["compact"]["norm"] == 1 - d and fam["unit_compact"]["norm"] == 1
        assert fam["member"]["x"] is None and fam["member"]["digits"] > 10**11
        assert fam["member"]["digits_exact"] and fam["unit_digits_exact"]
    code, out, _ = run(capsys, "solve", f"x^2 - {d}y^2 = 5")
    assert code == 0
    assert "in compact form" in out and "digits" in out and "about" not in out  # counts exact


def test_refusal_beyond_reach_is_one_line_and_quick(capsys):
    import time

    start = time.perf_counter()
    code, _, err = run(capsys, "solve", f"x^2 - {10**60 + 7}y^2 = 3")
    assert code == 2 and err.startswith("realquad: error:") and err.count("\n") == 1
    assert time.perf_counter() - start < 1.0


@pytest.mark.skipif(
    __import__("realquad._backend")._backend.BACKEND != "compiled",
    reason="the infrastructure's giant steps run compiled (the pure twin would take minutes)",
)
def test_a_form_beyond_the_continued_fraction_json(capsys):
    from tests.cli.test_json_schema import _validate

    d = 10**24 + 49
    n = 3 * 25 + 10 - 4 * d  # 3x² + xy − dy² at (5, 2)
    data = run_json(capsys, "solve", f"3x^2 + xy - {d}y^2 = {n}", "--bound", "10")
    _validate("solve", data)
    assert {"x": 5, "y": 2} in data["solutions"]
    assert data["proof"] == "unconditional"
    code, out, _ = run(capsys, "solve", f"3x^2 + xy - {d}y^2 = 5")
    assert code == 0 and "3x + y(1 + √" in out and "(t + u√" in out
