"""The blade-log commands end to end, in-process through the real error boundary.

External checks: closed-form section areas (πd²/4, b·h), pint's unit
conversions (m², in², cm²), the typical blade lives (from memory) for the
default forecast and ⌈area/life⌉, and the exit codes documented in
DEVELOPERS.md (2 usage, 3 bad data, 4 not found, 5 conflict, 6 damaged file).
"""

from __future__ import annotations

import json
import math
import sqlite3

import pint
import pytest
from logrows import execute, is_server, snapshot

LOG_MODULES = (
    "sawplan.cli.cmd_saw",
    "sawplan.cli.cmd_blade",
    "sawplan.cli.cmd_log",
    "sawplan.cli.cmd_life",
    "sawplan.cli.cmd_logdata",
)
UREG = pint.UnitRegistry()


def cm2(expr: str) -> float:
    return UREG(expr).to("cm**2").magnitude


@pytest.fixture(scope="module", autouse=True)
def _log_commands():
    """Register the blade-log commands unless sawplan.cli.app lists them already."""
    import importlib

    from sawplan.cli import app as appmod

    for name in LOG_MODULES:
        if name not in appmod.COMMAND_MODULES:
            importlib.import_module(name).register(appmod.app)


@pytest.fixture
def log(cli, log_db):
    """``log(*args)`` runs a command against one fresh log: a file, then a PostgreSQL database."""

    def run(*args: str):
        return cli(*args, "--db", str(log_db))

    run.path = log_db
    return run


def rows_of(db) -> dict[str, list[tuple]]:
    """Every table's rows, read with the engine's own driver (``tests/logrows.py``)."""
    return snapshot(db)


def ok(result):
    assert result.code == 0, result.err
    return result


def setup_shop(log) -> None:
    ok(log("saw", "add", "bay 2", "--like", "mid-production", "--wheel", "450mm", "--power", "2.2kW",
           "--speed-range", "20-90m/min"))  # fmt: skip
    ok(log("blade", "add", "B-017", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm",
           "--blade-length", "3505mm", "--price", "60"))  # fmt: skip
    ok(log("blade", "add", "B-018", "--pitch", "4/6", "--blade-width", "27mm", "--blade-thickness", "0.9mm",
           "--price", "55", "--grade", "M42"))  # fmt: skip
    ok(log("blade", "fit", "B-017", "--saw", "bay 2"))


def test_saw_add_keeps_units_and_lists_with_the_packaged_ones(log):
    ok(log("saw", "add", "bay 2", "--like", "mid-production", "--wheel", "18in", "--power", "3hp",
           "--speed-range", "65-330 ft/min", "--capacity-rect", "14x10in"))  # fmt: skip
    saws = json.loads(ok(log("saw", "list", "--json")).out)["items"]
    mine = next(s for s in saws if s["name"] == "bay 2")
    assert mine["wheel_diameter_mm"] == pytest.approx(UREG("18 inch").to("mm").magnitude)
    assert mine["motor_power_w"] == pytest.approx(UREG("3 hp").to("W").magnitude)
    assert mine["band_speed_min_m_min"] == pytest.approx(UREG("65 ft/min").to("m/min").magnitude)
    assert mine["band_speed_max_m_min"] == pytest.approx(UREG("330 ft/min").to("m/min").magnitude)
    assert mine["capacity_rect_w_mm"] == pytest.approx(355.6)  # 14 in × 25.4 mm/in
    assert mine["capacity_rect_h_mm"] == pytest.approx(254.0)
    assert {"small-horizontal", "mid-production", "large-column"} <= {s["name"] for s in saws}


def test_batch_of_cuts_is_n_times_the_section_area(log):
    setup_shop(log)
    out = ok(log("log", "cut", "304", "round", "60mm", "--cuts", "12", "--time", "30min", "--json"))
    entry = json.loads(out.out)
    assert entry["count"] == 12
    assert entry["area_mm2"] == pytest.approx(12 * math.pi * 60.0**2 / 4)  # 12 × πd²/4
    assert entry["time_min"] == pytest.approx(30.0)
    assert entry["blade"] == "B-017" and entry["saw"] == "bay 2"
    assert entry["predicted_time_min"] > 0  # the cutting model knows this saw, blade and cut
    flat = json.loads(
        ok(log("log", "cut", "4140", "flat", "100mm", "25mm", "--cuts", "3", "--json")).out
    )
    assert flat["area_mm2"] == pytest.approx(3 * 100.0 * 25.0)  # 3 × b·h
    bundle = json.loads(
        ok(log("log", "cut", "A36", "round", "40mm", "--bundle", "3x4", "--json")).out
    )
    assert bundle["pieces"] == 12
    assert bundle["area_mm2"] == pytest.approx(12 * math.pi * 40.0**2 / 4)  # 12 rounds of πd²/4
    blade = json.loads(ok(log("blade", "list", "--json")).out)["items"][0]
    assert blade["cuts"] == 12 + 3 + 1
    assert blade["area_mm2"] == pytest.approx(
        entry["area_mm2"] + flat["area_mm2"] + bundle["area_mm2"]
    )


def test_partial_cut_area_and_dial_feed(log):
    setup_shop(log)
    entry = json.loads(ok(log("log", "cut", "304", "round", "60mm", "--area", "20cm2", "--feed", "3",
                               "--band-speed", "200ft/min", "--dry", "--json")).out)  # fmt: skip
    assert entry["area_mm2"] == pytest.approx(2000.0)  # 20 cm² = 2000 mm²
    assert entry["feed_setting"] == "3" and entry["feed_mm_min"] is None
    assert entry["band_speed_m_min"] == pytest.approx(UREG("200 ft/min").to("m/min").magnitude)
    assert entry["coolant"] is False


def test_fit_replaces_the_blade_on_the_saw_and_show_lists_history(log):
    setup_shop(log)
    ok(log("log", "cut", "304", "round", "60mm", "--time", "3min", "--job", "=SUM(A1)"))
    out = ok(log("blade", "fit", "B-018", "--saw", "bay 2")).out
    assert "B-017 was taken off bay 2" in out
    assert "stopped and isolated" in out  # the safety caution
    blades = {b["tag"]: b for b in json.loads(ok(log("blade", "list", "--json")).out)["items"]}
    assert blades["B-017"]["status"] == "removed" and blades["B-018"]["status"] == "fitted"
    shown = ok(log("blade", "show", "B-017")).out
    assert "round Ø60 mm" in shown and "=SUM(A1)" in shown  # the section in display units
    history = json.loads(ok(log("blade", "show", "B-017", "--json")).out)
    assert len(history["cuts"]) == 1 and len(history["fittings"]) == 1


def test_retire_then_life_json_has_the_promised_keys(log):
    setup_shop(log)
    ok(log("log", "cut", "304", "round", "60mm", "--cuts", "10", "--time", "40min"))
    ok(log("blade", "retire", "B-017", "--failure", "dull"))
    ok(log("blade", "fit", "B-018", "--saw", "bay 2"))
    ok(log("log", "cut", "304", "round", "60mm", "--cuts", "4"))
    life = json.loads(ok(log("life", "--json")).out)
    for key in ("weibull_shape", "weibull_scale_cm2", "median_life_cm2", "b10_life_cm2",
                "blades", "failed", "censored"):  # fmt: skip
        assert key in life
    assert (life["blades"], life["failed"], life["censored"]) == (2, 1, 1)
    assert life["weibull_shape"] is None  # one failure cannot give a fit, and says so
    assert life["failure_modes"]["modes"][0]["code"] == "dull"
    grouped = json.loads(ok(log("life", "--json", "--group-by", "blade-type")).out)
    assert sorted(g["key"] for g in grouped["groups"]) == [
        "bi-metal 27×0.9 3/4",
        "bi-metal M42 27×0.9 4/6",
    ]
    text = ok(log("life")).out
    assert "1 retired" in text and "dull" in text


def test_life_of_an_empty_log_says_so(log):
    out = ok(log("life")).out
    assert "0 blades" in out
    assert rows_of(log.path) == {}  # reading creates no file and no table


@pytest.mark.parametrize(
    ("args", "life_expr"),
    [
        pytest.param(
            ("--area", "5m2"), "1e4 inch**2", id="no material: mild steel 10^4 in2 (memory)"
        ),
        pytest.param(
            ("--area", "5m2", "--material", "304"),
            "3.5e3 inch**2",
            id="304: austenitic 2-5e3 in2, middle (memory)",
        ),  # fmt: skip
        pytest.param(
            ("--area", "20000in2", "--material", "600"),
            "1e3 inch**2",
            id="alloy 600: nickel alloys 1e3 in2 (memory)",
        ),  # fmt: skip
        pytest.param(("--area", "5m2", "--life", "2m2"), "2 m**2", id="life given"),
    ],
)
def test_forecast_without_history_is_area_over_default_life(log, args, life_expr):
    result = json.loads(ok(log("forecast", *args, "--json")).out)
    area_cm2 = cm2(args[1].replace("m2", " m**2").replace("in2", " inch**2"))
    assert result["blades_needed"] == math.ceil(area_cm2 / cm2(life_expr))  # ⌈area / life⌉
    assert result["method"] == "deterministic"
    if "--life" not in args:
        assert "memory" in result["note"] and "calibrate" in result["note"]


def test_forecast_uses_the_log_once_it_has_a_fit(log):
    setup_shop(log)
    for tag, cuts, cause in (("B-017", "10", "dull"), ("B-018", "25", "stripped")):
        if tag != "B-017":  # B-017 is on the saw already
            ok(log("blade", "fit", tag, "--saw", "bay 2"))
        ok(log("log", "cut", "304", "round", "60mm", "--cuts", cuts))
        ok(log("blade", "retire", tag, "--failure", cause))
    result = json.loads(ok(log("forecast", "--area", "1m2", "--json")).out)
    assert result["life_source"] == "blade log" and result["method"] == "weibull-simulation"
    assert result["blades_needed"] >= 1


def test_export_import_backup_commands(log, tmp_path):
    setup_shop(log)
    ok(log("log", "cut", "304", "round", "60mm", "--cuts", "3", "--note", "@risky"))
    ok(log("export", str(tmp_path / "csv")))
    assert "'@risky" in (tmp_path / "csv" / "cuts.csv").read_text(encoding="utf-8")
    copy = tmp_path / "copy.sqlite"
    said = ok(log("backup", str(copy))).out
    fresh = tmp_path / "fresh.sqlite"
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    assert run_guarded(run, ["import", str(tmp_path / "csv"), "--db", str(fresh)]) == 0
    assert rows_of(fresh)["cuts"] == rows_of(log.path)["cuts"]
    if is_server(log.path):  # a pg_dump archive or the export set, and it says which
        assert "pg_dump archive" in said or "the export set" in said
    else:
        assert "a SQLite copy of the log" in said
        assert rows_of(copy)["cuts"] == rows_of(log.path)["cuts"]


def test_charts_print_and_give_their_data(log):
    setup_shop(log)
    for minutes in ("3min", "3.1min", "3min", "3.2min", "3.1min"):
        ok(log("log", "cut", "304", "round", "60mm", "--cuts", "5", "--time", minutes))
    chart = ok(log("chart", "wear", "B-017", "--chart-width", "60", "--chart-height", "15")).out
    assert "area cut (cm²)" in chart and "\x1b[" not in chart
    data = json.loads(ok(log("chart", "wear", "B-017", "--json")).out)["items"]
    assert len(data) == 5
    assert data[-1]["cumulative_area_cm2"] == pytest.approx(
        25 * math.pi * 36 / 4
    )  # 25 × πd²/4, d 6 cm
    assert ok(log("chart", "modes", "--csv")).out.startswith("mode,name,count")
    assert "no failures" in ok(log("chart", "weibull")).out
    assert ok(log("chart", "cost", "--json")).code == 0


# --- bad input: one line, an exit code, nothing written ---------------------------------------


@pytest.fixture(scope="module")
def shop_template(tmp_path_factory):
    """The shop of ``setup_shop`` plus a retired blade, built once through the store API."""
    import dataclasses

    from sawplan.saws import load_saws
    from sawplan.store import connect
    from sawplan.store.records import BladeSpec, add_blade, add_saw, fit_blade, retire_blade

    path = tmp_path_factory.mktemp("shop") / "template.sqlite"
    bay2 = dataclasses.replace(load_saws()["mid-production"], name="bay 2")
    with connect(path) as db:
        add_saw(db, bay2, added_on="2024-01-01")
        add_blade(db, BladeSpec("B-017", 27.0, 0.9, 3.0, 4.0, price=60.0), added_on="2024-01-01")
        add_blade(db, BladeSpec("B-018", 27.0, 0.9, 4.0, 6.0, grade="M42"), added_on="2024-01-01")
        add_blade(db, BladeSpec("B-OLD", 27.0, 0.9, 6.0, 6.0), added_on="2024-01-01")
        fit_blade(db, "B-017", "bay 2", on="2024-01-02")
        retire_blade(db, "B-OLD", "weld", on="2024-01-03")
    conn = sqlite3.connect(path)  # one self-contained file to copy
    conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    conn.close()
    return path


@pytest.mark.parametrize(
    ("args", "code", "message"),
    [
        pytest.param(("log", "cut", "304", "round", "60mm", "--blade", "B-999"), 4, "no blade 'B-999'", id="unknown blade"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--blade", "B-OLD"), 5, "retired", id="retired blade"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--area", "30cm2"), 3, "more than the section allows", id="area over the section (28.3 cm2)"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--date", "2999-01-01"), 3, "in the future", id="future date"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--date", "31/12/2023"), 2, "expected a date", id="unreadable date"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--date", "2023-02-30"), 2, "not a calendar date", id="no such day"),
        pytest.param(("log", "cut", "unobtainium", "round", "60mm"), 4, "unobtainium", id="unknown material"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--cuts", "0"), 3, "cuts", id="zero cuts"),
        pytest.param(("log", "cut", "304", "round", "60mm", "--time", "5kg"), 2, "time", id="time in kg"),
        pytest.param(("blade", "add", "B-NEW", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9"), 2, "thickness", id="no unit"),
        pytest.param(("blade", "add", "B-017", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm"), 5, "already in the log", id="tag taken"),
        pytest.param(("blade", "retire", "B-017", "--failure", "tired"), 3, "must be one of", id="unknown cause"),
        pytest.param(("blade", "fit", "B-018", "--saw", "no-such-saw"), 4, "no saw", id="unknown saw"),
        pytest.param(("log", "event", "B-017", "sneeze"), 2, "teeth-lost", id="unknown event"),
        pytest.param(("saw", "add", "x", "--kind", "horizontal"), 2, "missing --wheel", id="incomplete saw"),
        pytest.param(("forecast", "--area", "5kg"), 2, "area", id="area in kg"),
    ],
)  # fmt: skip
def test_bad_input_is_one_line_with_its_exit_code(log, shop_template, args, code, message):
    import shutil

    if is_server(log.path):
        from sawplan.store.transfer import copy_log

        copy_log(shop_template, log.path)
    else:
        shutil.copyfile(shop_template, log.path)
    before = rows_of(log.path)
    result = log(*args)
    assert result.code == code, result.err
    assert message in result.err
    assert result.err.count("\n") == 1 and "Traceback" not in result.err
    assert rows_of(log.path) == before


def test_no_fitted_blade_and_no_blade_option(log):
    ok(
        log(
            "blade",
            "add",
            "B-1",
            "--pitch",
            "3/4",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        )
    )
    result = log("log", "cut", "304", "round", "60mm")
    assert result.code == 2
    assert "no blade is fitted" in result.err and "--blade" in result.err
    assert rows_of(log.path)["cuts"] == []


def test_several_fitted_blades_need_a_saw(log):
    setup_shop(log)
    ok(log("blade", "fit", "B-018", "--saw", "small-horizontal"))
    result = log("log", "cut", "304", "round", "60mm")
    assert result.code == 2 and "--saw" in result.err
    entry = json.loads(
        ok(log("log", "cut", "304", "round", "60mm", "--saw", "small-horizontal", "--json")).out
    )
    assert entry["blade"] == "B-018"


@pytest.mark.parametrize(
    "content",
    [
        pytest.param(b"blade,area\nB-1,3\n", id="a CSV file"),
        pytest.param(None, id="another program's SQLite database"),
    ],
)
def test_a_file_that_is_not_a_log_is_refused(cli, tmp_path, content):
    path = tmp_path / "other.sqlite"
    if content is None:
        sqlite3.connect(path).executescript("CREATE TABLE invoices (id INTEGER PRIMARY KEY);")
    else:
        path.write_bytes(content)
    before = path.read_bytes()
    for args in (
        ("life",),
        ("blade", "list"),
        ("log", "cut", "304", "round", "60mm", "--blade", "B-1"),
    ):
        result = cli(*args, "--db", str(path))
        assert result.code == 6, result.err
        assert "not a sawplan blade log" in result.err
        assert result.err.count("\n") == 1
    assert path.read_bytes() == before


def test_a_log_from_a_newer_sawplan_is_refused(log):
    ok(
        log(
            "blade",
            "add",
            "B-1",
            "--pitch",
            "3/4",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        )
    )
    if is_server(log.path):
        execute(log.path, "UPDATE sawplan_schema SET version_num = '0099'")
    else:
        execute(log.path, "PRAGMA user_version = 99")
    result = log("blade", "list")
    assert result.code == 6 and "newer sawplan" in result.err


def test_import_with_missing_columns_is_refused(log, tmp_path):
    folder = tmp_path / "csv"
    folder.mkdir()
    (folder / "cuts.csv").write_text("blade,cut_on\nB-1,2024-01-02\n", encoding="utf-8")
    result = log("import", str(folder))
    assert result.code == 3
    assert "cuts.csv: missing columns" in result.err and "area_mm2" in result.err


def test_env_var_names_the_log(cli, tmp_path, monkeypatch):
    path = tmp_path / "env.sqlite"
    monkeypatch.setenv("SAWPLAN_DB", str(path))
    assert (
        cli(
            "blade",
            "add",
            "B-1",
            "--pitch",
            "3/4",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        ).code
        == 0
    )
    assert [r[1] for r in rows_of(path)["blades"]] == ["B-1"]
