"""``realquad pell d [--norm N]``: the fundamental solution of x² − dy² = N."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.output import (
    ACCEPT_NEGATIVE,
    check_output_path,
    emit,
    integer_text,
    json_option,
    put_integers,
    size_options,
    write_atomically,
)

from realquad.core.integers import as_integer
from realquad.equations.pell import pell
from realquad.textio import decimal_digits, to_decimal


@click.command("pell", context_settings=ACCEPT_NEGATIVE)
@click.argument("d", type=str)
@click.option(
    "--norm", "norm", type=str, default="1", show_default=True, help="N: one of 1, -1, 4, -4."
)
@json_option
@size_options
def command(d: str, norm: str, as_json: bool, max_digits: int, output: str | None) -> None:
    """Least positive solution of x² − d·y² = N (N = 1, -1, 4 or -4).

    Example: realquad pell 61 --norm -1
    """
    d_value = as_integer(d, "d")
    n_value = as_integer(norm, "--norm")
    check_output_path(output)
    sol = pell(d_value, n_value)
    payload: dict[str, Any] = {
        "d": sol.d,
        "norm": sol.norm,
        "solvable": sol.solvable,
    }
    lines = [f"x² − {sol.d}·y² = {sol.norm}"]
    if sol.solvable and sol.x is not None and sol.y is not None:
        cut = put_integers(payload, {"x": sol.x, "y": sol.y}, max_digits)
        payload["x_digits"] = decimal_digits(sol.x)
        payload["truncated"] = cut
        lines += [
            f"x = {integer_text(sol.x, max_digits)}",
            f"y = {integer_text(sol.y, max_digits)}",
        ]
        lines.append(f"x has {payload['x_digits']} digits")
    else:
        payload.update({"x": None, "y": None, "x_digits": None})
        lines.append("no solution")
    payload["period_length"] = sol.period_length
    if sol.period_length is not None:
        lines.append(f"period length {sol.period_length}")
    if sol.reason:
        payload["reason"] = sol.reason
        lines.append(f"reason: {sol.reason}")
    if sol.finite_solutions is not None:
        payload["finite_solutions"] = [list(t) for t in sol.finite_solutions]
    payload["method"] = sol.method
    payload["proof"] = sol.proof
    lines.append(f"method: {sol.method}; proof: {sol.proof}")
    if output is not None:
        body = f"# x^2 - {sol.d} y^2 = {sol.norm}\n"
        if sol.x is not None and sol.y is not None:
            body += f"x = {to_decimal(sol.x)}\ny = {to_decimal(sol.y)}\n"
        else:
            body += "no solution\n"
        write_atomically(output, body)
        payload["output"] = output
        lines.append(f"full values written to {output}")
    emit(payload, "\n".join(lines), as_json)
