"""The objects every problem shares: orders, numbers, forms, ideals, primes, linear algebra.

* :mod:`~realquad.core.integers` — exact integers from text, square roots and tests;
* :mod:`~realquad.core.orders` — :class:`~realquad.core.orders.Order` and :func:`~realquad.core.orders.field` (both signs of ``D``);
* :mod:`~realquad.core.numbers` — exact ``(x + y√d)/c``;
* :mod:`~realquad.core.forms` and :mod:`~realquad.core.ideals` — binary quadratic forms and ideals of orders;
* :mod:`~realquad.core.primes` — the one sieve, factoring, square roots modulo ``n``, Kronecker symbols;
* :mod:`~realquad.core.linalg` — 2×2 matrices, product trees, the Smith normal form;
* :mod:`~realquad.core.lattice` (with :mod:`~realquad.core.modular_linalg`) — the finite group
  ``Z^n`` modulo many sparse relations, and the integer combinations of relations that vanish;
* :mod:`~realquad.core.lfunction` — ``h·R`` from Euler products of ``L(1, χ_D)``, the GRH
  intervals and the generating bound ``4 log² |D|``;
* :mod:`~realquad.core.executors` — this process, local processes or Dask, for independent work;
* :mod:`~realquad.core.results` and :mod:`~realquad.core.progress` — what every result and every long computation share.

Nothing here imports a problem package; every problem imports from here.
"""
