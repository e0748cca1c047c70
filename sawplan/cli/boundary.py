"""The one error boundary: every failure becomes one line and a named exit code.

Whatever goes wrong below the CLI — a typo, a damaged file, a full disk, a
second program holding the log, a bug — the user sees exactly one line on
stderr that says what went wrong and what to type instead, and the exit code
of its kind (DEVELOPERS.md): 2 usage, 3 bad data, 4 not found, 5 conflict,
6 damaged file, 7 storage, 1 a bug, 130 stopped.

``--debug`` (anywhere on the command line, or SAWPLAN_DEBUG=1) re-raises so the
traceback shows.
"""

from __future__ import annotations

import errno
import os
import sqlite3
import sys
from collections.abc import Callable, Sequence
from pathlib import Path

from sawplan.errors import (
    DamagedFileError,
    ExitCode,
    NotFoundError,
    SawplanError,
    StorageError,
    UsageError,
)

STOPPED = 130  # the shell's code for a program stopped with Ctrl-C
MAX_LINE = 1000  # characters: a hard stop for a line that is still too long
_LONG_WORD = 160  # longer words (a pasted value, never a usual path) are shortened
_DEBUG_HINT = "run again with --debug and report the traceback"


def run_guarded(run: Callable[[list[str]], int | None], argv: Sequence[str]) -> int:
    """Run the CLI on ``argv``; turn any exception into one stderr line and an exit code.

    A closed pipe (``sawplan materials | head -1``) ends quietly with 0, and a
    blade log that a failing command created is removed again (nothing written).
    """
    args = list(argv)
    debug = os.environ.get("SAWPLAN_DEBUG", "") not in ("", "0")
    if "--debug" in args:
        args.remove("--debug")
        debug = True
    _NEW_LOGS.clear()
    checked = sys.modules.get("sawplan.store.safety")
    if checked is not None:  # each command checks the log afresh, as a new process would
        checked._CHECKED.clear()
    code = int(ExitCode.INTERNAL)
    try:
        code = int(run(args) or 0)
        return code
    except BrokenPipeError:
        quiet_stdout()
        code = 0
        return code
    except (KeyboardInterrupt, _abort_class()):
        _say("stopped.")
        code = STOPPED
        return code
    except Exception as err:
        if debug:
            raise
        code, line = describe(err)
        _say(line)
        return code
    finally:
        if code != 0:
            _remove_new_logs()
        _NEW_LOGS.clear()


# --- a failing command leaves no new blade log behind -------------------------------------------

_NEW_LOGS: list[tuple[Path, list[Path]]] = []  # (log file, folders made for it)
_LOG_TABLES = ("saws", "blades", "fittings", "cuts", "events")


def forget_new_log_on_failure(db: str | os.PathLike[str] | None) -> None:
    """Note the blade log ``db`` names when it does not exist yet.

    Should the command then fail, the log it created (empty of rows) is removed
    with the folders made for it, so a refused write leaves nothing on disk.
    """
    if db is not None and "://" in str(db):
        return  # a database server: nothing is made on this disk
    from sawplan.store import resolve_db_path

    path = resolve_db_path(db)
    if str(db) == ":memory:" or path.exists():
        return
    made = [p for p in path.parents if not p.exists()]
    _NEW_LOGS.append((path, made))


def _remove_new_logs() -> None:
    for path, made in _NEW_LOGS:
        if path.exists() and _holds_no_rows(path):
            for suffix in ("", "-wal", "-shm", "-journal"):
                Path(f"{path}{suffix}").unlink(missing_ok=True)
        for folder in made:  # innermost first
            try:
                folder.rmdir()
            except OSError:
                break  # not empty (someone else uses it) or gone: leave it


def _holds_no_rows(path: Path) -> bool:
    """True for a new log without a single saw, blade, fitting, cut or event."""
    if path.stat().st_size == 0:
        return True
    try:
        conn = sqlite3.connect(f"{path.resolve().as_uri()}?mode=ro", uri=True)
    except sqlite3.Error:
        return False
    try:
        names = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type='table'")}
        return all(
            conn.execute(f"SELECT COUNT(*) FROM {table}").fetchone()[0] == 0  # noqa: S608
            for table in _LOG_TABLES
            if table in names
        )
    except sqlite3.Error:
        return False
    finally:
        conn.close()


def quiet_stdout() -> None:
    """Point stdout at the null device so the interpreter's last flush cannot fail."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError, AttributeError):
        pass  # not a real file (tests capture it): nothing to flush into a closed pipe


# typer's own conversion of a number option speaks in its validator's words
_CONVERSION_WORDS = (
    (
        "Input should be a valid integer, unable to parse string as an integer",
        "expected a whole number",
    ),
    ("Input should be a valid number, unable to parse string as a number", "expected a number"),
    ("Input should be a valid integer", "expected a whole number"),
    ("Input should be a valid number", "expected a number"),
    ("Value error, ", ""),
)


def plain_conversion_words(message: str) -> str:
    """The shop's words for typer's conversion errors ("expected a whole number")."""
    for theirs, ours in _CONVERSION_WORDS:
        message = message.replace(theirs, ours)
    return message


def describe(err: BaseException) -> tuple[int, str]:
    """The exit code and the one line shown for ``err`` (no traceback)."""
    from typer._click import exceptions as click_exc

    if isinstance(err, SawplanError):
        return int(err.exit_code), f"error: {one_line(err.one_line())}"
    if isinstance(err, click_exc.UsageError):
        hint = ""
        if err.ctx is not None:
            hint = f" (see `{err.ctx.command_path} --help`)"
        message = plain_conversion_words(err.format_message())
        return int(ExitCode.USAGE), f"error: {one_line(message)}{hint}"
    if isinstance(err, click_exc.ClickException):
        return int(ExitCode.USAGE), f"error: {one_line(err.format_message())}"
    if isinstance(err, sqlite3.DatabaseError):
        mapped = storage_error_from_sqlite(err)
        return int(mapped.exit_code), f"error: {one_line(mapped.one_line())}"
    if isinstance(err, OSError):
        mapped = storage_error_from_os(err)
        return int(mapped.exit_code), f"error: {one_line(mapped.one_line())}"
    if isinstance(err, UnicodeDecodeError) and _sqlite_message(err):
        from sawplan.store.engine import sqlite_words

        mapped = storage_error_from_sqlite(sqlite3.DatabaseError(sqlite_words(err)))
        return int(mapped.exit_code), f"error: {one_line(mapped.one_line())}"
    if isinstance(err, UnicodeEncodeError):
        return int(ExitCode.USAGE), (
            "error: the terminal cannot show some characters of the answer "
            "(set PYTHONIOENCODING=utf-8, or use --json)"
        )
    if isinstance(err, MemoryError):
        return int(ExitCode.STORAGE), "error: out of memory; close other programs and try again"
    text = one_line(f"{type(err).__name__}: {err}")
    return int(ExitCode.INTERNAL), f"internal error: {text} ({_DEBUG_HINT})"


def _sqlite_message(err: UnicodeDecodeError) -> bool:
    """SQLite's message about a damaged schema, which its driver could not decode."""
    from sawplan.store.engine import is_sqlite_message

    return is_sqlite_message(err)


def storage_error_from_sqlite(err: sqlite3.DatabaseError) -> SawplanError:
    """Map SQLite's messages to errors a shop user can act on."""
    text = str(err).lower()
    if "locked" in text or "busy" in text:
        return StorageError(
            "the blade log stayed busy in another program; nothing was written, "
            "try again in a moment"
        )
    if "readonly" in text or "read-only" in text:
        return StorageError(
            "the blade log is read-only; nothing was written",
            hint="check the file's permissions, or give --db another file",
        )
    if "disk is full" in text or "database or disk is full" in text:
        return StorageError(
            "the disk is full; nothing was written", hint="free some space and try again"
        )
    if "not a database" in text or "malformed" in text or "corrupt" in text:
        return DamagedFileError(
            "the blade log file is damaged or not a sawplan database",
            hint="restore the newest backup (see `sawplan backup --help`)",
        )
    if "unable to open" in text or "disk i/o" in text:
        return StorageError(
            f"the blade log cannot be read or written ({one_line(str(err))})",
            hint="check the disk and the path given to --db",
        )
    return StorageError(one_line(str(err)))


def storage_error_from_os(err: OSError) -> SawplanError:
    """Map an operating-system error to the kind of mistake it points at."""
    name = err.filename if isinstance(err.filename, str | bytes) else None
    where = short(os.fsdecode(name)) if name is not None else None
    code = err.errno
    if code in (errno.ENOSPC, getattr(errno, "EDQUOT", -1)):
        return StorageError(
            "the disk is full; nothing more was written", hint="free some space and try again"
        )
    if code == errno.EROFS:
        return StorageError(f"{where or 'the file'} is on a read-only disk")
    if code in (errno.EACCES, errno.EPERM):
        return StorageError(
            f"no permission to use {where or 'the file'}", hint="check its permissions"
        )
    if code == errno.ENOENT:
        return NotFoundError(f"no such file or folder: {where or '?'}")
    if code == errno.ENAMETOOLONG:
        return UsageError("a file name is too long for the disk", hint="give a shorter path")
    if code == errno.EISDIR:
        return UsageError(f"{where or 'the path'} is a folder; give a file name")
    if code == errno.ENOTDIR:
        return UsageError(f"part of {where or 'the path'} is a file, not a folder")
    if code == errno.EEXIST:
        return UsageError(f"{where or 'the file'} exists already")
    reason = err.strerror or str(err)
    return StorageError(f"{reason}: {where}" if where else reason)


_BLANKS = str.maketrans("\t\n\r\f\v", "     ")


def one_line(text: str) -> str:
    """White space collapsed, control characters shown escaped (``render.terminal_text``,
    so a tag or name in a message or a "did you mean" cannot drive the terminal), very
    long words shortened."""
    from sawplan.render import terminal_text

    clean = terminal_text(str(text).translate(_BLANKS))
    line = " ".join(short(word, _LONG_WORD) for word in clean.split())
    if len(line) > MAX_LINE:
        line = line[: MAX_LINE - 1] + "…"
    return line


def short(text: str, limit: int = _LONG_WORD) -> str:
    """``text`` cut to ``limit`` characters, saying how long it was."""
    if len(text) <= limit:
        return text
    return f"{text[: limit // 2]}…({len(text):,} characters)"


def _abort_class() -> type[BaseException]:
    from typer.exceptions import Abort

    return Abort


def _say(line: str) -> None:
    try:
        print(line, file=sys.stderr)
    except UnicodeEncodeError:
        print(line.encode("ascii", "backslashreplace").decode("ascii"), file=sys.stderr)
