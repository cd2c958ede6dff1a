"""Exceptions raised by the casedepth library.

Every input problem is an :class:`InputError` that names the field and the allowed
range, so the command line and the window can show it as one plain sentence.
"""

from __future__ import annotations


class InputError(ValueError):
    """A value given by the user is outside what the models accept.

    Parameters
    ----------
    field : str
        The name of the input as the user knows it (``"temperature"``, ``"--target"``).
    message : str
        What is wrong, including the allowed range.
    """

    def __init__(self, field: str, message: str):
        super().__init__(f"{field}: {message}")
        self.field = field
        self.message = message


class NotReachableError(InputError):
    """The target cannot be reached with the given furnace step (e.g. a threshold above the surface carbon)."""


class SolverError(ArithmeticError):
    """The numerical solver could not continue (a step that stays unstable however short it is)."""
