"""Build of realquad's compiled kernels (the rest of the metadata is in pyproject.toml).

``pip install .`` and ``pip install -e .`` compile the C sources in ``realquad/_kernels/``
(``_ckernels.c`` with the module, the ``*_kernels.c`` files by subject, the shared header
``kernels.h``) into the one extension module ``realquad._kernels._ckernels``, with the
C compiler Python was built with; nothing but the compiler and the Python headers is
needed. The extension is optional: when it cannot be built, the install still succeeds
and realquad runs on its pure-Python kernels (``realquad --version`` says so). Set
``REALQUAD_REQUIRE_COMPILED=1`` to make the build mandatory: it then stops with a message
saying what to install.
"""

from __future__ import annotations

import os
import sys

from setuptools import Extension, setup
from setuptools.command.build_ext import build_ext

MINIMUM_PYTHON = (3, 11)
REQUIRED = os.environ.get("REALQUAD_REQUIRE_COMPILED", "") not in ("", "0")
HELP = (
    "Install a C compiler with __int128 support (GCC or Clang on a 64-bit platform) "
    "and the Python development headers (Debian/Ubuntu: apt-get install gcc python3-dev), "
    "then reinstall; or unset REALQUAD_REQUIRE_COMPILED to install with the pure-Python kernels."
)

if sys.version_info < MINIMUM_PYTHON:
    sys.exit(
        f"realquad needs Python {MINIMUM_PYTHON[0]}.{MINIMUM_PYTHON[1]} or newer, not {sys.version.split()[0]}"
    )


class OptionalBuildExt(build_ext):
    """``build_ext`` that reports a failed compilation instead of failing the install."""

    def run(self) -> None:
        try:
            super().run()
        except Exception as exc:  # setuptools raises several distutils error types here
            self._failed(exc)

    def build_extension(self, ext: Extension) -> None:
        try:
            super().build_extension(ext)
        except Exception as exc:
            self._failed(exc)

    def _failed(self, exc: Exception) -> None:
        message = (
            f"realquad: the compiled kernels could not be built ({type(exc).__name__}: {exc})."
        )
        if REQUIRED:
            sys.exit(f"{message}\n{HELP}")
        print(
            f"{message}\nrealquad will use its pure-Python kernels. To build the compiled ones, "
            "install a C compiler with __int128 support and the Python development headers, "
            "then reinstall.",
            file=sys.stderr,
        )


#: The C files of the extension, by subject (shared helpers and prototypes: kernels.h).
KERNEL_SOURCES = (
    "_ckernels",
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

KERNELS = Extension(
    "realquad._kernels._ckernels",
    sources=[f"realquad/_kernels/{name}.c" for name in KERNEL_SOURCES],
    depends=["realquad/_kernels/kernels.h", "realquad/_kernels/definite.h"],
    extra_compile_args=[]
    if sys.platform == "win32"
    else ["-O2", "-fno-fast-math", "-ffp-contract=off"],
    optional=not REQUIRED,
)

setup(ext_modules=[KERNELS], cmdclass={"build_ext": OptionalBuildExt})
