"""Accepting a log, and bringing its schema up to date with one migration history.

The history is Alembic's (``migrations/versions``), the same on SQLite and
PostgreSQL, recorded in the table ``sawplan_schema``.  A SQLite log also
carries ``PRAGMA application_id`` (it is a sawplan log) and ``PRAGMA
user_version`` (how many revisions it has), so opening an up-to-date file
costs two pragma reads and no Alembic at all.

Logs written by the first releases recorded their history with sqlite-utils
in ``_sqlite_migrations`` (``m001_initial``, ``m002_cut_traceability``).
They are adopted: stamped at the revision they match, then upgraded like any
other log.  Before any upgrade of a log holding data the whole file is
checked and copied into ``backups/`` beside it; if either fails nothing
changes.

A PostgreSQL database with no tables is given the schema on first write; one
at an older revision is upgraded only by ``sawplan db upgrade`` (a shared log
changes when the shop decides, not when the first station updates); one with
tables but no sawplan schema belongs to another application and is refused.
"""

from __future__ import annotations

import sqlite3
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from sawplan.errors import DamagedFileError
from sawplan.store import engine as engines
from sawplan.store.location import LogLocation
from sawplan.store.schema import (
    APPLICATION_ID,
    HEAD,
    LEGACY_NAMES,
    LEGACY_SET,
    LEGACY_TABLE,
    REVISIONS,
    VERSION_TABLE,
)

if TYPE_CHECKING:  # pragma: no cover
    from sqlalchemy import Connection

    from sawplan.store.db import Log

MIGRATIONS_DIR = Path(__file__).resolve().parent / "migrations"
ADVISORY_LOCK = APPLICATION_ID  # PostgreSQL: one upgrade at a time per database
_NOT_OURS_HINT = "give --db a new file name, or the path of your blade log"


@dataclass(frozen=True)
class UpgradeOutcome:
    """What ``upgrade_log`` did."""

    where: str
    from_version: int
    to_version: int
    backup: str | None  # the copy made before the upgrade, when there was one
    backup_kind: str | None = None


# --- SQLite --------------------------------------------------------------------------------


def sqlite_header(conn: sqlite3.Connection) -> tuple[int, int]:
    """Application id and schema count; reading them fails on a file that is no database."""
    app_id = int(conn.execute("PRAGMA application_id").fetchone()[0])
    version = int(conn.execute("PRAGMA user_version").fetchone()[0])
    return app_id, version


def is_current(app_id: int, version: int) -> bool:
    return app_id == APPLICATION_ID and version == len(REVISIONS)


def open_file(
    location: LogLocation, raw: sqlite3.Connection, header: tuple[int, int], *, writing: bool
) -> Log:
    """The full store over an opened file: identity checked, damage checked, schema current."""
    from sawplan.store import safety
    from sawplan.store.db import sqlite_log

    path = location.path
    assert path is not None
    where = str(path)
    try:
        if not is_current(*header):  # read-only checks first: a foreign file stays as it was
            check_sqlite_identity(raw, *header, where)
        if writing:
            engines.retry_busy(lambda: use_wal(raw))
        safety.open_check(raw, path)
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        raw.close()
        raise engines.sqlite_error(err, path) from None
    except BaseException:
        raw.close()
        raise
    log = sqlite_log(location, lambda: raw)
    try:
        if not is_current(*header):
            log.upgraded = upgrade_file(log)
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        log.close()
        raise engines.sqlite_error(err, path) from None
    except Exception as err:
        log.close()
        orig = getattr(err, "orig", None)
        if isinstance(orig, sqlite3.DatabaseError):
            raise engines.sqlite_error(orig, path) from None
        raise
    return log


def use_wal(conn: sqlite3.Connection) -> None:
    mode = str(conn.execute("PRAGMA journal_mode").fetchone()[0]).lower()
    if mode != "wal":
        conn.execute("PRAGMA journal_mode = WAL")
    conn.execute(
        "PRAGMA synchronous = NORMAL"
    )  # safe in WAL; a power cut loses at most the last cut


def check_sqlite_identity(conn: sqlite3.Connection, app_id: int, version: int, where: str) -> None:
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
                hint=_NOT_OURS_HINT,
            )
    elif app_id != APPLICATION_ID:
        raise DamagedFileError(
            f"{where} belongs to another program (application id {app_id:#x})",
            field="db",
            hint=_NOT_OURS_HINT,
        )
    if version > len(REVISIONS):
        raise newer(where, f"schema {version}")


def upgrade_file(log: Log) -> UpgradeOutcome:
    """Apply pending migrations to a SQLite log under its write lock (two first runs may race)."""
    from sawplan.store import safety
    from sawplan.store.db import write_transaction

    path = log.path
    assert path is not None
    raw = log.conn.connection.dbapi_connection
    with write_transaction(log):
        app_id, version = sqlite_header(raw)  # re-read: another process may have done it
        if is_current(app_id, version):
            return UpgradeOutcome(str(path), version, version, None)
        check_sqlite_identity(raw, app_id, version, str(path))
        applied = applied_revisions(log)
        backup = None
        if applied:
            safety.check_integrity(raw, path, full=True)
            backup = str(safety.backup_before_upgrade(path, from_version=len(applied)))
        run_migrations(log.conn, stamp=_legacy_stamp(log, applied))
        raw.execute(f"PRAGMA application_id = {APPLICATION_ID}")
        raw.execute(f"PRAGMA user_version = {len(REVISIONS)}")
    return UpgradeOutcome(
        str(path), len(applied), len(REVISIONS), backup, "copy" if backup else None
    )


def applied_revisions(log: Log) -> list[str]:
    """The revisions this log holds, oldest first; a legacy record counts as its revisions."""
    where = log.location.label
    if has_table(log, VERSION_TABLE):
        revision = log.scalar(f"SELECT version_num FROM {VERSION_TABLE}")
        if revision is None:
            return []
        if revision not in REVISIONS:
            raise newer(where, f"revision {revision}")
        return list(REVISIONS[: REVISIONS.index(revision) + 1])
    if has_table(log, LEGACY_TABLE):
        names = [
            r["name"]
            for r in log.query(
                f"SELECT name FROM {LEGACY_TABLE} WHERE migration_set = :s ORDER BY id",
                {"s": LEGACY_SET},
            )
        ]
        unknown = [n for n in names if n not in LEGACY_NAMES]
        if unknown:
            raise newer(where, f"migration {unknown[0]}")
        return list(REVISIONS[: len(names)])
    return []


def _legacy_stamp(log: Log, applied: list[str]) -> str | None:
    """The revision to record first for a log that has no ``sawplan_schema`` yet."""
    if applied and not has_table(log, VERSION_TABLE):
        return applied[-1]
    return None


def has_table(log: Log, name: str) -> bool:
    if log.dialect == "sqlite":
        sql = "SELECT COUNT(*) FROM sqlite_master WHERE type = 'table' AND name = :n"
        return bool(log.scalar(sql, {"n": name}))
    return log.scalar("SELECT to_regclass(:n) IS NOT NULL", {"n": name}) is True


def newer(where: str, what: str) -> DamagedFileError:
    return DamagedFileError(
        f"{where} was written by a newer sawplan ({what}; this one knows up to schema "
        f"{len(REVISIONS)})",
        field="db",
        hint="upgrade sawplan to use it; nothing was changed",
    )


# --- Alembic -------------------------------------------------------------------------------


def run_migrations(conn: Connection, *, stamp: str | None = None, to: str = "head") -> None:
    """Run the history on ``conn`` inside its open transaction (``stamp`` first, if given)."""
    from alembic import command
    from alembic.config import Config

    config = Config()
    config.set_main_option("script_location", str(MIGRATIONS_DIR).replace("%", "%%"))
    config.attributes["connection"] = conn
    if stamp is not None:
        command.stamp(config, stamp)
    command.upgrade(config, to)


def script_revisions() -> list[str]:
    """The revision ids of the migration scripts, oldest first (a test compares REVISIONS)."""
    from alembic.script import ScriptDirectory

    script = ScriptDirectory(str(MIGRATIONS_DIR))
    return [r.revision for r in reversed(list(script.walk_revisions()))]


# --- PostgreSQL ----------------------------------------------------------------------------


def open_server(location: LogLocation, *, create: bool, older_ok: bool = False) -> Log:
    """Connect to a ``postgresql://`` log and accept it (creating its schema when writing).

    ``older_ok``: accept an older schema (for ``sawplan db upgrade``)."""
    from sawplan.store.db import Log, memory_log

    engine = engines.server_engine(location)
    try:
        conn = engine.connect().execution_options(isolation_level="AUTOCOMMIT")
    except Exception as err:
        engine.dispose()
        raise engines.server_error(err, location) from None
    log = Log(location, engine, conn)
    try:
        state = server_state(log)
        if state == "empty" and not create:
            log.close()
            return memory_log()
        if state == "empty":
            create_server_schema(log)
        elif state != "current" and not (older_ok and state == "older"):
            raise refusal(log, state)
    except DamagedFileError:
        log.close()
        raise
    except Exception as err:
        log.close()
        from sawplan.store.db import translate

        mapped = translate(err, location)
        if mapped is None:
            raise
        raise mapped from None
    return log


def server_state(log: Log) -> str:
    """current, empty, older, newer or foreign."""
    if not log.in_transaction:  # autocommit: ask for the version first, one round trip
        from sqlalchemy.exc import ProgrammingError

        try:
            return _state_of(log.scalar(f"SELECT version_num FROM {VERSION_TABLE}"))
        except ProgrammingError as err:
            if engines.sqlstate(err) != "42P01":  # anything but "no such table"
                raise
    if has_table(log, VERSION_TABLE):
        return _state_of(log.scalar(f"SELECT version_num FROM {VERSION_TABLE}"))
    tables = log.scalar(
        "SELECT COUNT(*) FROM information_schema.tables WHERE table_schema = current_schema()"
    )
    return "foreign" if tables else "empty"


def _state_of(revision: str | None) -> str:
    if revision == HEAD:
        return "current"
    if revision in REVISIONS:
        return "older"
    return "newer" if revision is not None else "foreign"


def refusal(log: Log, state: str) -> DamagedFileError:
    where = log.location.label
    if state == "older":
        revision = log.scalar(f"SELECT version_num FROM {VERSION_TABLE}")
        return DamagedFileError(
            f"{where} holds schema {REVISIONS.index(revision) + 1}; this sawplan uses "
            f"{len(REVISIONS)}",
            field="db",
            hint="upgrade the shared log once, from one PC: sawplan db upgrade --db URL",
        )
    if state == "newer":
        return newer(where, f"revision {log.scalar(f'SELECT version_num FROM {VERSION_TABLE}')}")
    return DamagedFileError(
        f"{where} holds another application's tables, not a sawplan blade log",
        field="db",
        hint="give --db an empty database (or one sawplan made)",
    )


def create_server_schema(log: Log) -> None:
    """Give an empty database the schema; a second station doing the same waits, then finds it.

    READ COMMITTED, not SERIALIZABLE: after waiting for the lock, the next
    statement must see what the other station committed meanwhile.
    """
    from sawplan.store.db import begin

    with begin(log, "READ COMMITTED"):
        log.execute("SELECT pg_advisory_xact_lock(:k)", {"k": ADVISORY_LOCK})
        if server_state(log) == "empty":
            run_migrations(log.conn)


def upgrade_server(log: Log) -> tuple[int, int]:
    """Bring a PostgreSQL log to the newest schema (``sawplan db upgrade``); (from, to)."""
    from sawplan.store.db import begin

    with begin(log, "READ COMMITTED"):  # as in create_server_schema
        log.execute("SELECT pg_advisory_xact_lock(:k)", {"k": ADVISORY_LOCK})
        state = server_state(log)
        if state in ("newer", "foreign"):
            raise refusal(log, state)
        before = len(applied_revisions(log))
        if state != "current":
            run_migrations(log.conn)
    return before, len(REVISIONS)


# --- sawplan db upgrade ----------------------------------------------------------------------


def upgrade_log(db=None) -> UpgradeOutcome:
    """Bring the log at ``db`` to the newest schema, with a backup first."""
    from sawplan.errors import NotFoundError
    from sawplan.store.db import open_log
    from sawplan.store.location import resolve_db

    location = resolve_db(db)
    if location.kind == "sqlite":
        assert location.path is not None
        if not location.path.is_file():
            raise NotFoundError(f"no blade log at {location.path}", field="db")
        log = open_log(location)  # opening a file upgrades it
        current = len(REVISIONS)
        outcome = log.upgraded or UpgradeOutcome(str(location.path), current, current, None)
        log.close()
        return outcome
    if location.kind != "postgresql":
        raise DamagedFileError("an in-memory log needs no upgrade", field="db")
    log = open_server(location, create=True, older_ok=True)
    try:
        if server_state(log) == "current":
            return UpgradeOutcome(location.label, len(REVISIONS), len(REVISIONS), None)
        schema = log.scalar("SELECT current_schema()")
        backup, kind = _server_backup_before_upgrade(location, schema, len(applied_revisions(log)))
        before, after = upgrade_server(log)
    finally:
        log.close()
    return UpgradeOutcome(location.label, before, after, backup, kind)


def _server_backup_before_upgrade(
    location: LogLocation, schema: str, version: int
) -> tuple[str | None, str]:
    """A pg_dump of the log into the data folder's backups/, when pg_dump is there."""
    import datetime as dt
    import shutil
    from urllib.parse import urlsplit

    from sawplan.outputs import clear_stale_partials
    from sawplan.paths import user_data_dir
    from sawplan.store.backup import _pg_dump
    from sawplan.store.perms import make_folder
    from sawplan.store.safety import BACKUP_FOLDER

    if shutil.which("pg_dump") is None:
        return None, "no backup: pg_dump is not installed; the upgrade is one transaction"
    folder = user_data_dir() / BACKUP_FOLDER
    make_folder(folder)
    name = urlsplit(location.url or "").path.strip("/") or "log"
    clear_stale_partials(folder, f"{name}-schema*.dump")  # left by a killed upgrade
    stamp = dt.datetime.now().strftime("%Y%m%d-%H%M%S")
    target = folder / f"{name}-schema{version}-{stamp}.dump"
    _pg_dump(location, schema, target)
    return str(target), "pg_dump archive"
