"""What every result of realquad shares: how sure it is.

Every result object says how it was obtained (``method``, a description in
words) and how sure it is (``proof``): ``"unconditional"`` when the answer is
proved, ``"GRH"`` when it rests on the generalised Riemann hypothesis (and on
nothing else). Each also has ``to_dict()``, the JSON shape documented in
``docs/json.md`` that every command's ``--json`` prints.
"""

from __future__ import annotations

from typing import Any, Literal

#: How sure a result is: proved outright, or proved assuming the generalised Riemann hypothesis.
Proof = Literal["unconditional", "GRH"]

PROOFS: tuple[Proof, ...] = ("unconditional", "GRH")

#: A JSON object as ``to_dict()`` returns it: integers stay exact Python ints (of any size),
#: real numbers are decimal strings, the rest lists, strings, booleans and ``None``.
JSONObject = dict[str, Any]
