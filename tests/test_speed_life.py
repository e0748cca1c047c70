"""Taylor's relation fitted to censored blade lives: the Weibull AFT model with band speed.

Checks: invented data with a known n and C (fixed seeds) recovered within the
fit's intervals; agreement with a second method, lifelines' WeibullAFTFitter
(a general-purpose survival library from PyPI), to 1 %; the cumulative-exposure
model's own identities (derived); and the refusals when the log cannot say how
life changes with speed.
"""

from __future__ import annotations

import math

import pytest

from sawplan.errors import BadDataError
from sawplan.life.speed_life import SpeedLifeFit, SpeedLifeNotFitted, fit_speed_life


def invented_blades(n_true, c_true, shape, speeds, blades, seed, censor=(0.5, 1.6)):
    """One speed per blade; mean life (C/V)^(1/n) cm²; random right-censoring.

    Invented test data: Weibull lives from numpy with the scale that gives the
    mean life η·Γ(1 + 1/β) = (C/V)^(1/n) at each blade's speed.
    """
    import numpy as np

    rng = np.random.default_rng(seed)
    v = rng.choice(np.asarray(speeds, dtype=float), size=blades)
    eta = (c_true / v) ** (1.0 / n_true) / math.gamma(1.0 + 1.0 / shape)
    life = eta * rng.weibull(shape, size=blades)
    stop = rng.uniform(*censor, size=blades) * np.median(life)
    failed = life < stop
    return np.minimum(life, stop), v, failed


CASES = [
    # n, C (m/min for a mean life of 1 cm²), Weibull shape, speeds (m/min), blades, seed
    pytest.param(0.15, 250.0, 2.2, (40, 55, 70, 90), 120, 7, id="bi-metal-like n=0.15, 4 speeds"),
    pytest.param(0.25, 900.0, 1.5, (30, 45, 60), 80, 11, id="n=0.25, 3 speeds, shape 1.5"),
    pytest.param(0.10, 160.0, 3.0, (50, 80), 60, 5, id="n=0.10, 2 speeds, steep wear-out"),
]


@pytest.mark.parametrize(("n", "c", "shape", "speeds", "blades", "seed"), CASES)
def test_known_n_and_c_recovered_within_interval(n, c, shape, speeds, blades, seed):
    life, v, failed = invented_blades(n, c, shape, speeds, blades, seed)
    fit = fit_speed_life(range(blades), life, v, failed, confidence=0.95)
    assert isinstance(fit, SpeedLifeFit)
    assert fit.n_ci[0] < n < fit.n_ci[1]
    assert fit.c_ci_m_min[0] < c < fit.c_ci_m_min[1]
    assert fit.shape_ci[0] < shape < fit.shape_ci[1]
    assert fit.blades == blades
    assert fit.failures == int(failed.sum())
    assert fit.speed_levels == len(speeds)


@pytest.mark.parametrize(("n", "c", "shape", "speeds", "blades", "seed"), CASES)
def test_agrees_with_lifelines_weibull_aft(n, c, shape, speeds, blades, seed):
    # second method: lifelines' WeibullAFTFitter on ln V; its λ(V) = exp(b0 + b1 ln V) is
    # the Weibull scale and ρ the shape, so n = −1/b1 and
    # C = V·L(V)ⁿ with L = λ·Γ(1 + 1/ρ): ln C = n·(b0 + ln Γ(1 + 1/ρ))  (derived)
    import numpy as np
    import pandas as pd
    from lifelines import WeibullAFTFitter

    life, v, failed = invented_blades(n, c, shape, speeds, blades, seed)
    fit = fit_speed_life(range(blades), life, v, failed, confidence=0.95)
    df = pd.DataFrame({"life": life, "failed": failed, "ln_v": np.log(v)})
    aft = WeibullAFTFitter().fit(df, "life", "failed")
    b0 = aft.params_[("lambda_", "Intercept")]
    b1 = aft.params_[("lambda_", "ln_v")]
    rho = math.exp(aft.params_[("rho_", "Intercept")])
    ref_n = -1.0 / b1
    ref_c = math.exp(ref_n * (b0 + math.lgamma(1.0 + 1.0 / rho)))
    assert fit.n == pytest.approx(ref_n, rel=0.01)
    assert fit.c_m_min == pytest.approx(ref_c, rel=0.01)
    assert fit.shape == pytest.approx(rho, rel=0.01)
    assert fit.log_likelihood == pytest.approx(aft.log_likelihood_, rel=1e-4)
    # the same Wald standard error of the speed coefficient m = −b1 = 1/n
    se_b1 = aft.standard_errors_[("lambda_", "ln_v")]
    se_ln_m = math.log(fit.n_ci[1] / fit.n) / 1.959963984540054
    assert se_ln_m * (1.0 / fit.n) == pytest.approx(se_b1, rel=0.01)


def test_splitting_a_blade_into_stretches_changes_nothing():
    # derived: at one speed the exposure is the plain sum, so cutting each blade's life
    # into three logged stretches must give the very same fit
    import numpy as np

    life, v, failed = invented_blades(0.15, 250.0, 2.2, (40, 55, 70, 90), 60, 3)
    whole = fit_speed_life(range(60), life, v, failed)
    blade = np.repeat(np.arange(60), 3)
    parts = np.repeat(life / 3.0, 3)
    split = fit_speed_life(blade, parts, np.repeat(v, 3), failed)
    assert split.n == pytest.approx(whole.n, rel=1e-7)
    assert split.c_m_min == pytest.approx(whole.c_m_min, rel=1e-7)
    assert split.shape == pytest.approx(whole.shape, rel=1e-7)


def test_blades_run_at_two_speeds_each_recover_n_and_c():
    # Invented data from the cumulative-exposure model itself (Nelson 1980): each blade
    # draws a life u at V₀ from Weibull(β, η₀), cuts a first stretch at V₁ (using
    # x₁(V₁/V₀)^m of u), then runs at V₂ until u is used up or the log stops.
    import numpy as np

    rng = np.random.default_rng(21)
    n_true, c_true, shape, v0 = 0.2, 600.0, 2.0, 60.0
    m = 1.0 / n_true
    eta0 = (c_true / v0) ** m / math.gamma(1.0 + 1.0 / shape)
    blade, exposure, speed, failed = [], [], [], []
    for i in range(150):
        v1, v2 = rng.choice([40.0, 60.0, 85.0], size=2)
        u = eta0 * rng.weibull(shape)
        first = rng.uniform(0.1, 0.6) * eta0 * (v0 / v1) ** m
        used = first * (v1 / v0) ** m
        if used >= u:  # worn out in the first stretch
            blade.append(i), exposure.append(u * (v0 / v1) ** m), speed.append(v1)
            failed.append(True)
            continue
        rest = (u - used) * (v0 / v2) ** m
        stop = rng.uniform(0.3, 1.5) * eta0 * (v0 / v2) ** m
        blade += [i, i]
        exposure += [first, min(rest, stop)]
        speed += [v1, v2]
        failed.append(rest <= stop)
    fit = fit_speed_life(blade, exposure, speed, failed, confidence=0.95)
    assert isinstance(fit, SpeedLifeFit)
    assert fit.n_ci[0] < n_true < fit.n_ci[1]
    assert fit.c_ci_m_min[0] < c_true < fit.c_ci_m_min[1]
    assert fit.shape_ci[0] < shape < fit.shape_ci[1]


def test_mean_life_follows_taylor():
    # V·L(V)ⁿ = C at every speed (the definition of the fitted relation)
    life, v, failed = invented_blades(0.15, 250.0, 2.2, (40, 55, 70, 90), 120, 7)
    fit = fit_speed_life(range(120), life, v, failed)
    for speed in (35.0, 60.0, 100.0):
        assert speed * fit.mean_life(speed) ** fit.n == pytest.approx(fit.c_m_min, rel=1e-12)
    ref = fit.reference_speed_m_min
    assert fit.mean_life(ref) == pytest.approx(fit.reference_life, rel=1e-9)
    assert fit.reference_life_ci[0] < fit.reference_life < fit.reference_life_ci[1]


def test_time_as_life_is_labelled_minutes():
    life, v, failed = invented_blades(0.15, 250.0, 2.2, (40, 55, 70, 90), 120, 7)
    fit = fit_speed_life(range(120), life / 100.0, v, failed, basis="time")
    assert isinstance(fit, SpeedLifeFit)
    assert fit.life_unit == "min"
    # a life scale of 1/100 leaves n alone and moves C by (1/100)ⁿ (V·(L/100)ⁿ = C/100ⁿ)
    area = fit_speed_life(range(120), life, v, failed)
    assert fit.n == pytest.approx(area.n, rel=1e-6)
    assert fit.c_m_min == pytest.approx(area.c_m_min / 100.0**area.n, rel=1e-6)


# --- no fit, and why -------------------------------------------------------------------------


def test_one_speed_only_says_a_second_speed_is_needed():
    life, _v, failed = invented_blades(0.15, 250.0, 2.2, (60,), 30, 1)
    fit = fit_speed_life(range(30), life, [60.0] * 30, failed)
    assert isinstance(fit, SpeedLifeNotFitted)
    assert "every blade ran at 60 m/min" in fit.reason
    assert "second band speed" in fit.needs
    assert fit.speed_levels == 1


def test_too_few_retired_blades():
    fit = fit_speed_life([0, 1, 2, 3], [900.0, 1200.0, 400.0, 800.0], [50, 60, 70, 80],
                         [True, True, False, False])  # fmt: skip
    assert isinstance(fit, SpeedLifeNotFitted)
    assert fit.failures == 2
    assert "only 2 retired blades" in fit.reason
    assert "1 more blade(s)" in fit.needs


def test_failures_at_one_speed_only():
    fit = fit_speed_life(range(6), [900, 1000, 1100, 300, 400, 500], [50, 50, 50, 80, 80, 80],
                         [True, True, True, False, False, False])  # fmt: skip
    assert isinstance(fit, SpeedLifeNotFitted)
    assert "every retired blade ran at 50 m/min" in fit.reason


def test_life_not_falling_with_speed_gives_no_exponent():
    # lives drawn without any speed effect: the interval for m = 1/n must hold 0
    import numpy as np

    rng = np.random.default_rng(4)
    v = rng.choice([40.0, 80.0], size=20)
    life = 20_000.0 * rng.weibull(1.5, size=20)
    fit = fit_speed_life(range(20), life, v, [True] * 20)
    assert isinstance(fit, SpeedLifeNotFitted)
    assert "does not fall measurably" in fit.reason


def test_blades_that_cut_nothing_are_left_out():
    fit = fit_speed_life([], [], [], [True, False])
    assert isinstance(fit, SpeedLifeNotFitted)
    assert fit.blades == 0
    assert "log the band speed" in fit.needs


@pytest.mark.parametrize(
    ("blade", "exposure", "speed", "failed", "field"),
    [
        pytest.param([0], [-1.0], [50.0], [True], "exposure", id="negative area"),
        pytest.param([0], [10.0], [0.0], [True], "band-speed", id="zero speed"),
        pytest.param([0], [10.0], [math.nan], [True], "band-speed", id="speed not a number"),
        pytest.param([3], [10.0], [50.0], [True], "blade", id="blade out of range"),
        pytest.param([0, 0], [10.0], [50.0], [True], "exposure", id="lengths differ"),
    ],
)
def test_bad_input_names_the_field(blade, exposure, speed, failed, field):
    with pytest.raises(BadDataError) as err:
        fit_speed_life(blade, exposure, speed, failed)
    assert err.value.field == field
