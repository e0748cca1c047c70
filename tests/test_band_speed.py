"""Band speed: MH31 table and footnote corrections, the saw's range."""

from __future__ import annotations

import dataclasses

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.cutting import recommend
from sawplan.cutting.speed import band_speed, blade_factor, width_factor
from sawplan.errors import BadDataError, UsageError
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section

REF = pint.UnitRegistry()
IN = 25.4


def m_min(ft_min: float) -> float:
    return REF.Quantity(ft_min, "ft/min").to("m/min").magnitude


@pytest.fixture(scope="module")
def wide_saw():
    """A saw whose speed range never clips: isolates the speed rules."""
    return dataclasses.replace(
        get_saw("mid-production"), band_speed_min_m_min=5.0, band_speed_max_m_min=500.0
    )


@pytest.mark.parametrize(
    ("key", "ft_min"),
    [
        pytest.param("1018", 290, id="1018 MH31 290 ft/min"),
        pytest.param("4140", 250, id="4140 MH31 250 ft/min"),
        pytest.param("304", 120, id="304 MH31 120 ft/min"),
        pytest.param("Ti-6Al-4V", 70, id="Ti-6Al-4V MH31 70 ft/min"),
        pytest.param("D2", 90, id="D2 MH31 90 ft/min"),
    ],
)
def test_mh31_rows_at_4in(key, ft_min, wide_saw):
    material = load_catalogue().get(key)
    # MH31 band-saw table: bi-metal blade, coolant, 4 in width of cut
    result = recommend(material, parse_section("square 4in"), wide_saw)
    assert result.band_speed_m_min == pytest.approx(m_min(ft_min), rel=0.01)
    assert result.band_speed_clipped is None


@pytest.mark.parametrize(
    ("width_in", "factor"),
    [
        pytest.param(0.25, 1.15, id="1/4 in +15% MH31"),
        pytest.param(0.75, 1.12, id="3/4 in +12% MH31"),
        pytest.param(1.25, 1.10, id="1 1/4 in +10% MH31"),
        pytest.param(4.0, 1.00, id="4 in 0 MH31"),
        pytest.param(8.0, 0.88, id="8 in -12% MH31"),
    ],
)
def test_width_footnote(width_in, factor):
    assert width_factor(width_in * IN) == pytest.approx(factor)


def test_beyond_8in_keeps_falling_10_to_15_percent_per_doubling():
    # common practice: 10-15 % per doubling beyond 8 in (beyond the MH31 footnote's widths)
    per_doubling = width_factor(16 * IN) / width_factor(8 * IN)
    assert 0.85 <= per_doubling <= 0.90


@given(st.floats(1.0, 2000.0), st.floats(1.0, 2000.0))
def test_wider_cut_never_runs_faster(a, b):
    lo, hi = sorted((a, b))
    assert width_factor(hi) <= width_factor(lo) + 1e-12


def test_factors_for_blade_and_coolant():
    # MH31 footnote: carbon-steel blade -50 %; dry -30 to -50 %
    assert blade_factor("carbon") == pytest.approx(0.5)
    assert blade_factor("bi-metal") == 1.0
    assert blade_factor("carbide") > 1.0  # memory: 1.5-2x bi-metal
    wet = band_speed(88.0, 101.6, speed_min_m_min=1, speed_max_m_min=1000)
    dry = band_speed(88.0, 101.6, speed_min_m_min=1, speed_max_m_min=1000, dry=True)
    assert 0.5 <= dry.band_speed_m_min / wet.band_speed_m_min <= 0.7
    with pytest.raises(UsageError):
        blade_factor("diamond")


@pytest.mark.parametrize(
    ("section", "dry", "factor"),
    [
        pytest.param("square 0.25in", False, 1.15, id="1/4 in square MH31 +15%"),
        pytest.param("square 8in", False, 0.88, id="8 in square MH31 -12%"),
        pytest.param("square 4in", True, None, id="4 in square dry MH31 -30..-50%"),
    ],
)
def test_corrections_through_a_cut(section, dry, factor, wide_saw):
    material = load_catalogue().get("1018")
    result = recommend(material, parse_section(section), wide_saw, dry=dry)
    ratio = result.band_speed_m_min / m_min(290)  # MH31: 1018 at 290 ft/min
    if factor is None:
        assert 0.5 <= ratio <= 0.7
        assert result.dry
    else:
        assert ratio == pytest.approx(factor, rel=0.01)


def test_speed_is_held_to_the_saw_range():
    saw = get_saw("mid-production")  # 20-100 m/min
    aluminium = load_catalogue().get("6061-T6")  # about 150 m/min (memory)
    result = recommend(aluminium, parse_section("round 50mm"), saw)
    assert result.band_speed_m_min == saw.band_speed_max_m_min
    assert result.band_speed_clipped == "max"
    assert any("held at the saw's highest" in w for w in result.warnings)


def test_given_speed_outside_the_saw_range_is_bad_data():
    with pytest.raises(BadDataError) as err:
        band_speed(88.0, 100.0, speed_min_m_min=20, speed_max_m_min=100, given_m_min=150.0)
    assert "20-100 m/min" in str(err.value)
    given_speed = band_speed(88.0, 100.0, speed_min_m_min=20, speed_max_m_min=100, given_m_min=50.0)
    assert given_speed.band_speed_m_min == 50.0 and given_speed.given
