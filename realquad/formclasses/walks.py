"""The matrix of a walk along a listed cycle of reduced forms, by a product tree.

The rho step from a reduced form ``(a, b, c)`` to the next one ``(c, b', c')``
of its cycle has the matrix ``[[0, −1], [1, s]]`` with ``s = (b + b')/2c``
(:meth:`realquad.core.forms.Form.rho`), so once the cycle is listed (by the
compiled walk :meth:`~realquad.core.forms.Form.cycle`) the matrix of any
stretch of it is a product of known matrices. Their entries grow like the
unit along the cycle; multiplying them in a balanced tree
(:func:`realquad.core.linalg.matrix_product`) costs a few full-size
multiplications instead of one per step (far quicker on long cycles than
:meth:`~realquad.core.forms.Form.cycle_matrices`, which makes every
intermediate matrix, for callers that need each one).

>>> from realquad.core.forms import Form
>>> cycle = Form.identity(13).cycle()
>>> rho_matrix_product(cycle, 1), rho_matrix_product(cycle, 0)
((0, -1, 1, -3), (1, 0, 0, 1))
>>> [G == cycle[0].act(rho_matrix_product(cycle, k)) for k, G in enumerate(cycle)]
[True, True]
"""

from __future__ import annotations

from realquad.core.forms import Form
from realquad.core.linalg import IDENTITY_MATRIX, Matrix, matrix_product


def rho_matrix_product(cycle: list[Form], steps: int) -> Matrix:
    """``N`` with ``cycle[0]·N = cycle[steps mod length]``: the first ``steps`` rho matrices multiplied.

    ``steps`` may be the cycle's length (once round: an automorph of ``cycle[0]``).
    """
    matrices = []
    for k in range(steps):
        G, nxt = cycle[k % len(cycle)], cycle[(k + 1) % len(cycle)]
        matrices.append((0, -1, 1, (nxt.b + G.b) // (2 * G.c)))
    if not matrices:
        return IDENTITY_MATRIX
    return tuple(int(x) for x in matrix_product(matrices))  # type: ignore[return-value]
