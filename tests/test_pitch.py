"""Pitch catalogue, pitch text, tooth form and set."""

from __future__ import annotations

import math

import pytest

from sawplan.cutting.pitch import Pitch, catalogue, parse_pitch
from sawplan.cutting.teeth import choose_teeth
from sawplan.errors import BadDataError, UsageError


@pytest.mark.parametrize(
    ("text", "coarse", "fine"),
    [
        pytest.param("3/4", 3, 4, id="3/4"),
        pytest.param("4/6", 4, 6, id="4/6"),
        pytest.param("10-14", 10, 14, id="10-14 dash"),
        pytest.param("10 - 14", 10, 14, id="10 - 14 spaced"),
        pytest.param("14", 14, 14, id="14 constant"),
        pytest.param("0.75/1.25", 0.75, 1.25, id="0.75/1.25"),
        pytest.param("1.4/2", 1.4, 2, id="1.4/2"),
        pytest.param("4/3", 3, 4, id="4/3 written fine first"),
        pytest.param(" 3/4 TPI ", 3, 4, id="with TPI"),
        pytest.param("6tpi", 6, 6, id="6tpi"),
        pytest.param("5/7", 5, 7, id="5/7 not in catalogue"),
    ],
)
def test_parse_pitch(text, coarse, fine):
    pitch = parse_pitch(text)
    assert (pitch.tpi_coarse, pitch.tpi_fine) == (coarse, fine)
    # mean TPI of a variable pitch a/b is (a+b)/2 (definition of a variable pitch)
    assert pitch.tpi_mean == pytest.approx((coarse + fine) / 2)
    assert pitch.kind == ("constant" if coarse == fine else "variable")


@pytest.mark.parametrize(
    "text",
    [
        pytest.param("3-4x", id="trailing x"),
        pytest.param("", id="empty"),
        pytest.param("abc", id="words"),
        pytest.param("3/4/5", id="three numbers"),
        pytest.param("-3", id="negative"),
        pytest.param("3//4", id="double slash"),
        pytest.param("3 4", id="space only"),
    ],
)
def test_bad_pitch_text_is_a_usage_error_with_examples(text):
    with pytest.raises(UsageError) as err:
        parse_pitch(text)
    assert err.value.field == "pitch"
    assert "3/4" in str(err.value) and "10-14" in str(err.value)


@pytest.mark.parametrize("text", ["0", "0.2/0.3", "100", "3/60"])
def test_pitch_out_of_range_is_bad_data(text):
    with pytest.raises(BadDataError) as err:
        parse_pitch(text)
    assert err.value.field == "pitch"


def test_label_round_trips_for_every_catalogue_pitch():
    for pitch in catalogue():
        again = parse_pitch(pitch.label)
        assert again.same_teeth(pitch)
        assert again == pitch  # the catalogue entry is returned, with its source


def test_catalogue_holds_the_standard_pitches():
    labels = {p.label for p in catalogue()}
    # MH31 width-of-cut pairs and common practice constants
    for needed in ["10/14", "6/10", "4/6", "3/4", "2/3", "1.4/2", "0.75/1.25", "14/18"]:
        assert needed in labels
    for needed in ["18", "14", "10", "8", "6", "4", "3", "2"]:
        assert needed in labels
    assert len(labels) == len(catalogue())
    for p in catalogue():
        assert p.source.strip()
        assert p.tpi_coarse <= p.tpi_fine
        assert p.tpi_mean == pytest.approx((p.tpi_coarse + p.tpi_fine) / 2)
        assert p.min_blade_width_mm <= p.max_blade_width_mm


def test_spacings_are_inch_over_tpi():
    pitch = Pitch.of(3, 4)
    assert pitch.spacing_fine_mm == pytest.approx(25.4 / 4)
    assert pitch.spacing_mean_mm == pytest.approx(25.4 / 3.5)
    # teeth in 25.4 mm of chord: the coarse count, then the mean count
    assert pitch.teeth_in(25.4) == pytest.approx(3)
    assert pitch.teeth_in(25.4, coarse=False) == pytest.approx(3.5)
    assert math.isclose(Pitch.of(14).tpi_fine, 14)


def _teeth(group, label, *, solid=True, widest=50.0, fewest=5.0, thin=False):
    return choose_teeth(
        group,
        parse_pitch(label),
        is_solid=solid,
        widest_chord_mm=widest,
        fewest_teeth=fewest,
        thin_wall=thin,
    )


@pytest.mark.parametrize(
    ("group", "label", "kw", "form", "tooth_set"),
    [
        # common practice: skip teeth for soft non-ferrous and plastics
        pytest.param("aluminium", "3/4", {}, "skip", "alternate", id="aluminium solid"),
        pytest.param("plastic", "2/3", {}, "skip", "alternate", id="plastic"),
        # common practice: hook (positive rake) for gummy materials and large solids
        pytest.param("austenitic-stainless", "4/6", {}, "hook", "raker", id="304 solid"),
        pytest.param("carbon-steel", "2/3", {"widest": 250.0}, "hook", "raker", id="large solid"),
        # common practice: regular teeth for general work
        pytest.param("carbon-steel", "6/10", {}, "regular", "raker", id="general"),
        # common practice: wavy set for thin walls and fewer than 3 teeth
        pytest.param(
            "carbon-steel",
            "14/18",
            {"solid": False, "thin": True, "fewest": 1.9},
            "regular",
            "wavy",
            id="thin tube",
        ),
        pytest.param(
            "carbon-steel",
            "24",
            {"solid": False, "fewest": 2.8},
            "regular",
            "wavy",
            id="under 3 teeth",
        ),
    ],
)
def test_tooth_form_and_set(group, label, kw, form, tooth_set):
    choice = _teeth(group, label, **kw)
    assert (choice.tooth_form, choice.tooth_set) == (form, tooth_set)
    assert choice.form_why.startswith(form) and choice.set_why.startswith(tooth_set)


def test_gullet_factor_by_form():
    # memory: c ≈ 0.23-0.29 regular, higher for hook, about 2x for skip
    regular = _teeth("carbon-steel", "6/10").gullet_factor
    hook = _teeth("austenitic-stainless", "4/6").gullet_factor
    skip = _teeth("aluminium", "3/4").gullet_factor
    assert 0.23 <= regular <= 0.29
    assert hook > regular
    assert skip == pytest.approx(2 * regular, rel=0.25)
