"""Blades needed for an area: deterministic count and Weibull simulation.

External checks: ⌈area/life⌉ (definition); for β = 1 (exponential lives) the sum
of k lives is Gamma(k, η), so P(k blades cover A) = scipy.stats.gamma.sf(A, k,
scale=η), and the count minus one is Poisson(A/η), so E[count] = 1 + A/η
(renewal theory, derived); exponential lives are memoryless, so a part-used
blade behaves like a new one.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.errors import BadDataError
from sawplan.life.forecast import deterministic_count, forecast_blades
from sawplan.life.weibull import WeibullFit, fit_weibull


def make_fit(shape: float, scale: float) -> WeibullFit:
    """A WeibullFit with chosen parameters (the forecast only uses shape, scale, mean)."""
    return WeibullFit(
        shape=shape,
        scale_cm2=scale,
        n=10,
        failures=10,
        censored=0,
        shape_ci=(shape, shape),
        scale_ci_cm2=(scale, scale),
        confidence=0.9,
        log_likelihood=0.0,
        b10_ci_cm2=(0.0, 0.0),
        shape_se=0.0,
        scale_se_cm2=0.0,
    )


@pytest.mark.parametrize(
    ("area", "life", "blades"),
    [
        pytest.param(1000.0, 250.0, 4, id="exact multiple"),
        pytest.param(1001.0, 250.0, 5, id="just over a multiple"),
        pytest.param(999.0, 250.0, 4, id="just under a multiple"),
        pytest.param(1.1, 0.1, 11, id="exact multiple, 1.1/0.1 = 11.000000000000002 in floats"),
        pytest.param(0.3, 0.1, 3, id="exact multiple, 0.3/0.1 = 2.9999999999999996 in floats"),
        pytest.param(100.0, 300.0, 1, id="less than one life"),
        pytest.param(64_516.0, 64_516.0, 1, id="one life exactly (1e4 in², memory)"),
        pytest.param(1e6, 7.0, 142_858, id="many blades"),
    ],
)
def test_deterministic_count_is_ceiling(area, life, blades):
    # definition: ⌈area / life⌉
    assert deterministic_count(area, life) == blades
    fc = forecast_blades(area, None, deterministic_life_cm2=life)
    assert fc.blades_needed == blades
    assert fc.method == "deterministic"
    assert fc.probability_curve[-1] == (blades, 1.0)


def test_deterministic_with_part_used_blade():
    # life 1000, blade on the saw has cut 400: it has 600 left; 2000 needs 1 + ⌈1400/1000⌉
    fc = forecast_blades(2000.0, None, deterministic_life_cm2=1000.0, used_area_cm2=400.0)
    assert fc.blades_needed == 3
    assert fc.new_blades_needed == 2
    fc = forecast_blades(500.0, None, deterministic_life_cm2=1000.0, used_area_cm2=400.0)
    assert (fc.blades_needed, fc.new_blades_needed) == (1, 0)


@pytest.mark.parametrize(("area", "scale"), [(50_000.0, 10_000.0), (12_000.0, 3_000.0)])
def test_exponential_lives_match_gamma_sums(area, scale):
    # β = 1: P(sum of k lives ≥ A) = gamma.sf(A, k, scale=η) (scipy.stats); E[N] = 1 + A/η
    from scipy import stats

    fc = forecast_blades(area, make_fit(1.0, scale), confidence=0.9, simulations=20_000, seed=3)
    assert fc.method == "weibull-simulation"
    for k, p in fc.probability_curve:
        assert p == pytest.approx(stats.gamma.sf(area, k, scale=scale), abs=0.012)
    assert fc.expected_blades == pytest.approx(1 + area / scale, rel=0.02)
    # smallest k whose exact probability reaches 0.9, allowing one either side for noise
    exact = next(k for k in range(1, 200) if stats.gamma.sf(area, k, scale=scale) >= 0.9)
    assert abs(fc.blades_needed - exact) <= 1
    assert fc.achieved_probability >= 0.9


def test_part_used_blade_is_memoryless_for_exponential_lives():
    from scipy import stats

    fit = make_fit(1.0, 10_000.0)
    fc = forecast_blades(50_000.0, fit, used_area_cm2=25_000.0, seed=5)
    for k, p in fc.probability_curve:
        assert p == pytest.approx(stats.gamma.sf(50_000.0, k, scale=10_000.0), abs=0.012)
    assert fc.new_blades_needed == fc.blades_needed - 1


def test_part_used_wear_out_blade_has_less_left():
    # β > 1: a blade that has cut a lot has less left than a new one (derived)
    fit = make_fit(3.0, 10_000.0)
    new = forecast_blades(8_000.0, fit, seed=1)
    worn = forecast_blades(8_000.0, fit, used_area_cm2=9_000.0, seed=1)
    assert new.probability_curve[0][1] > worn.probability_curve[0][1]


def test_same_seed_same_answer():
    fit = make_fit(1.4, 20_000.0)
    assert forecast_blades(90_000.0, fit, seed=42) == forecast_blades(90_000.0, fit, seed=42)


@settings(max_examples=30, deadline=None)
@given(
    area=st.floats(min_value=10.0, max_value=1e5),
    shape=st.floats(min_value=0.5, max_value=5.0),
    seed=st.integers(min_value=0, max_value=2**31),
)
def test_curve_is_monotone_in_blade_count(area, shape, seed):
    fc = forecast_blades(area, make_fit(shape, 5_000.0), simulations=500, seed=seed)
    counts = [k for k, _ in fc.probability_curve]
    probs = [p for _, p in fc.probability_curve]
    assert counts == list(range(1, len(counts) + 1))
    assert all(a <= b for a, b in zip(probs, probs[1:], strict=False))
    assert all(0.0 <= p <= 1.0 for p in probs)


@settings(max_examples=30, deadline=None)
@given(
    area=st.floats(min_value=10.0, max_value=1e5),
    shape=st.floats(min_value=0.5, max_value=5.0),
    c1=st.floats(min_value=0.01, max_value=0.99),
    c2=st.floats(min_value=0.01, max_value=0.99),
    seed=st.integers(min_value=0, max_value=2**31),
)
def test_higher_confidence_never_asks_for_fewer_blades(area, shape, c1, c2, seed):
    lo, hi = sorted((c1, c2))
    fit = make_fit(shape, 5_000.0)
    a = forecast_blades(area, fit, confidence=lo, simulations=500, seed=seed)
    b = forecast_blades(area, fit, confidence=hi, simulations=500, seed=seed)
    assert a.blades_needed <= b.blades_needed
    det_lo = forecast_blades(area, None, deterministic_life_cm2=700.0, confidence=lo)
    det_hi = forecast_blades(area, None, deterministic_life_cm2=700.0, confidence=hi)
    assert det_lo.blades_needed == det_hi.blades_needed


def test_many_blades_match_the_central_limit_theorem():
    # k blades with mean μ and variance σ² (scipy.stats.weibull_min): the sum is close to
    # Normal(kμ, kσ²) for k ≈ 100 (central limit theorem), β = 3 lives are near-symmetric
    from scipy import stats

    shape, scale, area = 3.0, 10_000.0, 1.0e6
    mean, var = stats.weibull_min.stats(shape, scale=scale, moments="mv")
    fc = forecast_blades(area, make_fit(shape, scale), simulations=20_000, seed=9)
    for k, p in fc.probability_curve:
        clt = stats.norm.sf(area, loc=k * mean, scale=math.sqrt(k * var))
        assert p == pytest.approx(clt, abs=0.03)
    # renewal theory (derived): E[N] ≈ A/μ + (σ²/μ² + 1)/2 for large A
    assert fc.expected_blades == pytest.approx(area / mean + (var / mean**2 + 1) / 2, rel=0.01)


def test_forecast_from_a_fitted_sample():
    fit = fit_weibull(
        [9_000, 12_000, 15_500, 7_000, 20_000, 11_000], [True, True, True, True, False, True]
    )
    fc = forecast_blades(100_000.0, fit, confidence=0.9)
    assert fc.method == "weibull-simulation"
    curve = dict(fc.probability_curve)
    assert curve[fc.blades_needed] >= 0.9 > curve.get(fc.blades_needed - 1, 0.0)


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        pytest.param({"area_cm2": 100.0, "fit": None}, "deterministic_life_cm2", id="no life"),
        pytest.param(
            {"area_cm2": 100.0, "fit": fit_weibull([1, 2], [True, False])},
            "deterministic_life_cm2",
            id="fit not possible",
        ),
        pytest.param(
            {"area_cm2": 0.0, "fit": None, "deterministic_life_cm2": 5.0}, "area_cm2", id="zero"
        ),
        pytest.param(
            {"area_cm2": 10.0, "fit": None, "deterministic_life_cm2": 5.0, "confidence": 1.0},
            "confidence",
            id="confidence 1",
        ),
        pytest.param(
            {"area_cm2": 10.0, "fit": None, "deterministic_life_cm2": -5.0},
            "deterministic_life_cm2",
            id="negative life",
        ),
    ],
)
def test_bad_forecast_input(kwargs, field):
    with pytest.raises(BadDataError) as err:
        forecast_blades(**kwargs)
    assert err.value.field == field
