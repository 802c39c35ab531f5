"""Composition of two primitive forms of one discriminant, and powers of a form's class.

Two methods compose (``method``): ``"dirichlet"`` — Dirichlet's united forms
(:meth:`realquad.core.forms.Form.compose`), whose composite is shown before it
is reduced; ``"nucomp"`` — Shanks' NUCOMP in the form of Jacobson and van der
Poorten (:meth:`realquad.core.forms.Form.nucomp`), which keeps the
intermediate numbers near ``|D|^{1/4}`` and yields an almost reduced form.
Both give the same class; for ``D > 0`` the reduced forms they reach may be
different forms of that class's cycle.

>>> from realquad.core.forms import Form
>>> c = compose_forms(Form(2, 1, 3), Form(2, 1, 3))      # D = −23: Cl ≅ Z/3
>>> c.composite, c.reduced
(Form(4, -3, 2), Form(2, -1, 3))
>>> form_power(Form(2, 1, 3), 3).reduced                    # the principal form
Form(1, 1, 6)

References: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §5.4 (Algorithm 5.4.7) and §5.6; M. J. Jacobson Jr. and A. J.
van der Poorten, "Computational aspects of NUCOMP", ANTS-V, LNCS 2369 (2002).
"""

from __future__ import annotations

from realquad.core.forms import Form
from realquad.core.integers import as_integer
from realquad.core.results import Proof, check_method
from realquad.errors import DomainError, TooLargeError
from realquad.formclasses.results import FormComposition, FormPower
from realquad.textio import decimal_digits

#: Most ``bits(k)·digits(D)²`` :func:`form_power` takes on (a few seconds: each of the ~2·bits(k)
#: compositions reduces numbers of ~digits(D) digits in ~digits(D) steps).
MAX_POWER_WORK = 2 * 10**8

#: The composition methods of :func:`compose_forms`.
COMPOSITION_METHODS = ("dirichlet", "nucomp")

_REDUCTION = {True: "definite reduction", False: "rho steps"}

UNCONDITIONAL: Proof = "unconditional"


def _require_primitive(F: Form) -> None:
    if not F.is_primitive():
        raise DomainError(
            f"{F} is not primitive (its coefficients share a factor); classes compose for "
            "primitive forms only"
        )


def compose_forms(F: Form, G: Form, method: str = "dirichlet") -> FormComposition:
    """A reduced form of the class ``[F]·[G]`` (and the composite before reduction, by ``"dirichlet"``).

    >>> c = compose_forms(Form(3, 7, -2), Form(3, 7, -2))   # D = 73
    >>> c.composite, c.reduced.discriminant, c.reduced.is_reduced()
    (Form(9, 1, -2), 73, True)
    >>> compose_forms(Form(2, 1, 3), Form(2, -1, 3), method="nucomp").reduced
    Form(1, 1, 6)
    """
    check_method(method, COMPOSITION_METHODS)
    for H in (F, G):
        _require_primitive(H)
    if G.discriminant != F.discriminant:
        raise DomainError(
            f"forms of different discriminants {F.discriminant} and {G.discriminant} do not compose"
        )
    reduction = _REDUCTION[F.is_definite]
    if method == "nucomp":
        return FormComposition(
            F,
            G,
            None,
            F.nucomp(G),
            f"NUCOMP (Jacobson–van der Poorten), then {reduction}",
            UNCONDITIONAL,
        )
    composite = F.compose(G, reduce=False)
    return FormComposition(
        F,
        G,
        composite,
        composite.reduced(),
        f"Dirichlet composition (united forms, Cohen Alg. 5.4.7), then {reduction}",
        UNCONDITIONAL,
    )


def form_power(F: Form, k: int) -> FormPower:
    """A reduced form of the class ``[F]^k`` (``k`` of either sign; ``k = 0`` gives the principal form).

    >>> form_power(Form(3, 7, -2), -1).reduced.discriminant, form_power(Form(2, 1, 3), -1).reduced
    (73, Form(2, -1, 3))
    """
    k = as_integer(k, "the exponent")
    _require_primitive(F)
    digits = decimal_digits(F.discriminant)
    if k.bit_length() * digits * digits > MAX_POWER_WORK:
        raise TooLargeError(
            f"a power with a {k.bit_length():,}-bit exponent of a form of discriminant with "
            f"{digits:,} digits is beyond this command's budget (bits × digits² ≤ "
            f"{MAX_POWER_WORK:.0e}); reduce the exponent modulo the order of the class first"
        )
    reduction = _REDUCTION[F.is_definite]
    return FormPower(
        F,
        k,
        F.power(k),
        f"binary powering by Dirichlet composition, {reduction} after each product",
        UNCONDITIONAL,
    )
