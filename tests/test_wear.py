"""Wear curve of one blade: break-in region and end-of-life signs.

Synthetic blades are built to the common-practice picture: break-in over the
first ≈ 300–650 cm² at about half feed, so about twice the time per area
(common practice); then a steady rate; end of life shows as time
per unit area up 30–50 % (common practice).
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.errors import BadDataError
from sawplan.life.wear import BREAK_IN_CM2, RISE_THRESHOLD, wear_curve

STEADY = 0.02  # min per cm², i.e. 50 cm²/min (a made-up shop value for the synthetic blade)


def synthetic_blade(cuts=120, area=50.0, rise_from=None, rise=0.45, outlier_at=None):
    """Times per cut: ×2 during break-in (half feed), steady, then a step rise."""
    times = []
    for i in range(cuts):
        start = i * area
        per_area = STEADY
        if start < 650.0:
            per_area = 2 * STEADY
        elif rise_from is not None and start >= rise_from:
            per_area = STEADY * (1 + rise)
        if i == outlier_at:
            per_area = STEADY * 3
        times.append(per_area * area)
    return [area] * cuts, times


def test_break_in_defaults_sit_in_the_common_practice_range():
    # common practice: break-in over ≈ 300–650 cm²; end-of-life at +30–50 %
    assert 300.0 <= BREAK_IN_CM2 <= 650.0
    assert 0.30 <= RISE_THRESHOLD <= 0.50


def test_break_in_region_marked():
    areas, times = synthetic_blade(cuts=40)
    curve = wear_curve(areas, times)
    # cuts of 50 cm² starting at 0, 50, …, 600 cm² began inside the first 650 cm²: 13 cuts
    flags = [p.in_break_in for p in curve.points]
    assert flags == [True] * 13 + [False] * 27
    assert curve.steady_min_per_cm2 == pytest.approx(STEADY)
    assert curve.steady_rate_cm2_min == pytest.approx(1 / STEADY)
    assert curve.status == "steady"
    assert all(p.rise is None for p in curve.points if p.in_break_in)


def test_break_in_region_follows_the_given_area():
    areas, times = synthetic_blade(cuts=40)
    curve = wear_curve(areas, times, break_in_cm2=300.0)
    assert sum(p.in_break_in for p in curve.points) == 6  # starts 0…250 cm² are below 300


def test_end_of_life_rise_detected():
    # rise of 45 % from 4000 cm² on (inside the 30–50 % band, common practice)
    areas, times = synthetic_blade(cuts=120, rise_from=4000.0)
    curve = wear_curve(areas, times)
    assert curve.status == "end-of-life-signs"
    assert curve.latest_rise == pytest.approx(0.45)
    # a trailing median of 5 cuts crosses after the 3rd slow cut: 4000 + 2·50 cm²
    assert curve.end_of_life_from_cm2 == pytest.approx(4100.0)
    assert "manual" in curve.caution


def test_small_rise_and_single_slow_cut_do_not_flag():
    areas, times = synthetic_blade(cuts=120, rise_from=4000.0, rise=0.15, outlier_at=118)
    curve = wear_curve(areas, times)
    assert curve.status == "steady"
    assert curve.latest_rise == pytest.approx(0.15)
    assert curve.end_of_life_from_cm2 is None


def test_rates_and_times_give_the_same_curve():
    areas = [40.0, 60.0, 80.0, 100.0, 120.0, 150.0, 150.0, 150.0]
    times = [2.0, 3.0, 2.0, 2.5, 3.0, 3.75, 3.75, 4.0]
    by_time = wear_curve(areas, times)
    by_rate = wear_curve(areas, rates_cm2_min=[a / t for a, t in zip(areas, times, strict=True)])
    for a, b in zip(by_time.points, by_rate.points, strict=True):
        assert a.min_per_cm2 == pytest.approx(b.min_per_cm2)
    # hand-computed: cut 0 is 40 cm² in 2 min = 20 cm²/min; cumulative after cut 2 = 180 cm²
    assert by_time.points[0].rate_cm2_min == pytest.approx(20.0)
    assert by_time.points[2].cumulative_area_cm2 == pytest.approx(180.0)


def test_new_blade_still_in_break_in():
    curve = wear_curve([100.0, 100.0, 100.0], [4.0, 4.0, 4.0])
    assert curve.status == "break-in"
    assert curve.steady_min_per_cm2 is None
    assert curve.latest_rise is None


def test_just_past_break_in_has_too_few_cuts():
    curve = wear_curve([300.0, 300.0, 300.0, 50.0], [12.0, 12.0, 12.0, 1.0])
    assert curve.status == "too-few-cuts"


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        pytest.param({"areas_cm2": [10.0], "times_min": [0.0]}, "times_min", id="zero time"),
        pytest.param({"areas_cm2": [-1.0], "times_min": [1.0]}, "areas_cm2", id="negative area"),
        pytest.param({"areas_cm2": [1.0, 2.0], "times_min": [1.0]}, "times_min", id="lengths"),
        pytest.param({"areas_cm2": [1.0]}, "times_min", id="neither times nor rates"),
    ],
)
def test_bad_wear_input(kwargs, field):
    with pytest.raises(BadDataError) as err:
        wear_curve(**kwargs)
    assert err.value.field == field


@settings(max_examples=40, deadline=None)
@given(
    st.lists(
        st.tuples(
            st.floats(min_value=0.1, max_value=1e4), st.floats(min_value=0.01, max_value=1e3)
        ),
        min_size=1,
        max_size=60,
    )
)
def test_cumulative_area_adds_up(cuts):
    areas = [a for a, _ in cuts]
    curve = wear_curve(areas, [t for _, t in cuts])
    cumulative = [p.cumulative_area_cm2 for p in curve.points]
    assert all(a < b for a, b in zip(cumulative, cumulative[1:], strict=False))
    assert curve.total_area_cm2 == pytest.approx(sum(areas))
    # break-in cuts all come first
    flags = [p.in_break_in for p in curve.points]
    assert flags == sorted(flags, reverse=True)
