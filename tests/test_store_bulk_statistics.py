"""After a bulk load (import, ``db copy``) PostgreSQL has fresh planner statistics.

The check reads PostgreSQL's own catalogue (``pg_stats``, filled by ANALYZE)
for the log's schema.  The load threshold is lowered for the test, so that a
small log stands for a shop's 10⁴ rows.
"""

from __future__ import annotations

import pytest
from test_store_exchange import build_log

from sawplan.store import connect
from sawplan.store import db as store_db
from sawplan.store.exchange import export_csv, import_csv
from sawplan.store.transfer import copy_log


def analysed(db, table: str) -> bool:
    return bool(
        db.scalar(
            "SELECT COUNT(*) FROM pg_stats WHERE schemaname = current_schema() AND tablename = :t",
            {"t": table},
        )
    )


@pytest.fixture
def small_bulk(monkeypatch):
    monkeypatch.setattr(store_db, "BULK_ROWS", 50)  # the log below has 83 cuts and 2 blades


def test_an_import_analyses_the_tables_it_filled(tmp_path, pg_log, small_bulk):
    build_log(tmp_path / "log.sqlite")
    with connect(tmp_path / "log.sqlite") as source:
        export_csv(source, tmp_path / "csv")
    with connect(pg_log) as db:
        assert not analysed(db, "cuts")
        result = import_csv(db, tmp_path / "csv")
        assert result.rows["cuts"] >= 50 > result.rows["blades"]
        assert analysed(db, "cuts")
        assert not analysed(db, "blades")  # a small table is left to autovacuum


def test_a_copy_analyses_the_tables_it_filled(tmp_path, pg_log, small_bulk):
    build_log(tmp_path / "log.sqlite")
    copy_log(tmp_path / "log.sqlite", pg_log)
    with connect(pg_log, create=False) as db:
        assert analysed(db, "cuts")
        assert not analysed(db, "blades")


def test_a_file_log_needs_no_statistics(tmp_path, small_bulk):
    build_log(tmp_path / "log.sqlite")
    copy_log(tmp_path / "log.sqlite", tmp_path / "copy.sqlite")  # no ANALYZE asked of SQLite
    with connect(tmp_path / "copy.sqlite", create=False) as db:
        assert db.scalar("SELECT COUNT(*) FROM sqlite_master WHERE name = 'sqlite_stat1'") == 0
