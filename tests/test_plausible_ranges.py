"""Implausible values are refused where they enter, by the one field table, and never stored.

Each case pins a value that once got through somewhere (the command line, a job
or stock file, an import, the store's own write steps) and the one-line answer
it gets now: exit 3 (bad data, DEVELOPERS.md), the field in the user's words,
its range and unit, and nothing written.  Ranges and their reasons are in
``sawplan/fields.py``; the rows are read back through the engine's own driver
(``tests/logrows.py``), so "nothing written" does not trust the code under test.
"""

from __future__ import annotations

import csv
import math
import sqlite3
from pathlib import Path

import pytest
from cli_walk import set_first_cell
from logrows import snapshot

from sawplan.errors import BadDataError, ExitCode
from sawplan.store import connect
from sawplan.store.fields import StoredValueError, check_row

BLADE = ["--pitch", "4/6", "--blade-width", "27mm", "--blade-thickness", "0.9mm"]


@pytest.fixture
def shop_log(cli, tmp_path) -> Path:
    """A log with a saw, a blade bought 2024-03-01 and fitted 2024-03-02, and one cut."""
    log = tmp_path / "log.sqlite"
    steps = [
        ["saw", "add", "bay 1", "--like", "mid-production"],
        ["blade", "add", "B-1", *BLADE, "--bought", "2024-03-01", "--price", "50"],
        ["blade", "fit", "B-1", "--saw", "bay 1", "--date", "2024-03-02"],
        ["log", "cut", "304", "round", "50mm", "--date", "2024-03-03"],
    ]
    for args in steps:
        result = cli(*args, "--db", str(log))
        assert result.code == 0, result.err
    return log


def refused(result, *words: str) -> None:
    assert result.code == ExitCode.BAD_DATA, result.err
    assert result.err.startswith("error: ") and result.err.count("\n") == 1, result.err
    for word in words:
        assert word in result.err, result.err


# --- sections ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("section", "size"),
    [
        pytest.param(["round", "1e-12mm"], "diameter", id="round"),
        pytest.param(["square", "1e-12mm"], "side", id="square"),
        pytest.param(["flat", "1e-12mm", "1e-12mm"], "width", id="flat"),
        pytest.param(["tube", "1e-12mm", "1e-13mm"], "outside diameter", id="tube"),
        pytest.param(["angle", "1e-12mm", "1e-12mm", "1e-13mm"], "leg a", id="angle"),
    ],
)
def test_a_section_smaller_than_foil_is_refused_before_any_arithmetic(cli, section, size):
    refused(cli("cut", "304", *section), f"{size}: must be from 0.1 mm to 5,000 mm")


def test_an_imported_section_is_read_as_the_cut_command_reads_it(cli, shop_log, tmp_path):
    said = cli("cut", "304", "tube", "50mm", "30mm")
    refused(said, "wall: must be less than half the outside diameter")
    folder = export_with(cli, shop_log, tmp_path, "cuts", "section", "tube 50mm 30mm")
    result = cli("import", str(folder), "--db", str(tmp_path / "new.sqlite"))
    refused(result, "cuts.csv row 1 (line 2): section:", said.err.removeprefix("error: ").strip())
    assert snapshot(tmp_path / "new.sqlite") == {}


# --- the command line ----------------------------------------------------------------------


def test_a_cut_of_under_a_square_millimetre_is_not_logged(cli, shop_log):
    before = snapshot(shop_log)
    refused(cli("log", "cut", "304", "round", "50mm", "--area", "0.5mm2", "--db", str(shop_log)),
            "area cut: must be from 1 mm² to 1,000 m²")  # fmt: skip
    refused(cli("log", "cut", "304", "round", "0.5mm", "--db", str(shop_log)),
            "area cut: must be from 1 mm²")  # fmt: skip
    assert snapshot(shop_log) == before


def test_a_feed_dial_setting_has_a_range(cli, shop_log):
    before = snapshot(shop_log)
    result = cli("log", "cut", "304", "round", "50mm", "--feed", "1e308", "--db", str(shop_log))
    refused(result, "feed dial setting: must be above 0 and at most 1,000")
    assert snapshot(shop_log) == before


@pytest.mark.parametrize(
    ("args", "words"),
    [
        pytest.param(["cut", "304", "round", "50mm", "--feed", "1e-300mm/min"],
                     "feed: must be from 0.1 mm/min", id="a feed of 1e-300 mm/min"),
        pytest.param(["cut", "304", "round", "50mm", "--pitch", "33"],
                     "pitch: must be from 0.5 to 32", id="33 TPI"),
        pytest.param(["cut", "304", "round", "50mm", "--economics", "--change-time", "1e-300min"],
                     "blade change time: must be from 1 min", id="a change in no time"),
        pytest.param(["saw", "add", "x", "--like", "mid-production", "--efficiency", "1e-300"],
                     "drive efficiency: must be from 0.1 to 1", id="a drive that loses all"),
    ],
)  # fmt: skip
def test_values_at_the_edge_of_nonsense_are_refused(cli, tmp_path, args, words):
    refused(cli(*args, "--db", str(tmp_path / "log.sqlite")) if args[0] == "saw" else cli(*args),
            words)  # fmt: skip


def test_a_pitch_has_one_range_for_blades_and_cuts(cli, tmp_path):
    blade = cli("blade", "add", "B-9", "--pitch", "33", "--blade-width", "27mm",
                "--blade-thickness", "0.9mm", "--db", str(tmp_path / "log.sqlite"))  # fmt: skip
    cut = cli("cut", "304", "round", "50mm", "--pitch", "33")
    refused(blade, "pitch: must be from 0.5 to 32")
    refused(cut, "pitch: must be from 0.5 to 32")


def test_a_cut_before_the_blade_was_first_fitted_is_refused(cli, tmp_path):
    log = str(tmp_path / "log.sqlite")
    assert cli("saw", "add", "bay 1", "--like", "mid-production", "--db", log).code == 0
    assert cli("blade", "add", "B-1", *BLADE, "--db", log).code == 0  # no date bought
    assert (
        cli("blade", "fit", "B-1", "--saw", "bay 1", "--date", "2026-01-02", "--db", log).code == 0
    )
    result = cli("log", "cut", "304", "round", "50mm", "--date", "1950-01-01", "--db", log)
    refused(result, "a cut on 1950-01-01 is before it was first fitted (2026-01-02)")


@pytest.mark.parametrize(
    "text",
    [pytest.param("B\x00X", id="NUL"), pytest.param("B\x1b[31mX", id="ESC"),
     pytest.param("B\u202eX", id="bidi override")],
)  # fmt: skip
def test_control_characters_never_reach_a_tag_or_a_note(cli, shop_log, text):
    before = snapshot(shop_log)
    refused(cli("blade", "add", text, *BLADE, "--db", str(shop_log)),
            "blade tag: must not hold control characters")  # fmt: skip
    refused(cli("log", "cut", "304", "round", "50mm", "--note", text, "--db", str(shop_log)),
            "note: must not hold control characters")  # fmt: skip
    assert snapshot(shop_log) == before


def test_a_filter_with_a_control_character_is_refused_not_matched(cli, shop_log):
    refused(cli("log", "list", "--job", "J\x01", "--db", str(shop_log)),
            "job: must not hold control characters")  # fmt: skip


# --- job and stock files -------------------------------------------------------------------

JOB = """[job]
kerf = "1.6mm"

[[stock]]
material = "4140"
section = "round 60mm"
length = "3m"
count = 4

[[part]]
name = "shaft"
material = "4140"
section = "round 60mm"
length = "450mm"
count = 12
"""


@pytest.mark.parametrize(
    ("old", "new", "words"),
    [
        pytest.param('kerf = "1.6mm"', 'kerf = "1e-300mm"', "kerf: must be from 0.1 mm to 10 mm",
                     id="kerf"),
        pytest.param('kerf = "1.6mm"', 'kerf = "1.6mm"\nshop_rate = 1e308',
                     "shop_rate: must be from 0 to 100,000", id="shop rate"),
        pytest.param('kerf = "1.6mm"', 'kerf = "1.6mm"\nhandling_time = "1e9min"',
                     "handling_time (handling time per cut): must be from 0 min to 10 h",
                     id="handling time"),
        pytest.param('length = "450mm"', 'length = "1e-300mm"',
                     "length (piece length): must be from 0.1 mm to 100 m", id="part length"),
        pytest.param('name = "shaft"', 'name = "sh\\u0000aft"',
                     "name (part name): must not hold control characters", id="NUL in a name"),
        pytest.param('name = "shaft"', 'name = "sh\\u001b[2Jaft"',
                     "name (part name): must not hold control characters", id="ESC in a name"),
        pytest.param('section = "round 60mm"\nlength = "3m"',
                     'section = "round 1e-12mm"\nlength = "3m"',
                     "diameter: must be from 0.1 mm to 5,000 mm", id="a section of 1e-12 mm"),
    ],
)  # fmt: skip
def test_a_job_file_value_out_of_its_range_names_key_words_and_line(cli, tmp_path, old, new,
                                                                    words):  # fmt: skip
    assert JOB.count(old) == 1
    job = tmp_path / "job.toml"
    job.write_text(JOB.replace(old, new), encoding="utf-8")
    result = cli("plan", str(job), "--saw", "mid-production")
    refused(result, "job.toml line ", words)


def test_a_stock_file_price_of_1e308_is_refused_with_its_line(cli, tmp_path):
    (tmp_path / "rack.csv").write_text(
        "material,section,length,count,price\n4140,round 60mm,3m,4,1e308\n", encoding="utf-8"
    )
    job = tmp_path / "job.toml"
    job.write_text(JOB.replace('kerf = "1.6mm"', 'kerf = "1.6mm"\nstock_file = "rack.csv"'),
                   encoding="utf-8")  # fmt: skip
    result = cli("plan", str(job), "--saw", "mid-production")
    refused(result, "rack.csv line 2", "price (stock price): must be from 0 to 10,000,000")


# --- imports -------------------------------------------------------------------------------


def export_with(cli, log: Path, tmp_path: Path, table: str, column: str, cell: str) -> Path:
    """An export of ``log`` whose first ``table`` row holds ``cell`` in ``column``."""
    folder = tmp_path / f"csv-{table}-{column}"
    assert cli("export", str(folder), "--db", str(log)).code == 0
    set_first_cell(folder / f"{table}.csv", column, cell)
    return folder


@pytest.mark.parametrize(
    ("table", "column", "cell", "words"),
    [
        pytest.param("blades", "price", "-5", "price: blade price: must be from 0 to 1,000,000",
                     id="a negative price"),
        pytest.param("cuts", "count", "9" * 30, "count: number of cuts: must be from 1 to 100,000",
                     id="a 30-digit count"),
        pytest.param("cuts", "count", "1e23", "count: expected a whole number", id="count 1e23"),
        pytest.param("cuts", "area_mm2", "1e-12", "area_mm2: area cut: must be from 1 mm²",
                     id="a cut of 1e-12 mm²"),
        pytest.param("cuts", "band_speed_m_min", "1e9", "band speed: must be from 3 m/min",
                     id="a band speed of 1e9 m/min"),
        pytest.param("cuts", "feed_setting", "1e308", "feed dial setting: must be above 0",
                     id="a dial at 1e308"),
        pytest.param("blades", "width_mm", "1e9", "blade width: must be from 3 mm to 100 mm",
                     id="a blade 1,000 km wide"),
        pytest.param("fittings", "tension_mpa", "1e9", "blade tension: must be from 20 MPa",
                     id="a tension of 1e9 MPa"),
        pytest.param("blades", "supplier", "\x1b]0;owned\x07", "supplier: must not hold control",
                     id="an escape sequence in a supplier"),
        pytest.param("cuts", "job", "J" * 61, "job: must be at most 60 characters",
                     id="a 61-character job"),
    ],
)  # fmt: skip
def test_an_import_obeys_the_same_ranges_as_the_command_line(cli, shop_log, tmp_path, table,
                                                            column, cell, words):  # fmt: skip
    folder = export_with(cli, shop_log, tmp_path, table, column, cell)
    target = tmp_path / "new.sqlite"
    result = cli("import", str(folder), "--db", str(target))
    refused(result, f"{table}.csv row 1 (line 2): ", words)
    assert snapshot(target) == {}


# --- the store's own write steps -------------------------------------------------------------


@pytest.mark.parametrize(
    ("table", "row", "words"),
    [
        pytest.param("blades", {"price": math.inf}, "blade price", id="an infinite price"),
        pytest.param("cuts", {"count": 2**63}, "number of cuts", id="a count past 64 bits"),
        pytest.param("cuts", {"pieces": 2**31}, "pieces cut at once", id="a 32-bit overflow"),
        pytest.param("cuts", {"area_mm2": 5.0, "count": 10}, "area cut", id="0.5 mm² a cut"),
        pytest.param("saws", {"name": "bay\x00"}, "saw", id="a NUL in a saw's name"),
        pytest.param("blades", {"tooth_form": "Hook"}, "tooth form", id="a word not in the list"),
        pytest.param("fittings", {"break_in": 2}, "break-in", id="a switch of 2"),
        pytest.param("cuts", {"cut_on": "1949-12-31"}, "date", id="a cut before 1950"),
        pytest.param("cuts", {"blade_id": 0}, "blade id", id="a row id of 0"),
    ],
)  # fmt: skip
def test_every_stored_row_is_checked_against_the_field_table(table, row, words):
    with pytest.raises(StoredValueError) as err:
        check_row(table, row)
    assert err.value.one_line().startswith(f"{words}: ")
    assert err.value.column in row


def test_an_implausible_value_never_reaches_either_engine(log_db):
    with connect(log_db) as db:
        db.insert("saws", {"name": "bay 1", "source": "blade log"})
        before = snapshot(log_db)
        with pytest.raises(BadDataError, match="blade price: must be from 0 to 1,000,000"):
            db.insert("blades", {"tag": "B-1", "width_mm": 27.0, "thickness_mm": 0.9,
                                 "tpi_coarse": 4.0, "price": 1e308})  # fmt: skip
        with pytest.raises(BadDataError, match="number of wheels"):
            db.update("saws", 1, {"wheel_count": 2**40})
    assert snapshot(log_db) == before


# --- what the terminal shows ---------------------------------------------------------------


def test_control_characters_in_an_old_log_are_shown_escaped(cli, shop_log):
    # a log written before the checks above: its text holds an escape sequence and an override
    conn = sqlite3.connect(shop_log)
    conn.execute("UPDATE blades SET supplier = ?, notes = ?, tag = ?",
                 ("east\x1b]0;owned\x07", "red\x1b[31m", "B-1\u202e"))  # fmt: skip
    conn.commit()
    conn.close()
    for args in (["blade", "list"], ["blade", "show", "B-1\u202e"]):
        result = cli(*args, "--db", str(shop_log))
        assert result.code == 0, result.err
        assert "\x1b" not in result.out and "\u202e" not in result.out and "\x07" not in result.out
        assert "B-1\\u202e" in result.out
    shown = cli("blade", "show", "B-1\u202e", "--db", str(shop_log)).out
    assert "red\\x1b[31m" in shown and "east\\x1b]0;owned\\x07" in shown


# --- a materials file ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("column", "cell", "words"),
    [
        pytest.param("band_speed_m_min", "1e308", "(band speed): must be from 3 m/min to 2,000 m/min",
                     id="a band speed of 1e308 m/min"),
        pytest.param("density_kg_m3", "1e308", "(density): must be from 500 kg/m³ to 23,000 kg/m³",
                     id="a density of 1e308"),
        pytest.param("hardness_hb", "1e-300", "(hardness): must be from 1 HB to 800 HB",
                     id="a hardness of 1e-300 HB"),
        pytest.param("cutting_rate_cm2_min", "0.01", "(cutting rate): must be from 0.1 cm²/min",
                     id="a cutting rate of 0.01 cm²/min"),
        pytest.param("notes", "red\x1b[31m", "notes: must not hold control characters",
                     id="an escape sequence in the notes"),
    ],
)  # fmt: skip
def test_a_materials_file_obeys_the_field_table(cli, tmp_path, column, cell, words):
    catalogue = Path(__file__).parent.parent / "data" / "materials.csv"
    with catalogue.open(encoding="utf-8", newline="") as handle:
        row = next(r for r in csv.DictReader(handle) if r["key"] == "1018")
    row.update(key="shop-1018", **{column: cell})
    mine = tmp_path / "mine.csv"
    with mine.open("w", encoding="utf-8", newline="") as handle:
        writer = csv.DictWriter(handle, list(row))
        writer.writeheader()
        writer.writerow(row)
    refused(cli("cut", "shop-1018", "round", "60mm", "--materials-file", str(mine)),
            "mine.csv row 2", words)  # fmt: skip
