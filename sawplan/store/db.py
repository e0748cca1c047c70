"""Opening the blade log on either engine, reading it, and writing it in transactions.

The log is a SQLite file (one PC) or a PostgreSQL database (a shop with
several saws, stations and an office), named by ``--db`` (``location``).
Each command opens it, does its work in transactions and closes it.  Every
store function takes the open ``Log`` and speaks the same SQL to both
engines: plain SQL text with named parameters (``:tag``) for reads, and
SQLAlchemy Core tables (``schema``) for inserts and updates; every user
value is a bound parameter.

Writes go through ``run_write`` (or the ``write_transaction`` block): on
SQLite one ``BEGIN IMMEDIATE`` transaction, on PostgreSQL one SERIALIZABLE
transaction run again when the server reports a serialization failure or a
deadlock, so no row is lost or written twice however many stations write.

A SQLite file is accepted only when it is a sawplan log (``PRAGMA
application_id``) or empty; a PostgreSQL database only when it holds a
sawplan schema or no tables.  Older logs are upgraded (``upgrade``); a log
written by a newer sawplan is refused rather than damaged.
"""

from __future__ import annotations

import contextlib
import os
import random
import sqlite3
import time
from collections.abc import Callable, Iterator, Mapping, Sequence
from contextlib import contextmanager
from functools import lru_cache
from pathlib import Path
from typing import TYPE_CHECKING, Any, TypeVar

from sawplan.errors import SawplanError, UsageError
from sawplan.store import engine as engines
from sawplan.store.location import (
    ENV_VAR,
    FILE_NAME,
    LogLocation,
    default_db_path,
    resolve_db,
)
from sawplan.store.schema import REVISIONS

if TYPE_CHECKING:  # pragma: no cover
    from sqlalchemy import Connection, Engine

T = TypeVar("T")
BUSY_TIMEOUT_S = engines.BUSY_TIMEOUT_S

__all__ = [
    "ENV_VAR",
    "FILE_NAME",
    "Log",
    "connect",
    "default_db_path",
    "open_log",
    "read_snapshot",
    "resolve_db",
    "resolve_db_path",
    "run_write",
    "schema_version",
    "write_transaction",
]


class Rows:
    """Rows of one statement, already fetched (the transaction that read them is over)."""

    def __init__(self, rows: Sequence[Any], rowcount: int = -1) -> None:
        self._rows = list(rows)
        self.rowcount = rowcount

    def fetchone(self) -> Any:
        return self._rows[0] if self._rows else None

    def fetchall(self) -> list[Any]:
        return list(self._rows)

    def scalar(self) -> Any:
        return self._rows[0][0] if self._rows else None

    def __iter__(self) -> Iterator[Any]:
        return iter(self._rows)


@lru_cache(maxsize=512)
def _text(sql: str):
    from sqlalchemy import text

    return text(sql)


class Log:
    """An open blade log on SQLite or PostgreSQL: one connection, used by one command."""

    light = False
    upgraded: Any = None  # what opening it upgraded (``upgrade.UpgradeOutcome``), if anything

    def __init__(self, location: LogLocation, engine: Engine, conn: Connection) -> None:
        self.location = location
        self.engine = engine
        self.conn = conn
        self.dialect = engine.dialect.name  # "sqlite" | "postgresql"

    @property
    def path(self) -> Path | None:
        """The log file (None for a server or an in-memory log)."""
        return self.location.path if self.location.kind == "sqlite" else None

    @property
    def in_transaction(self) -> bool:
        return self.conn.in_transaction()

    # --- reading -------------------------------------------------------------------

    def query(self, sql: str, params: Mapping[str, Any] | None = None) -> list[dict[str, Any]]:
        """Rows as dicts; ``sql`` uses named parameters (``:tag``)."""
        return self._run(_text(sql), params, lambda r: [dict(m) for m in r.mappings()])

    def execute(self, sql: str, params: Mapping[str, Any] | None = None) -> Rows:
        """Any statement; rows (if any) come back as tuples."""
        return self._run(
            _text(sql), params, lambda r: Rows(r.all() if r.returns_rows else [], r.rowcount)
        )

    def scalar(self, sql: str, params: Mapping[str, Any] | None = None) -> Any:
        return self.execute(sql, params).scalar()

    def bulk_rows(self, sql: str) -> list[tuple[Any, ...]]:
        """Every row of a query without parameters, as the driver's own tuples.

        For the big reads statistics make (10⁵ cuts): no per-row wrapping.  It
        runs in the open transaction, if any.
        """
        driver = self.conn.connection.dbapi_connection
        if not self.conn.in_transaction() and self.dialect == "sqlite":
            with self.conn.begin():  # one snapshot for the whole read
                return self._fetch(driver, sql)
        return self._fetch(driver, sql)

    @staticmethod
    def _fetch(driver: Any, sql: str) -> list[tuple[Any, ...]]:
        cursor = driver.cursor()
        try:
            cursor.execute(sql)
            return [tuple(r) for r in cursor.fetchall()]
        finally:
            cursor.close()

    # --- writing -------------------------------------------------------------------

    def insert(self, table: str, row: Mapping[str, Any]) -> int:
        """Insert one row, checked against the field table first; returns its id."""
        from sawplan.store.fields import check_row
        from sawplan.store.schema import table as table_of

        check_row(table, row)
        statement = table_of(table).insert().values(**row)
        return int(self._run(statement, None, lambda r: r.inserted_primary_key[0]))

    def insert_many(self, table: str, rows: Sequence[Mapping[str, Any]]) -> int:
        """Insert rows in batches (every row with the same keys), each checked; returns how many."""
        from sawplan.store.fields import check_row
        from sawplan.store.schema import table as table_of

        if not rows:
            return 0
        for row in rows:
            check_row(table, row)
        keys = list(dict.fromkeys(k for row in rows for k in row))
        shaped = [{k: row.get(k) for k in keys} for row in rows]
        statement = table_of(table).insert()
        for start in range(0, len(shaped), 5000):
            self._run(statement, shaped[start : start + 5000], lambda r: None)
        return len(shaped)

    def update(self, table: str, row_id: int, values: Mapping[str, Any]) -> None:
        """Update one row's ``values``, checked against the field table first."""
        from sawplan.store.fields import check_row
        from sawplan.store.schema import table as table_of

        check_row(table, values)
        t = table_of(table)
        self._run(t.update().where(t.c.id == row_id).values(**values), None, lambda r: None)

    def close(self) -> None:
        with contextlib.suppress(Exception):
            if self.conn.in_transaction():
                self.conn.rollback()
        with contextlib.suppress(Exception):
            self.conn.close()
        with contextlib.suppress(Exception):
            self.engine.dispose()

    def _run(self, statement: Any, params: Any, take: Callable[[Any], T]) -> T:
        if self.conn.in_transaction():
            return take(self.conn.execute(statement, params))
        with self.conn.begin():
            return take(self.conn.execute(statement, params))


class LightLog:
    """Just enough of ``Log`` for read-only queries on an up-to-date SQLite file.

    ``sawplan cut`` only asks the log for its saws and calibration; loading
    SQLAlchemy would cost more than the rest of the command.  The SQL text is
    the same the full store runs (named parameters work in ``sqlite3`` too).
    """

    light = True
    dialect = "sqlite"

    def __init__(self, location: LogLocation, conn: sqlite3.Connection) -> None:
        self.location = location
        self.raw = conn

    @property
    def path(self) -> Path | None:
        return self.location.path

    @property
    def in_transaction(self) -> bool:
        return self.raw.in_transaction

    def query(self, sql: str, params: Mapping[str, Any] | None = None) -> list[dict[str, Any]]:
        cursor = self.raw.execute(sql, dict(params or {}))
        keys = [d[0] for d in cursor.description]
        return [dict(zip(keys, row, strict=True)) for row in cursor]

    def execute(self, sql: str, params: Mapping[str, Any] | None = None) -> Rows:
        cursor = self.raw.execute(sql, dict(params or {}))
        return Rows(cursor.fetchall(), cursor.rowcount)

    def scalar(self, sql: str, params: Mapping[str, Any] | None = None) -> Any:
        return self.execute(sql, params).scalar()

    def bulk_rows(self, sql: str) -> list[tuple[Any, ...]]:
        return self.raw.execute(sql).fetchall()

    def close(self) -> None:
        self.raw.close()


AnyLog = Log | LightLog


# --- opening -------------------------------------------------------------------------------


def resolve_db_path(db: str | os.PathLike[str] | LogLocation | None = None) -> Path:
    """The log file for commands that only work on a file (a server URL is refused)."""
    location = resolve_db(db)
    if location.kind != "sqlite" or location.path is None:
        raise UsageError(
            f"this needs a blade log file, not {location.label}",
            field="db",
            hint="give --db FILE",
        )
    return location.path


def open_log(
    db: str | os.PathLike[str] | LogLocation | None = None,
    *,
    create: bool = True,
    light: bool = False,
) -> Log:
    """Open (creating or upgrading as needed) the blade log.

    With ``create=False`` (reading) a missing file or an empty server database
    is not made: an empty in-memory log stands in, so read-only questions
    ("which saws are logged?") answer "none" and leave nothing behind.
    Every opening of a file checks it for damage first (``safety.open_check``:
    nothing is read from or written to a damaged log).  ``":memory:"`` gives a private
    in-memory log (tests).
    """
    from sawplan.store import upgrade

    location = resolve_db(db)
    if location.kind == "memory":
        return memory_log()
    if location.is_server:
        return upgrade.open_server(location, create=create)
    path = location.path
    assert path is not None
    if path.is_dir():
        raise UsageError(f"{path} is a folder; give a file name", field="db")
    if not path.exists():
        if not create:
            return memory_log()
        from sawplan.store.perms import create_log_file

        create_log_file(path)
    else:
        from sawplan.store.safety import refuse_known_damage

        refuse_known_damage(path)
    try:
        raw = _connect_file(path)
    except sqlite3.Error as err:
        raise engines.sqlite_error(err, path) from None
    try:
        header = engines.retry_busy(lambda: upgrade.sqlite_header(raw))
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        raw.close()
        raise engines.sqlite_error(err, path) from None
    if light and not create and upgrade.is_current(*header):
        raw.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")
        from sawplan.store.safety import open_check

        try:
            engines.retry_busy(lambda: open_check(raw, path))
        except BaseException as err:
            raw.close()
            if isinstance(err, sqlite3.DatabaseError) or engines.is_sqlite_message(err):
                raise engines.sqlite_error(err, path) from None
            raise
        return LightLog(location, raw)  # type: ignore[return-value]
    return upgrade.open_file(location, raw, header, writing=create)


def check_again(log: Log) -> None:
    """The opening check for a log kept open (the station's pool): a file changed
    since it was last checked, by anyone, is checked again before it is used."""
    path = log.path
    if path is None or log.location.kind != "sqlite" or not path.exists():
        return
    from sawplan.store.safety import check_file_again

    try:
        engines.retry_busy(lambda: check_file_again(path))
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        raise engines.sqlite_error(err, path) from None


def memory_log() -> Log:
    """A private in-memory log holding the newest schema and no rows."""
    from sawplan.store.schema import metadata

    conn = sqlite3.connect(":memory:", isolation_level=None)
    log = sqlite_log(LogLocation("memory"), lambda: conn)
    with log.conn.begin():
        metadata().create_all(log.conn)
    return log


def sqlite_log(location: LogLocation, creator: Callable[[], sqlite3.Connection]) -> Log:
    engine = engines.sqlite_engine(creator)
    return Log(location, engine, engine.connect())


def _connect_file(path: Path) -> sqlite3.Connection:
    """The one place a log file is opened (tests wrap it to simulate a full or read-only disk)."""
    return engines.connect_sqlite_file(path)


@contextmanager
def connect(
    db: str | os.PathLike[str] | LogLocation | None = None,
    *,
    create: bool = True,
    light: bool = False,
) -> Iterator[Log]:
    """``with connect(where) as db:`` — open the log and always close it.

    Database errors raised inside become sawplan errors that name the log:
    SQLite corruption a ``DamagedFileError`` with the newest backup to
    restore, a full or read-only disk a ``StorageError``, a lost server a
    ``ServerError`` (an open transaction is rolled back: nothing was written).
    """
    database = open_log(db, create=create, light=light)
    try:
        yield database
    except SawplanError:
        raise
    except Exception as err:
        mapped = translate(err, database.location)
        if mapped is None:
            raise
        raise mapped from None
    finally:
        database.close()


def translate(err: BaseException, location: LogLocation) -> SawplanError | None:
    """A database error as a sawplan error (None: a broken rule or a bug, shown as such)."""
    orig = getattr(err, "orig", None) or err
    if isinstance(orig, sqlite3.IntegrityError | sqlite3.ProgrammingError):
        return None
    if isinstance(orig, sqlite3.DatabaseError) or engines.is_sqlite_message(orig):
        return engines.sqlite_error(orig, location.path, opened=True)
    if location.is_server and _is_driver_error(err):
        state = engines.sqlstate(err) or ""
        if state.startswith("23") or state.startswith("42"):
            return None  # a broken rule or a bug in the SQL
        return engines.server_error(err, location)
    return None


def _is_driver_error(err: BaseException) -> bool:
    from sqlalchemy.exc import DBAPIError

    return isinstance(err, DBAPIError) or type(err).__module__.startswith("psycopg")


# --- transactions ----------------------------------------------------------------------------


@contextmanager
def begin(db: Log, isolation: str, *, read_only: bool = False) -> Iterator[Any]:
    """The outermost transaction at ``isolation`` on PostgreSQL (plain BEGIN on SQLite).

    A server connection sits in autocommit between transactions, so a single
    read costs one round trip; psycopg then opens a transaction with one
    ``BEGIN ISOLATION LEVEL ...``.
    """
    conn = db.conn
    if db.dialect == "postgresql":
        conn.execution_options(isolation_level=isolation, postgresql_readonly=read_only)
    try:
        with conn.begin() as transaction:
            yield transaction
    finally:
        if db.dialect == "postgresql":
            conn.execution_options(isolation_level="AUTOCOMMIT", postgresql_readonly=False)


@contextmanager
def write_transaction(db: Log) -> Iterator[Log]:
    """One write transaction: all of it or none (nested use: a savepoint).

    SQLite takes the write lock before the first read (``BEGIN IMMEDIATE``);
    PostgreSQL runs it SERIALIZABLE.  This block runs once; ``run_write``
    runs a step again after a serialization failure.  A full disk may refuse
    even the COMMIT; then nothing is kept.
    """
    if db.light:
        raise UsageError("this log was opened for reading only", field="db")
    conn = db.conn
    if conn.in_transaction():
        with conn.begin_nested():
            yield db
        return
    conn.info["write"] = True  # the SQLite begin hook says BEGIN IMMEDIATE
    try:
        with begin(db, "SERIALIZABLE"):
            yield db
    finally:
        conn.info.pop("write", None)


def run_write(db: Log, step: Callable[[], T]) -> T:
    """Run ``step`` in one write transaction; again when the server says another writer
    got in the way (for up to ``BUSY_TIMEOUT_S``, as SQLite waits for its lock).
    Inside an open transaction it is a savepoint."""
    if db.in_transaction:
        with write_transaction(db):
            return step()
    deadline = time.monotonic() + BUSY_TIMEOUT_S
    attempt = 0
    while True:
        try:
            with write_transaction(db):
                return step()
        except Exception as err:
            if not engines.is_retryable(err) or time.monotonic() > deadline:
                raise
            time.sleep(random.uniform(0.0, min(0.5, 0.005 * 2**attempt)))  # jittered back-off
            attempt += 1


BULK_ROWS = 10_000  # a load this big changes a table's shape for PostgreSQL's planner


def refresh_statistics(db: Log, counts: Mapping[str, int]) -> None:
    """ANALYZE, on PostgreSQL, each table a bulk load (import, ``db copy``) just filled.

    Until autovacuum gets to them, the planner takes freshly loaded tables for
    the nearly empty ones they were and may plan ``sawplan life`` over 10⁵ cuts
    badly.  Tables that took fewer than ``BULK_ROWS`` rows are left alone; SQLite
    plans from its indexes and needs nothing.
    """
    from sawplan.store.schema import ident

    if db.dialect != "postgresql":
        return
    for table, rows in counts.items():
        if rows >= BULK_ROWS:
            db.execute(f"ANALYZE {ident(table)}")


@contextmanager
def read_snapshot(db: AnyLog) -> Iterator[AnyLog]:
    """Several reads that see one moment of the log (an export, a report); writes nothing."""
    if db.light or db.in_transaction:
        yield db
        return
    with begin(db, "REPEATABLE READ", read_only=True) as transaction:
        try:
            yield db
        finally:
            transaction.rollback()


def schema_version(db: AnyLog) -> int:
    """How many migrations this log has applied (1 for the first schema)."""
    from sawplan.store.schema import VERSION_TABLE

    if db.dialect == "sqlite":
        return int(db.scalar("PRAGMA user_version"))
    revision = db.scalar(f"SELECT version_num FROM {VERSION_TABLE}")
    return REVISIONS.index(revision) + 1 if revision in REVISIONS else len(REVISIONS) + 1
