"""Tube, pipe, structurals and bundles: pitch by the average width of cut, teeth over the
whole chord, screens that never contradict themselves, and the better orientation.

Sources beside each check value: common practice (saw operators' manuals), closed
forms of the geometry, derived (the model's own formulas, docs/pitch.md).
"""

from __future__ import annotations

import math

import pytest

from sawplan.cutting import evaluate, recommend
from sawplan.cutting.pitch import catalogue
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section

CAT = load_catalogue()
MID = get_saw("mid-production")
VARIABLE = [p.label for p in catalogue() if p.kind == "variable"]  # coarsest first


def steps_apart(a: str, b: str) -> int:
    return abs(VARIABLE.index(a) - VARIABLE.index(b))


@pytest.mark.parametrize("key", ["1018", "A36", "4140"])
def test_average_width_example_from_the_operators_manuals(key):
    # common practice, printed in saw operators' manuals: a 4 in OD × 3 in ID tube has
    # 5.5 in² of metal over 4 in of blade travel, 1.38 in average width of cut, so 4/6
    section = parse_section("tube 4in 0.5in")
    area_in2 = section.area_mm2 / 25.4**2
    assert area_in2 == pytest.approx(math.pi / 4 * (4**2 - 3**2), rel=1e-9)  # closed form
    assert area_in2 == pytest.approx(5.5, abs=0.01)
    assert section.mean_chord_mm / 25.4 == pytest.approx(1.375, abs=0.005)
    result = recommend(CAT.get(key), section, MID)
    assert steps_apart(result.pitch_label, "4/6") <= 1, result.explanation


@pytest.mark.parametrize(
    ("spec", "chord_mm"),
    [
        # closed forms of the geometry: where the blade crosses the least metal
        pytest.param("tube 60mm 3mm", 6.0, id="tube equator: both walls 2t"),
        pytest.param("tube 4in 0.5in", 25.4, id="pipe equator: 2t"),
        pytest.param("stube 50mm 3mm", 6.0, id="box on a flat: both side walls"),
        pytest.param("stube 50mm 3mm --orient corner", 2 * math.sqrt(2) * 3, id="box on corner"),
        pytest.param("rtube 100mm 50mm 4mm --orient edge", 8.0, id="rect tube on edge"),
        pytest.param("angle 75mm 75mm 6mm", 2 * math.sqrt(2) * 6, id="angle legs down"),
        pytest.param("angle 75mm 50mm 6mm --orient flat", 6.0, id="angle standing leg"),
        pytest.param("channel 150mm 50mm 5mm 8mm", 16.0, id="channel on its flanges"),
        pytest.param("channel 150mm 50mm 5mm 8mm --orient on-side", 5.0, id="channel web"),
        pytest.param("ibeam 200mm 100mm 5.6mm 8.5mm", 5.6, id="I-beam web"),
        pytest.param("ibeam 200mm 100mm 5.6mm 8.5mm --orient on-side", 17.0, id="I-beam flanges"),
        pytest.param("tube 60mm 3mm --bundle 3x4", 4 * 6.0, id="bundle: 4 tubes × 2 walls"),
        pytest.param("round 30mm --bundle 3x4", 120.0, id="bundle of rounds: widest chord"),
    ],
)
def test_thinnest_chord_counts_the_whole_chord(spec, chord_mm):
    assert parse_section(spec).thinnest_chord_mm == pytest.approx(chord_mm, rel=1e-6)


def test_teeth_counted_over_both_walls_at_the_equator():
    # common practice: 3 teeth over the whole chord; a 60 × 3 mm tube has 6 mm of metal
    # at its equator, so 14 TPI coarse gives 6 × 14 / 25.4 = 3.3 teeth (derived)
    result = evaluate(CAT.get("1018"), parse_section("tube 60mm 3mm"), MID, "14/18")
    assert result.teeth_in_thinnest == pytest.approx(6 * 14 / 25.4)
    assert not any("teeth can snag" in w for w in result.warnings)
    # one wall alone (3 mm) would have given 1.65 teeth and a false warning
    coarse = evaluate(CAT.get("1018"), parse_section("tube 60mm 3mm"), MID, "8/12")
    assert coarse.teeth_in_thinnest == pytest.approx(6 * 8 / 25.4)
    assert any("fewer than 3" in w and "14" in w for w in coarse.warnings)


# Common fabrication work, each single and bundled: the screen must read the same way
# from top to bottom.
COMMON = [
    "A36 tube 60mm 3mm",
    "A36 tube 60mm 3mm --bundle 3x4",
    "A36 tube 4in 0.25in",
    "A36 tube 4in 0.25in --bundle 2x2",
    "A36 stube 50mm 3mm",
    "A36 stube 50mm 3mm --bundle 3x2",
    "A36 angle 3in 3in 0.25in",
    "A36 angle 3in 3in 0.25in --bundle 2x3",
    "A36 channel 6in 2in 0.2in 0.34in",
    "A36 channel 6in 2in 0.2in 0.34in --bundle 2x2",
    "A36 ibeam 200mm 100mm 5.6mm 8.5mm",
    "A36 ibeam 200mm 100mm 5.6mm 8.5mm --bundle 1x2",
    "A36 rtube 100mm 50mm 4mm",
    "A36 rtube 100mm 50mm 4mm --bundle 2x2",
    "304 tube 50mm 2mm --bundle 2x3",
    "6061-T6 rtube 4in 2in 0.125in",
]


@pytest.mark.parametrize("case", COMMON)
def test_no_screen_contradicts_itself(case):
    key, *spec = case.split()
    material, section = CAT.get(key), parse_section(" ".join(spec))
    result = recommend(material, section, MID)
    text = " ".join(result.explanation + result.warnings)
    assert not ("finest pitch" in text and "finer pitch" in text)
    assert result.cut_time_min is not None and math.isfinite(result.cut_time_min)
    # three teeth over the whole chord whenever any catalogued pitch manages it
    others = [evaluate(material, section, MID, p) for p in catalogue() if p.fits_blade(27)]
    if any(o.teeth_in_thinnest >= 3 for o in others):
        assert result.teeth_in_thinnest >= 3
    # no pitch biting under the rubbing floor over most of the cut when another
    # pitch that keeps 3 teeth does not
    if result.rubbing_share > 0.5:
        keeping = [o for o in others if o.teeth_in_thinnest >= 3]
        assert all(o.rubbing_share > 0.5 for o in keeping)
    # a warning never sends the user to a pitch that breaks the tooth rule
    for w in result.warnings:
        assert "use a finer pitch" not in w


@pytest.mark.parametrize(
    ("spec", "better"),
    [
        # closed-form reasoning (derived): on edge the long walls run in the feed
        # direction, so the gullets fill over 2 × 4 mm of wall instead of 100 mm of face
        pytest.param("rtube 100mm 50mm 4mm", "edge", id="rect tube: edge beats flat"),
        # the web of an upright I-beam is one 5.6 mm wall: the fine pitch it needs packs
        # its gullets across the 100 mm flanges; on its side two flanges share the chord
        pytest.param("ibeam 200mm 100mm 5.6mm 8.5mm", "on-side", id="I-beam: on its side"),
    ],
)
def test_the_better_orientation_is_shown_when_it_saves_time(spec, better):
    result = recommend(CAT.get("A36"), parse_section(spec), MID)
    assert result.better_orientation is not None
    assert f"--orient {better}" in result.better_orientation
    option = next(o for o in result.orientations if o.orientation == better)
    assert option.time_ratio is not None and option.time_ratio < 1 / 1.1
    # and turned that way, the first orientation is not shown as better
    turned = recommend(CAT.get("A36"), parse_section(f"{spec} --orient {better}"), MID)
    first = parse_section(spec).orientation
    back = next(o for o in turned.orientations if o.orientation == first)
    assert back.time_ratio is not None and back.time_ratio > 1


def test_orientations_compared_for_angle_and_channel():
    # angle on its heel (vee) against on its legs; channel on its back against its flanges
    angle = recommend(CAT.get("A36"), parse_section("angle 3in 3in 0.25in"), MID)
    assert {o.orientation for o in angle.orientations} == {"vee", "flat"}
    channel = recommend(CAT.get("A36"), parse_section("channel 6in 2in 0.2in 0.34in"), MID)
    assert {o.orientation for o in channel.orientations} == {"web-down", "on-side"}
    for o in angle.orientations + channel.orientations:
        assert o.cut_time_min is not None and o.wear_ratio is not None
    # a round tube looks the same every way: nothing to compare
    assert recommend(CAT.get("A36"), parse_section("tube 60mm 3mm"), MID).orientations == ()


@pytest.mark.parametrize(
    ("spec", "chart"),
    [
        # common practice: trade pitch charts for tube and structurals, read by wall
        # thickness and size (from memory); each within one catalogue step
        pytest.param("tube 2in 0.12in", "10/14", id="tube 2 in x 0.120 in"),
        pytest.param("tube 4.5in 0.237in", "6/10", id="4 in sch 40 pipe"),
        pytest.param("angle 3in 3in 0.25in", "6/10", id="angle 3 x 3 x 1/4"),
        pytest.param("channel 6in 2in 0.2in 0.34in", "6/10", id="channel C6"),
        pytest.param("rtube 4in 2in 0.1875in", "8/12", id="rect tube 4 x 2 x 3/16"),
        pytest.param("stube 2in 0.125in", "10/14", id="square tube 2 x 2 x 1/8"),
        pytest.param("ibeam 8in 5.25in 0.23in 0.36in --orient on-side", "6/10", id="W8 on side"),
        # bundles by the average width of cut on the solids pairs (MH31: 3/4 in -> 6/10,
        # 1 1/4 in -> 4/6)
        pytest.param("tube 2in 0.12in --bundle 2x2", "6/10", id="2x2 tubes, 0.71 in"),
        pytest.param("tube 60mm 3mm --bundle 3x4", "4/6", id="3x4 tubes, 1.41 in"),
        pytest.param("angle 3in 3in 0.25in --bundle 2x2", "4/6", id="2x2 angles, 1.25 in"),
    ],
)
def test_common_fabrication_cuts_within_one_step_of_a_trade_chart(spec, chart):
    result = recommend(CAT.get("A36"), parse_section(spec), MID)
    assert steps_apart(result.pitch_label, chart) <= 1, result.explanation


def test_an_upright_i_beam_web_needs_a_fine_pitch_and_is_shown_on_its_side():
    # three teeth over the 5.84 mm web alone need 3 × 25.4 / 5.84 = 13 TPI coarse (derived);
    # structural charts give 6/10-8/12 here, so sawplan names the way that cuts with it
    result = recommend(CAT.get("A36"), parse_section("ibeam 8in 5.25in 0.23in 0.36in"), MID)
    assert result.tpi_coarse >= 3 * 25.4 / (0.23 * 25.4)
    assert result.better_orientation is not None
    assert "--orient on-side" in result.better_orientation
    side = next(o for o in result.orientations if o.orientation == "on-side")
    assert steps_apart(side.pitch_label, "6/10") <= 1
