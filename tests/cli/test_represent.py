"""``realquad represent FORM``: text, JSON against docs/json.md, bad input, and a fuzz of random strings."""

from __future__ import annotations

import contextlib
import io
import json

import gmpy2
import pytest
from hypothesis import given
from hypothesis import strategies as st
from realquad_cli.main import main

from tests.cli.support import run, run_json
from tests.cli.test_json_schema import _validate as _validate_command


def _validate(data: dict) -> None:
    _validate_command("represent", data)


@pytest.mark.parametrize(
    "args",
    [
        ["x^2 + 5y^2"],
        ["x^2 + 14y^2", "--primes-up-to", "60"],
        ["2x^2 + 2xy + 3y^2", "--prime", "7"],
        ["x^2 - 79y^2", "--primes-up-to", "30"],
        ["x^2 + xy - 5y^2", "--primes-up-to", "30"],
        ["x^2 + 27y^2", "--max-digits", "5"],
        ["x^2 + 9y^2", "--no-criterion"],
    ],
)
def test_json_matches_the_page(capsys: pytest.CaptureFixture[str], args: list[str]) -> None:
    data = run_json(capsys, "represent", *args)
    _validate(data)
    assert data["proof"] == "unconditional" and data["method"]


def test_text_of_x2_plus_5y2(capsys: pytest.CaptureFixture[str]) -> None:
    # Cox, Primes of the Form x² + ny², (1.? in §1) — p = x² + 5y² ⇔ p ≡ 1, 9 (mod 20) for p ≠ 5
    code, out, err = run(capsys, "represent", "x^2 + 5y^2", "--primes-up-to", "30")
    assert code == 0, err
    assert "p = 29: yes, 29 = x² + 5y²" in out
    assert "p ≡ 1, 9 (mod 20)" in out
    assert "p = 3: no — split" in out and "2x² + 2xy + 3y²" in out
    assert "(−20/11) = −1" in out


def test_class_polynomial_digits_are_bounded(capsys: pytest.CaptureFixture[str]) -> None:
    data = run_json(capsys, "represent", "x^2 + 27y^2", "--max-digits", "5")
    assert data["truncated"] is True
    coefficients = data["criterion"]["polynomial"]["coefficients"]
    assert coefficients[-1] == 1 and isinstance(coefficients[0], dict)
    full = run_json(capsys, "represent", "x^2 + 27y^2", "--max-digits", "0")
    # H_{−108}: the constant term is −(j(√−27) j(…) j(…)), an exact integer
    assert full["criterion"]["polynomial"]["coefficients"][0] == -1879994705688000000000


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (["x^2 + 5y^2 = 3"], "without"),
        (["x^2 + y"], "degree below 2"),
        (["x^2/2 + y^2"], "integer coefficients"),
        (["2x^2 + 4y^2"], "not primitive"),
        (["x^2 - y^2"], "square discriminant"),
        (["--", "-x^2 - y^2"], "negative definite"),
        (["x^2 - 2xy + y^2"], "discriminant 0"),
        (["0"], "zero form"),
        (["x^2 + z"], "position"),
        (["x^2 + 5y^2", "--prime", "9"], "prime"),
        (["x^2 + 5y^2", "--prime", "3", "--primes-up-to", "9"], "not both"),
        (["x^2 + 5y^2", "--primes-up-to", "1"], "between"),
        (["x^2 + 5y^2", "--primes-up-to", "abc"], "integer"),
        (["x^2 + 1000003y^2"], "degree h"),
    ],
)
def test_bad_input_is_one_error_line(
    capsys: pytest.CaptureFixture[str], args: list[str], words: str
) -> None:
    code, out, err = run(capsys, "represent", *args)
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("realquad: error: "), err
    assert words in lines[0], lines[0]


ALPHABET = "xy0123456789+-*/^()= ²·−"


@given(st.text(alphabet=ALPHABET, max_size=24))
def test_fuzz_never_a_traceback(text: str) -> None:
    # random strings: an answer (exit 0) or one error line (exit 2), never a traceback
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["represent", text, "--primes-up-to", "20", "--json"])
    assert code in (0, 2), (text, err.getvalue())
    if code == 0:
        json.loads(out.getvalue(), parse_int=lambda t: int(gmpy2.mpz(t)))
    else:
        lines = err.getvalue().strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("realquad: error: "), (text, err.getvalue())
