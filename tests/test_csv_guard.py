"""The CSV guard: no stored text starts a new row, runs as a formula or changes on a round trip.

External references:
- RFC 4180 §2: a field holding a line break, a double quote or a comma is enclosed
  in double quotes, and a quote inside is doubled.  Every file is read back with
  Python's ``csv`` module (``newline=""``, as its documentation asks), which
  ends a row at a bare CR as at LF — as a spreadsheet would.
- OWASP, "CSV Injection": a cell starting with = + - @, a tab or a carriage return
  is run as a formula; spreadsheets skip leading white space and do not show the
  zero-width and bidirectional marks (Unicode Standard, ch. 23, "Format
  Characters"), so the lead is judged after them.  An apostrophe makes it text.
- Values stored in the log are read back with the standard ``sqlite3`` module.
"""

from __future__ import annotations

import csv
import io
import re
import shutil
import sqlite3
from pathlib import Path

import pytest
from cli_walk import build_shop, invoke
from hypothesis import HealthCheck, Phase, example, given, settings
from hypothesis import strategies as st

from sawplan.fields import CONTROL
from sawplan.render import safe_cell, to_csv

PLAIN_NUMBER = re.compile(r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?")
# what a spreadsheet may skip or not show before the first character it reads
INVISIBLE = "\u200b\u200c\u200d\u200e\u200f\u2060\ufeff\u061c"
JUNK = re.compile(rf"[\s\x00-\x1f\x7f-\x9f{INVISIBLE}\u202a-\u202e\u2066-\u2069]*")
FORMULA = "=+-@"


def read_csv(text: str) -> list[list[str]]:
    return list(csv.reader(io.StringIO(text, newline="")))


def runs_as_formula(cell: str) -> bool:
    """Whether a spreadsheet would take ``cell`` for a formula (OWASP, above)."""
    if cell.startswith("'") or PLAIN_NUMBER.fullmatch(cell):
        return False
    if cell.startswith(("\t", "\r")):
        return True
    rest = cell[JUNK.match(cell).end() :]
    return rest[:1] in tuple(FORMULA)


def undo(cell: str, original: str) -> str:
    """What import does: one apostrophe off a cell the guard marked."""
    return cell[1:] if cell.startswith("'") and not original.startswith("'") else cell


# --- to_csv on any text --------------------------------------------------------------------

ANY_TEXT = st.text(
    alphabet=st.one_of(
        st.sampled_from(list("=+-@'\",\r\n\t ") + list(INVISIBLE) + ["\x1b", "\u2028", "\x85"]),
        st.characters(),
    ),
    max_size=12,
)


TABLES = st.integers(1, 3).flatmap(
    lambda width: st.tuples(
        st.just(width), st.lists(st.lists(ANY_TEXT, min_size=width, max_size=width), max_size=6)
    )
)


@given(TABLES)
def test_every_cell_comes_back_as_one_cell_and_none_runs(table):
    width, rows = table
    back = read_csv(to_csv(["a", "b", "c"][:width], rows))
    assert len(back) == len(rows) + 1  # no cell started a row of its own, none was lost
    for written, read in zip(rows, back[1:], strict=True):
        assert len(read) == width
        assert [undo(r, w) for r, w in zip(read, written, strict=True)] == written
        assert not any(runs_as_formula(cell) for cell in read), read


@pytest.mark.parametrize(
    ("cell", "shown"),
    [
        pytest.param(" =1+1", "' =1+1", id="space before ="),
        pytest.param("\u200b=1+1", "'\u200b=1+1", id="zero-width space before ="),
        pytest.param("\u200e+1", "'\u200e+1", id="left-to-right mark before +"),
        pytest.param("\u2060@x", "'\u2060@x", id="word joiner before @"),
        pytest.param("\ufeff-x", "'\ufeff-x", id="byte-order mark before -"),
        pytest.param("\u061c=1", "'\u061c=1", id="Arabic letter mark before ="),
        pytest.param("\x1b=1", "'\x1b=1", id="control character before ="),
        pytest.param("\r", "'\r", id="a lone carriage return"),
        pytest.param("\uff1d1+1", "'\uff1d1+1", id="full-width = (an input method may type it)"),
        pytest.param("-inf", "'-inf", id="minus infinity is no plain number"),
        pytest.param("-5", "-5", id="a negative number stays a number"),
        pytest.param("a=1", "a=1", id="= after a letter is text anyway"),
    ],
)
def test_a_formula_after_leading_junk_is_neutralised(cell, shown):
    assert safe_cell(cell) == shown


def test_a_tolerance_with_a_carriage_return_stays_in_its_row():
    """The part tolerance "a\\r=1+1" once came back from csv.reader as a row "=1+1"."""
    text = to_csv(["part", "tolerance"], [["collar", "a\r=1+1"], ["shaft", "+0.5/-0"]])
    assert read_csv(text) == [["part", "tolerance"], ["collar", "a\r=1+1"],
                              ["shaft", "'+0.5/-0"]]  # fmt: skip


def test_plan_csv_keeps_a_tolerance_with_a_carriage_return_in_its_row(cli, tmp_path):
    job = tmp_path / "job.toml"
    text = (Path(__file__).parent / "data" / "plan_small.toml").read_text(encoding="utf-8")
    job.write_text(text.replace('"+0.5/-0"', '"a\\r=1+1"'), encoding="utf-8")
    result = cli("plan", str(job), "--csv-dir", str(tmp_path / "out"))
    assert result.code == 0, result.err
    for path in (tmp_path / "out").glob("*.csv"):
        rows = read_csv(path.read_bytes().decode("utf-8"))
        assert {len(r) for r in rows} == {len(rows[0])}, path.name
        assert not [c for r in rows for c in r if runs_as_formula(c)], path.name


# --- the blade log: export, import, export -------------------------------------------------

# free text of every table (not keys, choices, numbers or dates): table -> columns
FREE_TEXT = {
    "saws": ("notes", "source"),
    "blades": ("grade", "supplier", "lot", "notes"),
    "fittings": ("break_in_how",),
    "cuts": ("job", "heat", "note"),
    "events": ("location", "note"),
    "remnants": ("heat", "rack", "note"),
    "saw_notes": ("note",),
    "taps": ("said",),
}
# what the log may hold: no control characters (fields.CONTROL), not blank
NOT_STORED = "".join(chr(c) for c in range(0x2000, 0x2070) if CONTROL.match(chr(c)))
STORED_TEXT = st.text(
    alphabet=st.one_of(
        st.sampled_from(list("=+-@'\", ;|") + list(INVISIBLE) + ["\u00a0", "\u3000"]),
        st.characters(codec="utf-8", exclude_categories=("Cc",), exclude_characters=NOT_STORED),
    ),
    min_size=1,
    max_size=20,
).map(lambda t: t if t.strip() else t + "x")


@pytest.fixture(scope="module")
def shop(tmp_path_factory) -> dict[str, Path]:
    return build_shop(tmp_path_factory.mktemp("shop"))


def with_text(shop, folder: Path, texts: dict[tuple[str, str], str]) -> Path:
    """A copy of the shop's log with ``texts`` in their columns (every row)."""
    folder.mkdir()
    log = folder / "log.sqlite"
    shutil.copyfile(shop["log"], log)
    conn = sqlite3.connect(log)
    with conn:
        for (table, column), value in texts.items():
            conn.execute(f"UPDATE {table} SET {column} = ?", (value,))  # names from FREE_TEXT
    conn.close()
    return log


def export(log: Path, folder: Path) -> dict[str, bytes]:
    code, _out, err = invoke(["export", str(folder), "--db", str(log)])
    assert code == 0, err
    return {p.name: p.read_bytes() for p in sorted(folder.glob("*.csv"))}


COLUMNS = [(t, c) for t, cs in FREE_TEXT.items() for c in cs]
# the station's writers (and so its import) store text with white space collapsed
COLLAPSED = STORED_TEXT.map(lambda t: " ".join(t.split()) or "x")
STATION = {"remnants", "saw_notes", "taps"}
ROUND_TRIP = settings(
    max_examples=25,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture],
    phases=[Phase.explicit, Phase.reuse, Phase.generate],  # an export takes a while: no shrinking
)


@ROUND_TRIP
@given(texts=st.fixed_dictionaries(
    {(t, c): COLLAPSED if t in STATION else STORED_TEXT for t, c in COLUMNS}
))  # fmt: skip
@example(texts={key: lead for key, lead in zip(COLUMNS, [" =1", "\u200b+1", "'=1", "@x", "-inf",
          "\ufeff-1", "\u200e=1", "\u00a0@", "\u3000=", "\u061c+", "-5", "'", "\"=\"", ",", "x=1",
          "\u2060=", "+1.5e3"], strict=True)})  # fmt: skip
def test_export_import_export_is_identical(shop, tmp_path_factory, texts):
    work = tmp_path_factory.mktemp("trip")
    log = with_text(shop, work / "a", texts)
    first = export(log, work / "first")
    fresh = work / "fresh.sqlite"
    code, _out, err = invoke(["import", str(work / "first"), "--db", str(fresh)])
    assert code == 0, err
    assert export(fresh, work / "second") == first
    conn = sqlite3.connect(fresh)
    try:
        for table, column in COLUMNS:
            stored = {r[0] for r in conn.execute(f"SELECT {column} FROM {table}")}
            assert stored == {texts[table, column]}, (table, column)
    finally:
        conn.close()
    for name, body in first.items():
        rows = read_csv(body.decode("utf-8"))
        assert {len(r) for r in rows} == {len(rows[0])}, name
        assert not [c for r in rows for c in r if runs_as_formula(c)], name


def test_an_old_supplier_with_a_carriage_return_stays_in_its_row(shop, tmp_path):
    """An older log's supplier "\\r=1+1" once split its row in the export, so the export
    could not be imported; now the cell is quoted and import names the column."""
    log = with_text(shop, tmp_path / "old", {("blades", "supplier"): "\r=1+1"})
    export(log, tmp_path / "csv")
    rows = read_csv((tmp_path / "csv" / "blades.csv").read_bytes().decode("utf-8"))
    assert [r[rows[0].index("supplier")] for r in rows[1:]] == ["'\r=1+1", "'\r=1+1"]
    assert not any(runs_as_formula(c) for r in rows for c in r)
    code, _out, err = invoke(["import", str(tmp_path / "csv"), "--db", str(tmp_path / "n.sqlite")])
    assert code == 3
    assert err.startswith("error: blades.csv row 1 ") and err.count("\n") == 1
    assert "supplier" in err and "must not hold control characters" in err
