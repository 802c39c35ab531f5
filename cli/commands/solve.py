"""``realquad solve EQUATION``: every integer solution of a quadratic equation in x and y."""

from __future__ import annotations

import re
from typing import Any

import click
import gmpy2
from realquad_cli.output import (
    ACCEPT_NEGATIVE,
    bounded_integer,
    check_output_path,
    dumps,
    json_option,
    size_options,
    write_atomically,
)
from realquad_cli.progress import ElapsedTicker

from realquad.core.integers import as_integer
from realquad.equations.conics import solve_quadratic
from realquad.equations.families import Family, LineFamily, OrbitFamily, QuadraticSolutions
from realquad.equations.parser import parse_equation
from realquad.errors import InputError
from realquad.textio import to_decimal

NAMES = ("a", "b", "c", "d", "e", "f")
MONOMIALS = ("x²", "xy", "y²", "x", "y", "")


class _Sizer:
    """``--max-digits`` for many integers at once: each distinct integer is sized once.

    Same output as :func:`realquad_cli.output.bounded_integer`, but the leading
    and trailing digits of a long integer come from one division and one
    remainder instead of a full decimal conversion, and an integer shared by
    many families (the automorph) is sized once.
    """

    def __init__(self, max_digits: int) -> None:
        self.max_digits = max_digits
        self.cache: dict[int, tuple[int, dict[str, Any] | None]] = {}
        self.decimal: dict[int, tuple[int, str]] = {}

    def summary(self, n: int) -> dict[str, Any] | None:
        if self.max_digits == 0 or -(10**18) < n < 10**18:
            return None
        hit = self.cache.get(id(n))
        if hit is not None and hit[0] is n:
            return hit[1]
        m = abs(gmpy2.mpz(n))
        k0 = int(gmpy2.num_digits(m, 10))  # exact or one too many
        if k0 < 60:
            out = bounded_integer(n, self.max_digits)[1]
        else:
            lead = m // gmpy2.mpz(10) ** (k0 - 21)
            k = k0 if lead >= 10**20 else k0 - 1
            out = None
            if k > self.max_digits:
                out = {
                    "digits": k,
                    "leading": to_decimal(lead)[:20],
                    "trailing": to_decimal(m % 10**20).zfill(20),
                }
        self.cache[id(n)] = (n, out)
        return out

    def put(self, payload: dict[str, Any], values: dict[str, int]) -> bool:
        """Like :func:`realquad_cli.output.put_integers`."""
        cut = False
        for key, n in values.items():
            summary = self.summary(n)
            payload[key] = n if summary is None else None
            if summary is not None:
                payload[f"{key}_summary"] = summary
                cut = True
        return cut

    def digits(self, n: int) -> str:
        """The decimal digits of ``n``, converted once per distinct big integer."""
        if -(10**1000) < n < 10**1000:
            return to_decimal(n)
        hit = self.decimal.get(id(n))
        if hit is None or hit[0] is not n:
            hit = (n, to_decimal(n))
            self.decimal[id(n)] = hit
        return hit[1]

    def json(self, obj: Any) -> str:
        """:func:`realquad_cli.output.dumps`, with each big integer converted once."""
        if isinstance(obj, dict):
            return "{" + ", ".join(f"{dumps(str(k))}: {self.json(v)}" for k, v in obj.items()) + "}"
        if isinstance(obj, list):
            return "[" + ", ".join(self.json(v) for v in obj) + "]"
        if isinstance(obj, int) and not isinstance(obj, bool):
            return self.digits(obj)
        return dumps(obj)

    def text(self, n: int) -> str:
        """Like :func:`realquad_cli.output.integer_text`."""
        summary = self.summary(n)
        if summary is None:
            return self.digits(n)
        sign = "-" if n < 0 else ""
        return (
            f"{sign}{summary['leading']}…{summary['trailing']} ({summary['digits']} digits; "
            "--max-digits 0 or --output FILE for all)"
        )


def parse_bound(text: str) -> int:
    """A non-negative integer, also written as a power ``10^100`` or ``10**100``."""
    m = re.fullmatch(r"\s*(\d{1,6})\s*(?:\^|\*\*)\s*(\d{1,5})\s*", text)
    value = int(m.group(1)) ** int(m.group(2)) if m else as_integer(text, "--bound")
    if value < 0:
        raise InputError(f"--bound must be non-negative, got {value}")
    if value.bit_length() > 40_000:
        raise InputError("--bound is too large (at most about 10^12000)")
    return value


def equation_text(coefficients: tuple[int, ...]) -> str:
    """``x² − 13y² + 4 = 0`` from ``(1, 0, -13, 0, 0, 4)``."""
    parts = []
    for k, m in zip(coefficients, MONOMIALS, strict=True):
        if k == 0:
            continue
        mag = abs(k)
        body = m if mag == 1 and m else f"{mag}{m}"
        sign = "−" if k < 0 else "+"
        parts.append((sign, body))
    if not parts:
        return "0 = 0"
    first_sign, first = parts[0]
    text = ("−" if first_sign == "−" else "") + first
    for sign, body in parts[1:]:
        text += f" {sign} {body}"
    return text + " = 0"


def polynomial_text(coefficients: tuple[int, ...], var: str = "t") -> str:
    """``3t² − t + 2`` from ``(3, -1, 2)`` (highest degree first).

    >>> polynomial_text((0, 1, -1)), polynomial_text((1, 0, 0)), polynomial_text((0, 0, 0))
    ('t − 1', 't²', '0')
    """
    powers = ["", var, var + "²"]
    deg = len(coefficients) - 1
    parts = []
    for i, k in enumerate(coefficients):
        if k:
            m = powers[deg - i]
            parts.append(("−" if k < 0 else "+", m if abs(k) == 1 and m else f"{abs(k)}{m}"))
    if not parts:
        return "0"
    text = ("−" if parts[0][0] == "−" else "") + parts[0][1]
    return text + "".join(f" {sign} {body}" for sign, body in parts[1:])


def _family_payload(fam: Family, k: int | None, sizer: _Sizer) -> tuple[dict[str, Any], bool]:
    out: dict[str, Any] = {"kind": fam.kind}
    cut = sizer.put(out, {"x": fam.fundamental[0], "y": fam.fundamental[1]})
    if isinstance(fam, OrbitFamily):
        m, t = fam.automorph.matrix, fam.automorph.translation
        auto: dict[str, Any] = {}
        cut |= sizer.put(
            auto, {"m11": m[0], "m12": m[1], "m21": m[2], "m22": m[3], "t1": t[0], "t2": t[1]}
        )
        if fam.unit is not None:
            unit: dict[str, Any] = {"d": fam.unit[2]}
            cut |= sizer.put(unit, {"t": fam.unit[0], "u": fam.unit[1]})
            auto["unit"] = unit
        else:
            auto["unit"] = None
        out["automorph"] = auto
        out["mirrored"] = fam.reflection
    elif isinstance(fam, LineFamily):
        out["direction"] = list(fam.direction)
    else:
        out["x_polynomial"] = list(fam.x_polynomial)
        out["y_polynomial"] = list(fam.y_polynomial)
    if k is not None:
        member: dict[str, Any] = {"k": k}
        x, y = fam.solution(k)
        cut |= sizer.put(member, {"x": x, "y": y})
        out["member"] = member
    return out, cut


def _family_text(i: int, fam: Family, k: int | None, sizer: _Sizer) -> list[str]:
    x, y = (sizer.text(v) for v in fam.fundamental)
    if isinstance(fam, OrbitFamily):
        m, t = fam.automorph.matrix, fam.automorph.translation
        mm = [sizer.text(v) for v in m]
        shift = "" if t == (0, 0) else f" + ({t[0]}, {t[1]})"
        lines = [
            f"  {i}. ({x}, {y}), automorph (x, y) ↦ [[{mm[0]}, {mm[1]}], [{mm[2]}, {mm[3]}]]·(x, y){shift}"
        ]
        if fam.unit is not None:
            lines.append(
                f"     = multiplication by {sizer.text(fam.unit[0])} + "
                f"{sizer.text(fam.unit[1])}√{fam.unit[2]}"
            )
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
    else:
        px, py = fam.x_polynomial, fam.y_polynomial
        lines = [
            f"  {i}. the parabola (x, y) = ({polynomial_text(px)}, {polynomial_text(py)}), t ∈ Z"
        ]
    if k is not None:
        mx, my = (sizer.text(v) for v in fam.solution(k))
        lines.append(f"     member k = {k}: ({mx}, {my})")
    return lines


def build(
    sol: QuadraticSolutions, bound: int | None, member: int | None, max_digits: int
) -> tuple[dict[str, Any], list[str]]:
    """The JSON payload and text lines for a solved equation."""
    coefficients = sol.coefficients
    sizer = _Sizer(max_digits)
    payload: dict[str, Any] = {
        "equation": dict(zip(NAMES, coefficients, strict=True)),
        "equation_text": equation_text(coefficients),
        "finite": sol.finite,
    }
    lines = [f"equation: {equation_text(coefficients)}"]
    families, cut = [], False
    for fam in sol.families:
        entry, c = _family_payload(fam, member, sizer)
        families.append(entry)
        cut |= c
    payload["families"] = families
    if sol.families:
        lines.append(
            f"{len(sol.families)} famil{'y' if len(sol.families) == 1 else 'ies'} of solutions:"
        )
        for i, fam in enumerate(sol.families, 1):
            lines += _family_text(i, fam, member, sizer)
    listed = sol.bounded(bound) if bound is not None else (sol.solutions if sol.finite else None)
    if listed is not None:
        entries = []
        for x, y in listed:
            point: dict[str, Any] = {}
            cut |= sizer.put(point, {"x": x, "y": y})
            entries.append(point)
        payload["solutions"] = entries
        what = f"with |x|, |y| ≤ {sizer.text(bound)}" if bound is not None else "in all"
        lines.append(f"{len(listed)} solution{'s' if len(listed) != 1 else ''} {what}:")
        lines += [f"  ({sizer.text(x)}, {sizer.text(y)})" for x, y in listed]
    else:
        payload["solutions"] = None
    payload["bound"] = bound
    payload["method"] = sol.method
    payload["proof"] = sol.proof
    payload["truncated"] = cut
    if sol.notes:
        payload["notes"] = sol.notes
        lines += [f"note: {n}" for n in sol.notes]
    if not sol.families and listed == []:
        lines.append("no integer solution")
    lines.append(f"method: {sol.method}; proof: {sol.proof}")
    return payload, lines


@click.command("solve", context_settings=ACCEPT_NEGATIVE)
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
        full, _ = build(sol, b, k, 0)
        write_atomically(output, _Sizer(0).json(full) + "\n")
        payload["output"] = output
        lines.append(f"full values written to {output}")
    click.echo(_Sizer(max_digits).json(payload) if as_json else "\n".join(lines))
