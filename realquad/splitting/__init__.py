"""How primes decompose in a quadratic order (real or imaginary), and which class their prime ideals lie in.

:func:`decompose_prime` answers for one prime, :func:`split_primes` for every
prime up to a bound (:mod:`realquad.splitting.decomposition`). This problem sits
above the class groups: it locates prime ideals in the group that
:func:`realquad.classgroup.class_group` returns.

>>> [s.kind for s in split_primes(5, 11)]
['inert', 'inert', 'ramified', 'inert', 'split']
>>> [s.p for s in split_primes(-4, 30) if s.represented_by_principal]   # p = x² + y² (Fermat)
[2, 5, 13, 17, 29]
"""

from __future__ import annotations

from realquad.splitting.decomposition import PrimeDecomposition, decompose_prime, split_primes

__all__ = ["PrimeDecomposition", "decompose_prime", "split_primes"]
