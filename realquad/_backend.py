"""The one switch that decides which kernels are in use.

``BACKEND`` is ``"compiled"`` when the C extension :mod:`realquad._kernels._ckernels`
imports, and ``"python"`` otherwise or when the environment variable
``REALQUAD_PURE=1`` is set. Everything else imports its word-size kernels
from here, never from the kernel modules directly.

>>> BACKEND in ("compiled", "python")
True
"""

from __future__ import annotations

import os

from realquad._kernels import _pure

kernels = _pure
BACKEND = "python"
BUILD_NOTE = ""

if os.environ.get("REALQUAD_PURE", "") not in ("", "0"):
    BUILD_NOTE = "REALQUAD_PURE is set: using the pure-Python kernels"
else:
    try:
        from realquad._kernels import _ckernels  # type: ignore[attr-defined]
    except ImportError as exc:  # pragma: no cover - depends on the build
        BUILD_NOTE = f"compiled kernels unavailable ({exc}); using the pure-Python kernels"
    else:  # pragma: no cover - depends on the build
        kernels = _ckernels  # type: ignore[assignment]
        BACKEND = "compiled"

__all__ = ["BACKEND", "BUILD_NOTE", "kernels"]
