"""``sawplan backup``: one portable file holding the whole log, made while others write.

- A SQLite log is copied with SQLite's online backup: one self-contained log
  file, checked before it is renamed into place.
- A PostgreSQL log is dumped with the server's own ``pg_dump`` (custom format,
  only sawplan's tables; restore with ``pg_restore``) when it is installed and
  can talk to that server; otherwise, or if it fails, sawplan writes the export
  set: the five CSV files of ``sawplan export`` in one zip, which ``sawplan
  import`` and ``sawplan restore`` read back.  The answer says which it wrote.

Every copy is written beside its target as ``*.partial`` and renamed only
when complete; a partial left by a killed run is removed by the next one.
The password is handed to ``pg_dump`` in its environment, never on its
command line (which other users of the machine can see).
"""

from __future__ import annotations

import os
import shutil
import sqlite3
import subprocess
import tempfile
from dataclasses import dataclass
from pathlib import Path
from urllib.parse import urlsplit, urlunsplit

from sawplan.errors import NotFoundError, StorageError, UsageError
from sawplan.store.db import connect
from sawplan.store.location import LogLocation, resolve_db, scrub
from sawplan.store.safety import copy_verified

PG_DUMP_TIMEOUT_S = 3600
KINDS = {
    "sqlite": "a SQLite copy of the log (open it with --db FILE)",
    "pg_dump": "a pg_dump archive of sawplan's tables (custom format; restore with pg_restore)",
    "export": "the export set: the CSV files of `sawplan export` in one zip "
    "(read back with `sawplan import FILE` or `sawplan restore FILE`)",
}


@dataclass(frozen=True)
class BackupResult:
    source: str
    backup: str
    bytes: int
    kind: str  # sqlite | pg_dump | export
    note: str | None = None  # why the export set was written instead of a dump

    @property
    def what(self) -> str:
        return KINDS[self.kind]


def backup(
    db: str | os.PathLike[str] | LogLocation | None,
    dest: str | os.PathLike[str],
    *,
    overwrite: bool = False,
) -> BackupResult:
    """Write one portable backup file of the log at ``db`` into ``dest``."""
    from sawplan.outputs import Target, check_targets, run_inputs
    from sawplan.store.perms import make_folder

    location = resolve_db(db)
    target = Path(dest).expanduser()
    if location.kind == "memory":
        raise UsageError("an in-memory log cannot be backed up", field="db")
    if location.kind == "sqlite":
        assert location.path is not None
        if not location.path.exists():
            raise NotFoundError(f"no blade log at {location.path}", field="db")
    check_targets([Target(target, "backup FILE")], run_inputs(location), force=overwrite)
    make_folder(target.parent)
    if location.kind == "sqlite":
        return _sqlite_backup(location, target)
    return _server_backup(location, target)


def _sqlite_backup(location: LogLocation, target: Path) -> BackupResult:
    from sawplan.store import engine as engines

    source = location.path
    assert source is not None
    with connect(location, create=False):  # refuses files that are not a sawplan log
        pass
    try:
        size = copy_verified(source, target)
    except sqlite3.Error as err:
        if "full" in str(err).lower():  # the copy's disk, not the log's
            raise StorageError(
                f"the disk holding {target} is full; no backup was written",
                field="file",
                hint="free some space or give another place",
            ) from None
        raise engines.sqlite_error(err, source) from None
    return BackupResult(str(source), str(target), size, "sqlite")


def _server_backup(location: LogLocation, target: Path) -> BackupResult:
    with connect(location, create=False) as db:  # a sawplan log at the current schema
        schema = db.scalar("SELECT current_schema()") if db.dialect == "postgresql" else None
    note = None
    if schema is not None and shutil.which("pg_dump"):
        try:
            size = _pg_dump(location, schema, target)
            return BackupResult(location.label, str(target), size, "pg_dump")
        except StorageError as err:
            note = err.message
    else:
        note = "pg_dump is not installed" if schema is not None else None
    size = write_export_zip(location, target)
    return BackupResult(location.label, str(target), size, "export", note)


def _pg_dump(location: LogLocation, schema: str, target: Path) -> int:
    """Run pg_dump for sawplan's tables into ``target`` (via a partial file)."""
    from sawplan.outputs import staged
    from sawplan.store.perms import file_mode
    from sawplan.store.schema import ALL_TABLES, VERSION_TABLE

    url, password = _without_password(location.url or "")
    env = dict(os.environ)
    if password:
        env["PGPASSWORD"] = password
    tables = [arg for name in (*ALL_TABLES, VERSION_TABLE) for arg in ("-t", f"{schema}.{name}")]
    with staged(target, mode=file_mode()) as tmp:  # pg_dump writes into our locked partial
        command = ["pg_dump", "--format=custom", "--no-owner", f"--file={tmp}", *tables, url]
        try:
            done = subprocess.run(
                command, env=env, capture_output=True, text=True, timeout=PG_DUMP_TIMEOUT_S
            )
        except (OSError, subprocess.TimeoutExpired) as err:
            raise StorageError(f"pg_dump did not run ({err})") from None
        if done.returncode != 0:
            said = " ".join(done.stderr.split())[:160]
            raise StorageError(f"pg_dump failed: {scrub(said, location)}")
    return target.stat().st_size


def _without_password(url: str) -> tuple[str, str | None]:
    """The URL for a command line (no password, ``postgresql://``) and the password."""
    from urllib.parse import unquote

    parts = urlsplit(url)
    password = unquote(parts.password) if parts.password else None
    netloc = parts.netloc.rsplit("@", 1)
    if len(netloc) == 2:
        user = netloc[0].split(":", 1)[0]
        netloc = [f"{user}@{netloc[1]}"]
    return urlunsplit(("postgresql", netloc[0], parts.path, parts.query, "")), password


def write_export_zip(location: LogLocation, target: Path) -> int:
    """The export set (one CSV per table) as one zip, written beside and renamed."""
    import zipfile

    from sawplan.outputs import staged
    from sawplan.store.exchange import EXPORT_MEMBERS, export_csv
    from sawplan.store.perms import file_mode

    with (
        staged(target, mode=file_mode()) as tmp,
        tempfile.TemporaryDirectory(prefix="sawplan-backup-") as folder,
    ):
        with connect(location, create=False) as db:
            export_csv(db, folder)
        with zipfile.ZipFile(tmp, "w", compression=zipfile.ZIP_DEFLATED) as zf:
            for name in EXPORT_MEMBERS:
                zf.write(Path(folder) / name, arcname=name)
    return target.stat().st_size
