"""How primes decompose in a quadratic order (real or imaginary), and which class their prime ideals lie in.

:func:`decompose_prime` answers for one prime, :func:`split_primes` for every
prime up to a bound (:mod:`realquad.splitting.decomposition`);
:func:`represents_prime`, :func:`form_primes` and :func:`representation_criterion`
say which primes a given form represents (:mod:`realquad.splitting.representation`),
with the ring class polynomial :func:`ring_class_polynomial`
(:mod:`realquad.splitting.class_polynomial`) for imaginary orders. This problem sits
above the class groups: it locates prime ideals in the group that
:func:`realquad.classgroup.class_group` returns.

>>> [s.kind for s in split_primes(5, 11)]
['inert', 'inert', 'ramified', 'inert', 'split']
>>> [s.p for s in split_primes(-4, 30) if s.represented_by_principal]   # p = x² + y² (Fermat)
[2, 5, 13, 17, 29]
>>> from realquad.core.forms import Form
>>> [r.p for r in form_primes(Form(1, 0, 5), 50).primes if r.represented]   # x² + 5y²
[5, 29, 41]
"""

from __future__ import annotations

from realquad.splitting.class_polynomial import ClassPolynomial, ring_class_polynomial
from realquad.splitting.decomposition import PrimeDecomposition, decompose_prime, split_primes
from realquad.splitting.representation import (
    FormPrimes,
    PrimeRepresentation,
    RepresentationCriterion,
    form_primes,
    representation_criterion,
    represents_prime,
)

__all__ = [
    "ClassPolynomial",
    "FormPrimes",
    "PrimeDecomposition",
    "PrimeRepresentation",
    "RepresentationCriterion",
    "decompose_prime",
    "form_primes",
    "representation_criterion",
    "represents_prime",
    "ring_class_polynomial",
    "split_primes",
]
