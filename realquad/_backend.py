"""The one switch that decides which kernels are in use.

``kernels`` is a namespace holding every public function and constant of the
pure-Python twin :mod:`realquad._kernels._pure`, each replaced by its compiled
counterpart from the C extension :mod:`realquad._kernels._ckernels` where the
extension provides one (so a twin added to ``_pure.py`` works at once and is
compiled later). ``BACKEND`` is ``"compiled"`` when the extension imports and
``"python"`` when it does not or when the environment variable
``REALQUAD_PURE=1`` is set; ``BUILD_NOTE`` says why in the second case, once,
for ``realquad --version`` and the pytest header. Everything else imports its
word-size kernels from here, never from the kernel modules directly.

Compiled kernels raise ``OverflowError`` beyond their word-size range; the
caller then uses ``pure`` (the twin module itself), which has no limit:

>>> BACKEND in ("compiled", "python")
True
>>> kernels.principal_period(4 * 61, 100) == pure.principal_period(4 * 61, 100)
True
"""

from __future__ import annotations

import os
from types import ModuleType, SimpleNamespace

from realquad._kernels import _pure as pure

BACKEND = "python"
BUILD_NOTE = ""
#: Names in ``kernels`` served by the compiled extension.
COMPILED: frozenset[str] = frozenset()


def _public_names(module: ModuleType) -> list[str]:
    """The twin's own public functions and constants (not what it imports)."""
    names = []
    for name, value in vars(module).items():
        if name.startswith("_"):
            continue
        home = getattr(value, "__module__", None) or ""
        if callable(value) and home.startswith(module.__name__):  # _pure and its part _pure_forms
            names.append(name)
        elif name.isupper():
            names.append(name)
    return names


def _namespace(compiled: ModuleType | None) -> tuple[SimpleNamespace, frozenset[str]]:
    table = {}
    served = set()
    for name in _public_names(pure):
        if compiled is not None and hasattr(compiled, name):
            table[name] = getattr(compiled, name)
            served.add(name)
        else:
            table[name] = getattr(pure, name)
    return SimpleNamespace(**table), frozenset(served)


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

kernels, COMPILED = _namespace(_compiled)

__all__ = ["BACKEND", "BUILD_NOTE", "COMPILED", "kernels", "pure"]
