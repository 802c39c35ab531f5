"""Parsing equations as people write them; errors point at the position; fuzzing never gives a traceback."""

from __future__ import annotations

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad.equations.parser import parse_equation
from realquad.errors import InputError

# each text with the coefficients (a, b, c, d, e, f) of a x² + b xy + c y² + d x + e y + f = 0, by hand
CASES = [
    ("x^2 - 13y^2 = -4", (1, 0, -13, 0, 0, 4)),
    ("x^2-13*y^2=-4", (1, 0, -13, 0, 0, 4)),
    ("3x^2 + 5xy - 7y^2 = 11", (3, 5, -7, 0, 0, -11)),
    ("x^2 - 2y^2 + 3x - 5y = 7", (1, 0, -2, 3, -5, -7)),
    ("x² − 2y² = 1", (1, 0, -2, 0, 0, -1)),
    ("x**2 = 2*y**2 + 1", (1, 0, -2, 0, 0, -1)),
    ("xy + x + y + 1 = 0", (0, 1, 0, 1, 1, 1)),
    ("(x + 1)(y + 1) = 0", (0, 1, 0, 1, 1, 1)),
    ("2(x + 1)^2 = y", (2, 0, 0, 4, -1, 2)),
    ("x y = 6", (0, 1, 0, 0, 0, -6)),
    ("X^2 - 61 Y^2 = 1", (1, 0, -61, 0, 0, -1)),
    ("x·y = 5", (0, 1, 0, 0, 0, -5)),
    ("x^2/2 + y/3 = 1", (3, 0, 0, 0, 2, -6)),
    ("y = x^2", (-1, 0, 0, 0, 1, 0)),
    ("x^2 - y^2", (1, 0, -1, 0, 0, 0)),
    ("-x^2 + 3 = -y^2", (-1, 0, 1, 0, 0, 3)),
    ("(x - y)^2 = 4", (1, -2, 1, 0, 0, -4)),
    ("x^(2) = 2", (1, 0, 0, 0, 0, -2)),
    ("x³ - x³ + x = 1", (0, 0, 0, 1, 0, -1)),
]


@pytest.mark.parametrize(("text", "coefficients"), CASES)
def test_examples(text: str, coefficients: tuple[int, ...]) -> None:
    assert parse_equation(text) == coefficients


BAD = [
    ("x^2 - 13y^^2 = -4", 11),
    ("x^2 = 1 = 2", 9),
    ("x2 = 3", 2),
    ("x^2 + z = 1", 7),
    ("x^2 +", 6),
    ("(x + 1 = 2", 8),
    ("x^y = 2", 3),
    ("x / y = 2", 5),
    ("", 1),
]


@pytest.mark.parametrize(("text", "position"), BAD)
def test_errors_point_at_the_position(text: str, position: int) -> None:
    with pytest.raises(InputError, match=f"position {position}"):
        parse_equation(text)


def test_degree_and_size_limits() -> None:
    with pytest.raises(InputError, match="degree 3"):
        parse_equation("x^3 = y")
    with pytest.raises(InputError, match="exponent"):
        parse_equation("x^100000 = 1")
    with pytest.raises(InputError, match="longer than"):
        parse_equation("x" + "+x" * 6000)
    with pytest.raises(InputError):
        parse_equation("(" * 5000 + "x" + ")" * 5000)
    with pytest.raises(InputError, match="nested"):
        parse_equation("(" * 3000 + "x" + ")" * 3000)


ALPHABET = st.sampled_from(list("xy0123456789+-*/^()= ²³−·XYz.,") + ["**", "x^2", "13"])


@given(st.lists(ALPHABET, max_size=40).map("".join))
@example("((((((x")
@example("x^2^2^2 = 1")
@example("9" * 5000)
@example("(x+y)^64 = 1")
def test_fuzz_only_input_errors(text: str) -> None:
    try:
        out = parse_equation(text)
    except InputError as exc:
        assert "\n" not in str(exc)
    else:
        assert len(out) == 6 and all(isinstance(v, int) for v in out)


@given(st.text(max_size=60))
def test_fuzz_arbitrary_text(text: str) -> None:
    try:
        parse_equation(text)
    except InputError:
        pass
