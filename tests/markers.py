"""Markers shared by the test modules."""

from __future__ import annotations

import pytest

from realquad._backend import BACKEND

#: Tests that sieve or search for seconds: on the pure-Python kernels (a hundred times slower
#: in the sieve) they count as slow and leave the quick run; compiled, they always run.
HEAVY = pytest.mark.slow if BACKEND == "python" else pytest.mark.heavy
