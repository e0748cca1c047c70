"""Opening the blade log: where it lives, connection settings, schema checks, transactions.

The log is one SQLite file used through sqlite-utils.  Each command opens it,
does its work inside one transaction and closes it, so several terminals (or
a saw-side tablet and the office) can write at once: WAL lets readers work
beside one writer, ``BEGIN IMMEDIATE`` takes the write lock before reading
what it will change, and a 30 s busy timeout makes a second writer wait
instead of failing.

A file is accepted only when it is a sawplan log (``PRAGMA application_id``
says so) or an empty database; a log written by a newer sawplan (more
migrations than this one knows) is refused rather than damaged.
"""

from __future__ import annotations

import os
import sqlite3
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING

from sawplan.errors import DamagedFileError, StorageError, UsageError
from sawplan.store.schema import APPLICATION_ID, MIGRATION_NAMES, MIGRATION_SET, migrations

if TYPE_CHECKING:  # pragma: no cover
    from sqlite_utils import Database

ENV_VAR = "SAWPLAN_DB"
FILE_NAME = "blade-log.sqlite"
BUSY_TIMEOUT_S = 30.0
_RESTORE_HINT = "use --db to pick another file, or restore a backup made with `sawplan backup`"


def default_db_path() -> Path:
    """The per-user blade log: ``user_data_dir() / "blade-log.sqlite"``."""
    from sawplan.paths import user_data_dir

    return user_data_dir() / FILE_NAME


def resolve_db_path(db: str | os.PathLike[str] | None = None) -> Path:
    """``--db`` wins, then env ``SAWPLAN_DB``, then the per-user default."""
    if db is not None and str(db) != "":
        return Path(db).expanduser()
    env = os.environ.get(ENV_VAR, "")
    if env:
        return Path(env).expanduser()
    return default_db_path()


def open_log(db: str | os.PathLike[str] | None = None, *, create: bool = True) -> Database:
    """Open (creating or upgrading as needed) the blade log and return a sqlite-utils Database.

    With ``create=False`` a missing file is not made: an empty in-memory log
    stands in, so read-only questions ("which saws are logged?") answer
    "none" without leaving files behind.  ``":memory:"`` gives a private
    in-memory log (tests).
    """
    if db is not None and str(db) == ":memory:":
        return _memory_log()
    path = resolve_db_path(db)
    if path.is_dir():
        raise UsageError(f"{path} is a folder; give a file name", field="db")
    if not path.exists():
        if not create:
            return _memory_log()
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
        except OSError as err:
            raise StorageError(
                f"cannot create the folder {path.parent}: {err.strerror or err}", field="db"
            ) from None
    try:
        conn = sqlite3.connect(path, timeout=BUSY_TIMEOUT_S, isolation_level=None)
    except sqlite3.Error as err:
        raise StorageError(f"cannot open {path}: {err}", field="db") from None
    try:
        return _prepare(conn, path)
    except BaseException:
        conn.close()
        raise


@contextmanager
def connect(db: str | os.PathLike[str] | None = None, *, create: bool = True) -> Iterator[Database]:
    """``with connect(path) as db:`` — open the log and always close it."""
    database = open_log(db, create=create)
    try:
        yield database
    finally:
        database.close()


@contextmanager
def write_transaction(db: Database) -> Iterator[Database]:
    """One write transaction taken with ``BEGIN IMMEDIATE``: all of it or none.

    The write lock is taken before the first read, so checks made inside
    ("is this blade fitted?") still hold when the rows are written.  Inside,
    sqlite-utils' own ``atomic()`` blocks become savepoints.
    """
    conn = db.conn
    if conn.in_transaction:  # nested use: a savepoint inside the open transaction
        with db.atomic():
            yield db
        return
    conn.execute("BEGIN IMMEDIATE")
    try:
        yield db
    except BaseException:
        if conn.in_transaction:
            conn.execute("ROLLBACK")
        raise
    else:
        conn.execute("COMMIT")


def schema_version(db: Database) -> int:
    """How many migrations this log has applied (kept in ``PRAGMA user_version``)."""
    return int(db.conn.execute("PRAGMA user_version").fetchone()[0])


# --- internals -----------------------------------------------------------------


def _memory_log() -> Database:
    conn = sqlite3.connect(":memory:", isolation_level=None)
    return _prepare(conn, None)


def _prepare(conn: sqlite3.Connection, path: Path | None) -> Database:
    from sqlite_utils import Database

    where = str(path) if path is not None else "memory"
    try:
        app_id, version = _header(conn)
        current = app_id == APPLICATION_ID and version == len(MIGRATION_NAMES)
        if not current:  # read-only checks first: a foreign file is left exactly as it was
            _check_identity(conn, app_id, version, where)
        db = Database(conn, execute_plugins=False, recursive_triggers=False)
        conn.execute("PRAGMA foreign_keys = ON")
        conn.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")
        if path is not None:
            _use_wal(conn)
        if not current:
            _migrate(db, where)
    except sqlite3.DatabaseError as err:
        raise _damaged(err, where) from None
    return db


def _header(conn: sqlite3.Connection) -> tuple[int, int]:
    """Application id and schema version; reading them fails on a non-database file."""
    app_id = int(conn.execute("PRAGMA application_id").fetchone()[0])
    version = int(conn.execute("PRAGMA user_version").fetchone()[0])
    return app_id, version


def _use_wal(conn: sqlite3.Connection) -> None:
    mode = str(conn.execute("PRAGMA journal_mode").fetchone()[0]).lower()
    if mode != "wal":
        conn.execute("PRAGMA journal_mode = WAL")
    conn.execute(
        "PRAGMA synchronous = NORMAL"
    )  # safe in WAL; a power cut loses at most the last cut


def _check_identity(conn: sqlite3.Connection, app_id: int, version: int, where: str) -> None:
    """Refuse files that are not a sawplan log, or come from a newer sawplan."""
    if app_id == 0:
        tables = [
            r[0]
            for r in conn.execute(
                "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'"
            )
        ]
        if tables:
            raise DamagedFileError(
                f"{where} is an SQLite database but not a sawplan blade log "
                f"(it holds tables {', '.join(sorted(tables)[:5])})",
                field="db",
                hint="give --db a new file name, or the path of your blade log",
            )
    elif app_id != APPLICATION_ID:
        raise DamagedFileError(
            f"{where} belongs to another program (application id {app_id:#x})",
            field="db",
            hint="give --db a new file name, or the path of your blade log",
        )
    if version > len(MIGRATION_NAMES):
        raise _newer(where, version)


def _migrate(db: Database, where: str) -> None:
    """Apply pending migrations under the write lock (two first runs may race)."""
    conn = db.conn
    conn.execute("BEGIN IMMEDIATE")
    try:
        app_id, version = _header(conn)  # re-read: another process may have done it
        if not (app_id == APPLICATION_ID and version == len(MIGRATION_NAMES)):
            _check_identity(conn, app_id, version, where)
            plan = migrations()
            applied = [m.name for m in plan.applied(db)]
            unknown = [name for name in applied if name not in MIGRATION_NAMES]
            if unknown:
                raise _newer(where, len(applied))
            plan.apply(db)
            conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
            conn.execute(f"PRAGMA user_version = {len(MIGRATION_NAMES)}")
    except BaseException:
        if conn.in_transaction:
            conn.execute("ROLLBACK")
        raise
    conn.execute("COMMIT")


def _newer(where: str, version: int) -> DamagedFileError:
    return DamagedFileError(
        f"{where} was written by a newer sawplan (schema {version}, this one knows "
        f"{len(MIGRATION_NAMES)} in set {MIGRATION_SET!r})",
        field="db",
        hint="upgrade sawplan to use it; nothing was changed",
    )


def _damaged(err: sqlite3.DatabaseError, where: str) -> Exception:
    text = str(err).lower()
    if "not a database" in text or "malformed" in text or "encrypted" in text:
        return DamagedFileError(
            f"{where} is not a sawplan blade log or is damaged", field="db", hint=_RESTORE_HINT
        )
    if "locked" in text or "busy" in text:
        return StorageError(
            f"{where} is busy in another program; try again in a moment", field="db"
        )
    if "readonly" in text or "read-only" in text:
        return StorageError(f"{where} is read-only; check its permissions", field="db")
    return StorageError(f"{where}: {' '.join(str(err).split())}", field="db")
