"""The cycle of an indefinite form: the reduced forms of its class, and the automorph once round.

The rho step permutes the reduced forms of discriminant ``D > 0``; the orbit
of the reduced form reached from ``F`` is the cycle of ``F``'s proper
equivalence class (:meth:`realquad.core.forms.Form.cycle`). Its length is
even, and the product of the rho matrices ``[[0, −1], [1, sᵢ]]`` once round
is, up to sign, the automorph ``A`` of the reduced form that generates its
proper automorphs up to ``±1``; conjugated by the reduction matrix it fixes
``F`` itself. With trace ``t`` and lower-left entry ``a·u/g`` (``g`` the
content of ``F``), ``(t + u√D')/2`` is the least unit ``> 1`` of norm +1 of
the order of discriminant ``D' = D/g²`` (Buchmann–Vollmer, ch. 6; for the
principal form, the least solution of ``t² − D'u² = 4``).

>>> from realquad.core.forms import Form
>>> c = form_cycle(Form(1, 0, -13))       # D = 52, Z[√13]: ε = 18 + 5√13 has norm −1, ε² fixes F
>>> len(c.cycle), c.automorph, str(c.unit)
(10, (649, 2340, 180, 649), '649 + 180√13')

References: J. Buchmann and U. Vollmer, *Binary Quadratic Forms*, Springer 2007,
ch. 6 (cycles, automorphisms and units).
"""

from __future__ import annotations

from math import gcd

from realquad.core.forms import Form
from realquad.core.integers import isqrt
from realquad.core.linalg import matrix_inverse, matrix_multiply
from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.results import Proof
from realquad.errors import DomainError
from realquad.formclasses.results import FormCycle
from realquad.formclasses.walks import rho_matrix_product

#: Reduced forms of one cycle listed at most, unless the caller says otherwise.
DEFAULT_MAX_FORMS = 100_000

UNCONDITIONAL: Proof = "unconditional"


def form_cycle(F: Form, max_forms: int = DEFAULT_MAX_FORMS) -> FormCycle:
    """The cycle of reduced forms of the class of the indefinite form ``F``, and its automorph.

    More than ``max_forms`` forms in the cycle: :class:`~realquad.errors.TooLargeError`.
    A definite form has no cycle (its class holds one reduced form): :class:`DomainError`.

    >>> c = form_cycle(Form(3, 7, -2))
    >>> c.reduced, len(c.cycle), c.principal, Form(3, 7, -2).act(c.automorph) == Form(3, 7, -2)
    (Form(3, 7, -2), 18, True, True)
    """
    if F.is_definite:
        raise DomainError(
            f"{F} is positive definite: its class holds one reduced form and no cycle "
            "(reduce it instead)"
        )
    R, M = F.reduce()
    cycle = R.cycle(max_forms)
    if cycle[0] != R:
        raise ArithmeticError(f"internal check failed: the cycle of {R} starts elsewhere")
    N = rho_matrix_product(cycle, len(cycle))
    A = matrix_multiply(matrix_multiply(M, N), matrix_inverse(M))
    t = A[0] + A[3]
    if t < 0:
        A, t = (-A[0], -A[1], -A[2], -A[3]), -t
    if F.act(A) != F:
        raise ArithmeticError(f"internal check failed: {A} does not fix {F}")
    g = gcd(gcd(F.a, F.b), F.c)
    u = A[2] // (F.a // g)
    order = Order(F.discriminant // (g * g))  # √D' = f·√d, d squarefree
    f = isqrt(order.discriminant // order.radicand)
    unit = QuadraticNumber(t, u * f, 2, order.radicand)
    if unit.norm() != 1:
        raise ArithmeticError(f"internal check failed: the unit {unit} has norm {unit.norm()}")
    principal = Form.identity(F.discriminant) in cycle
    method = (
        "rho steps to a reduced form, then round its cycle (Buchmann–Vollmer, ch. 6); the "
        "automorph is the product of the rho matrices, by a product tree"
    )
    return FormCycle(F, R, cycle, principal, A, unit, method, UNCONDITIONAL)
