"""The blade log's storage on both engines: schema, refusal of foreign logs, rows, lives.

Every test that takes ``log_db`` runs twice: on a SQLite file and on a
PostgreSQL database (``tests/conftest.py``).  External checks: the rows and
tables as the engine's own driver reads them (``tests/logrows.py``), SQLite's
``PRAGMA`` values, closed-form areas (πd²/4), the definitions of right
censoring (life-data analysis) and of the median (Python's ``statistics``).
"""

from __future__ import annotations

import math
import statistics

import pytest
import sqlalchemy.exc
from hypothesis import given, settings
from hypothesis import strategies as st
from logrows import execute, is_server, snapshot

from sawplan.errors import BadDataError, ConflictError, DamagedFileError, NotFoundError
from sawplan.saws import load_saws
from sawplan.store import calibration_factor, connect, life_for, saws_from_db
from sawplan.store.db import open_log, schema_version, write_transaction
from sawplan.store.records import (
    BladeSpec,
    CutEntry,
    EventEntry,
    add_blade,
    fit_blade,
    get_blade,
    list_cuts,
    log_cut,
    log_event,
    remove_blade,
    retire_blade,
)
from sawplan.store.schema import APPLICATION_ID, HEAD, REVISIONS, TABLE_NAMES, VERSION_TABLE
from sawplan.store.stats import blade_lives

ROUND_60_MM2 = math.pi * 60.0**2 / 4.0  # closed form πd²/4


def spec(tag: str, **kw) -> BladeSpec:
    base = dict(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=3.0, tpi_fine=4.0, price=60.0)
    return BladeSpec(**(base | kw))


def cut(blade_id: int, area: float = ROUND_60_MM2, **kw) -> CutEntry:
    base = dict(
        blade_id=blade_id,
        cut_on="2024-03-04",
        material="304",
        material_group="austenitic-stainless",
        section="round 60mm",
        area_mm2=area,
    )
    return CutEntry(**(base | kw))


# --- opening, schema, migrations ------------------------------------------------------------


def test_new_log_is_marked_and_migrated(log_db):
    with connect(log_db) as db:
        assert schema_version(db) == len(REVISIONS)
    tables = snapshot(log_db)
    assert set(TABLE_NAMES) <= set(tables)
    assert tables[VERSION_TABLE] == [(HEAD,)]  # Alembic's record: the newest revision
    if not is_server(log_db):
        import sqlite3

        conn = sqlite3.connect(log_db)
        try:
            assert conn.execute("PRAGMA application_id").fetchone()[0] == APPLICATION_ID
            assert conn.execute("PRAGMA user_version").fetchone()[0] == len(REVISIONS)
            assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        finally:
            conn.close()


def test_opening_twice_changes_nothing(log_db):
    with connect(log_db) as db:
        add_blade(db, spec("B-1"), added_on="2024-01-01")
    first = snapshot(log_db)
    with connect(log_db):
        pass
    assert snapshot(log_db) == first


@pytest.mark.parametrize(
    "make",
    [
        pytest.param(lambda p: p.write_text("tag,area\nB-1,3\n"), id="a CSV file"),
        pytest.param(
            lambda p: p.write_bytes(b"SQLite format 3\x00" + b"\xff" * 200), id="damaged header"
        ),
        pytest.param(
            lambda p: execute(p, "CREATE TABLE orders (id INTEGER)"),
            id="another program's database",
        ),
    ],
)
def test_foreign_files_are_refused_untouched(tmp_path, make):
    path = tmp_path / "other.sqlite"
    make(path)
    before = path.read_bytes()
    with pytest.raises(DamagedFileError) as err:
        open_log(path)
    assert "not a sawplan blade log" in str(err.value)
    assert path.read_bytes() == before


def test_another_applications_database_is_refused_untouched(pg_log):
    execute(pg_log, "CREATE TABLE orders (id integer PRIMARY KEY, item text)")
    before = snapshot(pg_log)
    with pytest.raises(DamagedFileError, match="another application's tables"):
        open_log(pg_log)
    assert snapshot(pg_log) == before


def test_newer_schema_is_refused(log_db):
    with connect(log_db):
        pass
    execute(log_db, f"UPDATE {VERSION_TABLE} SET version_num = '9001'")
    if not is_server(log_db):
        execute(log_db, f"PRAGMA user_version = {len(REVISIONS) + 1}")
    before = snapshot(log_db)
    with pytest.raises(DamagedFileError, match="newer sawplan"):
        open_log(log_db)
    assert snapshot(log_db) == before


def test_reading_a_missing_log_creates_nothing(log_db):
    assert saws_from_db(log_db) == []
    assert calibration_factor(log_db, "any saw", "carbon-steel") is None
    with connect(log_db, create=False) as db:
        assert list_cuts(db) == []
    assert set(snapshot(log_db)) == set()  # no file; no table in the empty database


# --- blades, fittings, cuts, events -----------------------------------------------------------


@pytest.fixture
def db(log_db):
    with connect(log_db) as database:
        yield database


def test_fitting_takes_the_old_blade_off_the_saw(db):
    saw = load_saws()["mid-production"]
    add_blade(db, spec("B-1"), added_on="2024-01-01")
    add_blade(db, spec("B-2"), added_on="2024-01-01")
    fit_blade(db, "B-1", "mid-production", on="2024-01-02", saw_profile=saw)
    out = fit_blade(db, "B-2", "mid-production", on="2024-01-05")
    assert out.displaced == "B-1"
    assert get_blade(db, "B-1").status == "removed"
    assert get_blade(db, "B-2").saw == "mid-production"
    # the database itself allows one open fitting per saw
    with pytest.raises(sqlalchemy.exc.IntegrityError), write_transaction(db):
        db.insert("fittings", {"blade_id": 1, "saw_id": 1, "fitted_on": "2024-01-06"})


def test_retired_blade_takes_no_cuts_or_events(db):
    add_blade(db, spec("B-1"), added_on="2024-01-01")
    blade = get_blade(db, "B-1")
    log_cut(db, cut(blade.id))
    retire_blade(db, "B-1", "dull", on="2024-03-05")
    before = db.scalar("SELECT COUNT(*) FROM cuts")
    with pytest.raises(ConflictError):
        log_cut(db, cut(blade.id))
    with pytest.raises(ConflictError):
        log_event(db, EventEntry("B-1", "stall", "2024-03-06"))
    with pytest.raises(ConflictError):
        retire_blade(db, "B-1", "weld", on="2024-03-07")
    assert db.scalar("SELECT COUNT(*) FROM cuts") == before


def test_failure_event_retires_the_blade(db):
    add_blade(db, spec("B-1"), added_on="2024-01-01")
    blade = log_event(db, EventEntry("B-1", "failure", "2024-02-01", mode="weld", location="weld"))
    assert (blade.status, blade.retire_cause) == ("retired", "weld")


@pytest.mark.parametrize(
    ("call", "error"),
    [
        pytest.param(lambda db: add_blade(db, spec("B-1"), added_on="2024-01-01"), ConflictError, id="tag taken"),
        pytest.param(lambda db: add_blade(db, spec("b-1"), added_on="2024-01-01"), ConflictError, id="tag taken, other case"),
        pytest.param(lambda db: add_blade(db, spec("X", thickness_mm=30.0), added_on="2024-01-01"), BadDataError, id="thicker than wide"),
        pytest.param(lambda db: retire_blade(db, "B-1", "melted", on="2024-01-02"), BadDataError, id="unknown failure mode"),
        pytest.param(lambda db: get_blade(db, "B-9"), NotFoundError, id="unknown blade"),
        pytest.param(lambda db: remove_blade(db, "B-1", on="2024-01-02"), ConflictError, id="remove an unfitted blade"),
        pytest.param(lambda db: fit_blade(db, "B-1", "no such saw", on="2024-01-02"), NotFoundError, id="unknown saw"),
    ],
)  # fmt: skip
def test_bad_requests_write_nothing(db, log_db, call, error):
    add_blade(db, spec("B-1"), added_on="2024-01-01")
    before = snapshot(log_db)
    with pytest.raises(error):
        call(db)
    assert snapshot(log_db) == before


def test_a_cut_row_is_small(tmp_path):
    """A typical cut entry stays well under 300 bytes of record (table + indexes on disk: bench)."""
    import sqlite3

    path = tmp_path / "log.sqlite"
    with connect(path) as db:
        add_blade(db, spec("B-1"), added_on="2024-01-01")
        log_cut(
            db,
            cut(
                1,
                time_min=3.25,
                predicted_time_min=3.1,
                band_speed_m_min=60.0,
                job="J-2291",
                heat="H77812",
            ),
        )
    conn = sqlite3.connect(path)
    columns = [r[1] for r in conn.execute("PRAGMA table_info(cuts)")]
    # SQLite's own record size of the row, summed over its columns
    size = conn.execute(
        f"SELECT {' + '.join(f'COALESCE(LENGTH(CAST({c} AS BLOB)), 0)' for c in columns)} FROM cuts"
    ).fetchone()[0]
    conn.close()
    assert size < 200


@settings(max_examples=40, deadline=None)
@given(
    entries=st.lists(
        st.tuples(st.integers(1, 500), st.floats(1.0, 1.0e5, allow_nan=False)),
        min_size=1,
        max_size=8,
    ),
    retire=st.booleans(),
)
def test_a_blade_life_is_the_sum_of_its_entries(entries, retire):
    """Invariant: life (cm²) = Σ entry areas / 100, a failure exactly when retired."""
    with connect(":memory:") as db:
        add_blade(db, spec("B-1"), added_on="2024-01-01")
        for count, per_cut in entries:
            log_cut(db, cut(1, area=count * per_cut, count=count))
        if retire:
            retire_blade(db, "B-1", "dull", on="2024-03-05")
        (life,) = blade_lives(db)
        blade = get_blade(db, "B-1")
    assert blade.cuts == sum(n for n, _ in entries)
    assert life.area_cm2 == pytest.approx(math.fsum(n * a for n, a in entries) / 100.0)
    assert life.failed is retire


# --- lives, calibration, planning hooks -------------------------------------------------------


def test_lives_are_failures_or_censored(db):
    """Life-data definition: retired = failure at its area; fitted or removed unworn = censored."""
    saw = load_saws()["mid-production"]
    for tag in ("B-1", "B-2", "B-3", "B-4"):
        add_blade(db, spec(tag), added_on="2024-01-01")
    fit_blade(db, "B-2", "mid-production", on="2024-01-02", saw_profile=saw)
    for blade_id, n in ((1, 3), (2, 2), (3, 1)):
        log_cut(db, cut(blade_id, area=ROUND_60_MM2 * n, count=n))
    remove_blade(db, "B-2", on="2024-03-05")
    retire_blade(db, "B-1", "stripped", on="2024-03-05")
    lives = {b.tag: b for b in blade_lives(db)}
    assert set(lives) == {"B-1", "B-2", "B-3"}  # B-4 has cut nothing: no information
    assert lives["B-1"].failed and lives["B-1"].mode == "stripped"
    assert not lives["B-2"].failed and not lives["B-3"].failed
    assert lives["B-1"].area_cm2 == pytest.approx(3 * ROUND_60_MM2 / 100)  # 1 cm² = 100 mm²


def test_calibration_needs_three_cuts_and_is_the_median_ratio(db):
    add_blade(db, spec("B-1"), added_on="2024-01-01")
    saw = load_saws()["mid-production"]
    fit_blade(db, "B-1", "mid-production", on="2024-01-02", saw_profile=saw)
    pairs = [(3.3, 3.0), (2.0, 2.5), (4.4, 4.0)]
    for actual, model in pairs[:2]:
        log_cut(db, cut(1, saw_id=1, time_min=actual, predicted_time_min=model))
    path = db.location.url or db.location.path
    assert calibration_factor(path, "mid-production", "austenitic-stainless") is None
    log_cut(db, cut(1, saw_id=1, time_min=pairs[2][0], predicted_time_min=pairs[2][1]))
    factor, n, cuts = calibration_factor(path, "MID-production", "austenitic-stainless")
    assert n == 3 and cuts == 3  # three entries of one cut each
    assert factor == pytest.approx(statistics.median(a / p for a, p in pairs))  # median of ratios
    assert calibration_factor(path, "mid-production", "carbon-steel") is None


def test_life_for_without_history_gives_the_reference_default(tmp_path):
    import pint

    ureg = pint.UnitRegistry()
    basis = life_for(tmp_path / "none.sqlite", "carbon-steel")
    fit, default, *_ = basis
    assert fit is None
    # typical life (memory): mild steel ≈ 10⁴ in²
    assert default.life_cm2 == pytest.approx((1e4 * ureg("inch**2")).to("cm**2").magnitude)
    assert "memory" in default.source and "calibrate" in basis.note
