"""``realquad pell --mod M --leading K``: x and y reduced and cut, checked against Python's own arithmetic."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from tests.cli.support import run, run_json
from tests.equations.test_pell import giant_steps_compiled


def test_mod_and_leading_of_an_expanded_solution(capsys: pytest.CaptureFixture[str]) -> None:
    # x² − 61y² = 1: x = 1766319049, y = 226153980 (Euler's example; checked by the library's own x² − 61y²)
    data = run_json(capsys, "pell", "61", "--mod", "1000", "--leading", "4")
    assert data["residues"] == {"modulus": 1000, "x": 49, "y": 980}
    assert data["leading"] == {"x": "1766", "y": "2261"}
    code, out, _ = run(capsys, "pell", "61", "--mod", "1000", "--leading", "4")
    assert code == 0
    assert (
        "x ≡ 49 (mod 1000), y ≡ 980 (mod 1000)" in out and "x begins 1766…, y begins 2261…" in out
    )


@giant_steps_compiled
def test_mod_and_leading_of_a_compact_solution(capsys: pytest.CaptureFixture[str]) -> None:
    # d ≈ 10³⁰: x has hundreds of trillions of digits; x² − dy² = −1 must hold modulo the primes asked for
    d = 10**30 + 57
    for m in (10**9 + 7, 998244353):
        data = run_json(capsys, "pell", str(d), "--norm", "-1", "--mod", str(m), "--leading", "25")
        x, y = data["residues"]["x"], data["residues"]["y"]
        assert (x * x - d * y * y + 1) % m == 0
        assert data["x"] is None and data["compact"] is not None
        assert len(data["leading"]["x"]) == len(data["leading"]["y"]) == 25


def test_unsolvable_equation_has_nothing_to_reduce(capsys: pytest.CaptureFixture[str]) -> None:
    data = run_json(capsys, "pell", "3", "--norm", "-1", "--mod", "7", "--leading", "2")
    assert data["solvable"] is False and "residues" not in data and "leading" not in data


@pytest.mark.parametrize(
    "args, message",
    [
        (["--mod", "1"], "'--mod': 1 is not in the range 2 ≤ x"),
        (["--mod", "abc"], "--mod must be an integer"),
        (["--leading", "0"], "'--leading': 0 is not in the range 1 ≤ x ≤ 10000"),
        (["--leading", "10001"], "not in the range"),
    ],
)
def test_bad_values_are_one_line(
    capsys: pytest.CaptureFixture[str], args: list[str], message: str
) -> None:
    code, out, err = run(capsys, "pell", "61", *args)
    assert code == 2 and out == "" and err.count("\n") == 1 and message in err


@giant_steps_compiled
def test_modulus_sharing_the_denominators(capsys: pytest.CaptureFixture[str]) -> None:
    # small primes divide the compact form's denominators: reduced p-adically, and
    # x² − dy² ≡ −1 must hold modulo the whole modulus
    d = 10**30 + 57
    m = 2**10 * 3**10 * 5**10 * 7**10 * 11**10
    code, out, err = run(capsys, "pell", str(d), "--norm", "-1", "--mod", str(m), "--json")
    assert code == 0 and err == ""
    found = json.loads(out)["residues"]
    x, y = found["x"], found["y"]
    assert found["modulus"] == m and (x * x - d * y * y + 1) % m == 0


@giant_steps_compiled
def test_output_writes_the_compact_form_a_reader_can_evaluate(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    from tests.equations.test_pell import _evaluator_from_the_docs

    d, target = 10**30 + 57, tmp_path / "solution.txt"
    code, out, _ = run(capsys, "pell", str(d), "--norm", "-1", "--output", str(target))
    assert code == 0 and f"the compact form written to {target}" in out
    text = target.read_text(encoding="ascii")
    assert f"\nd {d}\nn -1\nscale 1\n" in text
    x, y = _evaluator_from_the_docs()(text, 998244353)
    assert (x * x - d * y * y + 1) % 998244353 == 0


@giant_steps_compiled
def test_the_square_of_a_chain_is_printed(capsys: pytest.CaptureFixture[str]) -> None:
    # N = +1 with a unit of norm −1: the least solution is ε², a chain raised to the power 2
    code, out, _ = run(capsys, "pell", str(10**30 + 57))
    assert code == 0 and "raised to the power 2:" in out


@giant_steps_compiled
def test_unit_output_beyond_the_expansion_limit_is_the_compact_file(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    # ε of discriminant 4(10³⁰ + 57) has about 5.6·10¹⁴ digits: the file holds 2ε = x + y√D,
    # whose norm is 4·N(ε); checked modulo a prime with the evaluator from docs/pell.md
    from tests.equations.test_pell import _evaluator_from_the_docs

    D, target = 4 * (10**30 + 57), tmp_path / "unit.txt"
    code, out, _ = run(capsys, "unit", "--disc", str(D), "--output", str(target))
    assert code == 0 and "written to" in out
    text = target.read_text(encoding="ascii")
    assert f"\nd {D}\n" in text and "\nscale 2\n" in text
    norm = int(text.split("\nn ")[1].split()[0])
    m = 2**61 - 1
    x, y = _evaluator_from_the_docs()(text, m)
    assert (x * x - D * y * y - norm) % m == 0 and abs(norm) == 4
