"""Exceptions raised by the casedepth library.

Every problem the library reports is a :class:`CasedepthError`. An input problem is an
:class:`InputError` that names the field (the key of the parameter table, :mod:`casedepth.parameters`,
where the input is a plan's) and the allowed range, so the command line can name the flag, the
window can mark the widget and a plan file can name its key.
"""

from __future__ import annotations


#: the longest message an error carries: one that quotes a huge value the user gave is cut in the middle of the
#: quote, keeping its start (what was wrong) and its end (the allowed range)
LONGEST_MESSAGE = 400


def brief(message: str) -> str:
    """``message`` cut to :data:`LONGEST_MESSAGE` characters, the middle replaced by an ellipsis."""
    if len(message) <= LONGEST_MESSAGE:
        return message
    head = LONGEST_MESSAGE * 2 // 3
    tail = LONGEST_MESSAGE - head - 3
    return f"{message[:head]} … {message[-tail:]}"


class CasedepthError(Exception):
    """Base of every error the library raises on purpose."""


class InputError(CasedepthError, ValueError):
    """A value given by the user is outside what the models accept.

    Parameters
    ----------
    field : str
        The input at fault: a parameter key (``"temperature"``, ``"case_max"``) or, for inputs
        that are not a plan's (a soak given to a function), the argument's name.
    message : str
        What is wrong, including the allowed range.
    """

    def __init__(self, field: str, message: str):
        message = brief(message)
        super().__init__(f"{field}: {message}")
        self.field = field
        self.message = message

    def renamed(self, field: str) -> "InputError":
        """The same error against another field (same class, same message)."""
        return type(self)(field, self.message)


class NotReachableError(InputError):
    """The target cannot be reached with the given furnace step (e.g. a threshold above the surface carbon)."""


class SolverError(CasedepthError, ArithmeticError):
    """The numerical solver could not continue (a step that stays unstable however short it is, an
    iteration that does not converge)."""
