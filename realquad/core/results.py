"""What every result of realquad shares: how sure it is.

Every result object says how it was obtained (``method``, a description in
words) and how sure it is (``proof``): ``"unconditional"`` when the answer is
proved, ``"GRH"`` when it rests on the generalised Riemann hypothesis (and on
nothing else). Each also has ``to_dict()``, the JSON shape documented in
``docs/json.md`` that every command's ``--json`` prints.
"""

from __future__ import annotations

from typing import Any, Literal

from realquad.errors import InputError

#: How sure a result is: proved outright, or proved assuming the generalised Riemann hypothesis.
Proof = Literal["unconditional", "GRH"]

PROOFS: tuple[Proof, ...] = ("unconditional", "GRH")


def check_method(method: str, methods: tuple[str, ...]) -> str:
    """``method`` if it is one of ``methods``, else :class:`~realquad.errors.InputError` naming them.

    >>> check_method("auto", ("auto", "exact"))
    'auto'
    """
    if method not in methods:
        raise InputError(f"method must be one of {', '.join(methods)}, got {method!r}")
    return method


#: A JSON object as ``to_dict()`` returns it: integers stay exact Python ints (of any size),
#: real numbers are decimal strings, the rest lists, strings, booleans and ``None``.
JSONObject = dict[str, Any]
