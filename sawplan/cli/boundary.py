"""The one error boundary: every failure becomes one line and a named exit code.

``--debug`` (anywhere on the command line, or SAWPLAN_DEBUG=1) re-raises so the
traceback shows.
"""

from __future__ import annotations

import os
import sqlite3
import sys
from collections.abc import Callable, Sequence

from sawplan.errors import ExitCode, SawplanError, StorageError


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


def run_guarded(run: Callable[[list[str]], int | None], argv: Sequence[str]) -> int:
    """Run the CLI on ``argv``; turn any exception into one stderr line and an exit code."""
    from typer._click import exceptions as click_exc

    args = list(argv)
    debug = os.environ.get("SAWPLAN_DEBUG", "") not in ("", "0")
    if "--debug" in args:
        args.remove("--debug")
        debug = True
    try:
        code = run(args)
        return int(code or 0)
    except SawplanError as err:
        if debug:
            raise
        _say(f"error: {err.one_line()}")
        return int(err.exit_code)
    except click_exc.UsageError as err:
        if debug:
            raise
        hint = ""
        if err.ctx is not None:
            hint = f" (see `{err.ctx.command_path} --help`)"
        _say(f"error: {_one_line(err.format_message())}{hint}")
        return int(ExitCode.USAGE)
    except click_exc.ClickException as err:
        if debug:
            raise
        _say(f"error: {_one_line(err.format_message())}")
        return int(ExitCode.USAGE)
    except (KeyboardInterrupt, click_exc.Abort):
        _say("stopped.")
        return 130
    except sqlite3.DatabaseError as err:
        if debug:
            raise
        mapped = storage_error_from_sqlite(err)
        _say(f"error: {mapped.one_line()}")
        return int(mapped.exit_code)
    except OSError as err:
        if debug:
            raise
        mapped = StorageError(
            _one_line(err.strerror or str(err)), field=getattr(err, "filename", None)
        )
        _say(f"error: {mapped.one_line()}")
        return int(mapped.exit_code)
    except Exception as err:  # the last line of defence: no traceback for users
        if debug:
            raise
        _say(
            f"internal error: {type(err).__name__}: {_one_line(str(err))[:300]}"
            " (run again with --debug and report the traceback)"
        )
        return int(ExitCode.INTERNAL)


def storage_error_from_sqlite(err: sqlite3.DatabaseError) -> SawplanError:
    """Map SQLite's messages to errors a shop user can act on."""
    from sawplan.errors import DamagedFileError

    text = str(err).lower()
    if "locked" in text or "busy" in text:
        return StorageError("the blade log is busy in another program; try again in a moment")
    if "readonly" in text or "read-only" in text:
        return StorageError("the blade log is read-only; check the file's permissions or use --db")
    if "disk is full" in text or "full" in text:
        return StorageError("the disk is full; nothing was written, free some space and try again")
    if "not a database" in text or "malformed" in text or "corrupt" in text:
        return DamagedFileError(
            "the blade log file is damaged or not a sawplan database",
            hint="restore the last backup (see `sawplan backup --help`)",
        )
    return StorageError(_one_line(str(err)))


def _say(line: str) -> None:
    print(line, file=sys.stderr)
