"""Survey rows checked against OEIS, sympy, mpmath and the brute-force cycle counter."""

from __future__ import annotations

import json

import mpmath
import pytest
import sympy

from realquad.survey.compute import survey_chunk, survey_field
from realquad.survey.ranges import Chunk, squarefree_in
from realquad.units.cfrac import fundamental_unit_cfrac as fundamental_unit
from tests.survey.test_helpers import brute_class_numbers, fundamental_discriminant


def test_class_number_one_list_equals_oeis(oeis) -> None:  # type: ignore[no-untyped-def]
    terms = oeis["A003172"]["terms"]  # OEIS A003172
    rows = survey_chunk(Chunk("d", 2, terms[-1]))
    assert [r.d for r in rows if r.class_number == 1] == terms


def test_class_number_one_discriminants_equal_oeis(oeis) -> None:  # type: ignore[no-untyped-def]
    terms = oeis["A003656"]["terms"]  # OEIS A003656
    rows = survey_chunk(Chunk("D", 1, terms[-1]))
    assert [r.discriminant for r in rows if r.class_number == 1] == terms


def test_class_numbers_equal_brute_force_counter() -> None:
    # independent counter of cycles of reduced forms (tests/test_survey_helpers.py)
    for d in squarefree_in(2, 400) + squarefree_in(5000, 5060):
        row = survey_field(d)
        assert (row.class_number, row.narrow_class_number, row.unit_norm) == brute_class_numbers(
            fundamental_discriminant(d)
        ), d


@pytest.mark.slow
def test_class_number_one_further_up_equals_brute_force_counter() -> None:
    # h = 1 list on 50000 ≤ d ≤ 52000 by the independent counter
    rows = survey_chunk(Chunk("d", 50000, 52000))
    expected = [
        d
        for d in squarefree_in(50000, 52000)
        if brute_class_numbers(fundamental_discriminant(d))[0] == 1
    ]
    assert [r.d for r in rows if r.class_number == 1] == expected


def test_unit_columns_against_direct_computation() -> None:
    for d in [2, 3, 5, 13, 46, 61, 94, 109, 139, 991, 4657, 9949]:
        row = survey_field(d)
        eps = fundamental_unit(row.discriminant).expand()
        x, y, c = int(eps.x), int(eps.y), int(eps.c)
        assert x * x - d * y * y == row.unit_norm * c * c  # the norm equation itself
        assert row.unit_digits == len(str(x))
        with mpmath.workdps(40):
            exact = mpmath.log((x + y * mpmath.sqrt(d)) / c)
            assert abs(mpmath.mpf(row.regulator) - exact) < mpmath.mpf(10) ** (-15) * max(1, exact)


def test_regulator_known_values() -> None:
    # log((1 + √5)/2) = 0.4812118250596034474977589… (OEIS A002390)
    assert survey_field(5).regulator.startswith("0.481211825059603")
    # log(1 + √2) = 0.8813735870195430252326093… (OEIS A091648)
    assert survey_field(2).regulator.startswith("0.881373587019543")
    # Q(√61): ε = (39 + 5√61)/2, norm −1 (from memory; checked by the norm equation above)
    row = survey_field(61)
    assert row.unit_norm == -1 and row.unit_digits == 2


def test_regulator_has_at_least_15_significant_digits() -> None:
    for d in squarefree_in(9000, 9040):
        row = survey_field(d)
        reference = fundamental_unit(row.discriminant).regulator(40)
        with mpmath.workdps(40):
            assert (
                abs(mpmath.mpf(row.regulator) - reference.value)
                <= mpmath.mpf(10) ** -15 * reference.value
            )


def test_structure_columns_multiply_to_class_numbers() -> None:
    for row in survey_chunk(Chunk("d", 2, 3000)):
        cl, cl_plus = json.loads(row.class_group), json.loads(row.narrow_class_group)
        assert sympy.prod(cl) == row.class_number and sympy.prod(cl_plus) == row.narrow_class_number
        assert row.narrow_class_number in (row.class_number, 2 * row.class_number)
        assert (row.narrow_class_number == row.class_number) == (row.unit_norm == -1)
        assert row.proof == "unconditional"
