"""Job files: values read with their units, and one-line errors naming file, line and entry.

Expected messages follow the format the job-file design fixes:
``FILE line N (ENTRY): FIELD: what is wrong``.  Line numbers are found in the
test text independently (the index of the offending line), never taken from
the loader.
"""

from __future__ import annotations

import pytest

from sawplan.cutlist.jobfile.load import parse_job
from sawplan.errors import BadDataError, NotFoundError, SawplanError, UsageError
from sawplan.materials import load_catalogue

BASE = """\
[job]
name = "test job"
kerf = "2mm"

[[stock]]
material = "1018"
section = "round 50mm"
length = "3m"
count = 2

[[part]]
name = "pin"
material = "1018"
section = "round 50mm"
length = "700mm"
count = 4
"""


@pytest.fixture(scope="module")
def catalogue():
    return load_catalogue()


def line_of(text: str, line: str, nth: int = 0) -> int:
    """1-based number of the nth line equal to ``line`` (found in the test's own text)."""
    found = [i + 1 for i, t in enumerate(text.splitlines()) if t.strip() == line]
    return found[nth]


def swap(text: str, old: str, new: str) -> str:
    assert old in text
    return text.replace(old, new, 1)


def error_of(text: str, catalogue) -> SawplanError:
    with pytest.raises(SawplanError) as info:
        parse_job(text, catalogue, file="job.toml")
    return info.value


# --- values -----------------------------------------------------------------------------


def test_values_are_read_in_core_units(catalogue):
    text = swap(BASE, 'kerf = "2mm"', 'kerf = "0.063in"\ntrim = "1/4 in"\ndue = 2025-03-14')
    text = swap(text, 'length = "700mm"', 'length = "7-1/4 in"')
    text = swap(text, "count = 2\n", 'heat = "H-77"\n')
    job = parse_job(text, catalogue, file="job.toml")
    h = job.header
    assert h.kerf_mm == pytest.approx(0.063 * 25.4)  # 1 in = 25.4 mm exactly (definition)
    assert h.trim_mm == pytest.approx(6.35)  # 1/4 in = 6.35 mm (definition)
    assert h.grip_mm == 0.0  # documented default
    assert h.min_remnant_mm == 300.0  # documented default (common practice, about a foot)
    assert h.handling_time_min == 0.5  # documented default (common practice)
    assert h.due == "2025-03-14"  # a TOML date kept as ISO text
    (stock,) = job.stock
    assert stock.count is None  # count left out: as many as needed
    assert stock.heat == "H-77"
    assert stock.length_mm == 3000.0
    (part,) = job.parts
    assert part.length_mm == pytest.approx(7.25 * 25.4)  # 184.15 mm
    assert part.count == 4
    assert part.group == stock.group == ("1018", "round 50mm")


def test_material_and_section_spellings_match_the_same_stock(catalogue):
    # "round 2in" is 50.8 mm; the part names the same bar in mm and the material by
    # another spelling of its key: both must land in one group.
    text = swap(BASE, 'section = "round 50mm"', 'section = "rd 2in"')
    text = swap(text, 'section = "round 50mm"', 'section = "round 50.8mm"')
    text = swap(text, 'material = "1018"', 'material = "1018 "')
    job = parse_job(text, catalogue)
    assert job.stock[0].group == job.parts[0].group


# --- errors ---------------------------------------------------------------------------------

PART = '([[part]] "pin")'
STOCK = "([[stock]] 1018 round 50mm 3m)"


@pytest.mark.parametrize(
    ("old", "new", "bad_line", "kind", "expected"),
    [
        pytest.param(
            'length = "700mm"', "length = 12", "length = 12", UsageError,
            f'{PART}: length: expected a length with its unit, e.g. "250mm", got 12',
            id="length-without-unit",
        ),
        pytest.param(
            'length = "700mm"', 'lenght = "700mm"', 'lenght = "700mm"', UsageError,
            f"{PART}: unknown key 'lenght' (did you mean length?)",
            id="unknown-key-did-you-mean",
        ),
        pytest.param(
            "count = 4", "count = -2", "count = -2", BadDataError,
            f"{PART}: count (number of pieces): must be from 1 to 1,000,000, got -2",
            id="negative-part-count",
        ),
        pytest.param(
            "count = 2", "count = -1", "count = -1", BadDataError,
            f"{STOCK}: count (bars on hand): must be from 0 to 1,000,000, got -1",
            id="negative-stock-count",
        ),
        pytest.param(
            "count = 4", 'count = "4"', 'count = "4"', BadDataError,
            f"{PART}: count: expected a whole number, got '4'",
            id="count-as-text",
        ),
        pytest.param(
            'length = "700mm"', 'length = "3.2m"', 'length = "3.2m"', BadDataError,
            f"{PART}: length: 3200 mm is longer than any 1018 round 50mm stock can give: "
            "longest bar 3000 mm less trim 0 mm and grip 0 mm leaves 3000 mm",
            id="part-longer-than-any-stock",
        ),
        pytest.param(
            'name = "pin"\nmaterial = "1018"\nsection = "round 50mm"',
            'name = "pin"\nmaterial = "1018"\nsection = "round 55mm"',
            "[[part]]", BadDataError,
            f"{PART}: no stock of 1018 round 55mm in the job (1018 on hand: round 50mm)",
            id="no-stock-of-that-section",
        ),
        pytest.param(
            'name = "pin"\nmaterial = "1018"', 'name = "pin"\nmaterial = "1045"',
            "[[part]]", BadDataError,
            f'{PART}: no stock of 1045 round 50mm in the job (add a [[stock]] with material = '
            '"1045" and section = "round 50mm")',
            id="no-stock-of-that-material",
        ),
        pytest.param(
            "count = 2", "count = 2\nprice = 10\nprice_per_kg = 1.5", "price_per_kg = 1.5",
            UsageError,
            f"{STOCK}: price_per_kg: give price (per bar) or price_per_kg, not both",
            id="two-prices",
        ),
        pytest.param(
            'section = "round 50mm"\nlength = "700mm"', 'section = "round 50"\nlength = "700mm"',
            'section = "round 50"', UsageError, None,
            id="section-without-unit",
        ),
        pytest.param(
            "count = 2", "count = 2\nremnant = \"yes\"", 'remnant = "yes"', BadDataError,
            f"{STOCK}: remnant: expected true or false, got 'yes'",
            id="remnant-not-a-boolean",
        ),
        pytest.param(
            'kerf = "2mm"', 'kerf = "-2mm"', 'kerf = "-2mm"', BadDataError,
            "([job]): kerf: must be from 0.1 mm to 10 mm, got -2 mm",
            id="negative-kerf",
        ),
        pytest.param(
            'kerf = "2mm"', 'kerf = "2kg"', 'kerf = "2kg"', UsageError, None,
            id="kerf-not-a-length",
        ),
    ],
)  # fmt: skip
def test_bad_entries_name_file_line_and_entry(catalogue, old, new, bad_line, kind, expected):
    text = swap(BASE, old, new)
    err = error_of(text, catalogue)
    assert isinstance(err, kind)
    nth = 0
    line = line_of(text, bad_line, nth)
    prefix = f"job.toml line {line} "
    message = err.one_line()
    assert message.startswith(prefix), message
    if expected is not None:
        assert message == prefix + expected
    assert "\n" not in message


def test_unknown_material_suggests_the_nearest_key(catalogue):
    text = swap(BASE, 'name = "pin"\nmaterial = "1018"', 'name = "pin"\nmaterial = "1081"')
    err = error_of(text, catalogue)
    assert isinstance(err, NotFoundError)
    line = line_of(text, 'material = "1081"')
    assert err.one_line().startswith(
        f"job.toml line {line} {PART}: material: unknown material '1081' (did you mean 1018"
    )


def test_unknown_table_suggests_the_right_one(catalogue):
    text = BASE + '\n[[parts]]\nname = "washer"\n'
    err = error_of(text, catalogue)
    line = line_of(text, "[[parts]]")
    assert err.one_line() == f"job.toml line {line}: unknown table 'parts' (did you mean part?)"


def test_second_part_is_located_on_its_own_lines(catalogue):
    second = '\n[[part]]\nname = "flange blank"\nmaterial = "1018"\nsection = "round 50mm"\n'
    text = BASE + second + 'length = "12"\n'
    err = error_of(text, catalogue)
    line = line_of(text, 'length = "12"')
    assert err.one_line().startswith(f'job.toml line {line} ([[part]] "flange blank"): length: ')


def test_duplicate_part_names_are_refused(catalogue):
    text = BASE + '\n[[part]]\nname = "PIN"\nmaterial = "1018"\nsection = "round 50mm"\n'
    text += 'length = "100mm"\n'
    err = error_of(text, catalogue)
    first = line_of(text, "[[part]]", 0)
    line = line_of(text, 'name = "PIN"')
    assert err.one_line() == (
        f"job.toml line {line} ([[part]] \"PIN\"): name: 'PIN' is already used by the part "
        f"on line {first}"
    )


def test_toml_syntax_error_carries_its_line(catalogue):
    text = swap(BASE, 'length = "700mm"', 'length = "700mm')
    err = error_of(text, catalogue)
    line = line_of(text, 'length = "700mm')
    assert isinstance(err, UsageError)
    assert err.one_line().startswith("job.toml: not valid TOML: ")
    assert f"line {line}" in err.one_line()


def test_a_job_without_parts_is_refused(catalogue):
    text = BASE.split("[[part]]")[0]
    assert error_of(text, catalogue).one_line() == (
        "job.toml: has no [[part]] entries: nothing to cut"
    )
