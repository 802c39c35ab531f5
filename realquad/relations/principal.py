"""The principal ideal test of a real quadratic field from the relations of index calculus.

An ideal ``I = [a, (b + √D)/2]`` is reduced, ``L_J = μ·L_I`` (``L_I = I/a``),
and baby steps along the cycle of ``J`` (``L_{J_k} = Θ_k·L_J``, ``log Θ_k = d_k``)
look for a reduced ideal ``J_k`` whose norm ``a_k`` factors over the relation
matrix's columns: ``J_k = M·∏ P_p^{v_p}`` (``M`` the product of the primes that
enter through their conjugates, :class:`ColumnFactoring`). The quotient of the
relation lattice (certified under GRH) gives the class of ``v``:

* nonzero: ``I`` is not principal (``proof: "GRH"``);
* zero: ``v = Σ c_i r_i`` on the rows (:func:`realquad.core.lattice.lattice_solve`),
  so ``∏ P_p^{v_p} = (∏ ρ_i^{c_i})`` with the rows' generators ``ρ_i``
  (:func:`~realquad.relations.system.row_generator`), and
  ``L_J = γ·O`` with ``log|γ| = −d_k + log(M/a_k) + Σ c_i log|ρ_i|``, taken modulo
  ``R`` (the regulator, as the unit's exponents on the same generators) in
  fixed point with a proven error. A doubling walk with precise distances to
  that distance on the principal cycle meets ``J`` and returns ``γ`` exactly
  (:func:`~realquad.infrastructure.distances.exact_ideal_at`), in compact form;
  the generator ``ν = a·μ^{−1}·γ`` of ``I`` has its norm ``±a`` checked exactly,
  so a principal answer holds unconditionally.

When the cycle of ``J`` closes before a smooth norm appears (a field of small
regulator), the principal cycle is walked instead: ``J`` on it is principal at
the distance found, and absent from it is not (both unconditional).

>>> from realquad.core.orders import Order
>>> from realquad.relations.system import index_calculus
>>> found = index_calculus(Order(4 * (10**12 + 39)))   # Cl ≅ Z/3 (the exact method agrees)
>>> found.quotient.invariants
[3]
>>> P = principal_ideal_relations(found, 3, -2 * 10**6)     # a prime ideal above 3
>>> P.principal, P.proof
(False, 'GRH')
>>> cube = principal_ideal_relations(found, 27, -1999976)  # its cube
>>> cube.principal, cube.generator.norm, cube.proof
(True, -27, 'unconditional')

References: J. Buchmann, "A subexponential algorithm for the determination of
class groups and regulators of algebraic number fields", Séminaire de Théorie
des Nombres, Paris 1988–89 (principal ideal testing from relations);
M. J. Jacobson Jr., *Subexponential class group computation in quadratic
orders*, PhD thesis, TU Darmstadt 1999; J. Buchmann, C. Thiel and
H. C. Williams, "Short representation of quadratic integers", Kluwer 1995
(compact representations).
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable

import gmpy2
import mpmath

from realquad.core.lattice import LatticeSolver, lattice_solve
from realquad.core.numbers import QuadraticNumber
from realquad.core.progress import Progress
from realquad.errors import DomainError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.distances import exact_ideal_at
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.principal import PrincipalityResult, check_ideal
from realquad.relations.factor_base import prime_b
from realquad.relations.regulator import fixed_logs
from realquad.relations.smooth import sign_of
from realquad.relations.system import IndexCalculus, row_generator

METHOD = (
    "index calculus: a smooth reduced ideal in the ideal's cycle, its exponent vector on the "
    "relation lattice, the generator's distance from the relations' generators, a compact "
    "generator by a doubling walk"
)

METHOD_CYCLE = "the ideal's cycle closes: searched for on the principal cycle by baby steps"

#: Baby steps along the ideal's cycle in search of a smooth norm before giving up.
MAX_STEPS = 5_000_000


class ColumnFactoring:
    """Exponent vectors, on the relation matrix's columns, of ideals whose norm factors over them.

    ``[a, (−B + √D)/2]`` (the ideal of the form ``(a, B, ·)``) with ``a``
    composed of column primes is ``M·∏ P_p^{v_p}``: ``v_p = ±e_p`` with the
    sign of :func:`~realquad.relations.smooth.sign_of`, and ``M`` the product
    of the ``p^{e_p}`` that enter as ``P̄_p^{e_p} = p^{e_p}·P_p^{−e_p}``.
    Smoothness is read from one gcd with the product of the column primes.
    """

    def __init__(self, found: IndexCalculus) -> None:
        fb = found.factor_base
        self.D = D = fb.discriminant
        self.columns = found.matrix.columns
        self.b = [fb.b[fb.index[p]] if p in fb.index else prime_b(D, p) for p in self.columns]
        self.product = gmpy2.mpz(math.prod(self.columns))

    def exponents(self, a: int, B: int) -> tuple[dict[int, int], int] | None:
        """``(v, M)`` (``v``: column index ↦ exponent) or ``None`` if ``|a|`` is not smooth."""
        a = abs(a)
        g = gmpy2.gcd(self.product % a, a)
        rest = gmpy2.mpz(a)
        while g > 1:
            rest //= g
            g = gmpy2.gcd(rest, g)
        if rest != 1:
            return None
        vector: dict[int, int] = {}
        M = 1
        for j, p in enumerate(self.columns):
            if a % p == 0:
                _, e = gmpy2.remove(a, p)
                s = sign_of(B, p, self.b[j], self.D)
                vector[j] = s * int(e)
                if s < 0:
                    M *= p ** int(e)
        return vector, M


class PrincipalTest:
    """:func:`principal_ideal_relations` on one set of relations, the lattice solver kept
    between calls (its elimination and dense core are the same for every ideal)."""

    def __init__(self, found: IndexCalculus) -> None:
        self.found = found
        self._solver: LatticeSolver | None = None

    def solver(self) -> LatticeSolver:
        if self._solver is None:
            matrix = self.found.matrix
            self._solver = LatticeSolver(matrix.rows, len(matrix.columns))
        return self._solver

    def __call__(
        self, a: int, b: int, progress: Progress | None = None, max_steps: int = MAX_STEPS
    ) -> PrincipalityResult:
        return principal_ideal_relations(self.found, a, b, progress, max_steps, self.solver)


def principal_ideal_relations(
    found: IndexCalculus,
    a: int,
    b: int,
    progress: Progress | None = None,
    max_steps: int = MAX_STEPS,
    solver: Callable[[], LatticeSolver] | None = None,
) -> PrincipalityResult:
    """Whether ``[a, (b + √D)/2]`` is principal in the real field of ``found``, with a generator.

    ``found``: the certified relations (:func:`~realquad.relations.system.index_calculus`).
    ``progress`` hears ``("baby steps", count, max_steps)`` during a long search.
    ``solver`` gives the relation lattice's :class:`~realquad.core.lattice.LatticeSolver`
    (:class:`PrincipalTest` keeps one for many ideals).
    """
    D = found.order.discriminant
    if D < 0 or found.unit is None:
        raise DomainError("the principal ideal test from relations is for real fields (D > 0)")
    check_ideal(D, a, b)
    cycle = Cycle(D)
    aJ, bJ, mu = cycle.reduce_exact(a, b)
    start = ideal = (aJ, bJ)
    factoring = ColumnFactoring(found)
    distance = 0.0
    clock = time.monotonic()
    for step in range(max_steps):
        hit = factoring.exponents(ideal[0], -ideal[1])
        if hit is not None:
            break
        following = cycle.rho(*ideal)
        distance += cycle.rho_log_float(*ideal, *following)
        ideal = following
        if ideal == start:
            return _on_principal_cycle(found, cycle, a, b, start, mu)
        if progress is not None and time.monotonic() - clock > 0.5:
            clock = time.monotonic()
            progress("baby steps", step, max_steps)
    else:
        raise TooLargeError(
            f"no reduced ideal of smooth norm within {max_steps:,} baby steps of [{a}, ({b} + √D)/2]"
        )
    vector, M = hit
    if any(found.quotient.coordinates(vector)):
        return PrincipalityResult(D, a, b, False, None, METHOD, "GRH")
    if solver is None:
        matrix = found.matrix
        c = lattice_solve(matrix.rows, len(matrix.columns), vector, quotient=found.quotient)
    else:
        c = solver().solve(vector)
    if c is None:  # pragma: no cover - the quotient said the vector is in the lattice
        raise ArithmeticError("internal check failed: a vector of the relation lattice unsolved")
    x = _distance(found, c, math.log(M) - math.log(ideal[0]) - distance)
    digits = len(str(int(found.unit.log))) + 20
    factors = exact_ideal_at(cycle, x, start, digits=digits)
    generator = CompactRepresentation.from_factors(D, factors, mu.inverse() * a, absolute_norm=a)
    return PrincipalityResult(D, a, b, True, generator, METHOD, "unconditional")


def _distance(found: IndexCalculus, c: dict[int, int], shift: float) -> mpmath.mpf:
    """``(shift + Σ c_i log|ρ_i|) mod R`` in ``[0, R)``, to within ``2⁻²⁰`` (module notes).

    Fixed point at ``bits`` bits: each logarithm is off by less than one unit,
    so the sum by ``Σ|c_i| + 1``, ``R`` by ``Σ|e_i|`` (the unit's exponents)
    and the remainder by ``Σ|c_i| + 1 + |q|·Σ|e_i|``; the precision doubles
    until that is below ``2^{bits − 20}``. ``shift`` is a binary64 value
    (``|error| < 10⁻⁶`` at the sizes met).
    """
    assert found.unit is not None
    unit = found.unit.exponents
    rows = sorted(set(c) | set(unit))
    generators = [row_generator(found, i) for i in rows]
    size_c = sum(abs(v) for v in c.values()) + 1
    size_e = sum(abs(v) for v in unit.values())
    bits = size_c.bit_length() + size_e.bit_length() + 64
    while True:
        logs = dict(zip(rows, fixed_logs(generators, bits), strict=True))
        total = sum((v * logs[i] for i, v in c.items()), gmpy2.mpz(0))
        total += gmpy2.mpz(int(mpmath.nint(mpmath.mpf(shift) * mpmath.mpf(2) ** bits)))
        R = sum((v * logs[i] for i, v in unit.items()), gmpy2.mpz(0))
        q = total // R
        error = size_c + 1 + abs(q) * size_e
        if error.bit_length() < bits - 20:
            with mpmath.workprec(bits + 64):
                return mpmath.mpf(total - q * R) / mpmath.mpf(2) ** bits
        bits *= 2  # pragma: no cover - the first precision covers the quotient's size


def _on_principal_cycle(
    found: IndexCalculus,
    cycle: Cycle,
    a: int,
    b: int,
    target: tuple[int, int],
    mu: QuadraticNumber,
) -> PrincipalityResult:
    """The whole cycle of ``J`` was walked: look for ``J`` on the principal cycle (one period)."""
    assert found.unit is not None
    D = cycle.discriminant
    R = float(found.unit.log)
    ideal, distance = cycle.principal, 0.0
    while distance <= R + 1:
        if ideal == target:
            factors = exact_ideal_at(cycle, distance, target)
            extra = mu.inverse() * a
            generator = CompactRepresentation.from_factors(D, factors, extra, absolute_norm=a)
            return PrincipalityResult(D, a, b, True, generator, METHOD_CYCLE, "unconditional")
        following = cycle.rho(*ideal)
        distance += cycle.rho_log_float(*ideal, *following)
        ideal = following
    return PrincipalityResult(D, a, b, False, None, METHOD_CYCLE, "unconditional")
