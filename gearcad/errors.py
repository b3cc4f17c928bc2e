"""The one error family of gearcad.

Every fault a user can cause is a :class:`GearcadError`.  The command line
turns it into a single line on stderr and exit code 2.  Subclasses also derive
from the matching built-in exception (as ezdxf's ``DXFValueError`` does), so
library callers may catch either.
"""

from __future__ import annotations

__all__ = [
    "GearcadError",
    "InputError",
    "ProfileError",
    "GeometryError",
    "ExportError",
    "ToleranceError",
]


class GearcadError(Exception):
    """Root of every error gearcad raises on purpose."""


class InputError(GearcadError, ValueError):
    """A value given by the user is outside what is allowed.

    The message names the value and what is allowed.
    """


class ProfileError(GearcadError, ValueError):
    """A profile file (tooth system, fabrication, material) is missing or invalid.

    The message names the file and the key.
    """


class GeometryError(GearcadError, ValueError):
    """The requested gear cannot exist (pointed teeth, negative root, ...)."""


class ExportError(GearcadError, OSError):
    """A file could not be written."""


class ToleranceError(GearcadError, ValueError):
    """Nothing the limits allow meets the tolerance asked for (or the target lies beyond their reach).

    Not a fault of the input: the command line prints the message (the best
    found and what would reach the target) and exits with code 1, building
    nothing.  ``best_error`` is the best relative error found (None if none).
    """

    def __init__(self, message: str, best_error: float | None = None) -> None:
        super().__init__(message)
        self.best_error = best_error
