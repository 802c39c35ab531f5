"""Word-size hot loops: C files by subject, each with a pure-Python twin of the same name.

``form_kernels.c`` and ``form_kernels.py``, ``cfrac_kernels.c`` and
``cfrac_kernels.py``, …: the C files are compiled into the one extension
module ``_ckernels`` (registered in ``_ckernels.c``, typed in
``_ckernels.pyi``); the twins are plain Python. Every twin function has the
same signature and the same results as its compiled counterpart; the tests
compare the two directly. The twins work for integers of any size, the
compiled kernels only below their stated word-size limits: beyond them they
raise ``OverflowError`` and :func:`realquad._backend.call_kernel` falls back
to the twin. Plain ints in, plain ints out.

Select them through :mod:`realquad._backend`, never directly.
"""
