"""``realquad solve EQUATION``: every integer solution of a quadratic equation in x and y."""

from __future__ import annotations

import re
from functools import partial
from typing import Any

import click
from realquad_cli.output import (
    Command,
    Sizer,
    check_output_path,
    dumps,
    emit,
    json_option,
    size_options,
    write_atomically,
)
from realquad_cli.progress import ElapsedTicker

from realquad.core.integers import as_integer
from realquad.equations.conics import solve_quadratic
from realquad.equations.conics_compact import CompactConicFamily
from realquad.equations.families import (
    MAX_MEMBER_DIGITS,
    CompactOrbitFamily,
    Family,
    LineFamily,
    OrbitFamily,
    ParabolaFamily,
    QuadraticSolutions,
    point_dict,
)
from realquad.equations.parser import parse_equation
from realquad.errors import InputError
from realquad.latex import POINTS_PER_ROW, display, integer, named_set, point, text
from realquad.latex import lines as lines_latex
from realquad.textio import plural, terms_text


def parse_bound(text: str) -> int:
    """A non-negative integer, also written as a power ``10^100`` or ``10**100``."""
    m = re.fullmatch(r"\s*(\d{1,6})\s*(?:\^|\*\*)\s*(\d{1,5})\s*", text)
    value = int(m.group(1)) ** int(m.group(2)) if m else as_integer(text, "--bound")
    if value < 0:
        raise InputError(f"--bound must be non-negative, got {value}")
    if value.bit_length() > 40_000:
        raise InputError("--bound is too large (at most about 10^12000)")
    return value


def polynomial_text(coefficients: tuple[int, ...], var: str = "t") -> str:
    """``3t² − t + 2`` from ``(3, -1, 2)`` (highest degree first).

    >>> polynomial_text((0, 1, -1)), polynomial_text((1, 0, 0)), polynomial_text((0, 0, 0))
    ('t − 1', 't²', '0')
    """
    powers = ["", var, var + "²"]
    degree = len(coefficients) - 1
    return terms_text((k, powers[degree - i]) for i, k in enumerate(coefficients))


def _unit_texts(fam: CompactOrbitFamily) -> tuple[str, str]:
    """How the family's fundamental solution and its unit are written: ``x + y√d`` or, for a
    form, ``ax + y(b + √D)/2``, or for a conic ``P + Q√Δ``; ``t + u√d`` or ``(t + u√D)/2``."""
    d = fam.d
    if isinstance(fam, CompactConicFamily):
        return f"P + Q√{d}", f"t + u√{d}"
    if (fam.a, fam.b) == (1, 0):
        return f"x + y√{d}", f"t + u√{d}"
    return f"{fam.a}x + y({fam.b} + √{d})/2", f"(t + u√{d})/2"


def _compact_text(i: int, fam: CompactOrbitFamily, sizer: Sizer) -> str:
    """A class whose fundamental solution is written out, or kept in compact form."""
    if fam.fundamental is not None:
        x, y = (sizer.text(v) for v in fam.fundamental)
        return f"  {i}. ({x}, {y})"
    element, _ = _unit_texts(fam)
    return (
        f"  {i}. {element} in compact form ({plural(fam.generator.size, 'factor')}), "
        f"x of {_about(fam.digits_exact())}{fam.digits():,} digits"
    )


def _about(exact: bool) -> str:
    """``about `` before a digit count the logarithms leave ±1 (never in practice: see
    :meth:`CompactOrbitFamily.digits`)."""
    return "" if exact else "about "


def _shared_automorph(fam: CompactOrbitFamily) -> list[str]:
    """The automorph every compact family of one equation shares, said once."""
    _, unit = _unit_texts(fam)
    if isinstance(fam, CompactConicFamily):
        S, (s0, s1) = fam.matrix, fam.shift
        sign = "−" if fam.unit.value_sign < 0 else ""
        return [
            f"with P = {terms_text([(S[0], 'x'), (S[1], 'y'), (s0, '')])}, "
            f"Q = {terms_text([(S[2], 'x'), (S[3], 'y'), (s1, '')])}: P² − {fam.d}Q² = {fam.n}",
            f"automorph of every family: multiplication of P + Q√{fam.d} by {sign}η, "
            f"η = {unit} a unit of norm 1 in compact form ({plural(fam.unit.size, 'factor')}), "
            f"t of {_about(fam.unit_digits_exact())}{fam.unit_digits():,} digits"
            + ("; the families hold the mirror images 2C − (x, y) too" if fam.mirrored else ""),
        ]
    return [
        f"automorph of every family: multiplication by the least unit {unit} of norm 1, in "
        f"compact form ({plural(fam.unit.size, 'factor')}), t of "
        f"{_about(fam.unit_digits_exact())}{fam.unit_digits():,} "
        "digits; the families hold the mirror images −(x, y) too"
    ]


def _family_text(i: int, fam: Family, k: int | None, sizer: Sizer) -> list[str]:
    if isinstance(fam, CompactOrbitFamily):
        lines = [_compact_text(i, fam, sizer)]
        if k is not None and fam.digits(k) > MAX_MEMBER_DIGITS:
            lines.append(
                f"     member k = {k}: {_about(fam.digits_exact(k))}{fam.digits(k):,} digits, "
                "left in compact form"
            )
        elif k is not None:
            mx, my = (sizer.text(v) for v in fam.solution(k))
            lines.append(f"     member k = {k}: ({mx}, {my})")
        return lines
    x, y = (sizer.text(v) for v in fam.fundamental)
    if isinstance(fam, OrbitFamily):
        m, t = fam.automorph.matrix, fam.automorph.translation
        mm = [sizer.text(v) for v in m]
        shift = "" if t == (0, 0) else f" + ({sizer.text(t[0])}, {sizer.text(t[1])})"
        lines = [
            f"  {i}. ({x}, {y}), automorph (x, y) ↦ [[{mm[0]}, {mm[1]}], [{mm[2]}, {mm[3]}]]·(x, y){shift}"
        ]
        if fam.unit is not None:
            t0, u0, D = fam.unit
            lines.append(f"     = multiplication by {sizer.text(t0)} + {sizer.text(u0)}√{D}")
        if fam.reflection:
            lines.append(
                "     together with the mirror images "
                + ("−(x, y)" if fam.center == (0, 0) else "2C − (x, y)")
            )
    elif isinstance(fam, LineFamily):
        (x0, y0), (dx, dy) = fam.point, fam.direction
        lines = [
            f"  {i}. the line (x, y) = ({polynomial_text((dx, x0))}, {polynomial_text((dy, y0))}), t ∈ Z"
        ]
    elif isinstance(fam, ParabolaFamily):
        px, py = fam.x_polynomial, fam.y_polynomial
        lines = [
            f"  {i}. the parabola (x, y) = ({polynomial_text(px)}, {polynomial_text(py)}), t ∈ Z"
        ]
    if k is not None:
        mx, my = (sizer.text(v) for v in fam.solution(k))
        lines.append(f"     member k = {k}: ({mx}, {my})")
    return lines


def _member(fam: Family, k: int) -> dict[str, Any]:
    """The JSON shape of the ``k``-th member (``docs/json.md``, *Member*)."""
    if isinstance(fam, CompactOrbitFamily) and fam.digits(k) > MAX_MEMBER_DIGITS:
        return {
            "k": k,
            "x": None,
            "y": None,
            "digits": fam.digits(k),
            "digits_exact": fam.digits_exact(k),
        }
    return {"k": k, **point_dict(fam.solution(k))}


def build(
    sol: QuadraticSolutions, bound: int | None, member: int | None, max_digits: int
) -> tuple[dict[str, Any], list[str]]:
    """The JSON payload (``sol.to_dict``, plus each family's ``member``) and the text lines."""
    sizer = Sizer(max_digits)
    payload = sol.to_dict(bound)
    if member is not None:
        for entry, fam in zip(payload["families"], sol.families, strict=True):
            entry["member"] = _member(fam, member)
    lines = [f"equation: {payload['equation']['text']}"]
    if sol.families:
        lines.append(f"{plural(len(sol.families), 'family', 'families')} of solutions:")
        for i, fam in enumerate(sol.families, 1):
            lines += _family_text(i, fam, member, sizer)
        compact = [fam for fam in sol.families if isinstance(fam, CompactOrbitFamily)]
        if compact:
            lines += _shared_automorph(compact[0])
    listed = payload["solutions"]
    if listed is not None:
        what = f"with |x|, |y| ≤ {sizer.text(bound)}" if bound is not None else "in all"
        lines.append(f"{plural(len(listed), 'solution')} {what}:")
        lines += [f"  ({sizer.text(p['x'])}, {sizer.text(p['y'])})" for p in listed]
    lines += [f"note: {n}" for n in sol.notes]
    if not sol.families and listed == []:
        lines.append("no integer solution")
    lines.append(f"method: {sol.method}; proof: {sol.proof}")
    return payload, lines


@click.command("solve", cls=Command)
@click.argument("equation", nargs=-1, required=True)
@click.option(
    "--bound",
    "bound",
    type=str,
    default=None,
    metavar="B",
    help="List every solution with |x|, |y| ≤ B.",
)
@click.option(
    "--member",
    "member",
    type=str,
    default=None,
    metavar="K",
    help="Also give the K-th member of each family.",
)
@json_option
@size_options
def command(
    equation: tuple[str, ...],
    bound: str | None,
    member: str | None,
    as_json: bool,
    max_digits: int,
    output: str | None,
) -> None:
    """Every integer solution of a quadratic equation in x and y.

    Example: realquad solve "x^2 - 13y^2 = -4" --bound 1000
    """
    text = " ".join(equation)
    b = parse_bound(bound) if bound is not None else None
    k = as_integer(member, "--member") if member is not None else None
    if k is not None and abs(k) > 10**6:
        raise InputError("--member must be at most 10^6 in absolute value")
    check_output_path(output)
    coefficients = parse_equation(text)
    with ElapsedTicker("solving"):
        sol = solve_quadratic(*coefficients)
        payload, lines = build(sol, b, k, max_digits)
    if output is not None:
        write_atomically(output, dumps(payload) + "\n")
        payload["output"] = output
        lines.append(f"full values written to {output}")
    members = [entry["member"] for entry in payload["families"] if "member" in entry]
    emit(
        payload,
        "\n".join(lines),
        as_json,
        max_digits,
        lambda md: solution_latex(sol, b, members, md),
    )


def solution_latex(
    sol: QuadraticSolutions, bound: int | None, members: list[dict[str, Any]], max_digits: int
) -> str:
    """The solutions as LaTeX (``--latex``): the families, the ``--member`` of each (one row,
    in the order of the families), and the solutions in the box of ``--bound``."""
    rows = [sol.to_latex(max_digits)]
    if members:
        shown = [
            point((m["x"], m["y"]), max_digits)
            if m["x"] is not None
            else text(f"{_about(m['digits_exact'])}{m['digits']} digits (compact)")
            for m in members
        ]
        rows.append(f"k = {integer(members[0]['k'])}:\\quad " + ",\\ ".join(shown))
    if bound is not None:
        write = partial(point, max_digits=max_digits)
        box, defining = named_set("B", sol.bounded(bound), write, POINTS_PER_ROW)
        rows += [rf"|x|, |y| \le {integer(bound, max_digits)}:\quad (x, y) \in {box}", *defining]
    return display(lines_latex(rows), sol.latex_note())
