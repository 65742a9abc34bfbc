"""One error hierarchy for the whole package.

Every error a user can cause by what they type or give us derives from
:class:`MembraneError`; the command line turns it into a one-line message and
exit code 2. The classes also subclass the builtin they resemble, so library
users may catch ``ValueError`` if they prefer.
"""

from __future__ import annotations


class MembraneError(Exception):
    """Base class of every error membrane raises on purpose."""


class InputError(MembraneError, ValueError):
    """A value given by the user is malformed, of the wrong kind, or out of range.

    Parameters
    ----------
    key : str
        Where the value came from: a drum-file key (``head.tension``) or an option.
    value : object
        The offending value, as given.
    allowed : str
        What would have been accepted, in words.
    """

    def __init__(self, key: str, value: object, allowed: str):
        self.key = key
        self.value = value
        self.allowed = allowed
        super().__init__(f"{key}: {allowed}" if value is None else f"{key} = {value!r}: {allowed}")


class SolverError(MembraneError, RuntimeError):
    """A numerical method did not reach its tolerance; never returned silently."""


class RecordingError(MembraneError, ValueError):
    """A recording cannot be read or analysed."""
