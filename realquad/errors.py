"""The small exception hierarchy of realquad.

Every error the library raises on purpose derives from :class:`RealquadError`;
the command line turns these into one ``realquad: error: ...`` line and exit
status 2.
"""

from __future__ import annotations


class RealquadError(Exception):
    """Base class of every deliberate realquad error."""


class InputError(RealquadError, ValueError):
    """An argument is malformed: not an integer, out of range, unparsable."""


class DomainError(RealquadError, ValueError):
    """The question has no meaning for this input (e.g. a square discriminant)."""


class TooLargeError(RealquadError):
    """The chosen method cannot finish for this size in reasonable time.

    The message says how far the method reaches and which method handles the
    size instead.
    """
