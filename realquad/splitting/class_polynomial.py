"""The ring class polynomial ``H_D(X) ∈ Z[X]`` of an imaginary order, from the modular j-function.

For the order ``O`` of discriminant ``D < 0`` and its ``h = h(D)`` reduced
forms ``(a, b, c)``, the numbers ``τ = (−b + √D)/(2a)`` lie in the upper half
plane and

    ``H_D(X) = ∏ (X − j(τ))``

is monic with integer coefficients, irreducible of degree ``h``; its roots
generate the ring class field ``L`` of ``O`` over ``K = Q(√D)`` (Cox,
*Primes of the Form x² + ny²*, Wiley 1989, Theorem 11.1 and Proposition
13.2). For a prime ``p ∤ D`` with ``(D/p) = 1`` the irreducible factors of
``H_D`` modulo ``p`` all have the degree of the class of a prime ideal above
``p`` in ``Cl(D)`` (the Frobenius of ``p`` in ``Gal(L/K) ≅ Cl(D)``), so
``p`` is represented by the principal form of discriminant ``D`` exactly
when ``H_D(X) ≡ 0 (mod p)`` has a root (Cox, Theorem 9.2 for ``D = −4n``,
with Theorem 9.4 for any order), provided ``p ∤ disc(H_D)``.

**Evaluation of j.** With ``q = e^{2πiτ}`` and the pentagonal series
``P(q) = ∏(1 − qⁿ) = Σ_k (−1)^k q^{k(3k−1)/2}`` (Euler),

    ``t = q·(P(q²)/P(q))^24 = Δ(2τ)/Δ(τ)``,  ``j(τ) = (256t + 1)³/t``

(Weber's ``f₂``: ``f₂(τ)^24 = 2^12·t``; Cox §12, Theorem 12.17). For a reduced
form ``|q| = e^{−π√|D|/a} ≤ e^{−π√3}``, so each series needs only
``O(√(bits))`` terms.

**Precision.** The ``q``-expansion ``j = 1/q + 744 + 196884q + …`` has
positive coefficients, so ``|j(τ) − 1/q| ≤ j(i√3/2) − e^{π√3} < 2079`` for
``Im τ ≥ √3/2``; hence ``|j(τ)| ≤ J_a = e^{π√|D|/a} + 2079``. Every
coefficient of ``∏(X − j_i)`` is bounded by ``B = ∏(1 + J_{a_i})`` (the
elementary symmetric functions of the ``|j_i|``). The product is formed with
``⌈log₂ B⌉ + 2⌈log₂(h + 1)⌉ + 64`` bits, far more than the ``h``-fold
accumulation of rounding errors needs for an absolute error below ``1/2``;
the coefficients are then rounded, and accepted only if each lay within
``2⁻³²`` of its integer and the ``j``-values of the ambiguous forms (real by
symmetry) had imaginary part within the same margin. Conjugate forms
``(a, ±b, c)`` give conjugate ``j``-values, multiplied in as one real quadratic.

>>> ring_class_polynomial(-23).coefficients             # H₋₂₃ (Cox, §13.A)
[12771880859375, -5151296875, 3491750, 1]
>>> str(ring_class_polynomial(-20))                        # Cox §13.A
'X² − 1264000X − 681472000'
>>> ring_class_polynomial(-4).coefficients, ring_class_polynomial(-3).coefficients
([-1728, 1], [0, 1])

References (theorem numbers from memory; the statements are tested by brute
force in tests/splitting): D. A. Cox, *Primes of the Form x² + ny²*, Wiley 1989, §9, §11–13;
H. Cohen, *A Course in Computational Algebraic Number Theory*, Springer 1993,
§7.6.2 (computing Hilbert class polynomials); A. Enge, "The complexity of
class polynomial computation via floating point approximations", Math. Comp.
78 (2009) 1089–1107 (the bound on the coefficients and the precision).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import gmpy2
import mpmath

from realquad.classgroup import ClassGroup, class_group
from realquad.core.forms import Form
from realquad.core.orders import Order
from realquad.core.results import JSONObject, Proof
from realquad.errors import DomainError, TooLargeError
from realquad.latex import MAX_DIGITS, Display, integer, terms
from realquad.textio import terms_text

#: Largest class number whose ring class polynomial is computed.
MAX_CLASS_NUMBER = 300

#: Bound on ``|j(τ) − 1/q|`` for ``Im τ ≥ √3/2`` (the q-expansion at ``τ = i√3/2``, rounded up).
J_TAIL_BOUND = 2079

#: Rounding margin: a computed coefficient must lie this close to its integer.
MARGIN_BITS = 32

METHOD = (
    "ring class polynomial ∏(X − j(τ)) over the reduced forms, j from Weber's f₂ by Euler's "
    "pentagonal series in mpmath, precision from the coefficient bound ∏(1 + e^{π√|D|/a} + 2079), "
    "rounded and checked"
)

_SUPERSCRIPT = str.maketrans("0123456789", "⁰¹²³⁴⁵⁶⁷⁸⁹")


@dataclass(frozen=True)
class ClassPolynomial(Display):
    """``H_D(X)``: ``coefficients[k]`` is the coefficient of ``X^k`` (``k = 0 … h``, the last is 1)."""

    discriminant: int
    coefficients: list[int]
    precision_bits: int
    bound_bits: int
    method: str
    proof: Proof

    @property
    def degree(self) -> int:
        return len(self.coefficients) - 1

    def __str__(self) -> str:
        terms = []
        for k in range(self.degree, -1, -1):
            monomial = "" if k == 0 else ("X" if k == 1 else "X" + str(k).translate(_SUPERSCRIPT))
            terms.append((self.coefficients[k], monomial))
        return terms_text(terms)

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``H_{D}(X) = X^h + …`` in LaTeX.

        >>> print(ring_class_polynomial(-23).to_latex())
        H_{-23}(X) = X^{3} + 3491750X^{2} - 5151296875X + 12771880859375
        """
        monomials = ["", "X"] + [f"X^{{{k}}}" for k in range(2, self.degree + 1)]
        pairs = [(self.coefficients[k], monomials[k]) for k in range(self.degree, -1, -1)]
        D = integer(self.discriminant, max_digits)
        return f"H_{{{D}}}(X) = {terms(pairs, max_digits)}"

    def to_dict(self) -> JSONObject:
        """The JSON shape (``docs/json.md``, *ClassPolynomial*)."""
        return {
            "discriminant": self.discriminant,
            "degree": self.degree,
            "coefficients": list(self.coefficients),
            "precision_bits": self.precision_bits,
            "bound_bits": self.bound_bits,
            "method": self.method,
            "proof": self.proof,
        }


def coefficient_bound_bits(D: int, forms: list[Form]) -> int:
    """``⌈log₂ ∏(1 + e^{π√|D|/a} + 2079)⌉`` over the forms: the bits of the largest coefficient.

    >>> coefficient_bound_bits(-23, [Form(1, 1, 6), Form(2, 1, 3), Form(2, -1, 3)])
    47
    """
    total = 0.0
    root = math.sqrt(-D)
    for F in forms:
        e = math.pi * root / F.a / math.log(2)  # log₂ e^{π√|D|/a}
        total += e + math.log2(1 + (1 + J_TAIL_BOUND) * 2.0**-e) if e < 1000 else e
    return math.ceil(total + 1e-9 * total) + 1


def j_invariant(tau: mpmath.mpc) -> mpmath.mpc:
    """``j(τ)`` for ``Im τ ≥ √3/2``, at mpmath's current precision (module notes).

    >>> from mpmath import mp, mpc, sqrt, nint
    >>> nint(j_invariant(mpc(0, 1)).real), abs(j_invariant(mpc(-0.5, sqrt(3) / 2))) < 1e-10
    (mpf('1728.0'), True)
    """
    ctx = mpmath.mp
    q = ctx.exp(2j * ctx.pi * tau)
    r = _pentagonal(q * q) / _pentagonal(q)
    r3 = r * r * r  # powers by multiplication: mpmath's ** on mpc goes through log and exp
    r6 = r3 * r3
    r12 = r6 * r6
    t = q * r12 * r12
    u = 256 * t + 1
    return u * u * u / t


def _pentagonal(q: mpmath.mpc) -> mpmath.mpc:
    """``Σ_k (−1)^k q^{k(3k−1)/2}`` over all integers ``k``, to the working precision."""
    ctx = mpmath.mp
    log2_q = float(ctx.log(abs(q), 2))  # |q| ≤ e^{−π√3} < 1
    total = ctx.mpc(1)
    # q^{k(3k−1)/2} and q^{k(3k+1)/2}: steps of q^{3k−2} and q^{3k−1} from the previous pair
    plus, minus = ctx.mpc(1), ctx.mpc(1)
    q3 = q * q * q
    step_plus, step_minus = q, q * q
    k = 1
    while -(k * (3 * k - 1) // 2) * log2_q <= ctx.prec + 16:
        plus *= step_plus
        minus *= step_minus
        total += -(plus + minus) if k % 2 else plus + minus
        step_plus *= q3
        step_minus *= q3
        k += 1
    return total


def reduced_forms(group: ClassGroup) -> list[Form]:
    """The reduced forms of an imaginary class group, one per class, principal first."""
    return [cycle[0] for cycle in group.narrow_classes()]


def _pack(f: list[gmpy2.mpz], slot: int) -> tuple[gmpy2.mpz, gmpy2.mpz]:
    """The positive and negative parts of ``f`` evaluated at ``2^slot`` (Kronecker substitution)."""
    plus, minus = gmpy2.mpz(0), gmpy2.mpz(0)
    for c in reversed(f):
        plus, minus = plus << slot, minus << slot
        if c >= 0:
            plus += c
        else:
            minus -= c
    return plus, minus


def _unpack(value: gmpy2.mpz, slot: int, count: int) -> list[gmpy2.mpz]:
    """The ``count`` non-negative coefficients of ``value`` in base ``2^slot`` (``slot`` bytes-aligned)."""
    width = slot // 8
    raw = int(value).to_bytes(width * count, "little")
    return [
        gmpy2.mpz(int.from_bytes(raw[k * width : (k + 1) * width], "little")) for k in range(count)
    ]


def _multiply(f: list[gmpy2.mpz], g: list[gmpy2.mpz], shift: int) -> list[gmpy2.mpz]:
    """The product of two fixed-point polynomials (``2^shift`` per unit), rounded back to that scale.

    One product of big integers per sign combination (Kronecker substitution):
    each coefficient of ``f⁺g⁺ + f⁻g⁻`` and of ``f⁺g⁻ + f⁻g⁺`` fits its slot.
    """
    size = max(abs(c).bit_length() for c in f) + max(abs(c).bit_length() for c in g)
    slot = 8 * ((size + (len(f) + len(g)).bit_length() + 8) // 8 + 1)
    fp, fm = _pack(f, slot)
    gp, gm = _pack(g, slot)
    count = len(f) + len(g) - 1
    positive = _unpack(fp * gp + fm * gm, slot, count)
    negative = _unpack(fp * gm + fm * gp, slot, count)
    half = gmpy2.mpz(1) << (shift - 1)
    return [(p - n + half) >> shift for p, n in zip(positive, negative, strict=True)]


def _product(factors: list[list[gmpy2.mpz]], shift: int) -> list[gmpy2.mpz]:
    """The product of many fixed-point polynomials, by a balanced tree."""
    if not factors:
        return [gmpy2.mpz(1) << shift]
    while len(factors) > 1:
        factors = [
            _multiply(factors[i], factors[i + 1], shift) if i + 1 < len(factors) else factors[i]
            for i in range(0, len(factors), 2)
        ]
    return factors[0]


def ring_class_polynomial(order: Order | int, group: ClassGroup | None = None) -> ClassPolynomial:
    """``H_D(X)`` of the imaginary order of discriminant ``D`` (exact integers; module notes).

    Refuses real orders (:class:`DomainError`) and class numbers above
    :data:`MAX_CLASS_NUMBER` (:class:`TooLargeError`).

    >>> ring_class_polynomial(-15).coefficients                 # Cox §13.A: X² + 191025X − 121287375
    [-121287375, 191025, 1]
    """
    order = Order.of(order)
    D = order.discriminant
    if D > 0:
        raise DomainError(
            f"the ring class polynomial is defined here for imaginary orders (D < 0), not D = {D}"
        )
    group = group if group is not None else class_group(order, method="exact")
    h = group.class_number
    if h > MAX_CLASS_NUMBER:
        raise TooLargeError(
            f"the ring class polynomial of discriminant {D} has degree h = {h:,}, more than "
            f"{MAX_CLASS_NUMBER} (its coefficients would have about "
            f"{int(math.pi * math.sqrt(-D) / math.log(10)):,} digits or more each)"
        )
    forms = reduced_forms(group)
    if len(forms) != h:
        raise ArithmeticError(f"internal check failed: {len(forms)} reduced forms, h = {h}")
    bound_bits = coefficient_bound_bits(D, forms)
    prec = bound_bits + 2 * math.ceil(math.log2(h + 1)) + 64
    with mpmath.workprec(prec):
        factors = _root_factors(D, forms, prec)
    coefficients = _rounded(D, _product(factors, prec), prec)
    if len(coefficients) != h + 1 or coefficients[h] != 1:
        raise ArithmeticError(f"internal check failed: H_{D} is not monic of degree {h}")
    return ClassPolynomial(D, coefficients, prec, bound_bits, METHOD, "unconditional")


def _root_factors(D: int, forms: list[Form], shift: int) -> list[list[gmpy2.mpz]]:
    """``X − j`` for the ambiguous forms, ``X² − 2 Re(j) X + |j|²`` for each conjugate pair.

    Coefficients in fixed point: ``round(c·2^shift)`` as integers.
    """
    ctx = mpmath.mp
    root = ctx.sqrt(-D)
    margin = ctx.mpf(2) ** -MARGIN_BITS
    present = {(F.a, F.b) for F in forms}
    factors = []
    for F in forms:
        if F.b < 0:
            continue  # the conjugate of (a, −b, c), taken with it
        j = j_invariant(ctx.mpc(ctx.mpf(-F.b) / (2 * F.a), root / (2 * F.a)))
        if (F.a, -F.b) in present and F.b != 0:
            factor = [j.real**2 + j.imag**2, -2 * j.real, ctx.mpf(1)]
        else:
            if abs(j.imag) > margin * (1 + abs(j)):
                raise ArithmeticError(
                    f"internal check failed: j at the ambiguous form {F} of {D} is not real"
                )
            factor = [-j.real, ctx.mpf(1)]
        factors.append([gmpy2.mpz(int(ctx.nint(ctx.ldexp(c, shift)))) for c in factor])
    return factors


def _rounded(D: int, product: list[gmpy2.mpz], shift: int) -> list[int]:
    """The nearest integers to the fixed-point coefficients, each checked to lie within the margin."""
    out = []
    unit = gmpy2.mpz(1) << shift
    slack = gmpy2.mpz(1) << (shift - MARGIN_BITS)
    for k, c in enumerate(product):
        n = (c + unit // 2) >> shift
        if abs(c - (n << shift)) > slack:
            raise ArithmeticError(
                f"internal check failed: coefficient {k} of H_{D} is not within 2^-{MARGIN_BITS} "
                "of an integer"
            )
        out.append(int(n))
    return out
