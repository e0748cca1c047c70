"""``sawplan export|import|backup|check|restore``: the log as CSV, safe copies, its health."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from sawplan.cli.options import DbOpt, ForceOpt, arg, command, opt

EXPORT_HELP = """Write the blade log as CSV files into the folder DIR.

One file per table: saws.csv, blades.csv, fittings.csv, cuts.csv,
events.csv, and the station's jobs.csv, queue.csv, remnants.csv,
saw_notes.csv, taps.csv. Blades and saws are named by tag and name, and rows
of other files by their row number, so the folder can be imported into
another log. Cells that a spreadsheet would run as a formula
start with an apostrophe. Files that exist are replaced only with --force;
new files are readable by you alone unless log_mode says otherwise.

\b
Examples:
  sawplan export log-csv
  sawplan export log-csv --force --db shop-log.sqlite
"""

IMPORT_HELP = """Read CSV files written by `sawplan export` into the blade log.

Every row is checked first; then all rows are written in one transaction, so
either everything is imported or nothing is. Errors name the file, row and
column. Blade tags already in the log are refused; a saw already in the log
with the same profile is reused.

\b
Examples:
  sawplan import old-shop-csv
  sawplan import old-shop-csv --db new-log.sqlite
"""

BACKUP_HELP = """Copy the blade log into one FILE, safely while others use it.

A log file is copied with SQLite's online backup: one consistent log file.
A PostgreSQL log is written with the server's own pg_dump when it is
installed (restore with pg_restore), otherwise as the export set (the CSV
files of `sawplan export` in one zip, read back by `sawplan restore`); the
answer says which. The copy is made beside FILE and renamed into place only
when complete. An existing FILE is replaced only with --force, and never the
log itself or its -wal and -shm files.

\b
Examples:
  sawplan backup blade-log-2024-06-30.sqlite
  sawplan backup usb/blade-log.sqlite --force
  sawplan backup shop-log-2024-06-30.dump --db postgresql://office@saw-server/sawplan
"""

CHECK_HELP = """Check the whole blade log for damage and broken records.

On a log file: SQLite's full integrity check (every page, record and index)
and its foreign keys; on every log: its own rules (a fitted blade has one open
fitting, a retired blade its date and cause, every cut an area above zero...).
Nothing is written. Exit code 0: sound; 6: damaged, with the backup to restore.

\b
Examples:
  sawplan check
  sawplan check --db shop-log.sqlite
"""

RESTORE_HELP = """Put a backup in place of the blade log.

Without FILE the newest sound automatic backup (backups/ beside the log) is
used. The backup is checked first. An existing log is replaced only with
--force, and is kept beside the restored one as NAME.replaced-TIME. Stop
other sawplan programs using the log first. A PostgreSQL log is refilled
from a log file or an export zip made by `sawplan backup`.

\b
Examples:
  sawplan restore --force
  sawplan restore usb/blade-log-2024-06-30.sqlite --force --db shop-log.sqlite
  sawplan restore shop-log.zip --db postgresql://office@saw-server/sawplan
"""


def export_command(
    csvdir: Annotated[Path, arg("folder", help="Folder to write the CSV files into.")],
    force: ForceOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.cli.progress import progress
    from sawplan.errors import NotFoundError
    from sawplan.store import connect, resolve_db
    from sawplan.store.exchange import export_csv

    where = resolve_db(db)
    if where.kind == "sqlite" and where.path is not None and not where.path.is_file():
        raise NotFoundError(f"no blade log at {where.label}", field="db", hint="give --db")
    with (
        connect(where, create=False) as database,
        progress(f"exporting the blade log to {csvdir}"),
    ):
        result = export_csv(database, csvdir, overwrite=force)
    counts = ", ".join(f"{n} {table}" for table, n in result.rows.items())
    print(f"exported to {result.folder}: {counts}")


def import_command(
    csvdir: Annotated[Path, arg("folder", help="Folder (or zip) holding the CSV files.")],
    db: DbOpt = None,
) -> None:
    from sawplan.cli.progress import progress
    from sawplan.store import connect
    from sawplan.store.exchange import import_csv

    with connect(db) as database, progress(f"importing {csvdir}"):
        result = import_csv(database, csvdir)
    counts = ", ".join(f"{n} {table}" for table, n in result.rows.items())
    print(f"imported from {result.folder}: {counts}")


def backup_command(
    file: Annotated[Path, arg("file", help="The backup file to write.")],
    force: ForceOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.cli.progress import progress
    from sawplan.store.backup import backup

    with progress(f"backing up the blade log to {file}"):
        result = backup(db, file, overwrite=force)
    print(f"backed up {result.source} to {result.backup} ({result.bytes:,} bytes): {result.what}")
    if result.note:
        print(f"  ({result.note})")


def check_command(db: DbOpt = None) -> None:
    from sawplan.errors import DamagedFileError
    from sawplan.store.health import check_log
    from sawplan.store.safety import restore_hint

    report = check_log(db)
    rows = ", ".join(f"{n:,} {table}" for table, n in report.rows.items())
    print(f"{report.log}: {'sound' if report.sound else 'DAMAGED'}")
    print(f"  checked: {'; '.join(report.checks)}")
    if rows:
        print(f"  holds: {rows} (schema {report.schema})")
    for problem in report.problems:
        print(f"  problem: {problem}")
    for warning in report.warnings:
        print(f"  warning: {warning}")
    if not report.sound:
        path = None if report.engine != "sqlite" else Path(report.log)
        raise DamagedFileError(
            f"{report.log} is damaged: {report.problems[0]}",
            field="db",
            hint=restore_hint(path),
        )


def restore_command(
    file: Annotated[
        Path | None,
        arg("file", help="The backup to restore (default: the newest sound automatic backup)."),
    ] = None,
    force: Annotated[
        bool, opt("force", help="Replace the existing log (it is kept aside).")
    ] = False,
    db: DbOpt = None,
) -> None:
    from sawplan.store.health import restore_log

    result = restore_log(db, file, force=force)
    print(f"restored {result.log} from {result.source}")
    if result.kept:
        print(f"  the log it replaced is kept as {result.kept}")


def register(app: typer.Typer) -> None:
    command(app, "export", EXPORT_HELP)(export_command)
    command(app, "import", IMPORT_HELP)(import_command)
    command(app, "backup", BACKUP_HELP)(backup_command)
    command(app, "check", CHECK_HELP)(check_command)
    command(app, "restore", RESTORE_HELP)(restore_command)
