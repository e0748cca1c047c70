"""The field table: every quantity has a range with its reason, checked in one line."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan import fields
from sawplan.errors import BadDataError, ExitCode

QUANTITIES = [f for f in fields.FIELDS.values() if f.low is not None or f.high is not None]


def test_every_quantity_field_has_a_range_and_a_reason():
    for f in fields.FIELDS.values():
        if f.dimension not in (None, "text") or f.low is not None or f.high is not None:
            assert f.low is not None or f.high is not None, f"{f.key} has no range"
            assert f.why, f"{f.key}: say why its range is what it is"
        if f.low is not None and f.high is not None:
            assert f.low < f.high, f.key


def test_names_point_at_one_field_each():
    names = [n for f in fields.FIELDS.values() for n in f.names]
    assert len(names) == len(set(names))
    assert fields.field_for("blades.price").words == "blade price"
    assert fields.field_for("cuts.band_speed_m_min").words == "band speed"


@pytest.mark.parametrize(
    ("key", "text", "expected"),
    [
        # 1 ft = 0.3048 m exactly (international foot, 1959)
        pytest.param("band_speed", "200 ft/min", 60.96, id="band speed in ft/min"),
        # 1 in = 25.4 mm exactly
        pytest.param("blade_width", "1in", 25.4, id="blade width in inches"),
        # 1 ksi = 6.894757 MPa (NIST SP 811, appendix B)
        pytest.param("tension", "30ksi", 206.84, id="tension in ksi"),
        pytest.param("area", "20cm2", 2000.0, id="area in cm2"),
    ],
)
def test_parse_reads_any_unit_into_the_core_unit(key, text, expected):
    assert fields.parse(key, text) == pytest.approx(expected, rel=1e-4)


@pytest.mark.parametrize(
    ("key", "text", "words", "shown"),
    [
        pytest.param(
            "band_speed", "1e9 m/min", "band speed", "m/min", id="band speed far too high"
        ),
        pytest.param("length", "1e-300mm", "piece length", "0.1 mm", id="a 1e-300 mm piece"),
        pytest.param("wheel", "1e-300mm", "wheel diameter", "80 mm", id="a 1e-300 mm wheel"),
        pytest.param("blade_width", "1000mm", "blade width", "100 mm", id="a metre-wide blade"),
        pytest.param("life", "0.01mm2", "life per blade", "cm²", id="a speck of life"),
        pytest.param("feed", "1e308mm/min", "feed", "mm/min", id="an absurd feed"),
    ],
)
def test_out_of_range_is_one_line_naming_field_range_and_unit(key, text, words, shown):
    with pytest.raises(BadDataError) as err:
        fields.parse(key, text)
    line = err.value.one_line()
    assert line.startswith(f"{words}: must be ")
    assert shown in line and "\n" not in line


def test_a_400_digit_count_is_refused_not_overflowed():
    with pytest.raises(BadDataError, match="number of pieces: must be from 1 to 1,000,000"):
        fields.check_count("count", 10**400)


@given(st.sampled_from(QUANTITIES), st.floats(allow_nan=True, allow_infinity=True))
def test_check_accepts_exactly_the_range(f, value):
    inside = (
        value == value
        and abs(value) != float("inf")
        and (f.low is None or (value > f.low if f.above else value >= f.low))
        and (f.high is None or value <= f.high)
        and (not f.integer or float(value).is_integer())
    )
    if inside:
        assert fields.check(f, value) == value
    else:
        with pytest.raises(BadDataError):
            fields.check(f, value)


def test_text_fields_refuse_control_characters_and_overlong_text():
    with pytest.raises(BadDataError, match="control characters"):
        fields.check_text("note", "a\x00b")
    with pytest.raises(BadDataError, match="at most 40 characters"):
        fields.check_text("tag", "B" * 41)
    assert fields.check_text("note", "  hit a   hard spot ") == "hit a hard spot"


@pytest.mark.parametrize(
    "args",
    [
        pytest.param(["weigh", "4140", "round", "60mm", "--length", "1m", "--count", "9" * 400], id="count"),
        pytest.param(["weigh", "4140", "round", "60mm", "--length", "1e-300mm"], id="length"),
        pytest.param(["forecast", "--area", "5m2", "--life", "1e-300m2"], id="life"),
        pytest.param(["saw", "add", "x", "--like", "mid-production", "--wheel", "1e-300mm"], id="wheel"),
        pytest.param(["blade", "add", "B-1", "--pitch", "3/4", "--blade-width", "1e9mm",
                      "--blade-thickness", "0.9mm"], id="blade width"),  # fmt: skip
        pytest.param(["blade", "add", "B-1", "--pitch", "3/4", "--blade-width", "27mm",
                      "--blade-thickness", "0.9mm", "--price", "inf"], id="price"),  # fmt: skip
        pytest.param(["chart", "weibull", "--chart-width", "5"], id="chart width"),
        pytest.param(["life", "--confidence", "1"], id="confidence"),
    ],
)  # fmt: skip
def test_the_command_line_refuses_implausible_values(cli, args):
    result = cli(*args)
    assert result.code == ExitCode.BAD_DATA, result.err
    assert result.err.count("\n") == 1 and "must be" in result.err


def test_every_job_file_key_and_materials_column_has_a_rule():
    from sawplan.cutlist.jobfile.types import JOB_KEYS, PART_KEYS, STOCK_KEYS
    from sawplan.materials import NUMERIC_COLUMNS

    keys = [("job", JOB_KEYS), ("stock", STOCK_KEYS), ("part", PART_KEYS),
            ("materials", ("key", "designation", "uns", "standard", "notes", *NUMERIC_COLUMNS))]  # fmt: skip
    flags = {"stock.remnant"}  # true or false: nothing to range
    missing = [
        f"{table}.{key}"
        for table, names in keys
        for key in names
        if fields.field_for(f"{table}.{key}") is None and f"{table}.{key}" not in flags
    ]
    assert missing == []
