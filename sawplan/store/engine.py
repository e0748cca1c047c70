"""Connections to the two engines, and their failures in the user's words.

SQLite: one file opened through ``sqlite3`` with autocommit off at the driver
(sawplan says BEGIN itself), so a write transaction starts with
``BEGIN IMMEDIATE``: the write lock is taken before the first read, and a
check made inside ("is this blade fitted?") still holds when the rows are
written.  WAL lets readers work beside one writer; a 30 s busy timeout makes
a second writer wait instead of failing.

PostgreSQL: psycopg 3 through SQLAlchemy.  Write transactions run at
SERIALIZABLE isolation, so a read-then-write step (fitting a blade, retiring
it, logging on the fitted blade) behaves as if it ran alone; when the server
answers with a serialization failure or a deadlock the whole step is run
again (``sawplan.store.db.run_write``).  The URL's query options (``sslmode``,
``sslrootcert``, ``connect_timeout``, ``options``...) go to libpq unchanged;
without a ``connect_timeout`` sawplan waits ``CONNECT_TIMEOUT_S`` for the server.
"""

from __future__ import annotations

import os
import sqlite3
import time
from pathlib import Path
from typing import TYPE_CHECKING, Any

from sawplan.errors import (
    DamagedFileError,
    SawplanError,
    ServerError,
    StorageError,
)
from sawplan.store.location import LogLocation, scrub

if TYPE_CHECKING:  # pragma: no cover
    from sqlalchemy import Engine

BUSY_TIMEOUT_S = 30.0
BUSY_RETRIES = 5  # for "busy" answers SQLite gives without waiting (lock upgrades, recovery)
CONNECT_TIMEOUT_S = 10
RETRY_STATES = ("40001", "40P01")  # serialization failure, deadlock: run the step again


# --- SQLite -------------------------------------------------------------------------------


def connect_sqlite_file(path: Path) -> sqlite3.Connection:
    """Open a log file with the driver's own transactions off (sawplan says BEGIN itself).

    The station (``sawplan serve``) hands an open log from one worker thread to the
    next, never to two at once, so the driver's same-thread check is off.
    """
    return sqlite3.connect(
        path, timeout=BUSY_TIMEOUT_S, isolation_level=None, check_same_thread=False
    )


def sqlite_engine(creator) -> Engine:
    """An engine over connections made by ``creator``; write transactions say BEGIN IMMEDIATE."""
    from sqlalchemy import create_engine, event
    from sqlalchemy.pool import NullPool

    engine = create_engine("sqlite://", creator=creator, poolclass=NullPool)

    @event.listens_for(engine, "connect")
    def _settings(dbapi_conn, _record) -> None:
        dbapi_conn.isolation_level = None
        dbapi_conn.execute("PRAGMA foreign_keys = ON")
        dbapi_conn.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")

    @event.listens_for(engine, "begin")
    def _begin(conn) -> None:
        statement = "BEGIN IMMEDIATE" if conn.info.pop("write", False) else "BEGIN"
        driver = conn.connection.dbapi_connection
        retry_busy(lambda: driver.execute(statement))

    return engine


def retry_busy(step):
    """Run ``step``, again briefly when SQLite answers "busy" without waiting."""
    for attempt in range(BUSY_RETRIES):
        try:
            return step()
        except sqlite3.OperationalError as err:
            if not is_busy(err) or attempt == BUSY_RETRIES - 1:
                raise
            time.sleep(0.02 * (attempt + 1))
    return None  # pragma: no cover


def is_busy(err: BaseException) -> bool:
    text = str(err).lower()
    return "locked" in text or "busy" in text


# --- PostgreSQL ---------------------------------------------------------------------------


def server_engine(location: LogLocation) -> Engine:
    """An engine for a ``postgresql://`` log through psycopg 3 (no pool: one command, one use)."""
    from sqlalchemy import create_engine
    from sqlalchemy.engine import make_url
    from sqlalchemy.pool import NullPool

    url = make_url(location.url or "").set(drivername="postgresql+psycopg")
    args: dict[str, Any] = {}
    if "connect_timeout" not in url.query and not os.environ.get("PGCONNECT_TIMEOUT"):
        args["connect_timeout"] = CONNECT_TIMEOUT_S
    if "application_name" not in url.query and not os.environ.get("PGAPPNAME"):
        args["application_name"] = "sawplan"
    return create_engine(url, poolclass=NullPool, connect_args=args)


def sqlstate(err: BaseException) -> str | None:
    """The server's SQLSTATE of a (wrapped) psycopg error."""
    orig = getattr(err, "orig", err)
    return getattr(orig, "sqlstate", None)


def is_retryable(err: BaseException) -> bool:
    return sqlstate(err) in RETRY_STATES


_UNREACHABLE = (
    "connection refused",
    "could not connect",
    "timeout expired",
    "could not translate host name",
    "name or service not known",
    "temporary failure in name resolution",
    "network is unreachable",
    "no route to host",
    "connection timed out",
    "is the server running",
    "no such file or directory",  # a Unix socket that is not there
)
_LOGIN = (
    "password authentication failed",
    "authentication failed",
    "no password supplied",
    "no pg_hba.conf entry",
    "does not exist",  # role "x" does not exist
    "permission denied for database",
    "peer authentication",
)
_LOST = (
    "server closed the connection",
    "terminating connection",
    "connection is closed",
    "consuming input failed",
    "the connection is lost",
    "ssl syscall error",
    "eof detected",
)


def server_error(err: BaseException, location: LogLocation) -> SawplanError:
    """A PostgreSQL failure as one line a user can act on; passwords never shown."""
    orig = getattr(err, "orig", None) or err
    state = sqlstate(err) or ""
    raw = " ".join(str(orig).split())
    text = raw.lower()
    where = location.label
    detail = scrub(raw, location)[:200]
    if state == "3D000" or ("database" in text and "does not exist" in text):
        return ServerError(
            f"the server at {where} has no such database ({detail})",
            field="db",
            hint="create it first (e.g. createdb NAME), or fix the database name in --db",
        )
    if state.startswith("28") or (not state and any(k in text for k in _LOGIN)):
        return ServerError(
            f"the server at {where} refused the login ({detail})",
            field="db",
            hint="check the user and password: in the URL, PGPASSFILE (~/.pgpass) or PGPASSWORD",
        )
    if "ssl" in text and ("not support" in text or "required" in text or "certificate" in text):
        return ServerError(
            f"TLS to {where} failed ({detail})",
            field="db",
            hint="check sslmode and the certificate options in --db",
        )
    if any(k in text for k in _LOST) or state in ("57P01", "57P02", "57P03"):
        return ServerError(
            f"lost the connection to {where}; the last step was not saved ({detail})",
            field="db",
            hint="check the network and the server, then try again",
        )
    if state.startswith("08") or any(k in text for k in _UNREACHABLE):
        return ServerError(
            f"cannot reach the database server at {where} ({detail})",
            field="db",
            hint="check that the server runs and that host and port in --db are right",
        )
    if state in RETRY_STATES or state == "55P03":
        return StorageError(
            f"{where} stayed busy with other writers; nothing was written",
            field="db",
            hint="try again in a moment",
        )
    if state == "25006":
        return StorageError(f"{where} is read-only; nothing was written", field="db")
    if state == "42501":
        return StorageError(
            f"the login for {where} may not do this ({detail}); nothing was written",
            field="db",
            hint="ask the database's owner for rights on its tables",
        )
    if state.startswith("53"):
        return StorageError(
            f"the server of {where} is out of room ({detail}); nothing was written", field="db"
        )
    return StorageError(f"{where}: {detail}", field="db")


# --- SQLite failures ----------------------------------------------------------------------

# SQLite's own words in a message it could not give as UTF-8 (the driver then raises
# UnicodeDecodeError instead of DatabaseError): garbage from a damaged schema is quoted
_SQLITE_WORDS = (b"malformed", b"schema", b"database", b"datatype", b"syntax error", b"no such")


def is_sqlite_message(err: BaseException) -> bool:
    """A UnicodeDecodeError raised for an error message of SQLite's (damaged schema text)."""
    data = getattr(err, "object", None)
    return (isinstance(err, UnicodeDecodeError) and isinstance(data, bytes)
            and any(word in data.lower() for word in _SQLITE_WORDS))  # fmt: skip


def sqlite_words(err: BaseException) -> str:
    """SQLite's message, printable and short: damage may put any bytes in it."""
    data = getattr(err, "object", None)
    raw = data.decode("utf-8", "replace") if is_sqlite_message(err) else str(err)  # type: ignore[union-attr]
    text = "".join(c if c.isprintable() and c != "\ufffd" else "?" for c in " ".join(raw.split()))
    return text if len(text) <= 100 else text[:99] + "…"


def sqlite_error(err: BaseException, path: Path | None, *, opened: bool = False) -> SawplanError:
    """An SQLite error as the sawplan error a user can act on, naming the file.

    ``opened``: the file was already accepted as a sawplan log, so corruption
    can only be damage (and is remembered, so no later write trusts the file).
    """
    from sawplan.store.safety import mark_damaged, restore_hint

    orig = getattr(err, "orig", None) or err
    where = str(path) if path is not None else "the blade log"
    words = sqlite_words(orig)
    text = words.lower()
    if "malformed" in text and opened:
        mark_damaged(path, words)
        return DamagedFileError(
            f"{where} is damaged (SQLite: {words}); nothing was written",
            field="db",
            hint=restore_hint(path),
        )
    if "could not decode to utf-8" in text:  # text another program stored: never shown
        column = text.split("column '", 1)[-1].split("'", 1)[0][:40]
        return DamagedFileError(
            f"{where} holds text that is not UTF-8 (column {column}): damaged, or written "
            "by another program; nothing was written",
            field="db",
            hint=restore_hint(path),
        )
    if "not a database" in text or "malformed" in text or "encrypted" in text:
        return DamagedFileError(
            f"{where} is damaged or not a sawplan blade log ({words}); nothing was written",
            field="db",
            hint=f"check the file given to --db or SAWPLAN_DB; if it is your log, "
            f"{restore_hint(path)}",
        )
    if is_busy(orig):
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
    if "disk i/o error" in text:  # a write the system refused: too large a file, a bad disk
        return StorageError(
            f"the disk refused a write to {where} (SQLite: {words}); nothing was written",
            field="db",
            hint="check the disk's free space, size limits and health, then try again",
        )
    if "unable to open" in text:
        return StorageError(
            f"cannot open {where} ({words})",
            field="db",
            hint="check that its folder exists and may be written",
        )
    return StorageError(f"{where}: {words}", field="db")
