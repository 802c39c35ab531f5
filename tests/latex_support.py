"""Checks of the LaTeX that realquad writes: a parser for its subset, a real engine where installed.

:func:`check_latex` reads LaTeX the way a careful referee would: ASCII only
outside comments, braces balanced, every ``\\begin`` closed by its ``\\end``,
``\\left`` paired with ``\\right``, display maths ``\\[ … \\]`` closed, ``$``
paired on each line, and every macro one of plain LaTeX, ``amsmath`` or
``amssymb`` that the package uses. :func:`compile_latex` runs ``pdflatex``,
``lualatex`` or ``tectonic`` on a document around the fragments when one is
on the PATH. :func:`to_sympy` reads the formulas of numbers back (``\\frac``,
``\\sqrt``, ``\\left( … \\right)``, powers) as sympy expressions.
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import sympy
from sympy.parsing.sympy_parser import (
    convert_xor,
    implicit_multiplication_application,
    parse_expr,
    standard_transformations,
)

#: The macros the package may write (plain LaTeX, amsmath, amssymb).
KNOWN_MACROS = {
    "frac", "sqrt", "left", "right", "overline", "underbrace", "ldots", "text", "quad",
    "cdot", "times", "cong", "pm", "in", "mathbb", "mathcal", "mathfrak", "bar",
    "operatorname", "varepsilon", "log", "langle", "rangle", "zeta", "begin", "end",
    "nmid", "mid", "iff", "implies", "equiv", "pmod", "bmod", "emptyset", "le", "ge",
    "delta", "mathrm", "hline", "approx", "alpha", "small", "setlength", "tabcolsep", "to", "not", "sim",
}  # fmt: skip
#: The environments the package may write.
KNOWN_ENVIRONMENTS = {"gathered", "aligned", "pmatrix", "tabular"}
PREAMBLE = "\\documentclass{article}\n\\usepackage{amsmath,amssymb}\n\\begin{document}\n"


def strip_comments(source: str) -> str:
    """``source`` without its comments (``%`` to the end of the line, ``\\%`` kept)."""
    return "\n".join(re.sub(r"(?<!\\)%.*", "", line) for line in source.splitlines())


def check_latex(source: str, ascii_only: bool = True) -> None:
    """Raise ``AssertionError`` with the reason if ``source`` is not well-formed LaTeX of our subset.

    ``ascii_only=False`` for a notebook's MathJax, which also reads Unicode inside ``\\text``.
    """
    body = strip_comments(source)
    assert body.isascii() or not ascii_only, (
        f"non-ASCII outside comments: {sorted(set(c for c in body if not c.isascii()))}"
    )
    depth = 0
    environments: list[str] = []
    lefts = 0
    display = 0
    i = 0
    while i < len(body):
        c = body[i]
        if c == "\\":
            m = re.match(r"\\([A-Za-z]+)", body[i:])
            if m is None:  # a control symbol: \{ \} \, \  \% \[ \] \\ …
                symbol = body[i + 1 : i + 2]
                assert symbol in "{},; %[]\\#&$_^", f"unknown control symbol \\{symbol}"
                if symbol == "[":
                    assert display == 0, "\\[ inside display maths"
                    display += 1
                elif symbol == "]":
                    assert display == 1, "\\] without \\["
                    display -= 1
                i += 2
                continue
            name = m[1]
            assert name in KNOWN_MACROS, f"unknown macro \\{name}"
            if name in ("begin", "end"):
                env = re.match(r"\{([a-z]+)\}", body[i + len(name) + 1 :])
                assert env is not None, f"\\{name} without an environment"
                assert env[1] in KNOWN_ENVIRONMENTS, f"unknown environment {env[1]}"
                if name == "begin":
                    environments.append(env[1])
                else:
                    assert environments and environments.pop() == env[1], (
                        f"\\end{{{env[1]}}} unmatched"
                    )
            elif name == "left":
                lefts += 1
            elif name == "right":
                lefts -= 1
                assert lefts >= 0, "\\right without \\left"
            i += len(name) + 1
            continue
        if c == "{":
            depth += 1
        elif c == "}":
            depth -= 1
            assert depth >= 0, "a closing brace without its opening one"
        i += 1
    assert depth == 0, f"{depth} braces left open"
    assert not environments, f"environments left open: {environments}"
    assert lefts == 0, "\\left without \\right"
    assert display == 0, "display maths left open"
    for line in body.splitlines():
        assert line.replace("\\$", "").count("$") % 2 == 0, f"unpaired $ in {line!r}"


def latex_engine() -> str | None:
    """The first LaTeX engine on the PATH, if any."""
    for name in ("pdflatex", "lualatex", "tectonic"):
        if shutil.which(name):
            return name
    return None


def compile_latex(fragments: list[str], directory: Path) -> str:
    """Compile a document made of ``fragments`` (text mode) with the installed engine; its log."""
    tex = directory / "note.tex"
    tex.write_text(PREAMBLE + "\n\n".join(fragments) + "\n\\end{document}\n", encoding="utf-8")
    return compile_document(tex)


def compile_document(tex: Path) -> str:
    """Compile the LaTeX document ``tex`` in its directory with the installed engine; its log."""
    engine = latex_engine()
    assert engine is not None
    args = (
        [engine, tex.name]
        if engine == "tectonic"
        else [engine, "-interaction=nonstopmode", "-halt-on-error", tex.name]
    )
    done = subprocess.run(args, cwd=tex.parent, capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stdout[-2000:]
    log = tex.with_suffix(".log")
    return log.read_text(errors="replace") if log.exists() else done.stdout + done.stderr


def _braced(text: str, start: int) -> tuple[str, int]:
    """The group ``{…}`` opening at ``start``: its inside and the index after it."""
    assert text[start] == "{", text[start:]
    depth = 0
    for j in range(start, len(text)):
        depth += {"{": 1, "}": -1}.get(text[j], 0)
        if depth == 0:
            return text[start + 1 : j], j + 1
    raise AssertionError("unbalanced braces")


def _python(latex: str) -> str:
    """Our LaTeX of a number as a Python expression (implicit products left to the parser)."""
    out = []
    i = 0
    while i < len(latex):
        if latex.startswith(r"\frac", i):
            top, i = _braced(latex, i + 5)
            bottom, i = _braced(latex, i)
            out.append(f"(({_python(top)})/({_python(bottom)}))")
        elif latex.startswith(r"\sqrt", i):
            inside, i = _braced(latex, i + 5)
            out.append(f"sqrt({_python(inside)})")
        elif latex.startswith(r"\left(", i) or latex.startswith(r"\right)", i):
            out.append("(" if latex[i + 1] == "l" else ")")
            i += 6 if latex[i + 1] == "l" else 7
        elif latex[i] == "^":
            power, i = _braced(latex, i + 1)
            out.append(f"**({_python(power)})")
        else:
            out.append(latex[i])
            i += 1
    return "".join(out)


def to_sympy(latex: str, **symbols: object) -> sympy.Expr:
    """The value of our LaTeX of a number (``\\frac``, ``\\sqrt``, ``\\left( \\right)``, ``^{…}``,
    products ``\\cdot`` over the rows of an ``aligned`` block)."""
    for layout in (r"\begin{aligned}", r"\end{aligned}", "&", r"\quad", "\\\\"):
        latex = latex.replace(layout, " ")
    latex = latex.replace(r"\cdot", "*")
    transformations = standard_transformations + (implicit_multiplication_application, convert_xor)
    names = {"sqrt": sympy.sqrt, **symbols}
    return parse_expr(_python(latex), local_dict=names, transformations=transformations)
