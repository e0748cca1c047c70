"""Cost per area cut and calibration factors, on hand-computed cases."""

from __future__ import annotations

import math

import pytest

from sawplan.errors import BadDataError
from sawplan.life.economics import blade_cost_per_area, calibration_factors, rank_blade_costs
from sawplan.life.weibull import WeibullFit, fit_weibull


def test_cost_per_area_with_given_life():
    # hand-computed: 60 / 30 000 cm² = 0.002 per cm² = 20 per m²
    cost = blade_cost_per_area("34x1.1 4/6", 60.0, life_cm2=30_000.0)
    assert cost.cost_per_cm2 == pytest.approx(0.002)
    assert cost.cost_per_m2 == pytest.approx(20.0)
    assert cost.life_method == "given"


def test_cost_per_area_with_fit_uses_weibull_mean():
    # β = 2: E[L] = η·Γ(3/2) = η·√π/2 (closed form); η = 10 000 → 8862.27 cm²
    fit = WeibullFit(
        shape=2.0,
        scale_cm2=10_000.0,
        n=8,
        failures=6,
        censored=2,
        shape_ci=(1.0, 3.0),
        scale_ci_cm2=(8_000.0, 12_000.0),
        confidence=0.9,
        log_likelihood=0.0,
        b10_ci_cm2=(0.0, 0.0),
        shape_se=0.0,
        scale_se_cm2=0.0,
    )
    cost = blade_cost_per_area("27x0.9 6/10", 50.0, fit=fit, lives_cm2=[1.0, 2.0])
    assert cost.life_cm2 == pytest.approx(10_000.0 * math.sqrt(math.pi) / 2)
    assert cost.cost_per_cm2 == pytest.approx(50.0 / 8862.269254527580)
    assert cost.life_method == "weibull-mean"
    assert cost.blades == 8


def test_cost_per_area_falls_back_to_observed_mean():
    # too few failures to fit: mean of 1000, 2000, 3000 = 2000 cm²; 30 / 2000 = 0.015 per cm²
    lives = [1000.0, 2000.0, 3000.0]
    fit = fit_weibull(lives, [True, False, False])
    cost = blade_cost_per_area("A", 30.0, fit=fit, lives_cm2=lives)
    assert cost.life_method == "observed-mean"
    assert cost.cost_per_cm2 == pytest.approx(0.015)


def test_rank_blade_costs_cheapest_first():
    a = blade_cost_per_area("A", 60.0, life_cm2=30_000.0)  # 0.002 per cm²
    b = blade_cost_per_area("B", 45.0, life_cm2=15_000.0)  # 0.003 per cm²
    c = blade_cost_per_area("C", 10.0, life_cm2=10_000.0)  # 0.001 per cm²
    assert [x.blade_type for x in rank_blade_costs([a, b, c])] == ["C", "A", "B"]


def test_cost_needs_some_life():
    with pytest.raises(BadDataError):
        blade_cost_per_area("A", 30.0)


def test_calibration_median_of_ratios_hand_computed():
    # saw-1: ratios 1.1, 1.2, 3.0 (one cut timed through a jam)
    #   median 1.2; quartiles (linear interpolation) 1.15 and 2.1; ratio of sums 53/30
    # saw-2: only 2 cuts → not reported yet
    actual = [11.0, 12.0, 30.0, 5.0, 6.0]
    predicted = [10.0, 10.0, 10.0, 5.0, 5.0]
    keys = ["saw-1", "saw-1", "saw-1", "saw-2", "saw-2"]
    summary = calibration_factors(actual, predicted, keys)
    assert summary.method == "median-of-ratios"
    (f,) = summary.factors
    assert f.key == "saw-1" and f.n == 3
    assert f.factor == pytest.approx(1.2)
    assert f.low == pytest.approx(1.15)
    assert f.high == pytest.approx(2.1)
    assert f.ratio_of_sums == pytest.approx(53 / 30)
    (p,) = summary.pending
    assert (p.key, p.n, p.needed) == ("saw-2", 2, 3)


def test_calibration_quartiles_match_numpy_percentile():
    # numpy.percentile's default (linear) is the same rule as statistics' "inclusive"
    import numpy as np

    actual = [9.0, 10.5, 12.0, 8.0, 14.0, 10.0, 11.0]
    predicted = [10.0, 10.0, 10.0, 10.0, 10.0, 10.0, 10.0]
    keys = [("saw-1", "stainless")] * 7
    (f,) = calibration_factors(actual, predicted, keys).factors
    ratios = np.array(actual) / np.array(predicted)
    assert f.key == ("saw-1", "stainless")
    assert f.factor == pytest.approx(np.median(ratios))
    assert (f.low, f.high) == pytest.approx(tuple(np.percentile(ratios, [25, 75])))


def test_calibration_without_keys_is_one_group():
    summary = calibration_factors([10.0, 20.0, 30.0], [10.0, 10.0, 10.0])
    assert summary.factors[0].key is None
    assert summary.factors[0].factor == pytest.approx(2.0)


@pytest.mark.parametrize(
    ("actual", "predicted", "field"),
    [
        pytest.param([1.0, -2.0, 3.0], [1.0, 1.0, 1.0], "actual_min", id="negative actual"),
        pytest.param([1.0, 2.0, 3.0], [1.0, 0.0, 1.0], "predicted_min", id="zero predicted"),
        pytest.param([1.0, 2.0], [1.0], "predicted_min", id="lengths"),
    ],
)
def test_bad_calibration_input(actual, predicted, field):
    with pytest.raises(BadDataError) as err:
        calibration_factors(actual, predicted)
    assert err.value.field == field
