"""The Weibull fit's own root finder, minimiser, log-sum-exp and χ²₁ quantiles.

They stand in for scipy (``optimize.brentq``, ``optimize.minimize_scalar`` bounded,
``special.logsumexp``, ``special.chdtri``) so that ``sawplan plan --db`` need not
import it; scipy is the reference every check here compares with.  Printed χ²
table values: NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.4
(critical values of the chi-square distribution, ν = 1).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from sawplan.life import scalar
from sawplan.life.weibull import fit_weibull, quantile_interval

ROOT_CASES = [
    pytest.param(lambda x: x**3 - 2 * x - 5, 2.0, 3.0, 2e-12, id="Wallis cubic"),
    pytest.param(math.cos, 0.0, 3.0, 1e-10, id="cos"),
    pytest.param(lambda x: math.exp(x) - 10.0, -5.0, 5.0, 2e-12, id="exp"),
    pytest.param(lambda x: math.atan(x - 1e-3), -100.0, 50.0, 1e-12, id="atan off centre"),
    pytest.param(lambda x: (x - 0.3) * (1 + 40 * x * x), 0.0, 1.0, 1e-12, id="steep cubic"),
    pytest.param(lambda x: x, 0.0, 1.0, 1e-12, id="root at an end"),
]


@pytest.mark.parametrize(("f", "a", "b", "xtol"), ROOT_CASES)
def test_root_is_scipys_brentq(f, a, b, xtol):
    from scipy.optimize import brentq

    assert scalar.find_root(f, a, b, xtol=xtol) == brentq(f, a, b, xtol=xtol)


@settings(max_examples=60, deadline=None)
@given(
    st.floats(min_value=-50.0, max_value=50.0),
    st.floats(min_value=0.0, max_value=20.0),
    st.floats(min_value=0.01, max_value=100.0),
    st.floats(min_value=0.01, max_value=100.0),
)
@example(root=5e-324, curve=0.0, left=1.0, right=1.0)  # values so small their product is 0
def test_root_of_any_bracketed_monotone_function_is_scipys(root, curve, left, right):
    from scipy.optimize import brentq

    def f(x):
        return (x - root) * (1.0 + curve * (x - root) ** 2) + 1e-3 * math.atan(x - root)

    a, b = root - left, root + right
    assert scalar.find_root(f, a, b, xtol=1e-12) == brentq(f, a, b, xtol=1e-12)


def test_root_gives_up_where_scipy_does():
    from scipy.optimize import brentq

    def flat(x):
        return (x - 0.3) ** 5

    with pytest.raises(RuntimeError):
        brentq(flat, 0.0, 1.0, xtol=1e-12)
    with pytest.raises(RuntimeError, match="no root within 100 steps"):
        scalar.find_root(flat, 0.0, 1.0, xtol=1e-12)


def test_root_needs_a_sign_change_and_a_number():
    with pytest.raises(ValueError, match="different signs"):
        scalar.find_root(lambda x: x * x + 1, -1.0, 1.0)
    with pytest.raises(ValueError, match="NaN"):
        scalar.find_root(lambda x: math.nan, -1.0, 1.0)


MIN_CASES = [
    pytest.param(lambda x: (x - 1.3) ** 2, -5.0, 5.0, 1e-10, id="parabola"),
    pytest.param(lambda x: math.cosh(x - 0.2) + x**4, -3.0, 2.0, 1e-10, id="cosh+quartic"),
    pytest.param(lambda x: abs(x - 0.7), 0.0, 2.0, 1e-10, id="kink"),
    pytest.param(lambda x: -x, 0.0, 1.0, 1e-10, id="minimum at the upper bound"),
    pytest.param(lambda x: math.sin(3 * x) + 0.1 * x, -1.0, 1.0, 1e-5, id="sine, default tol"),
]


@pytest.mark.parametrize(("f", "lo", "hi", "xatol"), MIN_CASES)
def test_minimum_is_scipys_bounded_brent(f, lo, hi, xatol):
    from scipy.optimize import minimize_scalar

    ref = minimize_scalar(f, bounds=(lo, hi), method="bounded", options={"xatol": xatol})
    assert scalar.minimise_bounded(f, lo, hi, xatol=xatol) == (ref.x, ref.fun)


@settings(max_examples=60, deadline=None)
@given(
    st.lists(st.floats(min_value=-800.0, max_value=800.0, allow_nan=False), min_size=1, max_size=40)
)
def test_log_sum_exp_is_scipys(values):
    import numpy as np
    from scipy.special import logsumexp

    a = np.array(values)
    assert scalar.log_sum_exp(a) == logsumexp(a)


@pytest.mark.parametrize(
    ("confidence", "printed"),
    [
        pytest.param(0.9, 2.706, id="90%"),
        pytest.param(0.95, 3.841, id="95%"),
        pytest.param(0.99, 6.635, id="99%"),
    ],
)
def test_stored_chi2_against_a_printed_table(confidence, printed):
    assert round(scalar.chi2_1_quantile(confidence), 3) == printed


@pytest.mark.parametrize("confidence", sorted(scalar.CHI2_1))
def test_stored_chi2_quantiles_are_scipys(confidence):
    from scipy.special import chdtri
    from scipy.stats import chi2

    stored = scalar.CHI2_1[confidence]
    assert stored == pytest.approx(chi2.ppf(confidence, 1), rel=1e-12)
    assert stored == float(chdtri(1, 1.0 - confidence))  # the function the fit used to call


def test_a_confidence_not_stored_is_worked_out():
    from scipy.stats import chi2

    assert scalar.chi2_1_quantile(0.875) == pytest.approx(chi2.ppf(0.875, 1), rel=1e-12)


@pytest.fixture
def scipy_steps(monkeypatch):
    """Run the Weibull fit on scipy's own routines, as it did before ``scalar`` existed."""

    def scipy_root(f, a, b, *, xtol=2e-12, rtol=scalar.ROOT_RTOL, maxiter=100):
        from scipy.optimize import brentq

        return brentq(f, a, b, xtol=xtol, rtol=rtol, maxiter=maxiter)

    def scipy_minimum(f, lo, hi, *, xatol=1e-5, maxiter=500):
        from scipy.optimize import minimize_scalar

        res = minimize_scalar(
            f, bounds=(lo, hi), method="bounded", options={"xatol": xatol, "maxiter": maxiter}
        )
        return res.x, res.fun

    def scipy_chi2(confidence):
        from scipy.special import chdtri

        return float(chdtri(1, 1.0 - confidence))

    def scipy_lse(a):
        from scipy.special import logsumexp

        return logsumexp(a)

    def use_scipy():
        monkeypatch.setattr(scalar, "find_root", scipy_root)
        monkeypatch.setattr(scalar, "minimise_bounded", scipy_minimum)
        monkeypatch.setattr(scalar, "chi2_1_quantile", scipy_chi2)
        monkeypatch.setattr(scalar, "log_sum_exp", scipy_lse)

    return use_scipy


def _censored(seed: int):
    """Weibull lives (scipy's sampler), some censored at random points: a shop's mix."""
    import numpy as np
    from scipy import stats

    rng = np.random.default_rng(seed)
    n = int(rng.integers(3, 60))
    shape = float(rng.uniform(0.5, 6.0))
    life = stats.weibull_min.rvs(shape, scale=2.0e4, size=n, random_state=rng)
    stop = rng.uniform(0.2, 3.0, size=n) * 2.0e4
    failed = life <= stop
    return np.minimum(life, stop).tolist(), failed.tolist(), float(rng.choice([0.8, 0.9, 0.95]))


def test_fit_agrees_with_the_scipy_based_fit_on_many_censored_samples(scipy_steps):
    fields = ("shape", "scale_cm2", "log_likelihood", "shape_se", "scale_se_cm2")
    pairs = ("shape_ci", "scale_ci_cm2", "b10_ci_cm2")
    ours = {}
    for seed in range(150):
        lives, failed, confidence = _censored(seed)
        ours[seed] = fit_weibull(lives, failed, confidence)
    scipy_steps()
    compared = 0
    for seed, mine in ours.items():
        lives, failed, confidence = _censored(seed)
        ref = fit_weibull(lives, failed, confidence)
        assert mine.fitted == ref.fitted, seed
        if not ref.fitted:
            continue
        compared += 1
        for name in fields:
            assert getattr(mine, name) == pytest.approx(getattr(ref, name), rel=1e-9), (seed, name)
        for name in pairs:
            for got, want in zip(getattr(mine, name), getattr(ref, name), strict=True):
                assert got == pytest.approx(want, rel=1e-9), (seed, name)
    assert compared > 120  # most samples have the two failures a fit needs


def test_median_interval_agrees_with_the_scipy_based_one(scipy_steps):
    lives, failed, _ = _censored(7)
    fit = fit_weibull(lives, failed, 0.9)
    mine = quantile_interval(lives, failed, fit, 0.5)
    scipy_steps()
    ref = quantile_interval(lives, failed, fit, 0.5)
    assert mine == pytest.approx(ref, rel=1e-9)
