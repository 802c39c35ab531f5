"""Binary quadratic forms ``ax² + bxy + cy²``: indefinite (``D = b² − 4ac > 0``) and positive definite (``D < 0``).

**Indefinite forms.** A form is *reduced* when ``|√D − 2|a|| < b < √D`` (tested exactly with
``⌊√D⌋``). The rho step ``ρ(a, b, c) = (c, t, (t² − D)/4c)``, with
``t ≡ −b (mod 2c)`` normalised, maps every form to a reduced one after
finitely many steps and permutes the reduced forms; its orbits on reduced
forms (the *cycles*) are exactly the proper (``SL₂(Z)``) equivalence classes.
Composition of primitive forms makes these classes the narrow class group
``Cl⁺(D)`` of the order of discriminant ``D``.

Matrices ``M = (α, β, γ, δ)`` stand for ``[[α, β], [γ, δ]]`` and act by
``(F·M)(x, y) = F(αx + βy, γx + δy)``, so ``(F·M)·N = F·(MN)``.

>>> F = Form(3, 7, -2)
>>> F.discriminant
73
>>> G, M = F.reduce()
>>> G, G.is_reduced(), F.act(M) == G
(Form(3, 7, -2), True, True)
>>> P = Form.identity(316)                   # the maximal order of Q(√79)
>>> P, len(P.cycle())
(Form(1, 16, -15), 4)
>>> Q = prime_form(316, 3)
>>> Q.power(3).equivalent(P) is None, Q.power(6).equivalent(P) is not None
(True, True)

**Positive definite forms** (``D < 0``, ``a > 0``; negative definite forms
are refused). Such a form is *reduced* when ``|b| ≤ a ≤ c``, with ``b ≥ 0``
if ``|b| = a`` or ``a = c``; each proper equivalence class holds exactly one
reduced form (Cohen, §5.3.1), so two forms are equivalent exactly when their
reduced forms agree, and the classes of primitive forms make the class group
``Cl(D)`` of the imaginary order of discriminant ``D``. Reduction (Cohen,
Alg. 5.4.2) alternates ``b ↦ b mod 2a`` (matrix ``[[1, s], [0, 1]]``) and
``(a, b, c) ↦ (c, −b, a)`` (matrix ``[[0, −1], [1, 0]]``).

>>> F = Form(3, 10, 9)                       # discriminant −8
>>> G, M = F.reduce()
>>> G, F.act(M) == G, Form.identity(-8)
(Form(1, 0, 2), True, Form(1, 0, 2))
>>> F = prime_form(-23, 2)                  # Cl(−23) ≅ Z/3
>>> F, F.power(2), F.power(3), F.power(2) == F.inverse().reduced()
(Form(2, 1, 3), Form(2, -1, 3), Form(1, 1, 6), True)

References: J. Buchmann and U. Vollmer, *Binary Quadratic Forms*, Springer
2007, ch. 6 (reduction, rho, cycles) and ch. 5 (composition); H. Cohen,
*A Course in Computational Algebraic Number Theory*, §5.4 and §5.6; M. J.
Jacobson Jr. and A. J. van der Poorten, "Computational aspects of NUCOMP",
ANTS-V, LNCS 2369 (2002) 120–133.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from math import gcd

import gmpy2

from realquad._backend import call_kernel
from realquad.core.integers import as_integer, is_square, isqrt
from realquad.core.linalg import IDENTITY_MATRIX, Matrix, matrix_inverse, matrix_multiply
from realquad.core.results import JSONObject
from realquad.errors import DomainError, InputError, TooLargeError
from realquad.latex import MAX_DIGITS, Display, brief
from realquad.latex import form as form_latex


@dataclass(frozen=True, slots=True)
class Form(Display):
    """The form ``ax² + bxy + cy²``: ``b² − 4ac > 0`` not a square, or ``b² − 4ac < 0`` and ``a > 0``."""

    a: int
    b: int
    c: int

    def __post_init__(self) -> None:
        for name in ("a", "b", "c"):
            value = getattr(self, name)
            if not isinstance(value, int) or isinstance(value, bool):
                object.__setattr__(self, name, as_integer(value, name))
        D = self.b * self.b - 4 * self.a * self.c
        if D == 0:
            raise DomainError(f"form ({self.a}, {self.b}, {self.c}) has discriminant 0")
        if D < 0 and self.a < 0:
            raise DomainError(
                f"form ({self.a}, {self.b}, {self.c}) of discriminant {D} is negative definite; "
                f"only positive definite forms are handled (use ({-self.a}, {-self.b}, {-self.c}))"
            )
        if D > 0 and is_square(D):
            raise DomainError(f"form ({self.a}, {self.b}, {self.c}) has square discriminant {D}")

    @classmethod
    def _raw(cls, a: int, b: int, c: int) -> Form:
        """A form known to be valid, without re-checking the discriminant."""
        f = object.__new__(cls)
        object.__setattr__(f, "a", a)
        object.__setattr__(f, "b", b)
        object.__setattr__(f, "c", c)
        return f

    @classmethod
    def from_ab(cls, a: int, b: int, D: int) -> Form:
        """The form ``(a, b, (b² − D)/4a)``; ``4a`` must divide ``b² − D``.

        >>> Form.from_ab(3, 7, 73)
        Form(3, 7, -2)
        """
        a, b, D = as_integer(a, "a"), as_integer(b, "b"), as_integer(D, "D")
        if a == 0 or (b * b - D) % (4 * a):
            raise InputError(f"no form (a, b, c) = ({a}, {b}, ·) of discriminant {D}")
        return cls(a, b, (b * b - D) // (4 * a))

    @classmethod
    def identity(cls, D: int) -> Form:
        """The reduced principal form ``(1, b, (b² − D)/4)``.

        For ``D > 0``, ``b < √D`` is the largest with ``b ≡ D (mod 2)``; for
        ``D < 0``, ``b = D mod 2``.

        >>> Form.identity(12), Form.identity(13), Form.identity(-20), Form.identity(-23)
        (Form(1, 2, -2), Form(1, 3, -1), Form(1, 0, 5), Form(1, 1, 6))
        """
        D = as_integer(D, "D")
        if D % 4 not in (0, 1) or (D >= 0 and is_square(D)):
            raise DomainError(f"{D} is not the discriminant of a quadratic order")
        if D < 0:
            b0 = D % 2
            return cls._raw(1, b0, (b0 - D) // 4)
        r = isqrt(D)
        b = r if (r - D) % 2 == 0 else r - 1
        return cls._raw(1, b, (b * b - D) // 4)

    def __repr__(self) -> str:
        return "Form(" + ", ".join(map(brief, (self.a, self.b, self.c))) + ")"

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """``ax² + bxy + cy²`` in LaTeX.

        >>> Form(3, 7, -2).to_latex()
        '3x^{2} + 7xy - 2y^{2}'
        """
        return form_latex(self.a, self.b, self.c, max_digits)

    def to_dict(self) -> JSONObject:
        """The JSON shape of ``ax² + bxy + cy²`` (``docs/json.md``, *Form*).

        >>> Form(3, 7, -2).to_dict()
        {'a': 3, 'b': 7, 'c': -2}
        """
        return {"a": self.a, "b": self.b, "c": self.c}

    def __str__(self) -> str:
        return f"({self.a}, {self.b}, {self.c})"

    @property
    def discriminant(self) -> int:
        return self.b * self.b - 4 * self.a * self.c

    @property
    def is_definite(self) -> bool:
        """Whether the form is (positive) definite, ``D < 0``."""
        return self.discriminant < 0

    def is_primitive(self) -> bool:
        return gcd(gcd(self.a, self.b), self.c) == 1

    def is_reduced(self) -> bool:
        """``|√D − 2|a|| < b < √D`` exactly (``D > 0``); ``|b| ≤ a ≤ c``, ``b ≥ 0`` at the edges (``D < 0``).

        >>> Form(1, 16, -15).is_reduced(), Form(1, 0, -79).is_reduced()
        (True, False)
        >>> Form(2, 2, 3).is_reduced(), Form(2, -2, 3).is_reduced(), Form(3, -2, 3).is_reduced()
        (True, False, False)
        """
        if self.is_definite:
            a, b, c = self.a, self.b, self.c
            return abs(b) <= a <= c and (b >= 0 or (-b != a and a != c))
        return call_kernel("form_is_reduced", self.a, self.b, isqrt(self.discriminant))

    def value(self, x: int, y: int) -> int:
        """``F(x, y)``."""
        return self.a * x * x + self.b * x * y + self.c * y * y

    def act(self, M: Matrix) -> Form:
        """``F·M``: the form ``(x, y) ↦ F(αx + βy, γx + δy)``."""
        al, be, ga, de = M
        a, b, c = self.a, self.b, self.c
        return Form(
            a * al * al + b * al * ga + c * ga * ga,
            2 * a * al * be + b * (al * de + be * ga) + 2 * c * ga * de,
            a * be * be + b * be * de + c * de * de,
        )

    def _require_indefinite(self, what: str) -> int:
        D = self.discriminant
        if D < 0:
            raise DomainError(f"{what} is defined for indefinite forms only, not for {self}")
        return D

    def rho(self) -> tuple[Form, Matrix]:
        """One rho step and its matrix ``[[0, −1], [1, s]]`` (``F·M = ρ(F)``); indefinite forms only.

        >>> Form(1, 16, -15).rho()
        (Form(-15, 14, 2), (0, -1, 1, -1))
        """
        D = self._require_indefinite("the rho step")
        t = call_kernel("form_rho_b", self.b, self.c, isqrt(D))
        s = (t + self.b) // (2 * self.c)
        return Form._raw(self.c, t, (t * t - D) // (4 * self.c)), (0, -1, 1, s)

    def reduce(self) -> tuple[Form, Matrix]:
        """A reduced form ``G`` properly equivalent to ``F`` and ``M ∈ SL₂(Z)`` with ``F·M = G``.

        >>> Form(1, 1, -18).reduce()
        (Form(1, 7, -6), (-1, -3, 0, -1))
        >>> Form(6, 5, 2).reduce()                   # definite: (2, −5, 6) → (2, −1, 3)
        (Form(2, -1, 3), (0, -1, 1, 1))
        """
        D = self.discriminant
        if D < 0:
            (a, b, c), M = definite_reduce_with_matrix(self.a, self.b, self.c)
            return Form._raw(a, b, c), M
        r = isqrt(D)
        a, b, c = self.a, self.b, self.c
        al, be, ga, de = IDENTITY_MATRIX
        while not call_kernel("form_is_reduced", a, b, r):
            t = call_kernel("form_rho_b", b, c, r)
            s = (t + b) // (2 * c)
            a, b, c = c, t, (t * t - D) // (4 * c)
            al, be, ga, de = be, be * s - al, de, de * s - ga
        return Form._raw(a, b, c), (al, be, ga, de)

    def reduced(self) -> Form:
        """The reduced form reached by rho steps, or the reduced form of a definite class (no matrix)."""
        D = self.discriminant
        if D < 0:
            return Form._raw(*call_kernel("definite_reduce", self.a, self.b, self.c))
        return Form._raw(*call_kernel("form_reduce", self.a, self.b, self.c, D, isqrt(D)))

    def cycle(self, max_length: int = 10_000_000) -> list[Form]:
        """The rho cycle of the reduced form reached from ``F`` (it starts there).

        Its length is even: rho changes the sign of ``a`` on reduced forms.
        A definite class has one reduced form: its "cycle" is that form alone.

        >>> Form.identity(13).cycle(), Form(3, 4, 2).cycle()
        ([Form(1, 3, -1), Form(-1, 3, 1)], [Form(1, 0, 2)])
        """
        D = self.discriminant
        if D < 0:
            return [self.reduced()]
        r = isqrt(D)
        a, b, c = call_kernel("form_reduce", self.a, self.b, self.c, D, r)
        walk = call_kernel("form_cycle", a, b, c, D, r, max_length)
        if walk is None:
            raise TooLargeError(f"the cycle of {self} is longer than {max_length:,} forms")
        return [Form._raw(x, y, (y * y - D) // (4 * x)) for x, y in walk]

    def inverse(self) -> Form:
        """``(a, −b, c)``, the inverse class under composition."""
        return Form._raw(self.a, -self.b, self.c)

    def negative(self) -> Form:
        """``(−a, b, −c)``: the class of ``F`` times the class of ``(−1, b₀, c₀)`` (indefinite only)."""
        self._require_indefinite("the negative form")
        return Form._raw(-self.a, self.b, -self.c)

    def _check_same(self, other: Form) -> int:
        D = self.discriminant
        if other.discriminant != D:
            raise DomainError(f"forms of different discriminants {D} and {other.discriminant}")
        if not (self.is_primitive() and other.is_primitive()):
            raise DomainError("composition is defined here for primitive forms only")
        return D

    def compose(self, other: Form, reduce: bool = True) -> Form:
        """The Dirichlet composite of two primitive forms (reduced unless ``reduce=False``).

        >>> Form(3, 7, -2).compose(Form(3, 7, -2), reduce=False)
        Form(9, 1, -2)
        """
        D = self._check_same(other)
        if D < 0 and reduce:
            return Form._raw(
                *call_kernel("definite_compose_reduce", self.a, self.b, other.a, other.b, D)
            )
        A, B, C = call_kernel("form_compose", self.a, self.b, other.a, other.b, D)
        F = Form._raw(A, B, C)
        return F.reduced() if reduce else F

    def nucomp(self, other: Form) -> Form:
        """The composite by NUCOMP: the same class as :meth:`compose`, intermediates near ``D^{1/4}``.

        The result is almost reduced; it is then reduced (rho steps, or
        definite reduction for ``D < 0``).

        >>> F = prime_form(229, 3)
        >>> F.nucomp(F).equivalent(F.compose(F)) is not None
        True
        >>> G = prime_form(-10**6 - 7, 61)
        >>> G.nucomp(G) == G.compose(G)
        True
        """
        D = self._check_same(other)
        if D < 0:
            A, B, C = _nucomp(self.a, self.b, self.c, other.a, other.b, other.c, D)
            return Form(A, B, C).reduced()
        f1 = self if self.a > 0 else self.reduced()
        if f1.a < 0:
            f1 = f1.rho()[0]
        f2 = other if other.a > 0 else other.reduced()
        if f2.a < 0:
            f2 = f2.rho()[0]
        A, B, C = _nucomp(f1.a, f1.b, f1.c, f2.a, f2.b, f2.c, D)
        return Form._raw(A, B, C).reduced()

    def power(self, k: int) -> Form:
        """The reduced form of the class ``[F]^k`` (``k`` may be negative).

        >>> Form(3, 7, -2).power(0), Form(3, 2, 7).power(-1)
        (Form(1, 7, -6), Form(3, -2, 7))
        """
        k = as_integer(k, "k")
        D = self.discriminant
        base = self.inverse() if k < 0 else self
        k = abs(k)
        result = Form.identity(D)
        base = base.reduced()
        while k:
            if k & 1:
                result = result.compose(base)
            k >>= 1
            if k:
                base = base.compose(base)
        return result

    def equivalent(self, other: Form, max_length: int = 10_000_000) -> Matrix | None:
        """``M ∈ SL₂(Z)`` with ``F·M = G`` if ``F`` and ``G`` are properly equivalent, else ``None``.

        >>> F, G = Form(3, 7, -2), Form(-2, 5, 6)
        >>> M = F.equivalent(G)
        >>> F.act(M) == G
        True
        >>> H, K = Form(6, 5, 2), Form(4, 5, 3)        # definite, discriminant −23
        >>> H.act(H.equivalent(K)) == K, Form(2, 1, 3).equivalent(K)
        (True, None)
        """
        if other.discriminant != self.discriminant:
            return None
        F1, M1 = self.reduce()
        G1, M2 = other.reduce()
        if self.is_definite:
            if F1 != G1:
                return None
            return matrix_multiply(M1, matrix_inverse(M2))
        for current, N in F1.cycle_matrices(max_length):
            if current == G1:
                return matrix_multiply(matrix_multiply(M1, N), matrix_inverse(M2))
        return None

    def cycle_matrices(self, max_length: int = 10_000_000) -> Iterator[tuple[Form, Matrix]]:
        """The rho cycle from this reduced form, each ``G`` with ``N``, ``F·N = G``, once round.

        The matrices grow like the fundamental unit along the cycle, so
        callers take only as many as they need.

        >>> [(str(G), N) for G, N in Form.identity(13).cycle_matrices()]
        [('(1, 3, -1)', (1, 0, 0, 1)), ('(-1, 3, 1)', (0, -1, 1, -3))]
        """
        self._require_indefinite("the rho cycle with matrices")
        current, N = self, IDENTITY_MATRIX
        for _ in range(max_length):
            yield current, N
            current, R = current.rho()
            N = matrix_multiply(N, R)
            if current == self:
                return
        raise TooLargeError(
            f"the cycle of discriminant {self.discriminant} is longer than {max_length:,} forms"
        )


def _nucomp(a1: int, b1: int, c1: int, a2: int, b2: int, c2: int, D: int) -> tuple[int, int, int]:
    """NUCOMP for ``a1, a2 > 0``: composition with a partial Euclidean reduction.

    Follows Jacobson–van der Poorten (2002), written there for either sign of
    ``D`` (the bound is ``|D|^{1/4}``): the gcd steps of Dirichlet
    composition, then a partial extended Euclid on ``(a1/G, ·)`` stopped at
    ``L ≈ D^{1/4}``, and the composite read off from the partial quotients.
    """
    if a1 < a2:
        a1, b1, c1, a2, b2, c2 = a2, b2, c2, a1, b1, c1
    s = (b1 + b2) // 2
    m = b2 - s
    F, b, c = call_kernel("extended_gcd", a2, a1)  # F = b a2 + c a1
    if s % F == 0:
        G = F
        Bx = m * b
        By = a1 // G
        Cy = a2 // G
        Dy = s // G
    else:
        G, x, y = call_kernel("extended_gcd", F, s)  # G = x F + y s
        H = F // G
        By = a1 // G
        Cy = a2 // G
        Dy = s // G
        ell = (y * (b * (c1 % H) + c * (c2 % H))) % H
        Bx = b * (m // H) + ell * (By // H)
    L = isqrt(isqrt(abs(D)))
    bx = Bx % By
    by = By
    x, y, z = 1, 0, 0
    while abs(by) > L and bx != 0:
        q, t = divmod(by, bx)
        by, bx = bx, t
        t = y - q * x
        y, x = x, t
        z += 1
    if z % 2 == 1:
        by, y = -by, -y
    ax, ay = G * x, G * y
    if z == 0:
        Q1 = Cy * bx
        cx = (Q1 - m) // By
        dx = (bx * Dy - c2) // By
        A = by * Cy
        C = bx * cx - G * dx
        B = b2 - 2 * Q1
    else:
        cx = (Cy * bx - m * x) // By
        Q1 = by * cx
        Q2 = Q1 + m
        dx = (Dy * bx - c2 * x) // By
        Q3 = y * dx
        Q4 = Q3 + Dy
        dy = Q4 // x
        cy = Q2 // bx if bx != 0 else (cx * dy - c1) // dx
        A = by * cy - ay * dy
        C = bx * cx - ax * dx
        B = G * (Q3 + Q4) - Q1 - Q2
    return A, B, C


def prime_form(D: int, p: int) -> Form | None:
    """A primitive form ``(p, b, c)`` of discriminant ``D`` (``0 ≤ b ≤ p``), or ``None``.

    Exists exactly when ``(D/p) ≠ −1`` and ``p`` does not divide the conductor
    (for ``p`` prime). The other one, when ``p`` splits, is its inverse.
    For ``D < 0`` it is positive definite (not necessarily reduced).

    >>> prime_form(316, 3), prime_form(316, 5), prime_form(12, 2)
    (Form(3, 2, -26), Form(5, 4, -15), Form(2, 2, -1))
    >>> prime_form(-20, 3), prime_form(-20, 2), prime_form(-20, 7), prime_form(-12, 2)
    (Form(3, 2, 2), Form(2, 2, 3), Form(7, 6, 2), None)
    """
    if p < 2 or not gmpy2.is_prime(p):
        raise InputError(f"prime_form needs a prime, got {p}")
    found = prime_form_coefficients(D, p)
    return None if found is None else Form._raw(*found)


def definite_reduce_with_matrix(a: int, b: int, c: int) -> tuple[tuple[int, int, int], Matrix]:
    """The reduced form of a positive definite ``F = (a, b, c)`` and ``M ∈ SL₂(Z)`` with ``F·M`` it.

    The steps of the ``definite_reduce`` kernel, with the matrix: ``b`` into
    ``(−a, a]`` by ``[[1, s], [0, 1]]``, ``(a, b, c) → (c, −b, a)`` by
    ``[[0, −1], [1, 0]]`` (Cohen, Alg. 5.4.2).

    >>> definite_reduce_with_matrix(3, 10, 9)
    ((1, 0, 2), (-2, 1, 1, -1))
    """
    D = b * b - 4 * a * c
    al, be, ga, de = IDENTITY_MATRIX
    while True:
        if b <= -a or b > a:
            q, r = divmod(b, 2 * a)
            if r > a:
                r, q = r - 2 * a, q + 1
            # (a, b, c)·[[1, −q], [0, 1]] = (a, b − 2aq, ·)
            be, de = be - q * al, de - q * ga
            b = r
            c = (b * b - D) // (4 * a)
        if a > c or (b < 0 and a == c):
            a, b, c = c, -b, a
            al, be, ga, de = be, -al, de, -ga
            continue
        return (a, b, c), (al, be, ga, de)


def prime_form_coefficients(D: int, p: int) -> tuple[int, int, int] | None:
    """:func:`prime_form` as a plain triple, for a ``p`` known to be prime (no checks)."""
    b = call_kernel("prime_form_b", D, p)
    return None if b < 0 else (p, b, (b * b - D) // (4 * p))
