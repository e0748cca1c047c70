"""Bar weights against the shop formulas for steel (common practice)."""

from __future__ import annotations

import pytest

from sawplan.errors import BadDataError
from sawplan.materials import load_catalogue
from sawplan.sections import parse_section
from sawplan.weights import weigh

LB = 0.45359237  # kg, exact by definition
FOOT_MM = 304.8  # exact by definition


@pytest.fixture(scope="module")
def steel():
    mat = load_catalogue().get("4140")  # 7.85 g/cm³, the density the shop formulas assume
    assert mat.density_kg_m3 == pytest.approx(7850, rel=0.005)
    return mat


@pytest.mark.parametrize(
    ("section", "size_in", "lb_per_ft"),
    [
        # common practice: round 2.67·D², square 3.40·s², hex 2.94·F², flat 3.40·w·t
        pytest.param("round 2in", 2.0, 2.67 * 2.0**2, id="round 2in 2.67D2"),
        pytest.param("round 7in", 7.0, 2.67 * 7.0**2, id="round 7in 2.67D2"),
        pytest.param("square 3in", 3.0, 3.40 * 3.0**2, id="square 3in 3.40s2"),
        pytest.param("hex 1.5in", 1.5, 2.94 * 1.5**2, id="hex 1.5in 2.94F2"),
        pytest.param("flat 4in 1in", None, 3.40 * 4 * 1, id="flat 4x1 3.40wt"),
    ],
)
def test_steel_bar_weight_matches_shop_formula(steel, section, size_in, lb_per_ft):
    result = weigh(steel, parse_section(section), FOOT_MM)
    assert result.weight_kg / LB == pytest.approx(lb_per_ft, rel=0.01)


def test_metric_round_formula(steel):
    # common practice: 0.006165·D²[mm] kg/m for ρ = 7.85
    result = weigh(steel, parse_section("round 60mm"), 1000)
    assert result.mass_per_length_kg_m == pytest.approx(0.006165 * 60**2, rel=0.005)


def test_lot_weight_is_count_times_piece(steel):
    result = weigh(steel, parse_section("round 60mm"), 250, count=8)
    assert result.lot_weight_kg == pytest.approx(8 * result.weight_kg)


def test_heavy_billet_needs_a_lift_aid(steel):
    # Ø250 mm × 500 mm steel is about 190 kg: far above the 23 kg NIOSH load constant
    result = weigh(steel, parse_section("round 250mm"), 500)
    assert result.weight_kg > 100
    assert result.handling == "lift-aid"
    assert "regulation" in result.caution.lower() or "rules" in result.caution.lower()


@pytest.mark.parametrize(("length", "count"), [(0, 1), (-5, 1), (100, 0)])
def test_bad_length_or_count(steel, length, count):
    with pytest.raises(BadDataError):
        weigh(steel, parse_section("round 60mm"), length, count)
