"""Separate stretches of metal at a depth: they add up to W(y) and split at bores and gaps."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.sections import parse_section

SPECS = [
    "round 50mm",
    "hex 40mm --orient corner",
    "tube 60mm 3mm",
    "stube 50mm 4mm --orient corner",
    "rtube 80mm 40mm 3mm --orient edge",
    "angle 60mm 40mm 6mm --orient vee",
    "channel 100mm 50mm 6mm 8mm --orient on-side",
    "ibeam 200mm 100mm 5.6mm 8.5mm",
    "round 30mm --bundle 3x3 --nest",
    "tube 60mm 3mm --bundle 2x4",
    "flat 50mm 10mm --bundle 2x3",
]


@settings(max_examples=60, deadline=None)
@given(spec=st.sampled_from(SPECS), frac=st.floats(min_value=0.0, max_value=1.0))
def test_runs_add_up_to_the_chord(spec, frac):
    section = parse_section(spec)
    y = frac * section.height_mm
    runs = section.runs_mm(y)
    assert all(r > 0 for r in runs)
    # exact slicing both ways: the runs are W(y) split where the metal is interrupted
    assert sum(runs) == pytest.approx(section.chord_mm(y), rel=1e-9, abs=1e-6)
    assert section.longest_run_mm(y) <= section.chord_mm(y) * (1 + 1e-9) + 1e-9


def test_tube_at_its_centre_line_has_two_walls():
    # closed form: at mid-height the chord crosses two walls of width t = 3 mm each
    tube = parse_section("tube 60mm 3mm")
    assert tube.runs_mm(30.0) == pytest.approx((3.0, 3.0))


def test_tube_above_its_bore_is_one_run():
    # above the bore (y < t) the chord is the outer circle's: 2·sqrt(y·(D − y))
    tube = parse_section("tube 60mm 3mm")
    assert tube.runs_mm(1.0) == pytest.approx((2 * math.sqrt(1.0 * 59.0),))


def test_flats_side_by_side_touch_and_form_one_run():
    bundle = parse_section("flat 50mm 10mm --bundle 1x3")
    assert bundle.runs_mm(5.0) == pytest.approx((150.0,))


def test_nested_rounds_are_separate_between_contacts():
    # each Ø30 round is its own run except where neighbours touch on the centre line
    bundle = parse_section("round 30mm --bundle 1x3")
    assert bundle.runs_mm(10.0) == pytest.approx((2 * math.sqrt(10.0 * 20.0),) * 3)


def test_outside_the_section_there_is_no_metal():
    section = parse_section("round 50mm")
    assert section.runs_mm(-1.0) == ()
    assert section.longest_run_mm(51.0) == 0.0
