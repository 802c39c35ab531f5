"""Invertible ideals of a quadratic order (real, or imaginary with positive definite forms) and their link with forms.

An ideal is stored as ``s·[a, (−b + √D)/2]``: a positive integer scale ``s``
times the primitive ideal with Z-basis ``a`` and ``(−b + √D)/2``, where
``a > 0`` and ``4a | b² − D``. Its norm is ``s²a``. The primitive part
corresponds to the form ``(a, b, (b² − D)/4a)``; with this orientation the
narrow class of the ideal is the proper class of the form, and the product of
ideals is the composition of forms (the gcd step of Dirichlet's composition
becomes part of the scale).

>>> P = Ideal.from_form(Form(3, 2, -26))     # a prime ideal of norm 3 in Z[√79]
>>> P, P.norm
(Ideal(316, 1, 3, 2), 3)
>>> str(P * P.conjugate())
'3·[1, √316/2]'
>>> (P * P.conjugate()).norm
9

References: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §5.2 (Theorem 5.2.9: ideals and forms); J. Buchmann and
U. Vollmer, *Binary Quadratic Forms*, Springer 2007, §6.
"""

from __future__ import annotations

from dataclasses import dataclass

from realquad._backend import call_kernel
from realquad.core.forms import Form
from realquad.core.integers import as_integer, isqrt
from realquad.core.results import JSONObject
from realquad.errors import DomainError
from realquad.latex import MAX_DIGITS, Display, brief, integer, surd
from realquad.textio import signed


@dataclass(frozen=True)
class Ideal(Display):
    """``scale·[a, (−b + √D)/2]`` in the order of discriminant ``D`` (``a > 0``, ``b`` mod ``2a``)."""

    discriminant: int
    scale: int
    a: int
    b: int

    def __post_init__(self) -> None:
        D, a, b = self.discriminant, self.a, self.b
        if self.scale <= 0 or a <= 0 or (b * b - D) % (4 * a):
            raise DomainError(
                f"[{a}, (−{b} + √{D})/2] is not an ideal of the order of discriminant {D}"
            )
        bb = b % (2 * a)
        if bb > a:
            bb -= 2 * a
        object.__setattr__(self, "b", bb)

    @classmethod
    def from_form(cls, form: Form) -> Ideal:
        """The primitive ideal of a primitive form; for ``a < 0`` a rho step first gives ``a > 0``."""
        if not form.is_primitive():
            raise DomainError(f"form {form} is not primitive")
        F = form if form.a > 0 else form.rho()[0]
        if F.a < 0:  # pragma: no cover - rho of a form with a < 0 and c < 0 needs more steps
            F = F.reduced()
            F = F if F.a > 0 else F.rho()[0]
        return cls(F.discriminant, 1, F.a, F.b)

    @classmethod
    def of_order(cls, D: int) -> Ideal:
        """The unit ideal ``[1, (−b₀ + √D)/2]`` of the order."""
        D = as_integer(D, "D")
        return cls.from_form(Form.identity(D))

    def __repr__(self) -> str:
        return (
            "Ideal(" + ", ".join(map(brief, (self.discriminant, self.scale, self.a, self.b))) + ")"
        )

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """``scale·[a, (−b + √D)/2]`` in LaTeX.

        >>> Ideal(316, 1, 3, 2).to_latex()
        '\\\\left[3, \\\\frac{-2 + \\\\sqrt{316}}{2}\\\\right]'
        """
        second = surd(-self.b, 1, 2, self.discriminant, max_digits)
        body = rf"\left[{integer(self.a, max_digits)}, {second}\right]"
        return body if self.scale == 1 else integer(self.scale, max_digits) + body

    def __str__(self) -> str:
        root = f"√{signed(self.discriminant)}"
        if self.b == 0:
            body = f"[{self.a}, {root}/2]"
        else:
            sign = "−" if self.b > 0 else ""
            body = f"[{self.a}, ({sign}{abs(self.b)} + {root})/2]"
        return body if self.scale == 1 else f"{self.scale}·{body}"

    @property
    def norm(self) -> int:
        return self.scale * self.scale * self.a

    def to_dict(self) -> JSONObject:
        """The JSON shape of ``scale·[a, (−b + √D)/2]`` (``docs/json.md``, *Ideal*).

        >>> Ideal(316, 1, 3, 2).to_dict()
        {'scale': 1, 'a': 3, 'b': 2, 'norm': 3, 'text': '[3, (−2 + √316)/2]'}
        """
        return {"scale": self.scale, "a": self.a, "b": self.b, "norm": self.norm, "text": str(self)}

    def form(self) -> Form:
        """The form ``(a, b, (b² − D)/4a)`` of the primitive part."""
        D = self.discriminant
        return Form(self.a, self.b, (self.b * self.b - D) // (4 * self.a))

    def conjugate(self) -> Ideal:
        return Ideal(self.discriminant, self.scale, self.a, -self.b)

    def __mul__(self, other: Ideal) -> Ideal:
        if other.discriminant != self.discriminant:
            raise DomainError("ideals of different orders")
        D = self.discriminant
        A, B, _ = call_kernel("form_compose", self.a, self.b, other.a, other.b, D)
        e = isqrt(self.a * other.a // A)  # a1 a2 = e² A, e the gcd step
        return Ideal(D, self.scale * other.scale * e, abs(A), B)

    def reduced(self) -> Ideal:
        """A reduced primitive ideal in the same narrow class (from the reduced form)."""
        return Ideal.from_form(self.form().reduced())
