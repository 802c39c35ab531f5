"""Word-size hot loops: a compiled module and its pure-Python twin.

Select them through :mod:`realquad._backend`, never directly.
"""
