"""``realquad classgroup d`` / ``--disc D``: h, h⁺, the structure of Cl and Cl⁺, genera."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.orders import order_arguments, order_from_options
from realquad_cli.output import Command, emit, json_option
from realquad_cli.progress import ProgressLine

from realquad.classgroup import CLASS_GROUP_METHODS, ClassGroup, class_group
from realquad.core.forms import Form
from realquad.core.ideals import Ideal
from realquad.errors import InputError
from realquad.textio import group_text, plural, signed

#: Most reduced forms that ``--forms`` prints in the text form.
SHOWN_FORMS = 2000


def _reason(G: ClassGroup) -> str:
    if G.unit_norm == -1:
        return "h⁺ = h: the fundamental unit has norm −1, so every principal ideal has a totally positive generator"
    return "h⁺ = 2h: the fundamental unit has norm +1, so the principal ideal (√D) is not narrowly principal"


def _form_text(F: Form) -> str:
    return f"({signed(F.a)}, {signed(F.b)}, {signed(F.c)})"


def _text(G: ClassGroup, payload: dict[str, Any], with_forms: bool) -> str:
    order = G.order
    genus = payload["genus"]
    lines = [
        f"order of discriminant {order.discriminant} in Q(√{order.radicand}), conductor {order.conductor}",
        f"class number h = {G.class_number}; Cl ≅ {group_text(G.invariants)}",
        f"narrow class number h⁺ = {G.narrow_class_number}; Cl⁺ ≅ {group_text(G.narrow_invariants)}",
        _reason(G),
    ]
    for title, gens, orders in (
        ("generators of Cl", G.generators, G.invariants),
        ("generators of Cl⁺", G.narrow_generators, G.narrow_invariants),
    ):
        if gens:
            lines.append(f"{title}:")
            for F, n in zip(gens, orders, strict=True):
                lines.append(f"  order {n}: form {_form_text(F)}, ideal {Ideal.from_form(F)}")
    characters = ", ".join(genus["characters"]) or "none"
    lines.append(
        f"genera: {genus['number_of_genera']} (characters {characters}); 2-rank of Cl⁺ {genus['two_rank']}"
    )
    lines.append(f"regulator {G.regulator}")
    if with_forms:
        shown = 0
        classes = payload["classes"]
        for k, cycle in enumerate(classes):
            if shown >= SHOWN_FORMS:
                rest = len(classes) - k
                lines.append(
                    f"… {plural(rest, 'more class', 'more classes')} not shown (use --json for all)"
                )
                break
            forms = " ".join(
                f"({signed(f['a'])}, {signed(f['b'])}, {signed(f['c'])})"
                for f in cycle[: SHOWN_FORMS - shown]
            )
            more = "" if len(cycle) <= SHOWN_FORMS - shown else f" … ({len(cycle):,} forms in all)"
            lines.append(f"class {k}: {forms}{more}")
            shown += len(cycle)
    lines.append(f"method: {G.method}; proof: {G.proof}")
    return "\n".join(lines)


@click.command("classgroup", cls=Command)
@order_arguments
@click.option(
    "--forms",
    "with_forms",
    is_flag=True,
    help="List the reduced forms (the cycle) of every narrow class.",
)
@click.option(
    "--method",
    type=click.Choice(CLASS_GROUP_METHODS),
    default="auto",
    show_default=True,
    help="exact: cycles of reduced forms (unconditional); bsgs: baby-step giant-step in the "
    "infrastructure (fields, under GRH); auto: by size.",
)
@json_option
def command(d: str | None, disc: str | None, with_forms: bool, method: str, as_json: bool) -> None:
    """Class numbers h and h⁺ and the groups Cl and Cl⁺ of Q(√d), or of the order of discriminant D.

    Example: realquad classgroup 79; realquad classgroup --disc 1300 --forms;
    realquad classgroup --disc 100000000000000000129 --method bsgs
    """
    order = order_from_options(d, disc)
    if with_forms and method == "bsgs":
        raise InputError(
            "--forms lists every class, which the exact method does: use --method exact or auto"
        )
    if with_forms:
        method = "exact"
    # small groups take the lean kernel, which reports nothing; beyond 10¹¹ the full table reports
    progress = ProgressLine() if order.discriminant > 10**11 else None
    G = class_group(order, progress=progress, method=method)
    payload = G.to_dict(with_classes=with_forms)
    emit(payload, _text(G, payload, with_forms), as_json)
