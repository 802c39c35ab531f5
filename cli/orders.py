"""How a command names an order: the argument ``d`` (the field Q(√d)) or ``--disc D``."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, TypeVar

import click

from realquad.core.integers import as_integer
from realquad.core.orders import Order, field
from realquad.errors import InputError

Decorated = TypeVar("Decorated", bound=Callable[..., Any])


def order_arguments(f: Decorated) -> Decorated:
    """The argument ``d`` (a field) and the option ``--disc D`` (an order)."""
    f = click.option(
        "--disc", type=str, default=None, metavar="D", help="Discriminant of an order instead of d."
    )(f)
    return click.argument("d", type=str, required=False)(f)


def order_from_options(d: str | None, disc: str | None) -> Order:
    """The order named by ``d`` (its field) or ``--disc D``; exactly one must be given."""
    if (d is None) == (disc is None):
        raise InputError("give either d (for the field Q(√d)) or --disc D (for an order), not both")
    if disc is not None:
        return Order(as_integer(disc, "--disc"))
    return field(as_integer(d, "d"))
