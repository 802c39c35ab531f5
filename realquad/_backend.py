"""The one switch that decides which kernels are in use, and the one way to call them.

The word-size hot loops live in C files under :mod:`realquad._kernels`, each
with a pure-Python twin of the same name (``form_kernels.c`` and
``form_kernels.py``); :data:`TWINS` lists them. ``pure`` is a namespace of
every public function and constant of the twins; ``kernels`` is the same
namespace with each function replaced by its compiled counterpart from the C
extension :mod:`realquad._kernels._ckernels` where the extension provides one
(so a new twin works at once and is compiled later). ``BACKEND`` is
``"compiled"`` when the extension imports and ``"python"`` when it does not or
when the environment variable ``REALQUAD_PURE=1`` is set; ``BUILD_NOTE`` says
why in the second case, once, for ``realquad --version`` and the pytest
header. Everything else reaches the kernels through this module, never
through the kernel modules themselves.

Compiled kernels raise ``OverflowError`` beyond their word-size range;
:func:`call_kernel` then runs the twin, which has no limit:

>>> BACKEND in ("compiled", "python")
True
>>> call_kernel("principal_period", 4 * 61, 100) == pure.principal_period(4 * 61, 100)
True
>>> call_kernel("form_rho_b", 5, 7, 2**100) == pure.form_rho_b(5, 7, 2**100)   # beyond 64 bits: the twin
True
"""

from __future__ import annotations

import importlib
import os
from types import ModuleType, SimpleNamespace
from typing import Any

#: The kernel subjects: ``realquad/_kernels/<name>.c`` and its twin ``<name>.py``.
TWINS = (
    "cfrac_kernels",
    "character_kernels",
    "form_kernels",
    "prime_form_kernels",
    "class_kernels",
    "definite_kernels",
    "definite_structure_kernels",
    "survey_kernels",
    "infrastructure_kernels",
    "sieve_kernels",
    "elimination_kernels",
)

BACKEND = "python"
BUILD_NOTE = ""
#: Names in ``kernels`` served by the compiled extension.
COMPILED: frozenset[str] = frozenset()


def _public_names(module: ModuleType) -> dict[str, Any]:
    """A twin's own public functions and constants (not what it imports)."""
    names = {}
    for name, value in vars(module).items():
        if name.startswith("_"):
            continue
        if callable(value) and getattr(value, "__module__", None) == module.__name__:
            names[name] = value
        elif name.isupper():
            names[name] = value
    return names


def _twin_table() -> dict[str, Any]:
    table: dict[str, Any] = {}
    for subject in TWINS:
        module = importlib.import_module(f"realquad._kernels.{subject}")
        for name, value in _public_names(module).items():
            if name in table and table[name] is not value:  # pragma: no cover - a packaging bug
                raise ImportError(f"kernel {name!r} is defined by two twins")
            table[name] = value
    return table


def _namespaces(
    compiled: ModuleType | None,
) -> tuple[SimpleNamespace, SimpleNamespace, frozenset[str]]:
    twins = _twin_table()
    table = dict(twins)
    served = set()
    if compiled is not None:
        for name in twins:
            if hasattr(compiled, name):
                table[name] = getattr(compiled, name)
                served.add(name)
    return SimpleNamespace(**twins), SimpleNamespace(**table), frozenset(served)


_compiled: ModuleType | None = None
if os.environ.get("REALQUAD_PURE", "") not in ("", "0"):
    BUILD_NOTE = "REALQUAD_PURE is set: using the pure-Python kernels"
else:
    try:
        from realquad._kernels import _ckernels as _compiled
    except ImportError as exc:  # pragma: no cover - depends on the build
        BUILD_NOTE = (
            f"compiled kernels not built ({exc}); using the pure-Python kernels. "
            "Reinstall with a C compiler present (pip install .) to build them"
        )
    else:
        BACKEND = "compiled"

pure, kernels, COMPILED = _namespaces(_compiled)


def call_kernel(name: str, *args: Any) -> Any:
    """Run the kernel ``name``: compiled within its word size, the pure twin beyond it."""
    try:
        return getattr(kernels, name)(*args)
    except OverflowError:
        return getattr(pure, name)(*args)


__all__ = ["BACKEND", "BUILD_NOTE", "COMPILED", "TWINS", "call_kernel", "kernels", "pure"]
