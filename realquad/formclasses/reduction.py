"""Reduction with its matrix, and equivalence of two forms with the matrices that carry one to the other.

A form of either sign is carried to a reduced form by a matrix of ``SL₂(Z)``
(:meth:`realquad.core.forms.Form.reduce`). Two forms are *properly*
equivalent when a matrix of determinant 1 carries one to the other, and
*improperly* equivalent when one of determinant −1 does; ``G`` is improperly
equivalent to ``F`` exactly when ``G' = G·J = (a, −b, c)``, ``J = [[1, 0], [0, −1]]``,
is properly equivalent to ``F``. For ``D < 0`` the test compares the unique
reduced forms; for ``D > 0`` it looks for the reduced form of ``G`` in the
cycle of ``F`` (:meth:`realquad.core.forms.Form.cycle`, the kernel walk), and
only then makes the matrix of the rho steps between, by a product tree
(:func:`realquad.formclasses.walks.rho_matrix_product`).

>>> from realquad.core.forms import Form
>>> r = reduce_form(Form(6, 5, 2))
>>> r.reduced, r.form.act(r.matrix) == r.reduced
(Form(2, -1, 3), True)
>>> e = equivalence(Form(3, 7, -2), Form(-2, 5, 6))
>>> e.properly_equivalent, Form(3, 7, -2).act(e.matrix)
(True, Form(-2, 5, 6))
>>> e = equivalence(Form(2, 1, 3), Form(2, -1, 3))     # D = −23: inverse classes, not the same
>>> e.properly_equivalent, e.improperly_equivalent, e.improper_matrix
(False, True, (1, 0, 0, -1))

References: J. Buchmann and U. Vollmer, *Binary Quadratic Forms*, Springer 2007,
ch. 6 (reduction and cycles of indefinite forms); H. Cohen, *A Course in
Computational Algebraic Number Theory*, Springer 1993, §5.3–5.6.
"""

from __future__ import annotations

from realquad.core.forms import Form
from realquad.core.linalg import Matrix, matrix_inverse, matrix_multiply
from realquad.core.results import Proof
from realquad.formclasses.results import FormEquivalence, FormReduction
from realquad.formclasses.walks import rho_matrix_product
from realquad.textio import signed

#: How each sign of discriminant is reduced.
REDUCTION_METHOD = {
    True: "definite reduction, b into (−a, a] and (a, b, c) → (c, −b, a), with the matrix "
    "(Cohen, Alg. 5.4.2)",
    False: "rho steps to a reduced form, with the matrix (Buchmann–Vollmer, ch. 6)",
}

#: Reduced forms of one cycle walked at most, unless the caller says otherwise.
DEFAULT_MAX_FORMS = 1_000_000

UNCONDITIONAL: Proof = "unconditional"


def _checked(F: Form, M: Matrix, G: Form) -> Matrix:
    """``M`` after checking ``F·M = G`` (an internal check: a wrong matrix is never returned)."""
    if F.act(M) != G:
        raise ArithmeticError(f"internal check failed: {F}·{M} is not {G}")
    return M


def reduce_form(F: Form) -> FormReduction:
    """A reduced form properly equivalent to ``F`` and the matrix of ``SL₂(Z)`` that carries ``F`` to it.

    >>> reduce_form(Form(1, 1, -18)).reduced, reduce_form(Form(3, 10, 9)).matrix
    (Form(1, 7, -6), (-2, 1, 1, -1))
    """
    G, M = F.reduce()
    return FormReduction(F, G, _checked(F, M, G), REDUCTION_METHOD[F.is_definite], UNCONDITIONAL)


def _flip(F: Form) -> Form:
    """``F·J = (a, −b, c)``, ``J = [[1, 0], [0, −1]]``."""
    return F.act((1, 0, 0, -1))


def _proper_matrix(F: Form, G: Form, cycle: list[Form] | None, max_forms: int) -> Matrix | None:
    """``M`` with ``F·M = G`` if properly equivalent (``cycle``: that of ``F``'s reduced form, ``D > 0``)."""
    if cycle is None:  # D < 0: one reduced form per class
        M = F.equivalent(G, max_forms)
        return None if M is None else _checked(F, M, G)
    G1, M2 = G.reduce()
    try:
        k = cycle.index(G1)
    except ValueError:
        return None
    _, M1 = F.reduce()
    N = rho_matrix_product(cycle, k)
    return _checked(F, matrix_multiply(matrix_multiply(M1, N), matrix_inverse(M2)), G)


def equivalence(F: Form, G: Form, max_forms: int = DEFAULT_MAX_FORMS) -> FormEquivalence:
    """Whether ``F`` and ``G`` are properly and improperly equivalent, with matrices when they are.

    For ``D > 0`` the cycle of ``F`` is walked (at most ``max_forms`` reduced
    forms, else :class:`~realquad.errors.TooLargeError`).

    >>> e = equivalence(Form(1, 0, -3), Form(-1, 0, 3))     # Q(√3): x² − 3y² never takes −1
    >>> e.properly_equivalent, e.improperly_equivalent, e.reason
    (False, False, 'the reduced form of the second is not in the cycle of the first')
    >>> equivalence(Form(1, 0, 1), Form(1, 1, 1)).reason
    'different discriminants −4 and −3'
    """
    D = F.discriminant
    definite = F.is_definite
    if G.discriminant != D:
        differ = f"different discriminants {signed(D)} and {signed(G.discriminant)}"
        return FormEquivalence(
            F, G, False, None, False, None, differ, "discriminants compared", UNCONDITIONAL
        )
    cycle = None if definite else F.reduce()[0].cycle(max_forms)
    M = _proper_matrix(F, G, cycle, max_forms)
    flipped = _proper_matrix(F, _flip(G), cycle, max_forms)
    improper = None
    if flipped is not None:
        a, b, c, d = flipped
        improper = _checked(F, (a, -b, c, -d), G)
    reason: str | None = None
    if M is None:
        reason = (
            "the reduced forms differ (each class has one reduced form)"
            if definite
            else "the reduced form of the second is not in the cycle of the first"
        )
    method = (
        "reduced forms compared (one per class), matrices from the reductions"
        if definite
        else "the reduced form of the second looked up in the rho cycle of the first, matrices "
        "from the reductions and the rho steps between (product tree)"
    )
    return FormEquivalence(
        F, G, M is not None, M, improper is not None, improper, reason, method, UNCONDITIONAL
    )
