"""Moving the log: CSV export/import (atomic, row-numbered errors), backup, and two writers.

Tests taking ``log_db`` run on a SQLite file and on a PostgreSQL database.
External checks: every table's rows read by the engine's own driver before and
after (``tests/logrows.py``), Python's ``csv`` module reading the exported
files back as a spreadsheet would, and SQLite's online backup producing a file
that opens as the same log.
"""

from __future__ import annotations

import csv
import math
import multiprocessing

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from logrows import snapshot

from sawplan import fields
from sawplan.errors import BadDataError, ConflictError
from sawplan.render import to_csv
from sawplan.saws import load_saws
from sawplan.store import connect
from sawplan.store.backup import backup
from sawplan.store.exchange import (
    TABLES,
    _convert_row,
    _export_cell,
    export_csv,
    import_csv,
)
from sawplan.store.records import (
    BladeSpec,
    CutEntry,
    EventEntry,
    add_blade,
    fit_blade,
    log_cut,
    log_event,
    retire_blade,
)

ROUND_60_MM2 = math.pi * 60.0**2 / 4.0  # closed form πd²/4
TRICKY = ('=HYPERLINK("x")', "+44 cut", "-dull edge", "@once", "'quoted", "plain, with comma")


def build_log(path, cuts: int = 80, *, undo_first: bool = False) -> None:
    """A small log touching every table and every kind of column."""
    saw = load_saws()["mid-production"]
    with connect(path) as db:
        add_blade(db, BladeSpec("B-1", 27.0, 0.9, 3.0, 4.0, length_mm=3505.0, price=60.0,
                                grade="M42", supplier="north depot", lot="=2291", bought_on="2024-01-01"),
                  added_on="2024-01-01")  # fmt: skip
        add_blade(
            db, BladeSpec("B-2", 27.0, 0.9, 4.0, 6.0, welded="in-house"), added_on="2024-01-01"
        )
        fit_blade(db, "B-1", "mid-production", on="2024-01-02", saw_profile=saw, tension_mpa=200.0,
                  break_in=True, break_in_how="half feed")  # fmt: skip
        for i in range(cuts):
            log_cut(
                db,
                CutEntry(
                    blade_id=1 + (i >= cuts // 2),
                    saw_id=1 if i < cuts // 2 else None,
                    cut_on=f"2024-02-{1 + i % 28:02d}",
                    material="304",
                    material_group="austenitic-stainless",
                    section="round 60mm",
                    area_mm2=ROUND_60_MM2 * (1 + i % 3),
                    count=1 + i % 3,
                    time_min=0.1 + i / 7,
                    predicted_time_min=0.1 + i / 9 if i % 2 else None,
                    band_speed_m_min=61.5,
                    feed_setting="3" if i % 4 == 0 else None,
                    coolant=bool(i % 5),
                    job=TRICKY[i % len(TRICKY)],
                    heat=f"H{i}",
                    note=TRICKY[(i + 1) % len(TRICKY)],
                ),
            )
        log_event(db, EventEntry("B-1", "teeth-lost", "2024-03-01", teeth=2, note="-2 teeth"))
        retire_blade(db, "B-2", "body-crack", on="2024-03-02", location="gullet")
        station_rows(db, saw, undo_first=undo_first)


def queued(n: int) -> list[dict]:
    """``n`` passes of an invented job on 60 mm rounds: a squaring cut, then 200 mm pieces."""
    return [{"seq": i + 1, "bar": 1 + i // 5, "step": "trim" if i % 5 == 0 else "part",
             "position_mm": 5.0 + 201.6 * (i % 5), "mark": None if i % 5 == 0 else f"P{i}",
             "part": "=spacer" if i % 5 else None, "heat": "H-77", "stock": "3m",
             "location": "rack B", "material": "304", "material_group": "austenitic-stainless",
             "section": "round 60mm", "area_mm2": ROUND_60_MM2, "predicted_time_min": 1.2,
             "band_speed_m_min": 40.0, "feed_mm_min": 25.0, "pitch": "4/6"}
            for i in range(n)]  # fmt: skip


def station_rows(db, saw, *, undo_first: bool = False) -> None:
    """Every station table: two jobs (one withdrawn), cuts done by taps, a correction,
    a remnant and a note; ``undo_first`` takes the first cut done back (a gap in the ids)."""
    from sawplan.store.job_rows import withdraw_job
    from sawplan.store.station_rows import (
        RemnantEntry,
        Saved,
        add_note,
        finish_cuts,
        once,
        rack_remnant,
        send_job,
        start_cut,
    )  # fmt: skip
    from sawplan.store.tap_fixes import correct_cut, take_back_cut

    job = send_job(db, name="+flanges", saw_name=saw.name, profile=saw, cuts=queued(12),
                   on="2024-03-03", customer="@harbour", due="2024-04-01")  # fmt: skip
    old = send_job(db, name="old job", saw_name=saw.name, profile=saw, cuts=queued(2),
                   on="2024-03-03")  # fmt: skip
    withdraw_job(db, old.id, on="2024-03-04")
    ids = [r["id"] for r in db.query("SELECT id FROM queue WHERE job_id = :j ORDER BY seq",
                                     {"j": job.id})]  # fmt: skip
    start_cut(db, saw.name, ids[0], at="2024-03-05T08:00:00+01:00")

    def entry(target, rows):
        return CutEntry(blade_id=target.blade.id, saw_id=target.saw_id, cut_on="2024-03-05",
                        material="304", material_group="austenitic-stainless",
                        section="round 60mm", area_mm2=ROUND_60_MM2 * len(rows),
                        count=len(rows), time_min=2.0 * len(rows), job=job.name)  # fmt: skip

    taps = []
    for n, chosen in enumerate((ids[0:2], ids[2:3], ids[3:6])):

        def done(chosen=chosen) -> Saved:
            cut_id, _e, _r = finish_cuts(db, saw.name, chosen, entry, on="2024-03-05")
            return Saved("-logged", cut_id=cut_id)

        once(db, f"{n + 1:032x}", "done", done, at=f"2024-03-05T08:{10 * n:02d}:00+01:00",
             saw_name=saw.name)  # fmt: skip
        taps.append(db.scalar("SELECT MAX(id) FROM taps"))
    fixed = correct_cut(db, taps[2], time_min=5.5, cuts=2)
    once(db, "f" * 32, "fix", lambda: Saved("fixed", fixed.cut_id, taps[2], fixed.change()),
         at="2024-03-05T08:25:00+01:00", saw_name=saw.name)  # fmt: skip
    if undo_first:
        taken = take_back_cut(db, taps[0])
        once(db, "e" * 32, "undo", lambda: Saved("undone", None, taps[0], taken.change()),
             at="2024-03-05T08:26:00+01:00", saw_name=saw.name)  # fmt: skip
    rack_remnant(db, RemnantEntry(length_mm=412.0, racked_on="2024-03-05", saw=saw.name,
                                  job_id=job.id, bar=1, material="304", section="round 60mm",
                                  heat="H-77", rack="=R2", note="'kept"))  # fmt: skip
    add_note(db, saw.name, "-coolant low", on="2024-03-05", job_id=job.id)


def rows(db) -> dict[str, list[tuple]]:
    every = snapshot(db)
    return {t: every[t] for t in TABLES}


@pytest.fixture(scope="module")
def exported(tmp_path_factory):
    base = tmp_path_factory.mktemp("exported")
    build_log(base / "log.sqlite")
    with connect(base / "log.sqlite") as db:
        export_csv(db, base / "csv")
    return base


def test_round_trip_into_a_fresh_log_gives_the_same_rows(exported, log_db):
    with connect(log_db) as db:
        result = import_csv(db, exported / "csv")
    assert result.rows["cuts"] == 80 + 3  # 80 logged, 3 by the station's taps
    assert result.rows["queue"] == 14 and result.rows["taps"] == 4
    assert rows(log_db) == rows(exported / "log.sqlite")
    assert all(rows(log_db)[t] for t in TABLES)  # every table has rows


def test_export_import_export_gives_the_same_files(tmp_path, log_db):
    """With the station's tables, and a cut taken back (the ids keep a gap)."""
    source = tmp_path / "source.sqlite"
    build_log(source, cuts=4, undo_first=True)
    with connect(source) as db:
        export_csv(db, tmp_path / "first")
    with connect(log_db) as db:
        result = import_csv(db, tmp_path / "first")
        export_csv(db, tmp_path / "second")
    assert result.rows["queue"] == 14 and result.rows["taps"] == 5  # 3 done, a fix, an undo
    for name in TABLES:
        first = (tmp_path / "first" / f"{name}.csv").read_text(encoding="utf-8")
        assert (tmp_path / "second" / f"{name}.csv").read_text(encoding="utf-8") == first, name


def test_formula_cells_are_neutralised(exported):
    cells = []
    for name in TABLES:
        with (exported / "csv" / f"{name}.csv").open(newline="", encoding="utf-8") as handle:
            cells += [c for row in csv.reader(handle) for c in row]
    leads = ("=", "+", "-", "@")
    risky = [c for c in cells if c.startswith(leads)]
    # numbers may start with "-" (none here are negative); no text cell may
    assert risky == []
    assert '\'=HYPERLINK("x")' in cells and "'@once" in cells
    assert {"'+flanges", "'@harbour", "'=spacer", "'=R2", "'-coolant low", "'-logged"} <= set(cells)
    assert "''quoted" in cells and "''kept" in cells  # one more, so import strips exactly one


@pytest.mark.parametrize(
    ("file", "column", "cell", "said"),
    [
        pytest.param("queue.csv", "area_mm2", "2e9", "area cut: must be", id="queue-area"),
        pytest.param("queue.csv", "step", "saw", "must be trim or part", id="queue-step"),
        pytest.param("queue.csv", "job_row", "9", "no row 9 in jobs.csv", id="queue-job"),
        pytest.param("remnants.csv", "length_mm", "0.5", "remnant length", id="remnant-length"),
        pytest.param("saw_notes.csv", "note", " ", "note: is required", id="note-empty"),
        pytest.param("taps.csv", "tap", "not-a-key", "tap key", id="tap-key"),
        pytest.param("taps.csv", "tapped_at", "at eight", "date and time", id="tap-time"),
        pytest.param("jobs.csv", "withdrawn_on", "", "open twice", id="job-open-twice"),
    ],
)
def test_station_rows_are_imported_by_the_station_s_own_rules(
    exported, tmp_path, file, column, cell, said
):
    bad = tmp_path / "bad"
    bad.mkdir()
    for name in TABLES:
        with (exported / "csv" / f"{name}.csv").open(newline="", encoding="utf-8") as handle:
            table = list(csv.reader(handle))
        if f"{name}.csv" == file:
            table[-1][table[0].index(column)] = cell  # the last row of the file
            if column == "withdrawn_on":  # the withdrawn job comes back with the same name
                table[-1][table[0].index("name")] = table[1][table[0].index("name")]
        (bad / f"{name}.csv").write_text(to_csv(table[0], table[1:]), encoding="utf-8")
    target = tmp_path / "t.sqlite"
    with connect(target):
        pass
    before = snapshot(target)
    with connect(target) as db, pytest.raises(BadDataError) as err:
        import_csv(db, bad)
    assert said in str(err.value) and (file in str(err.value) or column == "withdrawn_on")
    assert snapshot(target) == before


# any text the log stores: no control characters, line separators or bidi overrides
_TEXT = st.text(st.characters(blacklist_categories=("Cs", "Cc")), max_size=30).filter(
    lambda v: not fields.has_control(v)
)


@settings(max_examples=200, deadline=None)
@given(value=_TEXT)
def test_any_text_cell_round_trips(value):
    """Export cell → CSV text → csv reader → import cell gives the value back."""
    text = to_csv(["note"], [[_export_cell(value, "text")]])
    header, cell = list(csv.reader(text.splitlines()))
    row = _convert_row("x.csv", 1, dict(zip(header, cell, strict=True)), {"note": "text"})
    assert row["note"] == (value if value.strip() else None)


def test_bad_value_on_row_57_leaves_the_log_as_it_was(exported, tmp_path, log_db):
    target = log_db
    build_log(target, cuts=5)
    with connect(target) as db:  # blade tags of the export must not clash: rename them
        db.execute("UPDATE blades SET tag = tag || '-old'")
    bad = tmp_path / "bad"
    bad.mkdir()
    for name in TABLES:
        lines = (exported / "csv" / f"{name}.csv").read_text(encoding="utf-8").splitlines()
        if name == "cuts":
            header = lines[0].split(",")
            cells = next(csv.reader([lines[57]]))  # data row 57 is line 58
            cells[header.index("area_mm2")] = "lots"
            lines[57] = to_csv(header, [cells]).splitlines()[1]
        (bad / f"{name}.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
    before = snapshot(target)
    with connect(target) as db, pytest.raises(BadDataError) as err:
        import_csv(db, bad)
    assert "cuts.csv row 57 (line 58): area_mm2" in str(err.value)
    assert snapshot(target) == before


def test_interrupted_import_rolls_back_rows_already_written(exported, log_db, monkeypatch):
    """Stop the import after saws and blades are written: nothing may stay."""
    import sawplan.store.exchange as exchange

    target = log_db
    with connect(target):
        pass
    before = snapshot(target)
    calls = {"n": 0}
    real = exchange._resolve

    def flaky(*args, **kw):
        calls["n"] += 1
        if calls["n"] == 30:
            raise KeyboardInterrupt  # the user pressed Ctrl-C mid-import
        return real(*args, **kw)

    monkeypatch.setattr(exchange, "_resolve", flaky)
    with connect(target) as db, pytest.raises(KeyboardInterrupt):
        import_csv(db, exported / "csv")
    assert calls["n"] == 30
    assert snapshot(target) == before


def test_missing_columns_are_named(exported, tmp_path):
    folder = tmp_path / "cols"
    folder.mkdir()
    text = (exported / "csv" / "blades.csv").read_text(encoding="utf-8").splitlines()
    header = text[0].split(",")
    keep = [i for i, h in enumerate(header) if h not in ("tpi_fine", "status")]
    with (folder / "blades.csv").open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        for row in csv.reader(text):
            writer.writerow([row[i] for i in keep])
    target = tmp_path / "t.sqlite"
    with connect(target):
        pass
    before = snapshot(target)
    with (
        connect(target) as db,
        pytest.raises(BadDataError, match="missing columns tpi_fine, status"),
    ):
        import_csv(db, folder)
    assert snapshot(target) == before


def test_import_refuses_tags_already_in_the_log(exported, log_db):
    target = log_db
    build_log(target, cuts=2)
    before = snapshot(target)
    with (
        connect(target) as db,
        pytest.raises(BadDataError, match="blades.csv row 1 .*already in the log"),
    ):
        import_csv(db, exported / "csv")
    assert snapshot(target) == before


def test_backup_is_the_same_log_in_one_file(exported, tmp_path):
    copy = tmp_path / "copy.sqlite"
    result = backup(exported / "log.sqlite", copy)
    assert result.bytes == copy.stat().st_size and result.kind == "sqlite"
    assert not (tmp_path / "copy.sqlite-wal").exists()
    assert rows(copy) == rows(exported / "log.sqlite")
    with connect(copy, create=False) as db:  # opens as a sawplan log
        assert db.scalar("SELECT COUNT(*) FROM cuts") == 80 + 3
    with pytest.raises(ConflictError):
        backup(exported / "log.sqlite", copy)


# --- two writers at once -------------------------------------------------------------------


def _writer(path: str, tag: str, n: int, start, errors) -> None:
    try:
        from sawplan.store import connect
        from sawplan.store.records import BladeSpec, CutEntry, add_blade, get_blade, log_cut

        start.wait(30)
        with connect(path) as db:  # both processes may create and migrate the file
            add_blade(db, BladeSpec(tag, 27.0, 0.9, 3.0, 4.0), added_on="2024-01-01")
            blade_id = get_blade(db, tag).id
        for i in range(n):
            with connect(path) as db:  # one open per cut, as the command does
                log_cut(db, CutEntry(blade_id, "2024-02-01", "304", "austenitic-stainless",
                                     "round 60mm", 2827.43, note=f"{tag} {i}"))  # fmt: skip
    except BaseException as err:  # report to the parent instead of dying quietly
        errors.put(f"{tag}: {type(err).__name__}: {err}")


def test_two_processes_log_their_cuts_each(log_db):
    path = log_db
    n = 60 if "://" in log_db else 200  # a connection per cut costs more on a server
    ctx = multiprocessing.get_context("fork")
    start = ctx.Event()
    errors = ctx.Queue()
    workers = [
        ctx.Process(target=_writer, args=(path, tag, n, start, errors)) for tag in ("A", "B")
    ]
    for w in workers:
        w.start()
    start.set()
    for w in workers:
        w.join(120)
    problems = []
    while not errors.empty():
        problems.append(errors.get())
    assert problems == []
    assert [w.exitcode for w in workers] == [0, 0]
    every = snapshot(path)
    tags = {r[0]: r[1] for r in every["blades"]}
    per_blade = {tag: sum(1 for c in every["cuts"] if c[1] == i) for i, tag in tags.items()}
    assert len(every["cuts"]) == 2 * n
    assert per_blade == {"A": n, "B": n}
