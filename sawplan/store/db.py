"""Opening the blade log: where it lives, connection settings, schema checks, transactions.

The log is one SQLite file used through sqlite-utils.  Each command opens it,
does its work inside one transaction and closes it, so several terminals (or
a saw-side tablet and the office) can write at once: WAL lets readers work
beside one writer, ``BEGIN IMMEDIATE`` takes the write lock before reading
what it will change, and a 30 s busy timeout makes a second writer wait
instead of failing (with a short retry for the few cases where SQLite says
"busy" without waiting).

A file is accepted only when it is a sawplan log (``PRAGMA application_id``
says so) or an empty database; a log written by a newer sawplan (more
migrations than this one knows) is refused rather than damaged.  Before a
schema upgrade the log is checked and copied into ``backups/`` beside it
(``safety``); a damaged file is reported with the newest backup to restore.
"""

from __future__ import annotations

import contextlib
import os
import sqlite3
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

from sawplan.errors import DamagedFileError, StorageError, UsageError
from sawplan.store.schema import APPLICATION_ID, MIGRATION_NAMES, MIGRATION_SET, migrations

if TYPE_CHECKING:  # pragma: no cover
    from sqlite_utils import Database

ENV_VAR = "SAWPLAN_DB"
FILE_NAME = "blade-log.sqlite"
BUSY_TIMEOUT_S = 30.0
BUSY_RETRIES = 5  # for "busy" answers SQLite gives without waiting (lock upgrades, recovery)


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


class LightLog:
    """Just enough of sqlite-utils' ``Database`` for read-only queries.

    ``sawplan cut`` only asks the log for its saws and calibration; importing
    sqlite_utils would pull in pandas and triple its start-up.
    """

    def __init__(self, conn: sqlite3.Connection) -> None:
        self.conn = conn

    def execute(self, sql: str, params: Any = ()) -> sqlite3.Cursor:
        return self.conn.execute(sql, params)

    def query(self, sql: str, params: Any = ()) -> Iterator[dict[str, Any]]:
        cursor = self.conn.execute(sql, params)
        keys = [d[0] for d in cursor.description]
        for row in cursor:
            yield dict(zip(keys, row, strict=True))

    def close(self) -> None:
        self.conn.close()


def open_log(
    db: str | os.PathLike[str] | None = None, *, create: bool = True, light: bool = False
) -> Database:
    """Open (creating or upgrading as needed) the blade log and return a sqlite-utils Database.

    With ``create=False`` a missing file is not made: an empty in-memory log
    stands in, so read-only questions ("which saws are logged?") answer
    "none" without leaving files behind.  Opening with
    ``create=True`` (for writing) runs a routine integrity check now and then
    (``safety.ROUTINE_CHECK_ONE_IN``).  ``":memory:"`` gives a private
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
        conn = _connect_file(path)
    except sqlite3.Error as err:
        raise _damaged(err, path) from None
    try:
        if light and not create:
            app_id, version = _retry_busy(lambda: _header(conn))
            if app_id == APPLICATION_ID and version == len(MIGRATION_NAMES):
                conn.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")
                return LightLog(conn)  # type: ignore[return-value]
        return _prepare(conn, path, writing=create)
    except BaseException:
        conn.close()
        raise


@contextmanager
def connect(
    db: str | os.PathLike[str] | None = None, *, create: bool = True, light: bool = False
) -> Iterator[Database]:
    """``with connect(path) as db:`` — open the log and always close it.

    SQLite errors raised inside become sawplan errors that name the file:
    corruption a ``DamagedFileError`` with the newest backup to restore, a
    full or read-only disk a ``StorageError`` (the open transaction is rolled
    back, so nothing was written).
    """
    database = open_log(db, create=create, light=light)
    path = _path_of(database)
    try:
        yield database
    except sqlite3.DatabaseError as err:
        if isinstance(err, sqlite3.IntegrityError | sqlite3.ProgrammingError):
            raise  # a broken rule or a bug, not the file's fault
        _rollback(database.conn)
        raise _damaged(err, path, opened=True) from None
    finally:
        with contextlib.suppress(sqlite3.Error):
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
    begin_immediate(conn)
    try:
        yield db
        conn.execute("COMMIT")  # a full disk may refuse even this; then nothing is kept
    except BaseException:
        _rollback(conn)
        raise


def begin_immediate(conn: sqlite3.Connection) -> None:
    """``BEGIN IMMEDIATE``, retried briefly when SQLite answers "busy" without waiting."""
    for attempt in range(BUSY_RETRIES):
        try:
            conn.execute("BEGIN IMMEDIATE")
            return
        except sqlite3.OperationalError as err:
            if not is_busy(err) or attempt == BUSY_RETRIES - 1:
                raise
            time.sleep(0.02 * (attempt + 1))


def is_busy(err: sqlite3.Error) -> bool:
    text = str(err).lower()
    return "locked" in text or "busy" in text


def schema_version(db: Database) -> int:
    """How many migrations this log has applied (kept in ``PRAGMA user_version``)."""
    return int(db.conn.execute("PRAGMA user_version").fetchone()[0])


# --- internals -----------------------------------------------------------------


def _connect_file(path: Path) -> sqlite3.Connection:
    """The one place a log file is opened (tests wrap it to simulate a full or read-only disk)."""
    return sqlite3.connect(path, timeout=BUSY_TIMEOUT_S, isolation_level=None)


def _memory_log() -> Database:
    conn = sqlite3.connect(":memory:", isolation_level=None)
    return _prepare(conn, None, writing=False)


def _path_of(database: Database) -> Path | None:
    rows = database.conn.execute("PRAGMA database_list").fetchall()
    name = next((r[2] for r in rows if r[1] == "main"), "")
    return Path(name) if name else None


def _rollback(conn: sqlite3.Connection) -> None:
    if conn.in_transaction:
        with contextlib.suppress(sqlite3.Error):
            conn.execute("ROLLBACK")


def _prepare(conn: sqlite3.Connection, path: Path | None, *, writing: bool) -> Database:
    from sqlite_utils import Database

    from sawplan.store import safety

    where = str(path) if path is not None else "memory"
    try:
        app_id, version = _retry_busy(lambda: _header(conn))
        current = app_id == APPLICATION_ID and version == len(MIGRATION_NAMES)
        if not current:  # read-only checks first: a foreign file is left exactly as it was
            _check_identity(conn, app_id, version, where)
        db = Database(conn, execute_plugins=False, recursive_triggers=False)
        conn.execute("PRAGMA foreign_keys = ON")
        conn.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")
        if (
            path is not None and writing
        ):  # reading leaves the file as it is (a backup stays one file)
            _retry_busy(lambda: _use_wal(conn))
            if current and safety.routine_check_due():
                safety.check_integrity(conn, path)
        if not current:
            _migrate(db, where, path)
    except sqlite3.DatabaseError as err:
        raise _damaged(err, path) from None
    return db


def _retry_busy(step):
    for attempt in range(BUSY_RETRIES):
        try:
            return step()
        except sqlite3.OperationalError as err:
            if not is_busy(err) or attempt == BUSY_RETRIES - 1:
                raise
            time.sleep(0.02 * (attempt + 1))
    return None  # pragma: no cover


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


def _migrate(db: Database, where: str, path: Path | None) -> None:
    """Apply pending migrations under the write lock (two first runs may race).

    A log that already holds a schema is checked and copied into ``backups/``
    first; if that fails nothing is upgraded.
    """
    from sawplan.store import safety

    conn = db.conn
    begin_immediate(conn)
    try:
        app_id, version = _header(conn)  # re-read: another process may have done it
        if not (app_id == APPLICATION_ID and version == len(MIGRATION_NAMES)):
            _check_identity(conn, app_id, version, where)
            plan = migrations()
            applied = [m.name for m in plan.applied(db)]
            unknown = [name for name in applied if name not in MIGRATION_NAMES]
            if unknown:
                raise _newer(where, len(applied))
            if path is not None and applied:
                safety.check_integrity(conn, path)
                safety.backup_before_upgrade(path, from_version=len(applied))
            plan.apply(db)
            conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
            conn.execute(f"PRAGMA user_version = {len(MIGRATION_NAMES)}")
        conn.execute("COMMIT")
    except BaseException:
        _rollback(conn)
        raise


def _newer(where: str, version: int) -> DamagedFileError:
    return DamagedFileError(
        f"{where} was written by a newer sawplan (schema {version}, this one knows "
        f"{len(MIGRATION_NAMES)} in set {MIGRATION_SET!r})",
        field="db",
        hint="upgrade sawplan to use it; nothing was changed",
    )


def _damaged(err: sqlite3.Error, path: Path | None, *, opened: bool = False) -> Exception:
    """An SQLite error as the sawplan error a user can act on, naming the file.

    ``opened``: the file was already accepted as a sawplan log, so corruption
    can only be damage.
    """
    from sawplan.store.safety import restore_hint

    where = str(path) if path is not None else "the blade log"
    text = " ".join(str(err).split()).lower()
    if "malformed" in text and opened:
        return DamagedFileError(
            f"{where} is damaged (SQLite: {text}); nothing was written",
            field="db",
            hint=restore_hint(path),
        )
    if "not a database" in text or "malformed" in text or "encrypted" in text:
        return DamagedFileError(
            f"{where} is damaged or not a sawplan blade log ({text}); nothing was written",
            field="db",
            hint=f"check the file given to --db or SAWPLAN_DB; if it is your log, "
            f"{restore_hint(path)}",
        )
    if is_busy(err):
        return StorageError(
            f"{where} stayed busy in another program for {BUSY_TIMEOUT_S:.0f} s; "
            "nothing was written",
            field="db",
            hint="try again in a moment",
        )
    if "readonly" in text or "read-only" in text:
        return StorageError(
            f"{where} is read-only; nothing was written",
            field="db",
            hint="check the file's permissions and the disk, or give --db another file",
        )
    if "disk is full" in text or "database or disk is full" in text:
        return StorageError(
            f"the disk holding {where} is full; nothing was written",
            field="db",
            hint="free some space and try again",
        )
    if "unable to open" in text:
        return StorageError(
            f"cannot open {where} ({text})",
            field="db",
            hint="check that its folder exists and may be written",
        )
    return StorageError(f"{where}: {text}", field="db")
