"""``sawplan check`` and ``sawplan restore``: is the log sound, and bringing a backup back.

``check_log`` reads the log without changing it: on a SQLite file SQLite's
full ``integrity_check`` (every page, every record, every index row against
its table) and ``foreign_key_check``; on both engines the log's own rules (a
fitted blade has one open fitting, a retired blade its date and cause, every
cut an area and a count above zero...).  A sound file clears the damage mark
a command left; a damaged one gets it.

``restore_log`` puts a backup in the log's place: for a file, the newest
sound automatic backup (or the file named) is checked, copied beside the log
and renamed over it; the log it replaces is kept beside it as
``<name>.replaced-<time>`` with its ``-wal`` and ``-shm``.  An existing log is
only replaced with ``force``.  A server log is refilled from a SQLite backup
or an export zip in one transaction.
"""

from __future__ import annotations

import datetime as dt
import os
import sqlite3
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from sawplan.errors import ConflictError, DamagedFileError, NotFoundError, UsageError
from sawplan.store import safety
from sawplan.store.engine import sqlite_words
from sawplan.store.location import LogLocation, resolve_db

# (what is wrong, SQL listing the rows it is wrong for); the same on both engines
RULES: tuple[tuple[str, str], ...] = (
    (
        "blade marked fitted without an open fitting",
        "SELECT b.tag FROM blades b WHERE b.status = 'fitted' AND NOT EXISTS "
        "(SELECT 1 FROM fittings f WHERE f.blade_id = b.id AND f.removed_on IS NULL)",
    ),
    (
        "blade with an open fitting not marked fitted",
        "SELECT b.tag FROM blades b JOIN fittings f ON f.blade_id = b.id "
        "WHERE f.removed_on IS NULL AND b.status <> 'fitted'",
    ),
    (
        "retired blade without its date or cause",
        "SELECT tag FROM blades WHERE status = 'retired' "
        "AND (retired_on IS NULL OR retire_cause IS NULL)",
    ),
    (
        "blade with an unknown status",
        "SELECT tag FROM blades WHERE status NOT IN ('new', 'fitted', 'removed', 'retired')",
    ),
    (
        "cut entry without a positive area, count or pieces",
        "SELECT CAST(id AS TEXT) FROM cuts WHERE NOT (area_mm2 > 0) OR count < 1 OR pieces < 1",
    ),
    (
        "fitting removed before it was fitted",
        "SELECT CAST(id AS TEXT) FROM fittings WHERE removed_on < fitted_on",
    ),
)
_SHOWN = 3


@dataclass(frozen=True)
class CheckReport:
    """What ``sawplan check`` found."""

    log: str
    engine: str
    schema: int
    rows: dict[str, int]
    checks: tuple[str, ...]  # what was checked
    problems: tuple[str, ...]  # damage and broken rules
    warnings: tuple[str, ...]  # not damage: e.g. a log others may read

    @property
    def sound(self) -> bool:
        return not self.problems


def check_log(db: str | os.PathLike[str] | LogLocation | None = None) -> CheckReport:
    """Check the whole log without writing to it."""
    location = resolve_db(db)
    if location.kind == "sqlite":
        return _check_file(location)
    from sawplan.store.db import connect, schema_version

    with connect(location, create=False) as log:
        problems = _broken_rules(log.query)
        rows = _rows(log.scalar)
        schema = schema_version(log) if log.location.is_server else 0
    checks = ("the log's own rules", "(page and index checks are the server's own)")
    return CheckReport(location.label, "postgresql", schema, rows, checks, tuple(problems), ())


def _check_file(location: LogLocation) -> CheckReport:
    from sawplan.store.perms import too_open
    from sawplan.store.upgrade import check_sqlite_identity

    path = location.path
    assert path is not None
    if not path.is_file():
        raise NotFoundError(f"no blade log at {path}", field="db")
    try:
        conn = sqlite3.connect(f"file:{path.resolve()}?mode=ro", uri=True, timeout=30.0)
    except sqlite3.Error as err:
        raise DamagedFileError(f"{path} cannot be opened ({err})", field="db") from None
    try:
        try:
            app_id = int(conn.execute("PRAGMA application_id").fetchone()[0])
            version = int(conn.execute("PRAGMA user_version").fetchone()[0])
        except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
            raise DamagedFileError(
                f"{path} is damaged or not a sawplan blade log ({sqlite_words(err)})",
                field="db",
                hint=safety.restore_hint(path),
            ) from None
        check_sqlite_identity(conn, app_id, version, str(path))
        problems = [f"SQLite: {p}" for p in safety.integrity_problems(conn, full=True)]
        if not problems:
            problems += [
                f"row {r[1]} of {r[0]} points at a missing {r[2]} row"
                for r in conn.execute("PRAGMA foreign_key_check").fetchall()[:_SHOWN]
            ]
            problems += _broken_rules(lambda sql: _dicts(conn, sql))
            rows = _rows(lambda sql: conn.execute(sql).fetchone()[0])
        else:
            rows = {}
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        problems, rows = [f"SQLite: {sqlite_words(err)}"], {}
    finally:
        conn.close()
    if problems:
        safety.mark_damaged(path, problems[0])
    else:
        safety.clear_damage_mark(path)
    warnings = [w for w in (too_open(path), too_open(path.parent)) if w]
    checks = (
        "SQLite integrity_check (pages, records, indexes)",
        "foreign keys",
        "the log's own rules",
    )
    return CheckReport(str(path), "sqlite", version, rows, checks, tuple(problems), tuple(warnings))


def _dicts(conn: sqlite3.Connection, sql: str) -> list[dict[str, Any]]:
    cursor = conn.execute(sql)
    keys = [d[0] for d in cursor.description]
    return [dict(zip(keys, row, strict=True)) for row in cursor]


def _broken_rules(query) -> list[str]:
    found = []
    for what, sql in RULES:
        rows = query(sql)
        if rows:
            names = [str(next(iter(r.values()))) for r in rows[:_SHOWN]]
            more = f" and {len(rows) - _SHOWN} more" if len(rows) > _SHOWN else ""
            found.append(f"{what}: {', '.join(names)}{more}")
    return found


def _rows(scalar) -> dict[str, int]:
    from sawplan.store.schema import ALL_TABLES, ident

    return {t: int(scalar(f"SELECT COUNT(*) FROM {ident(t)}")) for t in ALL_TABLES}


# --- restore ------------------------------------------------------------------------------


@dataclass(frozen=True)
class RestoreResult:
    log: str
    source: str
    kept: str | None  # where the replaced log was put aside
    rows: dict[str, int]


def restore_log(
    db: str | os.PathLike[str] | LogLocation | None,
    source: str | os.PathLike[str] | None = None,
    *,
    force: bool = False,
) -> RestoreResult:
    """Put a backup in the log's place (the newest sound automatic one by default)."""
    location = resolve_db(db)
    if location.kind == "memory":
        raise UsageError("nothing to restore into an in-memory log", field="db")
    backup = _backup_to_use(location, source)
    if location.is_server:
        return _restore_server(location, backup, force=force)
    return _restore_file(location, backup, force=force)


def _backup_to_use(location: LogLocation, source: str | os.PathLike[str] | None) -> Path:
    if source is not None:
        path = Path(source).expanduser()
        if not path.is_file():
            raise NotFoundError(f"no backup file {path}", field="file")
        return path
    if location.is_server or location.path is None:
        raise UsageError(
            "a server log has no automatic backups; name the file to restore",
            field="file",
            hint="sawplan restore FILE --db URL",
        )
    newest = safety.newest_good_backup(location.path)
    if newest is None:
        raise NotFoundError(
            f"no sound automatic backup in {safety.backups_dir(location.path)}",
            field="file",
            hint="name a copy made with `sawplan backup`: sawplan restore FILE",
        )
    return newest


def _is_export_zip(path: Path) -> bool:
    from sawplan.store.exchange import zipfile_like

    return zipfile_like(path)


def _check_backup(path: Path) -> None:
    """A backup must be a sound sawplan log before it replaces anything."""
    from sawplan.store.upgrade import check_sqlite_identity

    try:
        conn = sqlite3.connect(f"file:{path.resolve()}?mode=ro", uri=True, timeout=30.0)
        try:
            app_id = int(conn.execute("PRAGMA application_id").fetchone()[0])
            version = int(conn.execute("PRAGMA user_version").fetchone()[0])
            check_sqlite_identity(conn, app_id, version, str(path))
            if app_id == 0:
                raise DamagedFileError(f"{path} is not a sawplan blade log", field="file")
            problems = safety.integrity_problems(conn, full=True)
        finally:
            conn.close()
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        raise DamagedFileError(
            f"{path} is damaged or not a sawplan blade log ({sqlite_words(err)})", field="file"
        ) from None
    if problems:
        raise DamagedFileError(
            f"the backup {path} is damaged too (SQLite's check: {problems[0][:80]})",
            field="file",
            hint="name an older backup: sawplan restore FILE --force",
        )


def _restore_file(location: LogLocation, backup: Path, *, force: bool) -> RestoreResult:
    from sawplan.store.db import connect
    from sawplan.store.transfer import row_total

    log = location.path
    assert log is not None
    if backup.resolve() == log.resolve():
        raise UsageError("the backup is the log itself", field="file")
    if log.exists() and not force:
        raise ConflictError(
            f"{log} exists",
            field="db",
            hint=f"add --force to replace it with {backup} (the old log is kept beside it)",
        )
    tmp = safety.partial_of(log)
    if _is_export_zip(backup):
        from sawplan.store.exchange import import_csv

        safety.remove_partial(log)
        with connect(tmp) as fresh:
            import_csv(fresh, backup)
    else:
        _check_backup(backup)
        safety.copy_verified(backup, tmp)
    kept = _put_aside(log) if log.exists() else None
    os.replace(tmp, log)
    safety.clear_damage_mark(log)
    with connect(log, create=False) as restored:
        rows = {"rows": row_total(restored)}
    return RestoreResult(str(log), str(backup), kept, rows)


def _put_aside(log: Path) -> str:
    """Rename the log and its -wal/-shm out of the way, together (a stale -wal must never
    meet the restored file)."""
    stamp = dt.datetime.now().strftime("%Y%m%d-%H%M%S")
    aside = log.with_name(f"{log.name}.replaced-{stamp}")
    for suffix in ("-wal", "-shm", ""):
        part = Path(f"{log}{suffix}")
        if part.exists():
            os.replace(part, Path(f"{aside}{suffix}"))
    return str(aside)


def _restore_server(location: LogLocation, backup: Path, *, force: bool) -> RestoreResult:
    from sawplan.store.db import connect, run_write
    from sawplan.store.transfer import copy_log, row_total

    with connect(location) as log:
        if row_total(log) > 0 and not force:
            raise ConflictError(
                f"{location.label} already holds a log",
                field="db",
                hint="add --force to replace every row of it with the backup",
            )
    if _is_export_zip(backup):
        from sawplan.store.exchange import import_csv
        from sawplan.store.schema import ALL_TABLES, ident

        with connect(location) as log:

            def empty_and_import() -> dict[str, int]:
                for table in reversed(ALL_TABLES):
                    log.execute(f"DELETE FROM {ident(table)}")
                return import_csv(log, backup).rows

            rows = run_write(log, empty_and_import)
        return RestoreResult(location.label, str(backup), None, rows)
    _check_backup(backup)
    result = copy_log(backup, location, replace=True)
    return RestoreResult(
        location.label, str(backup), None, {t.table: t.rows for t in result.tables}
    )
