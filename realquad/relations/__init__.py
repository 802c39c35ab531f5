"""Relations among prime ideal classes, for the sub-exponential (index calculus) methods.

:mod:`~realquad.relations.factor_base` (the prime ideals of norm up to a
bound), :mod:`~realquad.relations.families` (self-initialising families of
sieve polynomials, forms ``(a, b, c)`` with ``a`` a product of factor-base
primes), :mod:`~realquad.relations.smooth` (from a smooth value of a form to
a relation), :mod:`~realquad.relations.store` (the relation file that lets
a long search resume), :mod:`~realquad.relations.collect` (choosing families,
sieving them in batches on local processes or Dask, keeping the relations).
The linear algebra that turns relations into a group is
:mod:`realquad.core.lattice`; the class group method that uses both is
:mod:`realquad.classgroup.subexp`.
"""
