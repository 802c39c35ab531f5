"""Integer solutions of quadratic equations in two unknowns, from Pell's equation to general conics.

One public function per problem, each reducing to the one below it:

* :func:`pell` — ``x² − dy² = N``, ``N ∈ {±1, ±4}`` (:mod:`~realquad.equations.pell`);
* :func:`solve_norm_equation` — ``x² − dy² = n`` (:mod:`~realquad.equations.norm`);
* :func:`solve_binary_form` — ``ax² + bxy + cy² = n`` (:mod:`~realquad.equations.binary`);
* :func:`solve_quadratic` — ``ax² + bxy + cy² + dx + ey + f = 0`` (:mod:`~realquad.equations.conics`);
* :func:`parse_equation` — the same equation written as people write it (:mod:`~realquad.equations.parser`).

Their results (:mod:`~realquad.equations.families`) list finitely many
solutions and families of them (orbits under an automorph, lines, parabolas).

>>> pell(61).x
1766319049
>>> [f.fundamental for f in solve_quadratic(*parse_equation("x^2 - 13y^2 = -4")).families]
[(-3, 1), (3, 1), (36, 10)]
"""

from __future__ import annotations

from realquad.equations.binary import solve_binary_form
from realquad.equations.conics import solve_quadratic
from realquad.equations.families import (
    AffineMap,
    Family,
    LineFamily,
    OrbitFamily,
    ParabolaFamily,
    QuadraticSolutions,
)
from realquad.equations.norm import NormEquationSolution, solve_norm_equation
from realquad.equations.parser import parse_equation
from realquad.equations.pell import PellSolution, pell

__all__ = [
    "AffineMap",
    "Family",
    "LineFamily",
    "NormEquationSolution",
    "OrbitFamily",
    "ParabolaFamily",
    "PellSolution",
    "QuadraticSolutions",
    "parse_equation",
    "pell",
    "solve_binary_form",
    "solve_norm_equation",
    "solve_quadratic",
]
