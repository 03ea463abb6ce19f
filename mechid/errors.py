"""Exceptions and warnings raised by mechid.

Every user-facing problem is a :class:`MechidError` whose message says what is wrong and
how to fix it; the command line turns it into a message on stderr and exit code 2.
"""


class MechidError(Exception):
    """Base class of all errors mechid raises on purpose."""


class InputDataError(MechidError, ValueError):
    """A data file cannot be read as an I-V-T series (names the file, row or column)."""


class DeviceError(MechidError, ValueError):
    """The device description is missing a value or holds an impossible one."""


class UnknownMechanismError(MechidError, KeyError):
    """A mechanism id or parameter name that the catalogue does not declare."""

    def __str__(self) -> str:  # KeyError quotes its message; we want plain text
        return str(self.args[0]) if self.args else ""


class MechidWarning(UserWarning):
    """A recoverable problem the user should know about (excluded points, short chains...)."""


class ConvergenceWarning(MechidWarning):
    """A sampler or estimator did not reach its convergence target."""
