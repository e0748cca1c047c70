"""Exports that cannot hurt, SQL that cannot be bent, job files that stay in their folder.

External references:
- OWASP, "CSV Injection": a cell starting with = + - @ (and tab or carriage
  return) is run as a formula by spreadsheet programs; prefixing an apostrophe
  makes it text.  Exported files are read back with Python's ``csv`` module,
  as a spreadsheet would split them.
- Values stored in the log are read back with the standard ``sqlite3`` module.
"""

from __future__ import annotations

import csv
import os
import sqlite3
from pathlib import Path

import pytest

from sawplan.render import safe_cell

LEADS = ("=", "+", "-", "@", "\t", "\r")
PLAIN_NUMBER = r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?"
SMALL_JOB = Path(__file__).parent / "data" / "plan_small.toml"


@pytest.mark.parametrize(
    ("cell", "shown"),
    [
        pytest.param("=1+1", "'=1+1", id="OWASP: leading ="),
        pytest.param("+44 cut", "'+44 cut", id="OWASP: leading +"),
        pytest.param("-dull edge", "'-dull edge", id="OWASP: leading -"),
        pytest.param("@SUM(A1:A9)", "'@SUM(A1:A9)", id="OWASP: leading @"),
        pytest.param("\t=1", "'\t=1", id="OWASP: leading tab"),
        pytest.param("\r=1", "'\r=1", id="OWASP: leading carriage return"),
        pytest.param('=HYPERLINK("http://x","y")', '\'=HYPERLINK("http://x","y")', id="link"),
        pytest.param("-inf", "'-inf", id="float() reads it, a spreadsheet runs it"),
        pytest.param("+1_000", "'+1_000", id="underscore number is no plain number"),
        pytest.param("-5", "-5", id="a plain negative number stays a number"),
        pytest.param("+1.5e3", "+1.5e3", id="a plain signed number stays a number"),
        pytest.param("plain text", "plain text", id="text without a lead"),
        pytest.param(-2.5, -2.5, id="a float is not text"),
    ],
)
def test_safe_cell_neutralises_what_a_spreadsheet_would_run(cell, shown):
    assert safe_cell(cell) == shown


def risky_cells(folder: Path) -> list[tuple[str, str]]:
    """Cells of every CSV in ``folder`` that a spreadsheet would run as a formula."""
    import re

    found = []
    for path in sorted(folder.glob("*.csv")):
        with path.open(encoding="utf-8", newline="") as handle:
            for row in csv.reader(handle):
                for cell in row:
                    if cell.startswith(LEADS) and not re.fullmatch(PLAIN_NUMBER, cell):
                        found.append((path.name, cell))
    return found


def test_plan_csv_cells_cannot_run_as_formulas(cli, tmp_path):
    text = SMALL_JOB.read_text(encoding="utf-8")
    text = text.replace('name = "shaft"', 'name = "=HYPERLINK(\\"http://x\\")"')
    text = text.replace('drawing = "PS-101"', 'drawing = "@SUM(1+1)"')
    text = text.replace('heat = "H-2231"', "heat = \"+cmd|' /C calc'!A0\"")
    text = text.replace('location = "B2"', 'location = "-2+3"')
    job = tmp_path / "job.toml"
    job.write_text(text, encoding="utf-8")
    result = cli("plan", str(job), "--csv-dir", str(tmp_path / "out"))
    assert result.code == 0, result.err
    out = tmp_path / "out"
    assert risky_cells(out) == []
    cells = {c for p in out.glob("*.csv") for row in csv.reader(p.open()) for c in row}
    assert {'\'=HYPERLINK("http://x")', "'@SUM(1+1)", "'+cmd|' /C calc'!A0", "'-2+3"} <= cells


TRICKY = [
    "=1+1",
    "+44",
    "-dull",
    "@once",
    "'quoted",
    "'); DROP TABLE cuts; --",
    '" OR 1=1 --',
    "x' UNION SELECT name FROM saws --",
    "100%_done",
    "back\\slash",
]


def test_log_export_cells_cannot_run_as_formulas_and_come_back(cli, tmp_path):
    log = tmp_path / "log.sqlite"

    def ok(*args):
        result = cli(*args, "--db", str(log))
        assert result.code == 0, (args, result.err)

    ok("saw", "add", "=bay(2)", "--like", "mid-production", "--note", "@notes")
    ok("blade", "add", "@B1", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm",
       "--supplier", "+supplier", "--lot", "=lot")  # fmt: skip
    ok("blade", "fit", "@B1", "--saw", "=bay(2)")
    for i, value in enumerate(TRICKY):
        ok("log", "cut", "304", "round", "60mm", "--job", value, "--heat", f"H{i}", "--note",
           value)  # fmt: skip
    ok("export", str(tmp_path / "csv"))
    assert risky_cells(tmp_path / "csv") == []
    fresh = tmp_path / "fresh.sqlite"
    result = cli("import", str(tmp_path / "csv"), "--db", str(fresh))
    assert result.code == 0, result.err
    conn = sqlite3.connect(fresh)
    try:
        assert [r[0] for r in conn.execute("SELECT job FROM cuts ORDER BY id")] == TRICKY
        assert [r[0] for r in conn.execute("SELECT note FROM cuts ORDER BY id")] == TRICKY
        assert conn.execute("SELECT tag, supplier, lot FROM blades").fetchall() == [
            ("@B1", "+supplier", "=lot")
        ]
        assert conn.execute("SELECT name, notes FROM saws").fetchall() == [("=bay(2)", "@notes")]
    finally:
        conn.close()


INJECTIONS = [
    "'; DROP TABLE blades; --",
    "B' OR '1'='1",
    '"; DELETE FROM cuts; --',
    "x');INSERT INTO saws VALUES(9);--",
    "%",
    "_",
    "' UNION SELECT tag FROM blades --",
]


@pytest.mark.parametrize("value", INJECTIONS)
def test_sql_injection_strings_are_stored_literally(cli, tmp_path, value):
    log = tmp_path / "log.sqlite"

    def run(*args):
        return cli(*args, "--db", str(log))

    assert run("saw", "add", value, "--like", "mid-production").code == 0
    assert run("blade", "add", value, "--pitch", "3/4", "--blade-width", "27mm",
               "--blade-thickness", "0.9mm").code == 0  # fmt: skip
    assert run("blade", "add", "B-2", "--pitch", "3/4", "--blade-width", "27mm",
               "--blade-thickness", "0.9mm").code == 0  # fmt: skip
    assert run("blade", "fit", value, "--saw", value).code == 0
    assert run("log", "cut", "304", "round", "60mm", "--job", value, "--note", value,
               "--heat", value).code == 0  # fmt: skip
    assert run("log", "cut", "304", "round", "60mm", "--job", "J-other").code == 0
    listed = run("log", "list", "--job", value, "--csv")
    assert listed.code == 0, listed.err
    body = list(csv.reader(listed.out.splitlines()))[1:]
    assert len(body) == 1  # the filter matched that job only, not every row
    shown = run("blade", "show", value, "--json")
    assert shown.code == 0, shown.err
    conn = sqlite3.connect(log)
    try:
        tables = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type='table'")}
        assert {"saws", "blades", "fittings", "cuts", "events"} <= tables
        assert conn.execute("SELECT job, note, heat FROM cuts WHERE id = 1").fetchone() == (
            value, value, value
        )  # fmt: skip
        assert sorted(r[0] for r in conn.execute("SELECT tag FROM blades")) == sorted(
            [value, "B-2"]
        )
        assert [r[0] for r in conn.execute("SELECT name FROM saws")] == [value]
    finally:
        conn.close()


def _checked_name(expr) -> bool:
    """``ident(x)``, or ``", ".join(ident(c) for c in ...)``."""
    import ast

    if isinstance(expr, ast.Call) and isinstance(expr.func, ast.Name):
        return expr.func.id == "ident"
    return (
        isinstance(expr, ast.Call)
        and getattr(expr.func, "attr", "") == "join"
        and len(expr.args) == 1
        and isinstance(expr.args[0], ast.GeneratorExp)
        and _checked_name(expr.args[0].elt)
    )


def test_store_sql_interpolates_only_constants():
    """Every f-string handed to execute/query in sawplan/store interpolates CONSTANTS only,
    or names checked against the schema by ``ident(...)``."""
    import ast

    import sawplan.store

    offenders = []
    for path in sorted(Path(sawplan.store.__file__).parent.rglob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if not isinstance(node, ast.JoinedStr):
                continue
            text = "".join(v.value for v in node.values if isinstance(v, ast.Constant))
            if not text.lstrip().upper().startswith(("SELECT", "INSERT", "UPDATE", "DELETE",
                                                     "PRAGMA", "CREATE", "WITH")):  # fmt: skip
                continue
            for value in node.values:
                if isinstance(value, ast.FormattedValue) and _checked_name(value.value):
                    continue  # ident(...) refuses any name not in the schema
                if isinstance(value, ast.FormattedValue):
                    names = [n.id for n in ast.walk(value.value) if isinstance(n, ast.Name)]
                    if any(not (n.isupper() or n.startswith("_") and n[1:].isupper()
                                or n in ("int", "len")) for n in names):  # fmt: skip
                        offenders.append(f"{path.name}:{node.lineno}: {ast.unparse(node)[:80]}")
    assert offenders == []


# --- stock_file: paths from a job file stay in the job's folder --------------------------------


@pytest.fixture
def job_folder(tmp_path) -> Path:
    """A job whose stock is in rack.csv beside it, and a second rack outside the folder."""
    folder = tmp_path / "jobs" / "J-2291"
    folder.mkdir(parents=True)
    text = SMALL_JOB.read_text(encoding="utf-8")
    head, rest = text.split("[[stock]]", 1)
    parts = "[[part]]" + rest.split("[[part]]", 1)[1]
    head = head.replace('name = "pump shafts"', 'name = "pump shafts"\nstock_file = "rack.csv"')
    (folder / "job.toml").write_text(head + parts, encoding="utf-8")
    rack = (
        "material,section,length,count,price,heat,location,remnant\n"
        "4140,round 60mm,3m,3,120,H-2231,B2,no\n"
        "4140,round 60mm,1200mm,1,,H-1980,R1,yes\n"
    )
    (folder / "rack.csv").write_text(rack, encoding="utf-8")
    (tmp_path / "outside.csv").write_text(rack, encoding="utf-8")
    return folder


def set_stock_file(folder: Path, value: str) -> int:
    """Point stock_file at ``value``; returns the key's line number."""
    job = folder / "job.toml"
    lines = job.read_text(encoding="utf-8").splitlines()
    number = next(i for i, line in enumerate(lines) if line.startswith("stock_file"))
    lines[number] = f"stock_file = {value!r}".replace("'", '"')
    job.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return number + 1


def test_a_stock_file_beside_the_job_is_read(cli, job_folder):
    result = cli("plan", str(job_folder / "job.toml"), "--json")
    assert result.code == 0, result.err
    import json

    bars = json.loads(result.out)["bars"]
    assert {b["heat"] for b in bars} <= {"H-2231", "H-1980"} and bars
    from sawplan.cutlist.jobfile.load import load_job
    from sawplan.materials import load_catalogue

    job = load_job(job_folder / "job.toml", load_catalogue())
    assert [(s.length_mm, s.count, s.remnant, s.line) for s in job.stock] == [
        (3000.0, 3, False, 2),
        (1200.0, 1, True, 3),
    ]


@pytest.mark.parametrize(
    ("value", "why"),
    [
        pytest.param("../../outside.csv", "leads outside the job's folder with '..'", id="dotdot"),
        pytest.param("ABSOLUTE", "is an absolute path", id="absolute"),
        pytest.param("link.csv", "leads outside the job's folder through a symlink", id="symlink"),
        pytest.param("sub/../../../outside.csv", "with '..'", id="dotdot after a folder"),
    ],
)
def test_a_stock_file_outside_the_folder_needs_allow(cli, job_folder, value, why):
    outside = job_folder.parent.parent / "outside.csv"
    if value == "ABSOLUTE":
        value = str(outside)
    if value == "link.csv":
        os.symlink(outside, job_folder / "link.csv")
    (job_folder / "sub").mkdir()
    line = set_stock_file(job_folder, value)
    refused = cli("plan", str(job_folder / "job.toml"))
    assert refused.code == 2
    assert refused.err.count("\n") == 1
    assert refused.err.startswith(f"error: job.toml line {line} ([job]): stock_file: ")
    assert why in refused.err and "--allow" in refused.err
    allowed = cli("plan", str(job_folder / "job.toml"), "--allow")
    assert allowed.code == 0, allowed.err


def test_a_symlink_inside_the_folder_is_fine(cli, job_folder):
    os.symlink(job_folder / "rack.csv", job_folder / "same-rack.csv")
    set_stock_file(job_folder, "same-rack.csv")
    assert cli("plan", str(job_folder / "job.toml")).code == 0


@pytest.mark.parametrize(
    ("rack", "message"),
    [
        pytest.param("material,section,lenght\n", "unknown column 'lenght' (did you mean length?)",
                     id="misspelt column"),
        pytest.param("material,section,length\n4140,round 60mm,3kg\n",
                     "rack.csv line 2 (stock row 4140 round 60mm 3kg): length: expected a length",
                     id="wrong unit"),
        pytest.param("material,section,length,count\n4140,round 60mm,3m,lots\n",
                     "count: expected a whole number, got 'lots'", id="count not a number"),
        pytest.param("", "rack.csv: is empty", id="empty"),
    ],
)  # fmt: skip
def test_a_bad_stock_file_names_its_line(cli, job_folder, rack, message):
    (job_folder / "rack.csv").write_text(rack, encoding="utf-8")
    result = cli("plan", str(job_folder / "job.toml"))
    assert result.code in (2, 3)
    assert result.err.count("\n") == 1 and message in result.err


def test_a_missing_stock_file_names_the_key_and_line(cli, job_folder):
    line = set_stock_file(job_folder, "nope.csv")
    result = cli("plan", str(job_folder / "job.toml"))
    assert result.code == 4
    assert result.err.startswith(f"error: job.toml line {line} ([job]): stock_file: no such file")
