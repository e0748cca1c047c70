"""The one formatter for people: digits, separators, inch fractions, feet, text with quantities.

Conversions are checked against pint (an independent registry); fractions and
feet-and-inches are worked by hand beside each case.
"""

from __future__ import annotations

import copy
import json
import pickle
import re

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.display import (
    DISPLAY,
    Display,
    Phrase,
    Q,
    UnitSystem,
    fmt_fraction,
    fmt_number,
    fmt_percent,
    join,
    say,
)

REF = pint.UnitRegistry()
US = Display(UnitSystem.US)
US_FRACTIONS = Display(UnitSystem.US, fractions=True)
METRIC = Display(UnitSystem.METRIC)


@pytest.mark.parametrize(
    ("value", "digits", "text"),
    [
        pytest.param(1234.5, 3, "1,230", id="3-digits-thousands"),
        pytest.param(0.0123456, 3, "0.0123", id="small"),
        pytest.param(7.14, 3, "7.14", id="plain"),
        pytest.param(0.99999, 3, "1.00", id="rounds-up-to-one"),
        pytest.param(4.6e-5, 2, "0.000046", id="tiny-no-exponent"),
        pytest.param(2.5e9, 3, "2,500,000,000", id="huge-no-exponent"),
        pytest.param(0.0, 3, "0", id="zero"),
    ],
)
def test_numbers_keep_significant_digits_without_exponents(value, digits, text):
    assert fmt_number(value, digits) == text


@given(st.floats(min_value=1e-12, max_value=1e15, allow_nan=False))
def test_no_number_is_ever_written_in_scientific_notation(value):
    for kind in DISPLAY:
        for d in (US, METRIC, US_FRACTIONS):
            text = d.fmt(kind, value)
            assert not re.search(r"\d[eE][+-]?\d", text), text


@pytest.mark.parametrize(
    ("inches", "text"),
    [
        pytest.param(7.25, "7-1/4", id="7-1/4"),
        pytest.param(0.09375, "3/32", id="3/32 alone"),
        pytest.param(12.0, "12", id="whole"),
        pytest.param(28.346, "28-11/32", id="720 mm: 28.346 × 32 = 907.1 → 907/32 = 28 11/32"),
        pytest.param(0.99, "1", id="rounds to the next inch"),  # 0.99 × 32 = 31.7 → 32/32
        pytest.param(1.015625, "1", id="1/64 rounds to even"),  # 32.5 → 32 (half to even)
    ],
)
def test_inch_fractions_to_the_nearest_32nd(inches, text):
    assert fmt_fraction(inches) == text


@pytest.mark.parametrize(
    ("mm", "metric", "us", "us_fractions", "tape"),
    [
        # 184.15 mm = 7.25 in exactly (7.25 × 25.4)
        pytest.param(184.15, "184.2 mm", "7.25 in", "7-1/4 in", "7-1/4 in", id="7-1/4in"),
        # a kerf: 2.1 mm = 0.08268 in, 0.011 in from 3/32: no fraction, the size is exact
        pytest.param(2.1, "2.1 mm", "0.083 in", "0.083 in", "3/32 in", id="kerf"),
        # 16 ga wall 1.65 mm = 0.06496 in, 0.0025 in from 1/16: stays decimal
        pytest.param(1.65, "1.65 mm", "0.065 in", "0.065 in", "1/16 in", id="thin wall"),
        # 4.7625 mm = 3/16 in exactly
        pytest.param(4.7625, "4.76 mm", "0.188 in", "3/16 in", "3/16 in", id="3/16 wall"),
        pytest.param(3048.0, "3,048 mm", "120 in", "120 in", "120 in", id="10 ft"),
        # 1100 mm = 43.307 in: a size stays decimal, a tape reads 43-5/16 (43.3125)
        pytest.param(1100.0, "1,100 mm", "43.307 in", "43.307 in", "43-5/16 in", id="1100 mm"),
    ],
)
def test_lengths_keep_their_resolution(mm, metric, us, us_fractions, tape):
    assert METRIC.fmt("length", mm) == metric
    assert US.fmt("length", mm) == us
    assert US_FRACTIONS.fmt("length", mm) == us_fractions
    assert US_FRACTIONS.tape(mm) == tape
    assert US.tape(mm) == us and METRIC.tape(mm) == metric
    assert REF.Quantity(mm, "mm").to("inch").magnitude == pytest.approx(
        float(us.split()[0]), abs=0.0005
    )


@pytest.mark.parametrize(
    ("mm", "decimal", "fractions"),
    [
        pytest.param(3660.0, "12 ft 0.094 in", "12 ft 3/32 in", id="3.66 m"),  # 144.094 in
        pytest.param(6096.0, "20 ft", "20 ft", id="20 ft exactly"),
        pytest.param(1828.8, "6 ft", "6 ft", id="6 ft"),
        pytest.param(1200.0, "47.244 in", "47-1/4 in", id="under 6 ft stays inches"),
        pytest.param(6000.0, "19 ft 8.22 in", "19 ft 8-7/32 in", id="6 m"),  # 236.220 in
    ],
)
def test_long_bars_read_in_feet_and_inches(mm, decimal, fractions):
    assert US.bar_length(mm) == decimal
    assert US_FRACTIONS.bar_length(mm) == fractions
    feet = REF.Quantity(mm, "mm").to("foot").magnitude
    if "ft" in decimal:
        assert int(feet) == int(decimal.split()[0])
    assert METRIC.bar_length(mm) == METRIC.length(mm)


@pytest.mark.parametrize(
    ("kind", "core", "metric", "us", "pint_us"),
    [
        pytest.param("speed", 72.0, "72.0 m/min", "236 ft/min", "72 m/min", id="band speed"),
        pytest.param("feed", 48.0, "48.0 mm/min", "1.89 in/min", "48 mm/min", id="feed"),
        pytest.param("area", 2_258_100.0, "22,600 cm²", "3,500 in²", "2258100 mm**2", id="area"),
        pytest.param("mass", 42.8, "42.8 kg", "94.4 lb", "42.8 kg", id="mass"),
        pytest.param("stress", 464.0, "464 MPa", "67.3 ksi", "464 MPa", id="ksi"),
        pytest.param("stress", 3.0, "3.00 MPa", "435 psi", "3 MPa", id="psi under 1 ksi"),
        pytest.param("power", 1500.0, "1.50 kW", "2.01 hp", "1500 W", id="hp"),
        pytest.param("volume_rate", 16387.064, "16.4 cm³/min", "1.00 in³/min", "1 in**3/min",
                     id="in3/min"),
    ],
)  # fmt: skip
def test_estimates_in_both_systems_agree_with_pint(kind, core, metric, us, pint_us):
    assert METRIC.fmt(kind, core) == metric
    assert US.fmt(kind, core) == us
    number, unit = us.split(" ", 1)
    expected = REF(pint_us).to(unit.replace("²", "**2").replace("³", "**3")).magnitude
    assert float(number.replace(",", "")) == pytest.approx(expected, rel=5e-3)


def test_shares_read_as_whole_percent_and_never_zero_for_something():
    assert fmt_percent(0.53) == "53 %"
    assert fmt_percent(0.001) == "<1 %"
    assert fmt_percent(-0.11, signed=True) == "−11 %"
    assert fmt_percent(0.06, signed=True) == "+6 %"


def test_a_phrase_reads_metric_and_shows_again_in_us():
    chord = say("{} teeth in the {} widest chord", 18, Q("length", 184.15))
    assert chord == "18 teeth in the 184.2 mm widest chord"
    assert US.text(chord) == "18 teeth in the 7.25 in widest chord"
    assert US_FRACTIONS.text(chord) == "18 teeth in the 7-1/4 in widest chord"
    feed = say("{} on average", Q("feed", 48.0))
    both = join("; ", [chord, feed, "plain words"])
    assert US.text(both) == (
        "18 teeth in the 7.25 in widest chord; 1.89 in/min on average; plain words"
    )
    # JSON and copies keep the metric wording and the quantities
    assert json.loads(json.dumps([both])) == [str(both)]
    for clone in (copy.deepcopy(both), pickle.loads(pickle.dumps(both))):
        assert isinstance(clone, Phrase) and US.text(clone) == US.text(both)
    assert US.text("no quantities here") == "no quantities here"


def test_say_counts_its_slots():
    with pytest.raises(ValueError, match="2 slots for 1 values"):
        say("{} and {}", 1)
