"""The forecast's work is bounded by lives drawn; thousands of blades use the normal sum.

External checks: the mean and variance of a Weibull life against
scipy.stats.weibull_min (a reference library); the normal approximation of the
sum of k lives (central limit theorem) against plain simulation of the same
lives, on cases small enough to simulate in full.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import pytest

from sawplan.errors import BadDataError
from sawplan.life import forecast as fc_mod
from sawplan.life.forecast import (
    MAX_BLADES,
    MAX_DRAWS,
    NORMAL_FROM,
    _normal,
    _simulate,
    forecast_blades,
    life_moments,
)
from tests.test_forecast import make_fit


@pytest.mark.parametrize("shape", [0.5, 0.8, 1.0, 1.5, 2.0, 3.6, 8.0])
@pytest.mark.parametrize("scale", [1.0, 250.0, 40_000.0])
def test_life_moments_match_scipy(shape, scale):
    from scipy import stats

    mean, var = stats.weibull_min.stats(shape, scale=scale, moments="mv")
    got_mean, got_var = life_moments(shape, scale)
    assert got_mean == pytest.approx(float(mean), rel=1e-12)
    assert got_var == pytest.approx(float(var), rel=1e-9)


# (shape, area) where a run needs a few hundred to about 1,100 blades: small enough to
# simulate 20,000 runs, large enough for the central limit theorem to hold.
BOTH_RUN = [
    pytest.param(0.7, 5e6, id="beta 0.7 (early failures), ~400 blades"),
    pytest.param(0.7, 1e7, id="beta 0.7, ~790 blades"),
    pytest.param(1.5, 5e6, id="beta 1.5, ~550 blades"),
    pytest.param(3.0, 1e7, id="beta 3 (wear-out), ~1,120 blades"),
]


@pytest.mark.parametrize(("shape", "area"), BOTH_RUN)
@pytest.mark.parametrize("used", [0.0, 5_000.0])
def test_normal_sum_agrees_with_simulation(shape, area, used):
    fit = make_fit(shape, 10_000.0)
    simulated = _simulate(area, fit, 0.9, 20_000, 11, used)
    normal = _normal(area, fit, 0.9, 11, used)
    # tolerances: the count within 0.3 % (one or two blades in several hundred), the
    # expected count within 0.1 %, each probability of the curve within 0.02
    assert normal.blades_needed == pytest.approx(simulated.blades_needed, rel=3e-3)
    assert normal.expected_blades == pytest.approx(simulated.expected_blades, rel=1e-3)
    curve = dict(simulated.probability_curve)
    for k, p in normal.probability_curve:
        assert p == pytest.approx(curve.get(k, 1.0), abs=0.02)


def test_normal_sum_against_scipy_normal():
    # the probability of k blades covering the area is Φ((kμ − A)/(σ√k)), μ and σ² from
    # scipy.stats.weibull_min, Φ from scipy.stats.norm
    from scipy import stats

    shape, scale, area = 1.3, 8_000.0, 3e7
    mean, var = stats.weibull_min.stats(shape, scale=scale, moments="mv")
    fc = _normal(area, make_fit(shape, scale), 0.95, None, 0.0)
    for k, p in fc.probability_curve[::25]:
        want = stats.norm.cdf((k * mean - area) / math.sqrt(k * var))
        assert p == pytest.approx(float(want), abs=1e-9)
    curve = dict(fc.probability_curve)
    assert curve[fc.blades_needed] >= 0.95 > curve[fc.blades_needed - 1]


@pytest.mark.parametrize(
    ("scale", "method"),
    [
        pytest.param(10_000.0, "weibull-simulation", id="~100 blades per run: simulated"),
        pytest.param(1_000.0, "weibull-simulation", id="~1,000 blades per run: simulated"),
        pytest.param(100.0, "weibull-normal", id="~10,000 blades per run: normal sum"),
        pytest.param(10.0, "weibull-normal", id="~100,000 blades per run: normal sum"),
    ],
)
def test_method_follows_blades_per_run(scale, method):
    # exponential lives (β = 1): mean life = η, so a run needs about area/η blades
    area = 1e6 - 1.0
    fc = forecast_blades(area, make_fit(1.0, scale))
    assert fc.method == method
    assert fc.draws <= 1.2 * MAX_DRAWS  # the last block of each run may overshoot a little
    if method == "weibull-normal":
        assert fc.draws == 0 and fc.simulations == 0
        assert area / scale > NORMAL_FROM
    else:
        assert fc.simulations * min(area / scale, 1) <= 20_000


def test_tiny_life_is_refused_past_the_blade_cap():
    # a life of 1 cm² against 1,000 m²: ten million blades, no shop's job
    with pytest.raises(BadDataError, match=f"more than {MAX_BLADES:,}") as err:
        forecast_blades(1e7, make_fit(1.2, 1.0))
    assert err.value.field == "area_cm2"


def test_runs_fall_as_blades_per_run_rise(monkeypatch):
    # the work cap is in lives drawn: 1,500 blades a run leaves MAX_DRAWS / 1,500 runs
    fit = make_fit(2.0, 1_000.0)
    area = 1_500 * fit.mean_life_cm2
    fc = forecast_blades(area, fit)
    assert fc.method == "weibull-simulation"
    assert fc.simulations == pytest.approx(MAX_DRAWS / 1_501, rel=1e-3)
    monkeypatch.setattr(fc_mod, "NORMAL_FROM", 1_000)
    assert forecast_blades(area, fit).method == "weibull-normal"


def test_forecast_text_says_when_the_sum_was_taken_as_normal():
    from sawplan.cli.life_view import render_forecast

    core = _normal(3e7, make_fit(1.3, 8_000.0), 0.9, None, 0.0)
    shown = SimpleNamespace(
        material=None,
        area_cm2=3e7,
        blades_needed=core.blades_needed,
        method=core.method,
        confidence=0.9,
        weibull_shape=1.3,
        weibull_scale_cm2=8_000.0,
        expected_blades=core.expected_blades,
        note="from the blade log",
        lot_warning=None,
        forecast=core,
    )
    text = render_forecast(shown, "metric")
    assert "taken as normal" in text
    assert str(core.blades_needed) in text
