"""Shop spellings of quantities, checked against pint's own conversions."""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.errors import UsageError
from sawplan.units import DISPLAY, Display, UnitSystem, fmt_number, to_core

REF = pint.UnitRegistry()  # an independent registry as the reference


def ref_mm(expr: str) -> float:
    return REF(expr).to("mm").magnitude


@pytest.mark.parametrize(
    ("text", "expected_expr"),
    [
        pytest.param("7in", "7 inch", id="7in"),
        pytest.param("7 in", "7 inch", id="7 in"),
        pytest.param("178mm", "178 mm", id="178mm"),
        pytest.param("3.5 ft", "3.5 foot", id="3.5 ft"),
        pytest.param("7-1/4 in", "7.25 inch", id="7-1/4 in"),
        pytest.param("7 1/4 in", "7.25 inch", id="7 1/4 in"),
        pytest.param('7"', "7 inch", id="7 inch mark"),
        pytest.param("3' 6\"", "3 foot + 6 inch", id="3 ft 6 in marks"),
        pytest.param("3 ft 6 in", "3 foot + 6 inch", id="3 ft 6 in words"),
        pytest.param("1/2in", "0.5 inch", id="1/2in"),
        pytest.param("2.5 m", "2.5 m", id="2.5 m"),
        pytest.param("12 ft", "12 foot", id="12 ft"),
        pytest.param("0.9mm", "0.9 mm", id="0.9mm"),
        pytest.param("6 m 20 cm", "6.2 m", id="6 m 20 cm"),
    ],
)
def test_length_spellings_match_pint(text, expected_expr):
    assert to_core(text, "length", field="length") == pytest.approx(
        ref_mm(expected_expr), rel=1e-12
    )


@pytest.mark.parametrize(
    ("text", "dimension", "expected"),
    [
        pytest.param("200 ft/min", "speed", REF("200 ft/min").to("m/min").magnitude, id="sfm"),
        pytest.param("200 sfm", "speed", REF("200 ft/min").to("m/min").magnitude, id="sfm alias"),
        pytest.param(
            "12 in2/min", "rate", REF("12 in**2/min").to("mm**2/min").magnitude, id="in2/min"
        ),
        pytest.param("5m2", "area", REF("5 m**2").to("mm**2").magnitude, id="5m2"),
        pytest.param("800 in²", "area", REF("800 in**2").to("mm**2").magnitude, id="in²"),
        pytest.param("50 lb", "mass", REF("50 lb").to("kg").magnitude, id="lb"),
        pytest.param("2 hp", "power", REF("2 hp").to("W").magnitude, id="hp"),
        pytest.param("30 ksi", "stress", REF("30 ksi").to("MPa").magnitude, id="ksi"),
        pytest.param("90 s", "time", 1.5, id="seconds to minutes"),
    ],
)
def test_other_dimensions_match_pint(text, dimension, expected):
    assert to_core(text, dimension, field="x") == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "dimension", "fragment"),
    [
        pytest.param("7 kg", "length", "expected a length", id="mass for length"),
        pytest.param("7", "length", "has no unit", id="bare number"),
        pytest.param("", "length", "got nothing", id="empty"),
        pytest.param("seven in", "length", "expected a length", id="words"),
        pytest.param("7 furlongz", "length", "unknown unit", id="unknown unit"),
        pytest.param("nan mm", "length", "expected a length", id="nan"),
        pytest.param("1/0 in", "length", "expected a length", id="divide by zero"),
        pytest.param("3 ft 2 kg", "length", "expected a length", id="mixed dimensions"),
        pytest.param("x" * 300, "length", "characters", id="very long"),
    ],
)
def test_bad_quantities_name_the_field(text, dimension, fragment):
    with pytest.raises(UsageError) as info:
        to_core(text, dimension, field="length")
    assert fragment in str(info.value)
    assert str(info.value).startswith("length:")


def test_bare_number_takes_default_unit():
    assert to_core("7", "length", field="x", default_unit="inch") == pytest.approx(177.8)


@pytest.mark.parametrize(("kind", "system"), [(k, s) for k in DISPLAY for s in UnitSystem])
def test_display_factors_agree_with_pint(kind, system):
    core_unit = {
        "length": "mm",
        "long_length": "mm",
        "area": "mm**2",
        "mass": "kg",
        "mass_per_length": "kg/m",
        "time": "min",
        "speed": "m/min",
        "feed": "mm/min",
        "rate": "mm**2/min",
        "force": "N",
        "power": "W",
        "stress": "MPa",
        "density": "kg/m**3",
        "bite": "mm",
        "large_area": "mm**2",
        "volume_rate": "mm**3/min",
        "energy_density": "J/mm**3",
    }[kind]
    label, factor = DISPLAY[kind][system]
    target = (
        label.replace("²", "**2").replace("³", "**3").replace("µm", "micrometer").replace("·", "*")
    )
    assert factor == pytest.approx(REF(f"1 {core_unit}").to(target).magnitude, rel=1e-9)


def test_display_formats_us_and_metric():
    assert Display(UnitSystem.US).fmt("length", 25.4) == "1 in"  # a length keeps 0.001 in
    assert Display(UnitSystem.METRIC).fmt("mass", 12.345, 3) == "12.3 kg"
    assert fmt_number(1234.5, 3) == "1,230"  # 3 significant figures, no exponent


@given(st.floats(min_value=0.001, max_value=1e5, allow_nan=False))
def test_any_mm_value_round_trips(value):
    text = f"{value!r} mm"
    assert math.isclose(to_core(text, "length", field="x"), value, rel_tol=1e-12)


@pytest.mark.parametrize(
    ("text", "expected_expr"),
    [
        pytest.param("1'6\"", "1 foot + 6 inch", id="feet-inches no space"),
        pytest.param("50MM", "50 mm", id="capital MM is millimetres"),
        pytest.param("2 FT", "2 foot", id="capital FT"),
    ],
)
def test_shop_capitals_and_tight_marks(text, expected_expr):
    assert to_core(text, "length", field="length") == pytest.approx(
        ref_mm(expected_expr), rel=1e-12
    )


@pytest.mark.parametrize(
    ("dimension", "unit"),
    [
        (dim, unit)
        for dim, table in __import__("sawplan.units").units.FAST_FACTORS.items()
        for unit in table
    ],
)
def test_fast_factors_agree_with_pint(dimension, unit):
    from sawplan.units import DIMENSIONS, FAST_FACTORS

    core = DIMENSIONS[dimension][1]
    assert FAST_FACTORS[dimension][unit] == pytest.approx(
        REF(f"1 {unit}").to(core).magnitude, rel=1e-12
    )


@pytest.mark.parametrize("text", ["7in", "3' 6\"", "7 1/4 in", "178mm", "2.5 m", "1'6\"", "50MM"])
def test_fast_path_and_pint_path_agree(text):
    from sawplan.units import parse_quantity

    slow = parse_quantity(text, "length", field="x").to("mm").magnitude
    assert to_core(text, "length", field="x") == pytest.approx(slow, rel=1e-12)


@pytest.mark.parametrize(
    ("minutes", "text"),
    [
        pytest.param(0.14, "8.40 s", id="under-a-minute-in-seconds"),  # 0.14 × 60 = 8.4
        pytest.param(42.5, "42.5 min", id="short-stays-minutes"),
        pytest.param(200.0, "3 h 20 min", id="200-min-is-3h20"),  # 3 × 60 + 20 = 200
        pytest.param(180.0, "3 h", id="whole-hours"),
        pytest.param(928_000.0, "15,466 h 40 min", id="no-scientific-notation"),  # 15466 × 60 + 40
    ],
)
def test_durations_read_as_hours_and_minutes_past_ninety(minutes, text):
    from sawplan.units import fmt_duration

    assert fmt_duration(minutes) == text


def test_ratios_over_ten_are_words():
    from sawplan.units import fmt_ratio

    assert fmt_ratio(42_000.0) == "over ten times"
    assert fmt_ratio(0.4) == "0.40×"
