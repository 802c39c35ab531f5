"""``realquad classgroup d`` / ``--disc D``: h, h⁺, the structure of Cl and Cl⁺, genera."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.orders import order_arguments, order_from_options
from realquad_cli.output import ACCEPT_NEGATIVE, emit, json_option
from realquad_cli.progress import ProgressLine

from realquad.classgroup import CLASS_GROUP_METHODS, ClassGroup, class_group
from realquad.classgroup.genus import Genera
from realquad.core.forms import Form
from realquad.core.ideals import Ideal
from realquad.errors import InputError

#: Most reduced forms that ``--forms`` prints in the text form.
SHOWN_FORMS = 2000


def _form_list(F: Form) -> list[int]:
    return [F.a, F.b, F.c]


def _generators(forms: list[Form], orders: list[int]) -> list[dict[str, Any]]:
    return [
        {"order": d, "form": _form_list(F), "ideal": str(Ideal.from_form(F))}
        for F, d in zip(forms, orders, strict=True)
    ]


def _structure_text(invariants: list[int]) -> str:
    return " × ".join(f"Z/{d}" for d in invariants) if invariants else "trivial"


def _reason(G: ClassGroup) -> str:
    if G.unit_norm == -1:
        return "h⁺ = h: the fundamental unit has norm −1, so every principal ideal has a totally positive generator"
    return "h⁺ = 2h: the fundamental unit has norm +1, so the principal ideal (√D) is not narrowly principal"


def _payload(G: ClassGroup, with_forms: bool) -> dict[str, Any]:
    order = G.order
    genus: Genera = G.genus
    payload: dict[str, Any] = {
        "radicand": order.radicand,
        "discriminant": order.discriminant,
        "conductor": order.conductor,
        "class_number": G.class_number,
        "narrow_class_number": G.narrow_class_number,
        "structure": G.invariants,
        "narrow_structure": G.narrow_invariants,
        "generators": _generators(G.generators, G.invariants),
        "narrow_generators": _generators(G.narrow_generators, G.narrow_invariants),
        "unit_norm": G.unit_norm,
        "narrow_versus_wide": _reason(G),
        "regulator": str(G.regulator),
        "genus_characters": genus.characters,
        "number_of_genera": genus.number_of_genera,
        "two_rank": genus.two_rank,
        "method": G.method,
        "proof": G.proof,
    }
    if with_forms:
        payload["classes"] = [[_form_list(F) for F in cyc] for cyc in G.narrow_classes()]
    return payload


def _text(G: ClassGroup, payload: dict[str, Any], with_forms: bool) -> str:
    order = G.order
    lines = [
        f"order of discriminant {order.discriminant} in Q(√{order.radicand}), conductor {order.conductor}",
        f"class number h = {G.class_number}; Cl ≅ {_structure_text(G.invariants)}",
        f"narrow class number h⁺ = {G.narrow_class_number}; Cl⁺ ≅ {_structure_text(G.narrow_invariants)}",
        payload["narrow_versus_wide"],
    ]
    for title, gens in (
        ("generators of Cl", payload["generators"]),
        ("generators of Cl⁺", payload["narrow_generators"]),
    ):
        if gens:
            lines.append(f"{title}:")
            for g in gens:
                a, b, c = g["form"]
                lines.append(f"  order {g['order']}: form ({a}, {b}, {c}), ideal {g['ideal']}")
    lines.append(
        f"genera: {payload['number_of_genera']} (characters {', '.join(payload['genus_characters']) or 'none'}); "
        f"2-rank of Cl⁺ {payload['two_rank']}"
    )
    lines.append(f"regulator {payload['regulator']}")
    if with_forms:
        shown = 0
        for k, cyc in enumerate(payload["classes"]):
            if shown >= SHOWN_FORMS:
                rest = len(payload["classes"]) - k
                lines.append(f"… {rest} more classes not shown (use --json for all)")
                break
            forms = " ".join(f"({a}, {b}, {c})" for a, b, c in cyc[: SHOWN_FORMS - shown])
            more = "" if len(cyc) <= SHOWN_FORMS - shown else f" … ({len(cyc)} forms in all)"
            lines.append(f"class {k}: {forms}{more}")
            shown += len(cyc)
    lines.append(f"method: {G.method}; proof: {G.proof}")
    return "\n".join(lines)


@click.command("classgroup", context_settings=ACCEPT_NEGATIVE)
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
    payload = _payload(G, with_forms)
    emit(payload, _text(G, payload, with_forms), as_json)
