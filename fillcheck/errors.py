"""Typed errors raised by fillcheck.

Every failure a caller can meet is one of these; no function returns ``None`` or NaN in place of
a result. :class:`InputError` and its subclasses mean the user's input was refused (the command
line exits with status 2); the others mean a computation could not be completed.
"""

from __future__ import annotations


class FillcheckError(Exception):
    """Base class of every error fillcheck raises on purpose."""


class InputError(FillcheckError, ValueError):
    """The input was refused: the message is one sentence saying what is wrong and what is right."""


class UnitError(InputError):
    """A quantity string has a missing, unknown or ambiguous unit."""


class UnknownFluidError(InputError):
    """A fluid name, formula, alias or CAS number is not in the catalog."""


class ModelUnavailableError(InputError):
    """The requested model id does not exist or is not available for this fluid."""


class StateError(FillcheckError, ValueError):
    """A requested state cannot exist (e.g. saturation above the critical temperature)."""


class ConvergenceError(FillcheckError, ArithmeticError):
    """A solver did not converge; the message names the solver and the inputs."""
