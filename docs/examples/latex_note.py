"""A worked example of ``to_latex()``: a short seminar handout on the field Q(√79).

The scenario is our own: a handout for a number-theory seminar that works
through one real quadratic field by hand, checked by machine. Every formula in
it is written by the library; the prose is the handout's. Run

    python docs/examples/latex_note.py > q79.tex && pdflatex q79.tex

(amsmath and amssymb are the only packages needed). The method and proof of
each result follow it as a LaTeX comment, so the source says how each formula
was obtained while the printed handout stays clean.
"""

from __future__ import annotations

from realquad import (
    Form,
    class_group,
    continued_fraction,
    form_primes,
    fundamental_unit,
    pell,
    solve_norm_equation,
)

PREAMBLE = r"""\documentclass{article}
\usepackage{amsmath,amssymb}
\title{Seminar handout: the field $\mathbb{Q}(\sqrt{79})$}
\date{}
\begin{document}
\maketitle
"""


def handout() -> str:
    """The LaTeX source of the handout (a complete document)."""
    D = 4 * 79
    cf = continued_fraction("79")
    unit = fundamental_unit(D)
    group = class_group(D)
    solutions = solve_norm_equation(79, -15)
    primes = form_primes(Form(1, 0, -79), 60)
    parts = [
        PREAMBLE,
        r"\section*{The continued fraction of $\sqrt{79}$}",
        r"Its period is short and symmetric, ending in $2\lfloor\sqrt{79}\rfloor = 16$:",
        cf.to_latex_display(),
        r"\section*{The fundamental unit}",
        r"The period has even length, so the unit has norm $+1$ and"
        r" $x^{2} - 79y^{2} = -1$ has no solution:",
        unit.to_latex_display(),
        pell(79, -1).to_latex_display(),
        r"\section*{Class groups}",
        r"Since $N(\varepsilon) = +1$, the narrow class group is twice as large:",
        group.to_latex_display(),
        r"\section*{A norm equation}",
        r"The solutions of $x^{2} - 79y^{2} = -15$ fall into two classes,"
        r" each an orbit under the unit of norm $+1$:",
        solutions.to_latex_display(),
        r"\section*{Primes of the form $x^{2} - 79y^{2}$}",
        primes.to_latex_display(),
        r"\end{document}",
    ]
    return "\n\n".join(parts) + "\n"


def formulas() -> list[str]:
    """The displayed formulas alone, one per result (what a test checks one by one)."""
    return [block for block in handout().split("\n\n") if block.startswith("\\[")]


if __name__ == "__main__":
    print(handout(), end="")
