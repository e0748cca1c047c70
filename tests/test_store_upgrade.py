"""One migration history for both engines, and the logs of earlier releases upgraded intact.

External checks:
- ``tests/data/legacy/*.sql``: logs written by the earlier release itself (its
  sqlite-utils migrations and commands), dumped as SQL; loaded here with the
  standard ``sqlite3`` module and read back the same way;
- Alembic's own ``compare_metadata`` (the migrated schema against the tables
  the program uses) and its script directory (the list of revisions);
- SQLite's ``PRAGMA table_info / index_list / index_xinfo / foreign_key_list``
  and ``sqlite_master``, comparing an upgraded old log with a new one.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest
from logrows import snapshot

from sawplan.errors import DamagedFileError
from sawplan.store import connect, safety
from sawplan.store.db import open_log, schema_version
from sawplan.store.records import get_blade, list_blades, log_cut
from sawplan.store.schema import (
    APPLICATION_ID,
    HEAD,
    LEGACY_TABLE,
    REVISIONS,
    TABLE_NAMES,
    VERSION_TABLE,
    metadata,
)
from sawplan.store.upgrade import script_revisions

LEGACY = Path(__file__).parent / "data" / "legacy"


def legacy_log(path: Path, schema: int) -> Path:
    """A log file exactly as the earlier release left it (schema 1 or 2)."""
    conn = sqlite3.connect(path)
    conn.executescript((LEGACY / f"blade-log-schema{schema}.sql").read_text(encoding="utf-8"))
    conn.close()
    return path


def pragma(path: Path, sql: str) -> list[tuple]:
    conn = sqlite3.connect(path)
    try:
        return conn.execute(sql).fetchall()
    finally:
        conn.close()


def test_the_revision_list_is_the_migration_scripts():
    assert list(REVISIONS) == script_revisions()


@pytest.mark.parametrize("schema", [1, 2])
def test_an_old_log_upgrades_and_keeps_every_row(tmp_path, schema):
    path = legacy_log(tmp_path / "blade-log.sqlite", schema)
    before = snapshot(path)
    assert pragma(path, "PRAGMA user_version") == [(schema,)]
    with connect(path) as db:
        blades = list_blades(db)
        assert schema_version(db) == len(REVISIONS)
    after = snapshot(path)
    for table in TABLE_NAMES:
        old_rows = before[table]
        width = len(old_rows[0]) if old_rows else 0
        assert [row[:width] for row in after[table]] == old_rows  # same rows, same ids
    # each blade's area is the sum of its cut entries, as the old rows say
    for blade in blades:
        areas = [r[7] for r in before["cuts"] if r[1] == blade.id]
        assert blade.area_mm2 == pytest.approx(sum(areas))
    assert LEGACY_TABLE not in after and after[VERSION_TABLE] == [(HEAD,)]
    assert pragma(path, "PRAGMA user_version") == [(len(REVISIONS),)]
    assert pragma(path, "PRAGMA application_id") == [(APPLICATION_ID,)]


def test_an_upgraded_old_log_takes_new_cuts(tmp_path):
    from sawplan.store.records import CutEntry

    path = legacy_log(tmp_path / "blade-log.sqlite", 1)
    with connect(path) as db:
        blade = get_blade(db, "a-1")  # the unique tag is case-blind after the upgrade too
        log_cut(db, CutEntry(blade.id, "2024-02-01", "304", None, "round 60mm", 100.0, heat="H1"))
        assert get_blade(db, "A-1").cuts == blade.cuts + 1


def _shape(path: Path) -> dict:
    """Every table's columns, indexes, foreign keys and STRICT flag, as SQLite reports them."""
    conn = sqlite3.connect(path)
    try:
        out = {}
        for table in (*TABLE_NAMES, VERSION_TABLE):
            indexes = {}
            for _seq, name, unique, _origin, partial in conn.execute(f"PRAGMA index_list({table})"):
                columns = [r[2] for r in conn.execute(f"PRAGMA index_xinfo({name})") if r[5]]
                sql = conn.execute(
                    "SELECT sql FROM sqlite_master WHERE name = ?", [name]
                ).fetchone()
                # the indexed expression and WHERE clause, quoting aside
                text = str(sql[0]).split(" ON ", 1)[1].replace('"', "") if sql[0] else ""
                expression = " ".join(text.split()) or None
                indexes[name] = (unique, partial, columns, expression)
            strict = conn.execute(f"PRAGMA table_list({table})").fetchone()[5]
            out[table] = {
                "columns": [r[1:] for r in conn.execute(f"PRAGMA table_info({table})")],
                "indexes": indexes,
                "keys": sorted(r[2:5] for r in conn.execute(f"PRAGMA foreign_key_list({table})")),
                "strict": strict,
            }
        return out
    finally:
        conn.close()


@pytest.mark.parametrize("schema", [1, 2])
def test_an_upgraded_old_log_has_the_new_logs_schema(tmp_path, schema):
    old = legacy_log(tmp_path / "old.sqlite", schema)
    with connect(old):
        pass
    with connect(tmp_path / "new.sqlite"):
        pass
    upgraded, new = _shape(old), _shape(tmp_path / "new.sqlite")
    for table in TABLE_NAMES:
        # the old release declared "id INTEGER PRIMARY KEY" (nullable in SQLite's eyes);
        # SQLAlchemy writes "id INTEGER NOT NULL ... PRIMARY KEY (id)": the same rowid key
        old_columns = [c[:2] + (c[2] or c[0] == "id",) + c[3:] for c in upgraded[table]["columns"]]
        assert old_columns == new[table]["columns"], table
        assert upgraded[table]["indexes"] == new[table]["indexes"], table
        assert upgraded[table]["keys"] == new[table]["keys"], table
        assert upgraded[table]["strict"] == new[table]["strict"] == 1, table


def _metadata_differences(url: str) -> list:
    """What Alembic's autogenerate would change to make the database match ``metadata()``.

    SQLite cannot reflect expression indexes (the lower() unique names): there the
    index comparison is ``test_an_upgraded_old_log_has_the_new_logs_schema``'s, through
    ``sqlite_master``.  A rowid key the old release declared "INTEGER PRIMARY KEY"
    reflects as nullable, though SQLite never lets it be NULL: not a difference.
    """
    import warnings

    from alembic.autogenerate import compare_metadata
    from alembic.migration import MigrationContext
    from sqlalchemy import create_engine

    engine = create_engine(url)
    try:
        with engine.connect() as conn:
            context = MigrationContext.configure(conn, opts={"version_table": VERSION_TABLE})
            with warnings.catch_warnings():
                warnings.filterwarnings("ignore", message=".*expression-based index")
                found = compare_metadata(context, metadata())
    finally:
        engine.dispose()
    sqlite = url.startswith("sqlite")
    return [d for d in found if not (sqlite and _nullable_rowid(d))]


def _nullable_rowid(diff) -> bool:
    return isinstance(diff, list) and [(d[0], d[3]) for d in diff] == [("modify_nullable", "id")]


def test_the_migrated_schema_is_the_programs_tables_on_both_engines(log_db, tmp_path):
    """Alembic compares the database the history built with the tables the code uses."""
    with connect(log_db):
        pass
    url = log_db if "://" in log_db else f"sqlite:///{log_db}"
    url = url.replace("postgresql://", "postgresql+psycopg://")
    assert _metadata_differences(url) == []
    old = legacy_log(tmp_path / "old.sqlite", 1)
    with connect(old):
        pass
    assert _metadata_differences(f"sqlite:///{old}") == []


def test_an_unknown_old_migration_is_a_newer_log(tmp_path):
    path = legacy_log(tmp_path / "blade-log.sqlite", 2)
    conn = sqlite3.connect(path)
    conn.execute(
        f"INSERT INTO {LEGACY_TABLE} (migration_set, name, applied_at) "
        "VALUES ('sawplan-blade-log', 'm003_from_the_future', '2030')"
    )
    conn.commit()
    conn.close()
    before = snapshot(path)
    with pytest.raises(DamagedFileError, match="newer sawplan"):
        open_log(path)
    assert snapshot(path) == before


# --- backups before an upgrade ---------------------------------------------------------------


def test_an_upgrade_keeps_a_backup_of_the_old_log(tmp_path, cli):
    log = legacy_log(tmp_path / "blade-log.sqlite", 2)
    rows = snapshot(log)
    assert cli("blade", "list", "--db", str(log)).code == 0  # opening upgrades it
    (backup,) = safety.backups_of(log)
    assert backup.parent.name == "backups"
    assert pragma(backup, "PRAGMA user_version") == [(2,)]  # the log as it was
    assert snapshot(backup) == rows
    assert pragma(backup, "PRAGMA integrity_check") == [("ok",)]


def test_only_the_newest_three_upgrade_backups_are_kept(tmp_path, cli):
    log = tmp_path / "blade-log.sqlite"
    for n in range(5):
        for suffix in ("", "-wal", "-shm"):
            Path(f"{log}{suffix}").unlink(missing_ok=True)
        legacy_log(log, 1)
        execute_sql(log, f"UPDATE blades SET tag = 'B-{n}'")
        assert cli("blade", "list", "--db", str(log)).code == 0
    backups = safety.backups_of(log)
    assert len(backups) == safety.BACKUPS_KEPT == 3
    assert [pragma(b, "SELECT tag FROM blades")[0][0] for b in backups] == ["B-2", "B-3", "B-4"]


def execute_sql(path: Path, sql: str) -> None:
    conn = sqlite3.connect(path)
    conn.execute(sql)
    conn.commit()
    conn.close()


def test_no_upgrade_without_a_backup(tmp_path, cli):
    log = legacy_log(tmp_path / "blade-log.sqlite", 1)
    (tmp_path / "backups").write_text("a file where the folder should be", encoding="utf-8")
    before = snapshot(log)
    result = cli("blade", "list", "--db", str(log))
    assert result.code == 7 and result.err.count("\n") == 1
    assert "could not back up" in result.err and "nothing was changed" in result.err
    assert snapshot(log) == before
    assert pragma(log, "PRAGMA user_version") == [(1,)]


# --- a shared log on the server changes only when the shop says so -----------------------------


def test_an_older_server_log_is_refused_until_db_upgrade(pg_log, cli):
    from sqlalchemy import create_engine

    from sawplan.store.upgrade import run_migrations

    engine = create_engine(pg_log.replace("postgresql://", "postgresql+psycopg://"))
    with engine.begin() as conn:
        run_migrations(conn, to=REVISIONS[1])  # a log an older sawplan made
    engine.dispose()
    result = cli("blade", "list", "--db", pg_log)
    assert result.code == 6 and result.err.count("\n") == 1
    assert f"holds schema 2; this sawplan uses {len(REVISIONS)}" in result.err
    assert "sawplan db upgrade" in result.err
    assert snapshot(pg_log)[VERSION_TABLE] == [(REVISIONS[1],)]  # nothing changed
    upgraded = cli("db", "upgrade", "--db", pg_log)
    assert upgraded.code == 0, upgraded.err
    assert f"from schema 2 to {len(REVISIONS)}" in upgraded.out
    assert snapshot(pg_log)[VERSION_TABLE] == [(HEAD,)]
    assert cli("blade", "list", "--db", pg_log).code == 0
    again = cli("db", "upgrade", "--db", pg_log)
    assert again.code == 0 and "nothing to do" in again.out
