"""``realquad pell d [--norm N]``: the fundamental solution of x² − dy² = N."""

from __future__ import annotations

import click
from realquad_cli.output import (
    Command,
    IntegerRange,
    Sizer,
    check_output_path,
    compact_text,
    emit,
    json_option,
    size_options,
    write_atomically,
)

from realquad.core.integers import as_integer
from realquad.equations.pell import PellSolution, pell
from realquad.latex import display, integer
from realquad.latex import lines as lines_latex
from realquad.textio import plural, shown, signed, to_decimal


@click.command("pell", cls=Command)
@click.argument("d", type=str)
@click.option(
    "--norm", "norm", type=str, default="1", show_default=True, help="N: one of 1, -1, 4, -4."
)
@click.option(
    "--mod",
    "modulus",
    type=IntegerRange(2),
    default=None,
    help="Also give x and y modulo M (a compact solution needs M prime to its denominators).",
    metavar="M",
)
@click.option(
    "--leading",
    "leading",
    type=IntegerRange(1, 10_000),
    default=None,
    help="Also give the first K decimal digits of x and y.",
    metavar="K",
)
@json_option
@size_options
def command(
    d: str,
    norm: str,
    modulus: int | None,
    leading: int | None,
    as_json: bool,
    max_digits: int,
    output: str | None,
) -> None:
    """Least positive solution of x² − d·y² = N (N = 1, -1, 4 or -4).

    Example: realquad pell 61 --norm -1
    """
    d_value = as_integer(d, "d")
    n_value = as_integer(norm, "--norm")
    check_output_path(output)
    sol = pell(d_value, n_value)
    payload = sol.to_dict()
    extra_lines = _extras(sol, modulus, leading, payload)
    sizer = Sizer(max_digits)
    lines = [f"x² {'−' if sol.d > 0 else '+'} {sizer.text(abs(sol.d))}·y² = {signed(sol.norm)}"]
    if sol.solvable and sol.x is not None and sol.y is not None:
        lines += [
            f"x = {sizer.text(sol.x)}",
            f"y = {sizer.text(sol.y)}",
            f"x has {plural(payload['digits'], 'digit')}",
        ]
    elif sol.solvable and sol.compact is not None:
        shape = "x + y√d" if abs(sol.norm) == 1 else "(x + y√d)/2"
        about = "" if sol.digits_exact else "about "
        lines.append(
            f"x has {about}{plural(sol.digits or 0, 'digit')}: kept in compact form "
            f"({shape} as a product of small numbers; --json gives it)"
        )
        lines.append(compact_text(sol.compact, shape))
    else:
        lines.append("no solution")
    lines += extra_lines
    if sol.period_length is not None:
        lines.append(f"period length {sol.period_length:,}")
    if sol.reason:
        lines.append(f"reason: {sol.reason}")
    lines.append(f"method: {sol.method}; proof: {sol.proof}")
    if output is not None:
        body = f"# x^2 - {sol.d} y^2 = {sol.norm}\n"
        if sol.x is not None and sol.y is not None:
            body += f"x = {to_decimal(sol.x)}\ny = {to_decimal(sol.y)}\n"
        elif sol.compact is not None:
            body = sol.compact_file()
        else:
            body += "no solution\n"
        write_atomically(output, body)
        payload["output"] = output
        what = "the compact form" if sol.x is None and sol.compact is not None else "full values"
        lines.append(f"{what} written to {output}")
    emit(payload, "\n".join(lines), as_json, max_digits, lambda md: _latex(sol, payload, md))


def _latex(sol: PellSolution, payload: dict, max_digits: int) -> str:
    """The solution, then ``--mod`` and ``--leading`` when asked for."""
    rows = [sol.to_latex(max_digits)]
    residues = payload.get("residues")
    if residues is not None:
        m = integer(residues["modulus"], max_digits)
        x, y = integer(residues["x"], max_digits), integer(residues["y"], max_digits)
        rows.append(rf"x_{{1}} \equiv {x},\quad y_{{1}} \equiv {y} \pmod{{{m}}}")
    leading = payload.get("leading")
    if leading is not None:
        rows.append(rf"x_{{1}} = {leading['x']}\ldots,\quad y_{{1}} = {leading['y']}\ldots")
    return display(lines_latex(rows), sol.latex_note())


def _extras(
    sol: PellSolution, modulus: int | None, leading: int | None, payload: dict
) -> list[str]:
    """Lines (and JSON keys) for ``--mod`` and ``--leading``; nothing when there is no solution."""
    if not sol.solvable or (modulus is None and leading is None):
        return []
    lines = []
    if modulus is not None:
        x_mod, y_mod = sol.residues(modulus)
        payload["residues"] = {"modulus": modulus, "x": x_mod, "y": y_mod}
        m = shown(modulus)
        lines.append(f"x ≡ {x_mod} (mod {m}), y ≡ {y_mod} (mod {m})")
    if leading is not None:
        digits = sol.leading_digits(leading)
        if digits is None:
            payload["leading"] = None
            lines.append(
                f"the first {plural(leading, 'digit')} of x and y are not certain at the "
                "regulator's precision (a digit sits at a boundary)"
            )
        else:
            payload["leading"] = {"x": digits[0], "y": digits[1]}
            lines.append(f"x begins {digits[0]}…, y begins {digits[1]}…")
    return lines
