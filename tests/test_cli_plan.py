"""``sawplan plan`` end to end: terminal report, JSON keys, CSV, HTML and Markdown sheets.

Runs in-process through the real error boundary (``cli`` fixture).
"""

from __future__ import annotations

import csv
import io
import json
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from sawplan.cli import app as app_module

DATA = Path(__file__).parent / "data"
SMALL = DATA / "plan_small.toml"

# The lead adds "sawplan.cli.cmd_plan" to COMMAND_MODULES; until then register it here.
if not any(c.name == "plan" for c in app_module.app.registered_commands):
    from sawplan.cli import cmd_plan

    cmd_plan.register(app_module.app)


def read_csv(path: Path) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(path.read_text(encoding="utf-8"))))


@pytest.fixture(scope="module")
def small_json(tmp_path_factory):
    """The small job's JSON, run once for the key checks."""
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    out = io.StringIO()
    import contextlib

    with contextlib.redirect_stdout(out):
        code = run_guarded(run, ["plan", str(SMALL), "--json"])
    assert code == 0
    return json.loads(out.getvalue())


def test_json_has_the_promised_keys(small_json):
    data = small_json
    assert data["kind"] == "plan"
    for key in (
        "bars_used", "lp_bound_bars", "waste_pct", "cuts", "total_cut_time_min",
        "blades_needed", "total_cost", "bars", "sections", "remnants", "cautions",
    ):  # fmt: skip
        assert key in data, key
    for bar in data["bars"]:
        for key in (
            "stock", "length_mm", "heat", "pieces", "remnant_mm", "remnant_kept", "weight_kg",
            "handling",
        ):  # fmt: skip
            assert key in bar, key
        for piece in bar["pieces"]:
            assert {"part", "start_mm", "end_mm", "length_mm", "weight_kg", "handling"} <= set(
                piece
            )
    # 8 shafts and 6 collars ordered in plan_small.toml
    parts = [p["part"] for b in data["bars"] for p in b["pieces"]]
    assert parts.count("shaft") == 8 and parts.count("collar") == 6
    assert data["bars_used"] == len(data["bars"])


def test_terminal_report_shows_sections_bars_drawings_and_cautions(cli):
    r = cli("plan", str(SMALL))
    assert r.code == 0, r.err
    out = r.out
    for heading in ("JOB", "SECTIONS", "CUT SHEET", "BARS TO SCALE", "BLADES", "QUOTE", "CAUTIONS"):
        assert heading in out
    drawings = [ln for ln in out.splitlines() if re.match(r"^\s*\d+ \|", ln)]
    bars = int(re.search(r"^bars\s+(\d+)", out, re.M).group(1))
    assert len(drawings) == bars
    for line in drawings:
        inner = line.split("|", 1)[1].rsplit("|", 1)[0]
        assert len(inner) == 72  # fixed width: every bar drawn to the same scale length
    assert "it rolls: chock it" in out  # a job of rounds
    assert "saw maker's manual" in out
    assert "H-2231" in out  # the heat number travels with the bar


def test_us_units_show_inches(cli):
    r = cli("plan", str(SMALL), "--units", "us")
    assert r.code == 0, r.err
    assert "from head in" in r.out
    assert " lb" in r.out


def test_html_sheet_has_every_bar_an_svg_each_and_the_cautions(cli, tmp_path):
    sheet = tmp_path / "sheet.html"
    r = cli("plan", str(SMALL), "--sheet", str(sheet))
    assert r.code == 0, r.err
    html = sheet.read_text(encoding="utf-8")
    bars = int(re.search(r"^bars\s+(\d+)", r.out, re.M).group(1))
    blocks = re.findall(r'<section class="bar" id="bar-(\d+)">(.*?)</section>', html, re.S)
    assert [int(n) for n, _ in blocks] == list(range(1, bars + 1))
    for _n, block in blocks:
        svgs = re.findall(r"<svg.*?</svg>", block, re.S)
        assert len(svgs) == 1
        root = ET.fromstring(svgs[0])  # well-formed XML
        assert root.get("viewBox")
        assert root.get("width") is None  # sized by CSS (width: 100%), never wider than the page
    assert "@page { size: auto; margin: 12mm }" in html
    assert "break-inside: avoid" in html
    assert ".bar svg { display: block; width: 100%" in html
    assert "it rolls: chock it" in html
    assert "saw maker&#x27;s manual" in html or "saw maker's manual" in html
    assert "H-2231" in html and "4140" in html
    assert "<script" not in html and "http://" not in html.replace("http://www.w3.org/2000/svg", "")


def test_markdown_sheet(cli, tmp_path):
    sheet = tmp_path / "sheet.md"
    r = cli("plan", str(SMALL), "--sheet", str(sheet))
    assert r.code == 0, r.err
    text = sheet.read_text(encoding="utf-8")
    assert text.startswith("# Cut sheet: pump shafts")
    assert text.count("### Bar ") == int(re.search(r"^bars\s+(\d+)", r.out, re.M).group(1))
    assert "it rolls: chock it" in text


def test_csv_files_and_formula_neutralisation(cli, tmp_path):
    job = tmp_path / "job.toml"
    job.write_text(
        SMALL.read_text(encoding="utf-8")
        .replace('name = "shaft"', 'name = "=HYPERLINK(\\"http://x\\")"')
        .replace('heat = "H-2231"', 'heat = "+A1"'),
        encoding="utf-8",
    )
    out = tmp_path / "out"
    r = cli("plan", str(job), "--csv-dir", str(out))
    assert r.code == 0, r.err
    assert sorted(p.name for p in out.iterdir()) == [
        "bars.csv",
        "cuts.csv",
        "order.csv",
        "summary.csv",
    ]
    cuts = read_csv(out / "cuts.csv")
    assert len(cuts) == 14  # 8 + 6 pieces ordered
    formula = [row for row in cuts if "HYPERLINK" in row["part"]]
    assert formula and all(row["part"].startswith("'=") for row in formula)
    assert {row["heat"] for row in read_csv(out / "bars.csv")} >= {"'+A1"}
    summary = read_csv(out / "summary.csv")
    assert summary[-1]["group"] == "total"
    assert int(summary[-1]["bars_used"]) == len(read_csv(out / "bars.csv"))


def bad_job(tmp_path: Path) -> tuple[Path, int]:
    text = SMALL.read_text(encoding="utf-8").replace('length = "80mm"', "length = 80")
    job = tmp_path / "bad.toml"
    job.write_text(text, encoding="utf-8")
    line = text.splitlines().index("length = 80") + 1
    return job, line


def test_error_names_the_line_and_nothing_is_written(cli, tmp_path):
    job, line = bad_job(tmp_path)
    out, sheet = tmp_path / "out", tmp_path / "sheet.html"
    r = cli("plan", str(job), "--csv-dir", str(out), "--sheet", str(sheet))
    assert r.code == 2  # usage: a value without its unit
    assert r.err.strip() == (
        f'error: bad.toml line {line} ([[part]] "collar"): length: expected a length with its '
        'unit, e.g. "250mm", got 80'
    )
    assert r.out == ""
    assert not out.exists() and not sheet.exists()
    assert list(tmp_path.iterdir()) == [job]


def test_short_stock_prints_the_partial_plan_and_exits_8(cli, tmp_path):
    # plan_small.toml has 3 + 1 bars; 40 shafts of 450 mm need far more (by hand:
    # 40 × 451.6 mm = 18.1 m against 3 × 2996.6 + 1196.6 = 10.2 m of capacity).
    text = SMALL.read_text(encoding="utf-8").replace("count = 8", "count = 40")
    job = tmp_path / "short.toml"
    job.write_text(text, encoding="utf-8")
    sheet = tmp_path / "s.html"
    r = cli("plan", str(job), "--sheet", str(sheet))
    assert r.code == 8  # DEVELOPERS.md: plan incomplete
    assert r.out.startswith("SHORT: stock on hand does not finish the job.")
    assert "ORDER LIST" in r.out and "shaft ×" in r.out
    assert sheet.exists() and "SHORT:" in sheet.read_text(encoding="utf-8")


def test_unknown_saw_is_named(cli):
    r = cli("plan", str(SMALL), "--saw", "mid-producton")
    assert r.code == 4
    assert "did you mean mid-production" in r.err


def test_missing_job_file(cli, tmp_path):
    r = cli("plan", str(tmp_path / "nope.toml"))
    assert r.code == 4
    assert "no such file" in r.err


def test_help_has_examples(cli):
    r = cli("plan", "--help")
    assert r.code == 0
    assert "Examples:" in r.out and "sawplan plan job.toml --sheet job.html" in r.out


def test_unknown_saw_in_the_job_file_is_located(cli, tmp_path):
    text = SMALL.read_text(encoding="utf-8").replace('saw = "mid-production"', 'saw = "big-bertha"')
    job = tmp_path / "job.toml"
    job.write_text(text, encoding="utf-8")
    line = text.splitlines().index('saw = "big-bertha"') + 1
    r = cli("plan", str(job))
    assert r.code == 4
    assert r.err.startswith(f"error: job.toml line {line} ([job]): saw: unknown saw 'big-bertha'")


def test_an_empty_blade_log_falls_back_to_default_lives(cli, tmp_path):
    from sawplan.store import open_log

    log = tmp_path / "log.sqlite"
    open_log(log).close()
    r = cli("plan", str(SMALL), "--db", str(log), "--json")
    assert r.code == 0, r.err
    data = json.loads(r.out)
    # no blades logged: the default typical life (from memory) is used, and said so
    assert data["blade_forecast_method"] == "deterministic"
    assert any("not enough history" in n for n in data["notes"])
    assert all(s["calibration_n"] == 0 for s in data["sections"])


def test_bars_cut_alike_keep_their_own_number_and_rack_on_every_sheet(cli, tmp_path):
    # Three 1000 mm bars (two on rack A1, one on B2), nine 310 mm pieces: with a 2 mm
    # kerf and 5 mm trim a bar holds three (3 × 312 = 936 of 997, four need 1248), so
    # all three bars are cut alike and keep a 1000 - 5 - 930 - 2·2 - 2 = 59 mm remnant
    # (worked out by hand).  The sheets draw such bars once; each must still carry its
    # own number, rack and drawing ids.
    job = tmp_path / "job.toml"
    stock = (
        '[[stock]]\nmaterial = "1018"\nsection = "round 30mm"\nlength = "1000mm"\n'
        'count = {count}\nheat = "H-1"\nlocation = "{rack}"\n'
    )
    job.write_text(
        '[job]\nname = "alike"\nsaw = "mid-production"\nkerf = "2mm"\ntrim = "5mm"\n'
        'grip = "0mm"\nmin_remnant = "20mm"\n'
        + stock.format(count=2, rack="A1")
        + stock.format(count=1, rack="B2")
        + '[[part]]\nname = "p"\nmaterial = "1018"\nsection = "round 30mm"\n'
        'length = "310mm"\ncount = 9\n',
        encoding="utf-8",
    )
    html_path, md_path = tmp_path / "job.html", tmp_path / "job.md"
    r = cli("plan", str(job), "--sheet", str(html_path))
    assert r.code == 0, r.err
    assert cli("plan", str(job), "--sheet", str(md_path)).code == 0
    assert re.search(r"^bars\s+3;", r.out, re.M)
    table_rows = re.findall(r"^\s*(\d)  .*?@(A1|B2)", r.out, re.M)
    assert sorted(n for n, _ in table_rows) == ["1", "2", "3"]
    assert sorted(rack for _, rack in table_rows) == ["A1", "A1", "B2"]
    assert r.out.count("keep 59 mm remnant") == 3
    html = html_path.read_text(encoding="utf-8")
    blocks = re.findall(r'<section class="bar" id="bar-(\d+)">(.*?)</section>', html, re.S)
    assert [n for n, _ in blocks] == ["1", "2", "3"]
    for n, block in blocks:
        assert f'aria-label="bar {n}, ' in block
        assert f'<pattern id="keep-{n}"' in block and f'fill="url(#keep-{n})"' in block
        assert "bar-number" not in block
    md = md_path.read_text(encoding="utf-8")
    assert [m for m in re.findall(r"^### Bar (\d+)", md, re.M)] == ["1", "2", "3"]


@pytest.mark.parametrize("name", ["sheet.pdf", "sheet.txt", "sheet"])
def test_a_sheet_of_another_kind_is_refused_before_planning(cli, tmp_path, name):
    """HTML written into a file named .pdf would not open as a PDF: say which kinds there are."""
    sheet = tmp_path / name
    result = cli("plan", str(SMALL), "--sheet", str(sheet))
    assert result.code == 2
    assert "a cut sheet is written as .html or .md" in result.err
    assert not sheet.exists()
