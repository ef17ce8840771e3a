"""Exceptions that carry what the user needs to fix their input.

Every error raised for something a person typed or saved names the field
and says what was expected; the command line and the TUI show the message
as it is, never a traceback.
"""

from __future__ import annotations


class BalanceError(Exception):
    """Base of every error joulebook reports to a user."""


class InputError(BalanceError):
    """Bad input: the field it came from and what was expected.

    ``field`` is the name a user would recognise (``"P1"``,
    ``"state 'receiver'.T"``, ``"fluid.species"``).
    """

    def __init__(self, field: str, message: str):
        self.field = field
        self.message = message
        super().__init__(f"{field}: {message}" if field else message)


class TwoPhaseError(InputError):
    """A cubic model was asked for a state inside its two-phase region."""


class SpecificationError(BalanceError):
    """The worksheet is under- or over-specified (degrees of freedom)."""


class SolveError(BalanceError):
    """The solver did not converge, or the result is physically impossible."""
