"""The order of a blade's dates, kept by every write step of the log, on both engines.

A blade is bought before it is fitted, fitted before it cuts or anything happens
to it, and cuts nothing after it is retired (common practice: a log of what
happened).  Each refusal names both dates, exits 3 (bad data, DEVELOPERS.md)
and writes nothing: the rows are read back through the engine's own driver
(``tests/logrows.py``).
"""

from __future__ import annotations

import csv

import pytest
from logrows import snapshot

from sawplan.errors import BadDataError
from sawplan.store import connect
from sawplan.store.exchange import export_csv, import_csv
from sawplan.store.records import (
    BladeSpec,
    CutEntry,
    EventEntry,
    add_blade,
    add_saw,
    fit_blade,
    get_blade,
    log_cut,
    log_event,
    retire_blade,
)


def spec(tag: str, bought: str | None = "2024-03-10") -> BladeSpec:
    return BladeSpec(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=3.0, tpi_fine=4.0,
                     bought_on=bought)  # fmt: skip


def cut(db, tag: str, day: str) -> CutEntry:
    return CutEntry(blade_id=get_blade(db, tag).id, cut_on=day, material="304",
                    material_group="austenitic-stainless", section="round 60mm", area_mm2=2827.4)  # fmt: skip


@pytest.fixture
def db(log_db):
    from sawplan.saws import load_saws

    with connect(log_db) as database:
        saws = load_saws()
        for name in ("mid-production", "small-horizontal"):
            add_saw(database, saws[name], added_on="2024-03-01")
        add_blade(database, spec("B-1"), added_on="2024-03-20")
        add_blade(database, spec("B-2"), added_on="2024-03-20")
        fit_blade(database, "B-2", "mid-production", on="2024-03-12")
        log_cut(database, cut(database, "B-2", "2024-03-14"))
        yield database


REFUSALS = [
    pytest.param(lambda db: fit_blade(db, "B-1", "small-horizontal", on="2024-03-09"),
                 "blade B-1: fitted on 2024-03-09 is before it was bought (2024-03-10)",
                 id="fitted before it was bought"),
    pytest.param(lambda db: log_cut(db, cut(db, "B-2", "2024-03-11")),
                 "blade B-2: a cut on 2024-03-11 is before it was first fitted (2024-03-12)",
                 id="cut before fitting"),
    pytest.param(lambda db: log_cut(db, cut(db, "B-1", "2024-03-01")),
                 "blade B-1: a cut on 2024-03-01 is before it was bought (2024-03-10)",
                 id="cut before purchase"),
    pytest.param(lambda db: log_event(db, EventEntry("B-2", "stall", "2024-03-11")),
                 "blade B-2: an event on 2024-03-11 is before it was first fitted (2024-03-12)",
                 id="event before fitting"),
    pytest.param(lambda db: retire_blade(db, "B-2", "weld", on="2024-03-13"),
                 "blade B-2: a cut on 2024-03-14 is after it was retired (2024-03-13)",
                 id="retired before its last cut"),
    pytest.param(lambda db: fit_blade(db, "B-2", "small-horizontal", on="2024-03-11"),
                 "blade B-2: taken off on 2024-03-11 is before it was fitted (2024-03-12)",
                 id="moved before it was fitted"),
]  # fmt: skip


@pytest.mark.parametrize(("write", "message"), REFUSALS)
def test_out_of_order_dates_are_refused_naming_both(db, log_db, write, message):
    before = snapshot(log_db)
    with pytest.raises(BadDataError) as err:
        write(db)
    assert message in str(err.value) and err.value.field == "date"
    assert snapshot(log_db) == before


def test_dates_in_order_are_taken(db):
    log_event(db, EventEntry("B-2", "stall", "2024-03-12"))  # the day it was fitted
    log_cut(db, cut(db, "B-2", "2024-03-15"))
    blade = retire_blade(db, "B-2", "worn-out", on="2024-03-15")  # the day of its last cut
    assert blade.status == "retired"


def test_a_first_fitting_after_cuts_on_an_unfitted_blade_is_refused(db, log_db):
    log_cut(db, cut(db, "B-1", "2024-03-11"))  # logged with no saw fitted: allowed
    before = snapshot(log_db)
    with pytest.raises(BadDataError, match=r"a cut on 2024-03-11 is before it was first fitted"):
        fit_blade(db, "B-1", "small-horizontal", on="2024-03-13")
    assert snapshot(log_db) == before


def test_the_cli_refuses_with_exit_3_and_one_line(cli, log_db, db):
    result = cli("blade", "retire", "B-2", "--failure", "dull", "--date", "2024-03-13",
                 "--db", str(log_db))  # fmt: skip
    assert result.code == 3
    assert result.err.strip().splitlines() == [
        "error: date: blade B-2: a cut on 2024-03-14 is after it was retired (2024-03-13)"
    ]


def test_import_refuses_rows_out_of_order_and_writes_nothing(db, log_db, tmp_path):
    """A CSV edited by hand: a cut dated after the blade's retirement."""
    retire_blade(db, "B-2", "dull", on="2024-03-16")
    folder = tmp_path / "export"
    export_csv(db, folder)
    rows = list(csv.DictReader((folder / "cuts.csv").open(encoding="utf-8")))
    rows[0]["cut_on"] = "2024-03-18"
    with (folder / "cuts.csv").open("w", encoding="utf-8", newline="") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(rows[0]))
        writer.writeheader()
        writer.writerows(rows)
    target = tmp_path / "new.sqlite"
    with connect(target) as fresh:
        before = snapshot(target)
        with pytest.raises(
            BadDataError,
            match=r"blade B-2: a cut on 2024-03-18 is after it was retired \(2024-03-16\)",
        ):
            import_csv(fresh, folder)
    assert snapshot(target) == before
