"""Taylor's tool-life relation V·Tⁿ = C (sawplan.cutting.tool_life)."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.cutting import tool_life as tl
from sawplan.errors import BadDataError


def test_twice_the_speed_at_the_hss_exponent():
    # Groover, Fundamentals of Modern Manufacturing: n = 0.125 for HSS (from memory);
    # T2/T1 = (V1/V2)^(1/n) = 2^-8 = 1/256 (derived)
    assert tl.HSS.n == 0.125
    assert tl.life_ratio(2.0, tl.HSS.n) == pytest.approx(1 / 256, rel=1e-12)
    # across the published range 0.08-0.2 (Kalpakjian & Schmid, from memory): 1/5793 to 1/32
    assert tl.life_ratio(2.0, tl.HSS.n_high) == pytest.approx(1 / 32, rel=1e-12)
    assert tl.life_ratio(2.0, tl.HSS.n_low) == pytest.approx(2**-12.5, rel=1e-12)


def test_textbook_example_half_speed_quadruples_life():
    # Kalpakjian & Schmid worked example (from memory): n = 0.5, C = 120; halving the
    # cutting speed raises tool life by 300 % (4×)
    assert tl.life_ratio(0.5, 0.5) == pytest.approx(4.0)
    c = 120.0
    t1 = tl.life_at(100.0, c, 0.5)
    t2 = tl.life_at(50.0, c, 0.5)
    assert (t2 - t1) / t1 == pytest.approx(3.0)


def test_constant_life_and_speed_round_trip():
    # Groover (from memory): HSS on steel, n = 0.125, C = 70 m/min; at 30 m/min
    # T = (70/30)^8 = 878.6 min (derived)
    assert tl.life_at(30.0, 70.0, 0.125) == pytest.approx((70 / 30) ** 8, rel=1e-12)
    assert tl.life_at(30.0, 70.0, 0.125) == pytest.approx(878.6, abs=0.1)
    c = tl.taylor_constant(30.0, 878.6, 0.125)
    assert c == pytest.approx(70.0, rel=1e-4)
    assert tl.speed_for_life(878.6, c, 0.125) == pytest.approx(30.0)


@given(st.floats(0.2, 5.0), st.floats(0.05, 0.6))
def test_speed_and_life_ratios_are_inverse(speed_ratio, n):
    life = tl.life_ratio(speed_ratio, n)
    assert tl.speed_ratio_for_life(life, n) == pytest.approx(speed_ratio, rel=1e-9)
    # faster means shorter life, always (V·Tⁿ = C with n > 0)
    if speed_ratio > 1:
        assert life < 1
    elif speed_ratio < 1:
        assert life > 1


def test_area_and_time_exponents_convert_both_ways():
    # derived: with cut time ∝ 1/V, area life L = A′·T, A′ ∝ V, so n_A = n/(1 − n)
    n = tl.HSS.n
    assert tl.area_exponent(n) == pytest.approx(0.125 / 0.875)
    assert tl.time_exponent(tl.area_exponent(n)) == pytest.approx(n)
    # the same speed change read in area: L2/L1 = (T2/T1)·(V2/V1)
    ratio = 1.5
    area_life_ratio = tl.life_ratio(ratio, n) * ratio
    assert tl.life_ratio(ratio, tl.area_exponent(n)) == pytest.approx(area_life_ratio)


def test_wear_per_cut():
    # 2× the speed halves the cut time; the cut uses 0.5 × 256 = 128× the blade (derived)
    assert tl.wear_per_cut_ratio(2.0, 0.5, 0.125) == pytest.approx(128.0)
    # same speed, same time: same wear
    assert tl.wear_per_cut_ratio(1.0, 1.0, 0.125) == pytest.approx(1.0)


def test_feed_exponent_extended_taylor():
    # Kalpakjian & Schmid: V·Tⁿ·fʸ = C with y ≈ 0.6 (from memory): 1.5× the feed per tooth
    # at the same speed leaves 1.5^(-0.6/0.125) = 1.5^-4.8 of the life (derived)
    assert tl.FEED_EXPONENT == 0.6
    assert tl.feed_life_ratio(1.5, 0.125) == pytest.approx(1.5**-4.8)
    assert tl.feed_wear_per_cut_ratio(1.5, 1 / 1.5, 0.125) == pytest.approx(1.5**3.8)


def test_published_exponents_carry_sources_and_ranges():
    for key, exp in tl.PUBLISHED.items():
        assert exp.n_low <= exp.n <= exp.n_high, key
        assert "from memory" in exp.source
    assert tl.exponent_for("bi-metal") is tl.HSS
    assert tl.exponent_for("Bimetal") is tl.HSS
    assert tl.exponent_for("carbide") is tl.CARBIDE
    with pytest.raises(BadDataError):
        tl.exponent_for("diamond")


@pytest.mark.parametrize("n", [0.0, 1.0, -0.1, math.nan, math.inf])
def test_exponent_out_of_range_is_refused(n):
    with pytest.raises(BadDataError) as err:
        tl.life_ratio(2.0, n)
    assert err.value.field == "n"


@pytest.mark.parametrize("ratio", [0.0, -1.0, math.inf, math.nan])
def test_ratio_must_be_positive(ratio):
    with pytest.raises(BadDataError):
        tl.life_ratio(ratio, 0.125)
