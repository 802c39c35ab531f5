"""The infrastructure of a real quadratic order: reduced principal ideals with distances.

Modules: :mod:`ideals` (reduced ideals, baby steps, composition, reduction),
:mod:`distances` (reaching a given distance by doubling, exact relative
generators), :mod:`table` (the baby-step table and the giant-step search, in
the kernels), :mod:`regulator_search` (the regulator by baby-step giant-step),
:mod:`compact` (compact representations of units), :mod:`principal` (the
principal ideal test), :mod:`class_group_bsgs` (class groups under GRH by
baby-step giant-step in the class group). The ``h·R`` estimate
that sizes the search is :mod:`realquad.lfunction`, shared with the
continued-fraction side.
"""

from realquad.infrastructure.ideals import Cycle

__all__ = ["Cycle"]
