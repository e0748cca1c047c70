"""Fuzzing the edges where user text comes in: quantities, sections, job files, CSV imports.

Two properties everywhere: nothing but a ``SawplanError`` ever escapes (no
crash, no traceback), and no silent wrong unit: a value whose unit has the
wrong dimension is always refused, and a length written "N mm" or "N in" is
N mm or N × 25.4 mm.  Conversion factors come from pint with its own default
registry (outside sawplan) and from the definition 1 in = 25.4 mm exactly
(international yard and pound agreement, 1959).  Row counts after an import
are read with Python's ``csv`` and ``sqlite3`` modules.
"""

from __future__ import annotations

import contextlib
import csv
import io
import math
import shutil
import sqlite3
import tempfile
from functools import lru_cache
from pathlib import Path

import pint
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from sawplan.cutlist.jobfile.load import parse_job
from sawplan.errors import SawplanError, UsageError
from sawplan.sections import parse_section
from sawplan.units import to_core

UREG = pint.UnitRegistry()
INCH_MM = 25.4  # exact by definition
FUZZ = settings(max_examples=150, deadline=None)
SLOW_FUZZ = settings(
    max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)

# unit as typed -> (pint spelling, dimension group); groups are pint dimensionalities
UNITS = {
    "mm": ("mm", "length"), "cm": ("cm", "length"), "m": ("m", "length"),
    "in": ("inch", "length"), "ft": ("foot", "length"), '"': ("inch", "length"),
    "kg": ("kg", "mass"), "lb": ("lb", "mass"), "g": ("g", "mass"),
    "min": ("min", "time"), "s": ("s", "time"), "h": ("hour", "time"),
    "mm2": ("mm**2", "area"), "cm2": ("cm**2", "area"), "in2": ("inch**2", "area"),
    "m/min": ("m/min", "speed"), "ft/min": ("ft/min", "speed"), "mm/min": ("mm/min", "speed"),
    "N": ("N", "force"), "lbf": ("lbf", "force"), "kW": ("kW", "power"), "hp": ("hp", "power"),
    "MPa": ("MPa", "stress"), "ksi": ("ksi", "stress"), "cm2/min": ("cm**2/min", "rate"),
}  # fmt: skip
# sawplan dimension -> (the pint group it accepts, the core unit in pint spelling)
TARGETS = {
    "length": ("length", "mm"), "mass": ("mass", "kg"), "time": ("time", "min"),
    "area": ("area", "mm**2"), "speed": ("speed", "m/min"), "feed": ("speed", "mm/min"),
    "force": ("force", "N"), "power": ("power", "W"), "stress": ("stress", "MPa"),
    "rate": ("rate", "mm**2/min"),
}  # fmt: skip
NOT_SAWPLAN = "an exception other than a SawplanError escaped"


def factor(unit: str, core: str) -> float:
    """How many core units one ``unit`` is, by pint (outside sawplan)."""
    return UREG.Quantity(1.0, UNITS[unit][0]).to(core).magnitude


# --- quantities --------------------------------------------------------------------------

numbers = st.floats(min_value=0.001, max_value=1e5, allow_nan=False, allow_infinity=False)


@FUZZ
@given(st.text(max_size=40), st.sampled_from(sorted(TARGETS)))
def test_any_text_is_a_quantity_or_a_sawplan_error(text, dimension):
    try:
        value = to_core(text, dimension, field="x")
    except SawplanError:
        return
    assert math.isfinite(value) and abs(value) <= 1e9


@FUZZ
@given(
    st.lists(
        st.sampled_from(["7", "-", "1/4", "3", ".5", "e", "1e308", " ", "'", '"', "in", "mm", "kg",
                         "/", "min", "²", "६", "⌀", "nan", "inf", "0", "x", "--", "0/0"]),
        max_size=8,
    ).map("".join),
    st.sampled_from(sorted(TARGETS)),
)  # fmt: skip
def test_shop_spellings_are_a_quantity_or_a_sawplan_error(text, dimension):
    with contextlib.suppress(SawplanError):
        value = to_core(text, dimension, field="x")
        assert math.isfinite(value)


@FUZZ
@given(numbers, st.sampled_from(sorted(UNITS)), st.sampled_from(sorted(TARGETS)), st.booleans())
def test_a_unit_is_converted_exactly_or_refused(number, unit, dimension, space):
    text = f"{number!r}{' ' if space else ''}{unit}"
    group, core = TARGETS[dimension]
    if UNITS[unit][1] != group:  # the wrong dimension: always refused, never guessed
        with pytest.raises(UsageError):
            to_core(text, dimension, field="x")
        return
    expected = number * factor(unit, core)
    assume(expected <= 1e9)
    assert to_core(text, dimension, field="x") == pytest.approx(expected, rel=1e-9)


@FUZZ
@given(numbers, st.sampled_from(["mm", "in"]))
def test_a_length_in_mm_or_in_is_n_or_n_times_25_4(number, unit):
    expected = number * (INCH_MM if unit == "in" else 1.0)
    assert to_core(f"{number!r} {unit}", "length", field="x") == pytest.approx(expected, rel=1e-12)


# --- sections ----------------------------------------------------------------------------

SECTION_WORDS = ["round", "flat", "tube", "square", "hex", "angle", "rtube", "ibeam", "x", "by",
                 "60mm", "7in", "1/4", "7", "in", "kg", "-5mm", "0mm", "1e308mm", "nan", "⌀60mm",
                 "--orient", "edge", "--bundle", "3x2", "--nest", "100x25mm", "3'", '6"', "",
                 "square tube", "--orient=", "६०mm", "2x2x1/4in"]  # fmt: skip


@FUZZ
@given(st.lists(st.sampled_from(SECTION_WORDS) | st.text(max_size=12), max_size=7))
def test_any_words_are_a_section_or_a_sawplan_error(words):
    try:
        section = parse_section(words)
    except SawplanError:
        return
    except Exception as err:  # pragma: no cover - the failure being looked for
        pytest.fail(f"{NOT_SAWPLAN}: {type(err).__name__}: {err} for {words!r}")
    assert all(math.isfinite(d) and d > 0 for d in section.dims_mm)


sizes_mm = st.floats(min_value=0.5, max_value=5000.0)
sizes_in = st.floats(min_value=0.02, max_value=190.0)


@FUZZ
@given(st.one_of(sizes_mm.map(lambda v: (v, "mm")), sizes_in.map(lambda v: (v, "in"))))
def test_a_round_bar_is_its_diameter_in_mm(size):
    value, unit = size
    section = parse_section(["round", f"{value!r}{unit}"])
    expected = value * (INCH_MM if unit == "in" else 1.0)
    # sections keep sizes to the nearest 0.000001 mm (sawplan/sections/section.py)
    assert section.dims_mm == pytest.approx((expected,), rel=1e-12, abs=5e-7)


@FUZZ
@given(sizes_mm, sizes_mm, st.sampled_from(["kg", "min", "mm2", "N", "m/min", "lb"]))
def test_a_size_with_a_unit_of_another_kind_is_refused(a, b, unit):
    with pytest.raises(UsageError):
        parse_section(["flat", f"{a!r}mm", f"{b!r}{unit}"])


# --- job files ---------------------------------------------------------------------------


@lru_cache(maxsize=1)
def catalogue():
    from sawplan.materials import load_catalogue

    return load_catalogue()


GROUPS = [("4140", "round 60mm"), ("A36", "flat 100mm 25mm"), ("304", "round 2in")]


@st.composite
def job_files(draw):
    """A valid job file's text and the part lengths it asks for, in mm."""
    material, section = draw(st.sampled_from(GROUPS))
    lines = ['[job]', 'name = "fuzz"', 'kerf = "1.6mm"', "",
             "[[stock]]", f'material = "{material}"', f'section = "{section}"',
             'length = "3m"', f"count = {draw(st.integers(1, 50))}", ""]  # fmt: skip
    lengths = []
    for k in range(draw(st.integers(1, 4))):
        unit = draw(st.sampled_from(["mm", "in"]))
        value = draw(st.floats(min_value=5.0, max_value=2900.0 if unit == "mm" else 114.0))
        lengths.append(value * (INCH_MM if unit == "in" else 1.0))
        lines += ["[[part]]", f'name = "p{k}"', f'material = "{material}"',
                  f'section = "{section}"', f'length = "{value!r}{unit}"',
                  f"count = {draw(st.integers(1, 3))}", ""]  # fmt: skip
    return "\n".join(lines), lengths


@FUZZ
@given(job_files())
def test_a_generated_job_reads_back_its_lengths(job):
    text, lengths = job
    parsed = parse_job(text, catalogue())
    assert [p.length_mm for p in parsed.parts] == pytest.approx(lengths, rel=1e-12)


EDIT_CHARS = st.sampled_from(list("[]{}=\"'\n#,.0123456789-x \\\x00é⌀mkg") + ['"""', "[[", "]]"])


@st.composite
def mangled(draw, text: str):
    """``text`` with a few characters deleted, inserted or replaced."""
    chars = list(text)
    for _ in range(draw(st.integers(1, 6))):
        at = draw(st.integers(0, len(chars)))
        op = draw(st.sampled_from(["delete", "insert", "replace", "cut line"]))
        if op == "delete" and at < len(chars):
            del chars[at]
        elif op == "insert":
            chars[at:at] = list(draw(EDIT_CHARS))
        elif op == "replace" and at < len(chars):
            chars[at] = draw(EDIT_CHARS)
        elif op == "cut line":
            joined = "".join(chars)
            end = joined.find("\n", at)
            chars = list(joined[:at] + (joined[end:] if end >= 0 else ""))
    return "".join(chars)


@FUZZ
@given(st.data())
def test_a_mangled_job_is_a_job_or_a_sawplan_error(data):
    text, _lengths = data.draw(job_files())
    broken = data.draw(mangled(text))
    try:
        parse_job(broken, catalogue())
    except SawplanError:
        pass
    except Exception as err:  # pragma: no cover - the failure being looked for
        pytest.fail(f"{NOT_SAWPLAN}: {type(err).__name__}: {err}\n{broken}")


@FUZZ
@given(st.data(), st.sampled_from(["kg", "min", "mm2", "N", "lb", "m/min"]))
def test_a_part_length_with_a_wrong_unit_is_refused_with_its_line(data, unit):
    text, _lengths = data.draw(job_files())
    broken = text.replace('mm"\ncount', f'{unit}"\ncount').replace('in"\ncount', f'{unit}"\ncount')
    with pytest.raises(UsageError, match=r"job\.toml line \d+ \(\[\[part\]\]"):
        parse_job(broken, catalogue(), file="job.toml")


def test_deeply_nested_toml_is_refused_not_a_crash():
    with pytest.raises(UsageError, match="nested too deeply"):
        parse_job("a = " + "[" * 5000, catalogue())


# --- CSV import --------------------------------------------------------------------------


def _invoke(args: list[str]) -> tuple[int, str]:
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, args)
    return code, err.getvalue()


@pytest.fixture(scope="module")
def exported(tmp_path_factory) -> Path:
    """A small log touching every table, exported as CSV."""
    root = tmp_path_factory.mktemp("fuzz-export")
    log = root / "log.sqlite"
    for args in (
        ["saw", "add", "bay 2", "--like", "mid-production"],
        [
            "blade",
            "add",
            "B-1",
            "--pitch",
            "3/4",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        ],
        [
            "blade",
            "add",
            "B-2",
            "--pitch",
            "4/6",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        ],
        ["blade", "fit", "B-1", "--saw", "bay 2"],
        ["log", "cut", "304", "round", "60mm", "--cuts", "3", "--time", "9min", "--job", "=1+1"],
        ["log", "cut", "4140", "flat", "100mm", "25mm", "--note", "-dull"],
        ["log", "event", "B-1", "teeth-lost", "--teeth", "2"],
        ["blade", "retire", "B-2", "--failure", "dull"],
    ):
        code, err = _invoke([*args, "--db", str(log)])
        assert code == 0, (args, err)
    code, err = _invoke(["export", str(root / "csv"), "--db", str(log)])
    assert code == 0, err
    return root / "csv"


def import_and_count(folder: Path, work: Path) -> tuple[int, dict[str, int], dict[str, int]]:
    """Import ``folder`` into a new log: its exit code, the rows it holds, the rows offered.

    Whatever happens the answer is one line, never a traceback or an internal error.
    """
    log = work / "new.sqlite"
    code, err = _invoke(["import", str(folder), "--db", str(log)])
    assert "Traceback" not in err and code != 1, err
    if code != 0:
        assert code in {2, 3, 4, 5, 6, 7} and err.count("\n") == 1, err
    tables = ("saws", "blades", "fittings", "cuts", "events")
    counts = dict.fromkeys(tables, 0)
    if log.exists():
        conn = sqlite3.connect(log)
        try:
            for table in tables:
                counts[table] = conn.execute(f"SELECT COUNT(*) FROM {table}").fetchone()[0]
        finally:
            conn.close()
    offered = dict.fromkeys(tables, 0)
    for table in tables:
        path = folder / f"{table}.csv"
        if path.exists():
            with path.open(encoding="utf-8-sig", newline="") as handle:
                offered[table] = len(list(csv.DictReader(handle)))
    return code, counts, offered


def whole_or_nothing(code: int, counts: dict[str, int], offered: dict[str, int]) -> dict[str, int]:
    """What an atomic import leaves: every offered row once, or none at all."""
    return offered if code == 0 else dict.fromkeys(counts, 0)


@SLOW_FUZZ
@given(st.data())
def test_a_mangled_export_imports_whole_or_not_at_all(exported, data):
    table = data.draw(st.sampled_from(["saws", "blades", "fittings", "cuts", "events"]))
    text = (exported / f"{table}.csv").read_text(encoding="utf-8")
    broken = data.draw(mangled(text))
    with tempfile.TemporaryDirectory() as tmp:
        work = Path(tmp)
        folder = work / "csv"
        shutil.copytree(exported, folder)
        (folder / f"{table}.csv").write_text(broken, encoding="utf-8")
        code, counts, offered = import_and_count(folder, work)
    assert counts == whole_or_nothing(code, counts, offered)


CELLS = {
    "area_mm2": ["2827.4", "0", "-1", "nan", "inf", "1e400", "", "12,5", "2827.4mm2", "६०"],
    "count": ["1", "3", "0", "-2", "1.5", "", "1e3", "x"],
    "cut_on": ["2024-01-02", "2024-02-30", "01/02/2024", "", "2999-01-01", "1900-01-01", "today"],
    "coolant": ["1", "0", "yes", "maybe", ""],
    "note": ["plain", '=HYPERLINK("x")', "'); DROP TABLE cuts;--", "", "x" * 400, "a\x00b"],
    "blade": ["B-1", "b-1", "B-9", "", "' OR 1=1 --"],
}


@SLOW_FUZZ
@given(st.lists(st.fixed_dictionaries({k: st.sampled_from(v) for k, v in CELLS.items()}),
                min_size=1, max_size=4))  # fmt: skip
def test_generated_cut_rows_import_whole_or_not_at_all(exported, rows):
    with tempfile.TemporaryDirectory() as tmp:
        work = Path(tmp)
        folder = work / "csv"
        shutil.copytree(exported, folder)
        path = folder / "cuts.csv"
        with path.open(encoding="utf-8", newline="") as handle:
            reader = csv.DictReader(handle)
            header, first = reader.fieldnames, next(reader)
        with path.open("w", encoding="utf-8", newline="") as handle:
            out = csv.DictWriter(handle, fieldnames=header)
            out.writeheader()
            for row in rows:
                out.writerow({**first, **row})
        code, counts, offered = import_and_count(folder, work)
    assert counts == whole_or_nothing(code, counts, offered)
