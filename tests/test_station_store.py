"""The station's rows on both engines: a plan sent to a saw, its queue, taps written once.

The job is ``tests/data/plan_small.toml``: 8 shafts of 450 mm and 6 collars of
80 mm from 60 mm rounds, a 5 mm trim and a 1.6 mm kerf.  Where each cut falls is worked out here from
those numbers alone (the bookkeeping of docs/cut-lists.md: the squaring cut
at the trim, then each piece's length plus one kerf), and every cut's area is
the circle's, π·30² mm² — not read back from the planner.
"""

from __future__ import annotations

import math
import shutil
from pathlib import Path

import pytest
from logrows import snapshot

from sawplan.errors import BadDataError, ConflictError
from sawplan.store import connect
from sawplan.store.dates import parse_day
from sawplan.store.records import CutEntry
from sawplan.store.station_rows import (
    RemnantEntry,
    finish_cuts,
    job_progress,
    once,
    rack_remnant,
    saw_queue,
    tap_said,
)

HERE = Path(__file__).parent
TRIM_MM, KERF_MM = 5.0, 1.6  # tests/data/plan_small.toml
PIECE_MM = {"shaft": 450.0, "collar": 80.0}
PIECES = 8 + 6
AREA_MM2 = math.pi * 30.0**2  # a 60 mm round, closed form
SAW = "mid-production"
TODAY = parse_day(None)


@pytest.fixture
def sent(cli, log_db, tmp_path):
    """The small job planned and sent to its saw, a blade fitted there."""
    job = tmp_path / "job.toml"
    shutil.copyfile(HERE / "data" / "plan_small.toml", job)
    result = cli("plan", str(job), "--send", "--db", log_db)
    assert result.code == 0, result.err
    assert "sent" in result.out
    for args in (
        ("blade", "add", "S-1", "--pitch", "4/6", "--blade-width", "27mm",
         "--blade-thickness", "0.9mm"),
        ("blade", "fit", "S-1", "--saw", SAW),
    ):  # fmt: skip
        assert cli(*args, "--db", log_db).code == 0
    return log_db


def test_the_queue_holds_every_pass_in_cut_sheet_order(sent):
    with connect(sent) as db:
        rows = saw_queue(db, SAW)
        (job,) = job_progress(db)
    assert [r["seq"] for r in rows] == list(range(1, len(rows) + 1))
    assert job["name"] == "pump shafts" and job["cuts"] == len(rows) and job["done"] == 0
    assert {r["heat"] for r in rows} <= {"H-2231", "H-1980"}
    by_bar: dict[int, list[dict]] = {}
    for r in rows:
        by_bar.setdefault(r["bar"], []).append(r)
        assert r["area_mm2"] == pytest.approx(AREA_MM2, rel=1e-9)
    pieces = 0
    for bar_rows in by_bar.values():
        assert bar_rows[0]["step"] == "trim"
        assert bar_rows[0]["position_mm"] == pytest.approx(TRIM_MM)
        end = TRIM_MM
        for k, r in enumerate(bar_rows[1:], start=1):
            assert r["step"] == "part"
            # the k-th piece ends its length (and a kerf from the second piece on) further
            end += PIECE_MM[r["part"]] + (KERF_MM if k > 1 else 0.0)
            assert r["position_mm"] == pytest.approx(end)
        pieces += len(bar_rows) - 1
    # a bar used to its very end needs no last cut: between 14 less one per bar and 14
    assert PIECES - len(by_bar) <= pieces <= PIECES


def test_sending_the_same_job_again_is_refused_while_it_has_cuts_to_do(cli, sent, tmp_path):
    before = snapshot(sent)
    again = cli("plan", str(tmp_path / "job.toml"), "--send", "--db", sent)
    assert again.code == 5 and "already in the queue" in again.err
    assert snapshot(sent) == before


def _entry(target, rows):
    return CutEntry(
        blade_id=target.blade.id,
        saw_id=target.saw_id,
        cut_on=TODAY,
        material=rows[0]["material"],
        material_group=rows[0]["material_group"],
        section=rows[0]["section"],
        area_mm2=sum(r["area_mm2"] for r in rows),
        count=len(rows),
        time_min=3.0,
    )


def test_a_tap_sent_twice_logs_once_and_a_refused_tap_writes_nothing(sent):
    key = "a" * 32
    with connect(sent) as db:
        ids = [r["id"] for r in saw_queue(db, SAW, limit=3)]

        def step() -> str:
            finish_cuts(db, SAW, ids, _entry, on=TODAY)
            return "three cuts"

        assert once(db, key, "done", step, at=TODAY + "T10:00:00", saw_name=SAW) == (
            "three cuts",
            False,
        )
        assert once(db, key, "done", step, at=TODAY + "T10:00:01", saw_name=SAW) == (
            "three cuts",
            True,
        )
        assert tap_said(db, key) == "three cuts"
    rows = snapshot(sent)
    assert len(rows["cuts"]) == 1 and len(rows["taps"]) == 1
    (cut,) = rows["cuts"]
    assert sum(1 for q in rows["queue"] if q[-1] == cut[0]) == 3  # cut_id is the last column
    before = rows
    with connect(sent) as db, pytest.raises(ConflictError, match="already logged"):
        once(db, "b" * 32, "done", step, at=TODAY + "T10:00:02", saw_name=SAW)
    assert snapshot(sent) == before  # neither the cut nor the tap's key


def test_a_remnant_out_of_range_is_refused_with_its_field_and_nothing_written(sent):
    before = snapshot(sent)
    with connect(sent) as db, pytest.raises(BadDataError, match="remnant length"):
        rack_remnant(db, RemnantEntry(length_mm=0.2, racked_on=TODAY, saw=SAW))
    assert snapshot(sent) == before
    with connect(sent) as db:
        rack_remnant(db, RemnantEntry(length_mm=310.0, racked_on=TODAY, saw=SAW, heat="H-2231"))
    (row,) = snapshot(sent)["remnants"]
    assert 310.0 in row and "H-2231" in row


def test_a_copy_of_the_log_carries_the_station_rows(cli, sent, tmp_path):
    with connect(sent) as db:
        rack_remnant(db, RemnantEntry(length_mm=350.0, racked_on=TODAY, saw=SAW, rack="R1"))
    copy = tmp_path / "copy.sqlite"
    result = cli("db", "copy", "--from", sent, "--to", str(copy))
    assert result.code == 0, result.err
    original, copied = snapshot(sent), snapshot(copy)
    for table in ("jobs", "queue", "remnants"):
        assert copied[table] == original[table] and copied[table]


def test_a_cut_done_is_corrected_and_taken_back_in_one_step_each_on_both_engines(sent):
    from sawplan.store.station_rows import Saved
    from sawplan.store.tap_fixes import correct_cut, day_cut_taps, take_back_cut

    with connect(sent) as db:
        ids = [r["id"] for r in saw_queue(db, SAW, limit=3)]

        def step() -> Saved:
            cut_id, _entry_done, _rows = finish_cuts(db, SAW, ids, _entry, on=TODAY)
            return Saved("three cuts", cut_id=cut_id)

        once(db, "c" * 32, "done", step, at=TODAY + "T10:00:00", saw_name=SAW)
        (tap,) = day_cut_taps(db, TODAY)
        fixed = correct_cut(db, tap["id"], cuts=1, time_min=1.5)
        assert fixed.cuts == (3, 1) and fixed.before["count"] == 3 and fixed.after["count"] == 1
    rows = snapshot(sent)
    (cut,) = rows["cuts"]
    assert cut[0] == tap["cut_id"] and cut[7] == pytest.approx(AREA_MM2)  # area_mm2, 8th column
    assert sum(1 for q in rows["queue"] if q[-1] == cut[0]) == 1
    before = rows
    with connect(sent) as db, pytest.raises(BadDataError, match="number of cuts"):
        correct_cut(db, tap["id"], cuts=0)  # the field table's range of "cuts"
    assert snapshot(sent) == before
    with connect(sent) as db:
        taken = take_back_cut(db, tap["id"])
        assert taken.after is None and taken.before["time_min"] == 1.5
        with pytest.raises(ConflictError, match="taken back already"):
            take_back_cut(db, tap["id"])
    rows = snapshot(sent)
    assert rows["cuts"] == [] and all(q[-1] is None for q in rows["queue"])
