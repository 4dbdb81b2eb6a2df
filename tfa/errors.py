"""Exceptions shared by every layer.

``InputError`` and its subclasses mean the user's input is wrong (command line exit code 2);
``ComputationError`` and its subclasses mean the question could not be answered (exit code 1).
Every message says what was wrong, where (file, line, identifier) and how to fix it.
"""

from __future__ import annotations


class TfaError(Exception):
    """Base class of all errors raised on purpose by ``tfa``."""

    exit_code = 1


class InputError(TfaError, ValueError):
    """Bad input: a file, a name, a value or an equation that cannot be used as given."""

    exit_code = 2


class ConditionsError(InputError):
    """Temperature, pH, ionic strength or pressure outside what the models support."""


class EquationSyntaxError(InputError):
    """A reaction equation that the grammar cannot read."""


class UnknownCompoundError(InputError):
    """A compound name not found; ``matches`` holds the closest known names."""

    def __init__(self, message: str, name: str = "", matches: tuple[str, ...] = ()):
        super().__init__(message)
        self.name = name
        self.matches = tuple(matches)


class UnbalancedReactionError(InputError):
    """An equation whose elements or charge do not balance."""


class NetworkFileError(InputError):
    """A malformed network, compound or environment file."""


class ComputationError(TfaError):
    """The question is well posed but could not be answered."""


class CertificateError(ComputationError):
    """A solution failed its independent check; it is never reported as a result."""


class UndeterminedError(ComputationError):
    """The solver stopped (time limit, numerical trouble) without a proven answer."""


class MissingDataError(ComputationError):
    """A reaction or compound lacks the thermodynamic data a calculation needs."""
