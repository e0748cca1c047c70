"""``sawplan export|import|backup``: the blade log as CSV files, and a safe copy of it."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from sawplan.cli.options import DbOpt, ForceOpt, arg, command

EXPORT_HELP = """Write the blade log as CSV files into the folder DIR.

One file per table: saws.csv, blades.csv, fittings.csv, cuts.csv,
events.csv. Blades and saws are named by tag and name, so the folder can be
imported into another log. Cells that a spreadsheet would run as a formula
start with an apostrophe.

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

BACKUP_HELP = """Copy the blade log into FILE, safely while others use it.

Uses SQLite's online backup: the copy is one consistent file, made beside
FILE and renamed into place only when complete.

\b
Examples:
  sawplan backup blade-log-2024-06-30.sqlite
  sawplan backup usb/blade-log.sqlite --force
"""


def export_command(
    csvdir: Annotated[Path, arg("folder", help="Folder to write the CSV files into.")],
    force: ForceOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.cli.progress import progress
    from sawplan.errors import NotFoundError
    from sawplan.store import connect, resolve_db_path
    from sawplan.store.exchange import export_csv

    if not resolve_db_path(db).is_file():
        raise NotFoundError(f"no blade log at {resolve_db_path(db)}", field="db", hint="give --db")
    with connect(db, create=False) as database, progress(f"exporting the blade log to {csvdir}"):
        result = export_csv(database, csvdir, overwrite=force)
    counts = ", ".join(f"{n} {table}" for table, n in result.rows.items())
    print(f"exported to {result.folder}: {counts}")


def import_command(
    csvdir: Annotated[Path, arg("folder", help="Folder holding the CSV files.")],
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
    from sawplan.store.exchange import backup

    with progress(f"backing up the blade log to {file}"):
        result = backup(db, file, overwrite=force)
    print(f"backed up {result.source} to {result.backup} ({result.bytes:,} bytes)")


def register(app: typer.Typer) -> None:
    command(app, "export", EXPORT_HELP)(export_command)
    command(app, "import", IMPORT_HELP)(import_command)
    command(app, "backup", BACKUP_HELP)(backup_command)
