"""One error hierarchy for the whole program.

Every error a user can cause is a ``SawplanError``: it carries the field at
fault, what was expected, and an exit code by kind.  The CLI's single error
boundary (``sawplan.cli.boundary``) turns it into one line on stderr.
"""

from __future__ import annotations

from enum import IntEnum


class ExitCode(IntEnum):
    """Exit codes by kind of failure (documented in the README)."""

    OK = 0
    INTERNAL = 1
    USAGE = 2
    BAD_DATA = 3
    NOT_FOUND = 4
    CONFLICT = 5
    DAMAGED = 6
    STORAGE = 7
    PLAN_INCOMPLETE = 8  # not an error: the plan is printed, but stock on hand is short
    SERVER = 9


class SawplanError(Exception):
    """Base of every error a user can cause; message is one line."""

    exit_code: ExitCode = ExitCode.INTERNAL

    def __init__(self, message: str, *, field: str | None = None, hint: str | None = None):
        self.field = field
        self.hint = hint
        self.message = message
        super().__init__(self.one_line())

    def one_line(self) -> str:
        text = f"{self.field}: {self.message}" if self.field else self.message
        if self.hint:
            text = f"{text} ({self.hint})"
        return " ".join(text.split())


class UsageError(SawplanError, ValueError):
    """The command line itself is wrong: bad option value, unit, syntax."""

    exit_code = ExitCode.USAGE


class BadDataError(SawplanError, ValueError):
    """A value is well-formed but impossible (negative size, wall too thick...)."""

    exit_code = ExitCode.BAD_DATA


class NotFoundError(SawplanError, LookupError):
    """A named thing (material, saw, blade, file) does not exist."""

    exit_code = ExitCode.NOT_FOUND


class ConflictError(SawplanError):
    """The request clashes with what is recorded (blade retired, tag taken...)."""

    exit_code = ExitCode.CONFLICT


class DamagedFileError(SawplanError):
    """A file is not what it should be (corrupt database, newer schema...)."""

    exit_code = ExitCode.DAMAGED


class StorageError(SawplanError, OSError):
    """The disk refused: full, read-only, locked too long."""

    exit_code = ExitCode.STORAGE


class ServerError(SawplanError):
    """The database server cannot be reached, or refuses the login."""

    exit_code = ExitCode.SERVER
