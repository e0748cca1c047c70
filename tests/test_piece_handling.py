"""Lifting by shape and length: what rolls, what tips, long bars, reach from the piece's size.

Sources: NIOSH Pub. 94-110 (1994, rev. 2021) §1.3 formulas and §1.3.1 estimate
of H from the object's width (H = 20 + W/2 cm with the hands at or above
25 cm, 25 + W/2 cm below; from memory); the shape and length rules are common
practice (rounds roll, structurals tip, bars from about 2 m take two people
at the ends, a lifting beam on a crane from about 3 m).  Weights by hand:
π/4·D²·L·ρ and w·t·L·ρ.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.handling import LiftConditions, team_limit_kg
from sawplan.materials import load_catalogue
from sawplan.piece_handling import (
    EDGE_CAUTION,
    ROLL_CAUTION,
    TIP_CAUTION,
    Piece,
    assess_piece,
    reach_cm,
)
from sawplan.sections import parse_section
from sawplan.weights import weigh


@pytest.mark.parametrize(
    ("section", "rolls", "tips"),
    [
        pytest.param("round 60mm", True, False, id="round rolls"),
        pytest.param("tube 3in 0.12in", True, False, id="tube rolls"),
        pytest.param("hex 40mm", True, False, id="hex rolls"),
        pytest.param("flat 4in 1in", False, False, id="flat bar neither"),
        pytest.param("square 50mm", False, False, id="square neither"),
        pytest.param("angle 3in 3in 0.25in", False, True, id="angle tips"),
        pytest.param("channel 6in 2in 0.2in 0.34in", False, True, id="channel tips"),
        pytest.param("ibeam 8in 5.25in 0.23in 0.4in", False, True, id="I-beam tips"),
    ],
)
def test_cautions_follow_the_shape(section, rolls, tips):
    steel = load_catalogue().get("A36")
    result = weigh(steel, parse_section(section), 500.0)
    assert (ROLL_CAUTION in result.cautions) is rolls
    assert (TIP_CAUTION in result.cautions) is tips
    assert EDGE_CAUTION in result.cautions  # every sawn end has a burr
    assert "roll" not in result.caution  # the general line no longer guesses the shape


def test_a_light_long_flat_bar_is_a_two_person_lift():
    # 6061-T6 flat 50 × 6 mm × 6 m: 50 × 6 mm² × 6 m × 2.70 g/cm³ = 4.86 kg, far under
    # the 23 kg load constant, yet 6 m long: two people, one at each end (common practice)
    alu = load_catalogue().get("6061-T6")
    result = weigh(alu, parse_section("flat 50mm 6mm"), 6000.0)
    assert result.weight_kg == pytest.approx(50 * 6 * 6000 * 2.70e-6, rel=1e-9)
    assert result.handling == "two-person"
    assert "one at each end" in result.advice
    assert any("bends and swings" in c for c in result.cautions)
    short = weigh(alu, parse_section("flat 50mm 6mm"), 1000.0)
    assert short.handling == "one-person"


def test_a_long_heavy_bar_goes_on_a_lifting_beam():
    # A36 I-beam 8 × 5.25 in × 20 ft, about 20 lb/ft: 400 lb, far over a team's limit
    steel = load_catalogue().get("A36")
    result = weigh(steel, parse_section("ibeam 8in 5.25in 0.23in 0.4in"), 6096.0)
    assert result.handling == "lift-aid"
    assert any("lifting beam and two slings" in c for c in result.cautions)
    assert TIP_CAUTION in result.cautions


@pytest.mark.parametrize(
    ("piece", "v_cm", "h_cm"),
    [
        # a 110 mm slice of a 250 mm round: narrowest side 11 cm, H = 20 + 11/2 = 25.5 cm
        pytest.param(Piece("round", 110.0, 250.0), 75.0, 25.5, id="slice: narrowest side"),
        # the same slice from the floor (V = 10 cm < 25 cm): H = 25 + 11/2 = 30.5 cm
        pytest.param(Piece("round", 110.0, 250.0), 10.0, 30.5, id="slice from the floor"),
        # a 6 m flat bar 100 mm wide, gripped at its end: H = 20 + 10/2 = 25 cm
        pytest.param(Piece("flat", 6000.0, 100.0), 75.0, 25.0, id="long bar: section width"),
        # a 300 mm block of a 400 mm square: W = 30 cm, H = 20 + 15 = 35 cm
        pytest.param(Piece("square", 300.0, 400.0), 75.0, 35.0, id="block"),
    ],
)
def test_reach_is_estimated_from_the_width_facing_the_body(piece, v_cm, h_cm):
    assert reach_cm(piece, v_cm) == pytest.approx(h_cm)


def test_the_estimated_reach_lowers_the_limit_by_hand():
    # H 25.5 cm: HM = 25/25.5; other multipliers 1 at V 75, D 25, A 0, F 0.2, good grip
    lift = assess_piece(10.0, Piece("round", 110.0, 250.0))
    assert lift.horizontal_cm == pytest.approx(25.5)
    assert lift.rwl_kg == pytest.approx(23.0 * 25 / 25.5)
    # a reach the user gives wins over the estimate
    given = assess_piece(10.0, Piece("round", 110.0, 250.0), LiftConditions(), reach_given=True)
    assert given.horizontal_cm == 25.0 and given.rwl_kg == pytest.approx(23.0)


@given(
    mass=st.floats(min_value=0.1, max_value=5000),
    length=st.floats(min_value=2000, max_value=12000),
    width=st.floats(min_value=5, max_value=600),
    shape=st.sampled_from(["round", "flat", "angle", "tube", "ibeam"]),
)
def test_a_long_piece_is_never_a_one_person_lift(mass, length, width, shape):
    lift = assess_piece(mass, Piece(shape, length, width))
    assert lift.handling in ("two-person", "lift-aid")
    if lift.handling == "two-person":
        assert mass <= team_limit_kg(lift.rwl_kg) + 1e-9
    assert not math.isnan(lift.lifting_index)


def test_a_long_bar_from_low_with_a_twist_by_hand(cli):
    # 6061-T6 pipe 48.3 × 3.2 mm × 6 m lifted from 20 cm, turning 45° (Pub. 94-110 §1.3):
    # V = 20 < 25 cm, so H = 25 + 4.83/2 = 27.415 cm; HM = 25/27.415, VM = 1 − 0.003·55,
    # DM = 1 (25 cm travel), AM = 1 − 0.0032·45, FM = CM = 1 → RWL = 23·HM·VM·AM
    by_hand = 23 * (25 / 27.415) * (1 - 0.003 * 55) * (1 - 0.0032 * 45)
    result = cli("weigh", "6061-T6", "tube", "48.3mm", "3.2mm", "--length", "6m",
                 "--lift-from", "20cm", "--twist", "45", "--json")  # fmt: skip
    assert result.code == 0, result.err
    data = __import__("json").loads(result.out)
    assert data["reach_cm"] == pytest.approx(27.415)
    assert data["recommended_limit_kg"] == pytest.approx(by_hand, rel=1e-9)
    assert data["handling"] == "two-person"  # 7.3 kg, but 6 m long
    refused = cli("weigh", "6061-T6", "round", "20mm", "--length", "1m", "--twist", "200")
    assert refused.code != 0 and "twist" in refused.err
