"""Censored Weibull fit, median ranks and the early-failure warning.

Reference values come from scipy.stats (weibull_min, CensoredData, chi2, beta),
closed-form Weibull quantiles, a published median-rank table (from memory) and
common practice (band-saw troubleshooting) for the failure-mode causes.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.errors import BadDataError
from sawplan.life.failure_modes import (
    early_failure_warning,
    failure_mode,
    failure_modes,
    rank_failure_modes,
)
from sawplan.life.ranks import bernard_median_rank, johnson_adjusted_ranks, weibull_plot
from sawplan.life.weibull import WeibullFit, WeibullNotFitted, fit_weibull


def censored_sample(shape, scale, n, cutoff, seed):
    """Weibull lives from scipy, right-censored at ``cutoff`` (Type I censoring)."""
    import numpy as np
    from scipy import stats

    rng = np.random.default_rng(seed)
    life = stats.weibull_min.rvs(shape, scale=scale, size=n, random_state=rng)
    failed = life < cutoff
    return np.minimum(life, cutoff).tolist(), failed.tolist()


def scipy_loglik(lives, failed, shape, scale):
    """Censored log-likelihood built from scipy's logpdf (failures) and logsf (censored)."""
    from scipy import stats

    dist = stats.weibull_min(shape, scale=scale)
    return sum(dist.logpdf(x) if f else dist.logsf(x) for x, f in zip(lives, failed, strict=True))


SAMPLES = [
    pytest.param(1.8, 60_000.0, 40, 70_000.0, 1, id="wear-out, mild-steel-like lives"),
    pytest.param(0.7, 20_000.0, 30, 30_000.0, 2, id="early failures beta<1"),
    pytest.param(3.5, 5_000.0, 30, 5_500.0, 3, id="steep wear-out, nickel-like lives"),
    pytest.param(1.2, 100_000.0, 30, 50_000.0, 4, id="heavily censored"),
    pytest.param(2.5, 300.0, 12, 1e9, 5, id="small sample, no censoring"),
]


@pytest.mark.parametrize(("shape", "scale", "n", "cutoff", "seed"), SAMPLES)
def test_fit_matches_scipy_censored_fit(shape, scale, n, cutoff, seed):
    # reference: scipy.stats.weibull_min.fit(CensoredData(...), floc=0), to 1 %
    from scipy import stats

    lives, failed = censored_sample(shape, scale, n, cutoff, seed)
    fit = fit_weibull(lives, failed)
    assert isinstance(fit, WeibullFit)
    data = stats.CensoredData(
        uncensored=[x for x, f in zip(lives, failed, strict=True) if f],
        right=[x for x, f in zip(lives, failed, strict=True) if not f],
    )
    ref_shape, _, ref_scale = stats.weibull_min.fit(data, floc=0)
    assert fit.shape == pytest.approx(ref_shape, rel=0.01)
    assert fit.scale_cm2 == pytest.approx(ref_scale, rel=0.01)
    assert fit.failures == sum(failed)
    assert fit.censored == n - sum(failed)
    # the reported log-likelihood is scipy's at the fitted parameters, and no smaller
    # than scipy's at its own optimum (ours is a maximum)
    assert fit.log_likelihood == pytest.approx(
        scipy_loglik(lives, failed, fit.shape, fit.scale_cm2), rel=1e-9
    )
    assert fit.log_likelihood >= scipy_loglik(lives, failed, ref_shape, ref_scale) - 1e-7


@pytest.mark.parametrize(("shape", "scale", "n", "cutoff", "seed"), SAMPLES[:3])
def test_quantiles_against_closed_forms(shape, scale, n, cutoff, seed):
    from scipy import stats

    fit = fit_weibull(*censored_sample(shape, scale, n, cutoff, seed))
    b, eta = fit.shape, fit.scale_cm2
    # closed forms (derived): B10 = η(−ln 0.9)^(1/β), median = η(ln 2)^(1/β), mean = ηΓ(1+1/β)
    assert fit.b10_life_cm2 == pytest.approx(eta * (-math.log(0.9)) ** (1 / b), rel=1e-12)
    assert fit.median_life_cm2 == pytest.approx(eta * math.log(2) ** (1 / b), rel=1e-12)
    assert fit.mean_life_cm2 == pytest.approx(stats.weibull_min.mean(b, scale=eta), rel=1e-9)
    for p in (0.01, 0.1, 0.5, 0.9):
        assert fit.quantile_cm2(p) == pytest.approx(
            stats.weibull_min.ppf(p, b, scale=eta), rel=1e-9
        )
    assert fit.reliability(fit.b10_life_cm2) == pytest.approx(0.9, rel=1e-12)
    assert fit.b10_ci_cm2[0] < fit.b10_life_cm2 < fit.b10_ci_cm2[1]
    assert fit.scale_ci_cm2[0] < eta < fit.scale_ci_cm2[1]
    assert fit.shape_ci[0] < b < fit.shape_ci[1]


def test_standard_errors_match_numerical_hessian_of_scipy_loglik():
    # observed information: finite-difference Hessian of scipy's log-likelihood in (ln β, ln η)
    import numpy as np

    lives, failed = censored_sample(1.8, 60_000.0, 40, 70_000.0, 1)
    fit = fit_weibull(lives, failed)
    theta = np.array([math.log(fit.shape), math.log(fit.scale_cm2)])

    def ll(t):
        return scipy_loglik(lives, failed, math.exp(t[0]), math.exp(t[1]))

    h = 1e-4
    hess = np.zeros((2, 2))
    for i in range(2):
        for j in range(2):
            e_i, e_j = np.eye(2)[i] * h, np.eye(2)[j] * h
            hess[i, j] = (
                ll(theta + e_i + e_j)
                - ll(theta + e_i - e_j)
                - ll(theta - e_i + e_j)
                + ll(theta - e_i - e_j)
            ) / (4 * h * h)
    cov = np.linalg.inv(-hess)
    assert fit.shape_se == pytest.approx(fit.shape * math.sqrt(cov[0, 0]), rel=1e-3)
    assert fit.scale_se_cm2 == pytest.approx(fit.scale_cm2 * math.sqrt(cov[1, 1]), rel=1e-3)


@pytest.mark.parametrize("confidence", [0.8, 0.9, 0.95])
def test_shape_bounds_are_likelihood_ratio_bounds(confidence):
    # at each bound the profile log-likelihood is χ²₁(confidence)/2 below the maximum
    # (scipy.stats.chi2; profile over η by scipy's fit with the shape fixed)
    from scipy import stats

    lives, failed = censored_sample(0.7, 20_000.0, 30, 30_000.0, 2)
    fit = fit_weibull(lives, failed, confidence=confidence)
    data = stats.CensoredData(
        uncensored=[x for x, f in zip(lives, failed, strict=True) if f],
        right=[x for x, f in zip(lives, failed, strict=True) if not f],
    )
    drop = stats.chi2.ppf(confidence, 1) / 2
    for bound in fit.shape_ci:
        _, _, eta = stats.weibull_min.fit(data, fc=bound, floc=0)
        assert fit.log_likelihood - scipy_loglik(lives, failed, bound, eta) == pytest.approx(
            drop, abs=1e-3
        )


def test_b10_bounds_are_likelihood_ratio_bounds():
    # profile with B10 fixed: maximise scipy's log-likelihood over β, η = B10/(−ln 0.9)^(1/β)
    from scipy import optimize, stats

    lives, failed = censored_sample(1.8, 60_000.0, 40, 70_000.0, 1)
    fit = fit_weibull(lives, failed, confidence=0.9)
    drop = stats.chi2.ppf(0.9, 1) / 2
    for bound in fit.b10_ci_cm2:

        def neg(b, t=bound):
            return -scipy_loglik(lives, failed, b, t / (-math.log(0.9)) ** (1 / b))

        best = optimize.minimize_scalar(neg, bounds=(0.2, 10.0), method="bounded")
        assert fit.log_likelihood + best.fun == pytest.approx(drop, abs=2e-3)


def test_higher_confidence_gives_wider_bounds():
    lives, failed = censored_sample(1.8, 60_000.0, 40, 70_000.0, 1)
    narrow = fit_weibull(lives, failed, confidence=0.8)
    wide = fit_weibull(lives, failed, confidence=0.95)
    for a, b in [
        (narrow.shape_ci, wide.shape_ci),
        (narrow.scale_ci_cm2, wide.scale_ci_cm2),
        (narrow.b10_ci_cm2, wide.b10_ci_cm2),
    ]:
        assert b[0] < a[0] and a[1] < b[1]


@settings(max_examples=25, deadline=None)
@given(
    factor=st.floats(min_value=1e-3, max_value=1e3),
    seed=st.integers(min_value=0, max_value=10_000),
)
def test_fit_is_scale_equivariant(factor, seed):
    # measuring in other area units scales η and leaves β alone (derived)
    lives, failed = censored_sample(1.5, 1000.0, 15, 1500.0, seed)
    if sum(failed) < 2:
        return
    a = fit_weibull(lives, failed)
    b = fit_weibull([x * factor for x in lives], failed)
    assert b.shape == pytest.approx(a.shape, rel=1e-7)
    assert b.scale_cm2 == pytest.approx(a.scale_cm2 * factor, rel=1e-7)
    assert b.b10_ci_cm2[0] == pytest.approx(a.b10_ci_cm2[0] * factor, rel=1e-5)


@pytest.mark.parametrize(
    ("lives", "failed", "words"),
    [
        pytest.param([100, 200, 300], [False, False, False], "censored", id="all censored"),
        pytest.param([100, 200, 300], [True, False, False], "only 1 failure", id="one failure"),
        pytest.param([], [], "censored", id="no blades"),
        pytest.param([500, 500, 500], [True, True, True], "same life", id="identical lives"),
        pytest.param([500, 500, 400], [True, True, False], "same life", id="identical+shorter"),
    ],
)
def test_fit_not_possible_is_a_result(lives, failed, words):
    result = fit_weibull(lives, failed)
    assert isinstance(result, WeibullNotFitted)
    assert not result.fitted
    assert words in result.reason
    assert result.failures == sum(failed)


def test_identical_failures_with_a_longer_censored_blade_still_fit():
    # a blade still running beyond the failures gives the shape a finite maximum
    fit = fit_weibull([500, 500, 600], [True, True, False])
    assert isinstance(fit, WeibullFit)
    assert fit.shape > 1


def test_zero_area_censored_blade_counts_but_does_not_move_the_fit():
    lives, failed = censored_sample(1.8, 60_000.0, 20, 70_000.0, 7)
    a = fit_weibull(lives, failed)
    b = fit_weibull([*lives, 0.0], [*failed, False])
    assert b.n == a.n + 1 and b.censored == a.censored + 1
    assert b.shape == pytest.approx(a.shape, rel=1e-12)


@pytest.mark.parametrize(
    ("lives", "failed", "confidence", "field"),
    [
        pytest.param([100, -5], [True, True], 0.9, "lives_cm2", id="negative life"),
        pytest.param([100, 0], [True, True], 0.9, "lives_cm2", id="failure at zero"),
        pytest.param([100, math.nan], [True, True], 0.9, "lives_cm2", id="nan"),
        pytest.param([100, 200], [True], 0.9, "failed", id="length mismatch"),
        pytest.param([100, 200], [True, True], 1.0, "confidence", id="confidence 1"),
    ],
)
def test_bad_input_raises_bad_data(lives, failed, confidence, field):
    with pytest.raises(BadDataError) as err:
        fit_weibull(lives, failed, confidence=confidence)
    assert err.value.field == field


# ---- median ranks -------------------------------------------------------------------


@pytest.mark.parametrize(
    ("rank", "n", "published"),
    # exact median ranks, n = 5 and n = 10 (published median-rank tables, from memory;
    # the same values are scipy.stats.beta.ppf(0.5, i, n - i + 1))
    [
        pytest.param(1, 5, 0.1294, id="n5-i1"),
        pytest.param(2, 5, 0.3138, id="n5-i2"),
        pytest.param(3, 5, 0.5000, id="n5-i3"),
        pytest.param(5, 5, 0.8706, id="n5-i5"),
        pytest.param(1, 10, 0.0670, id="n10-i1"),
        pytest.param(3, 10, 0.2586, id="n10-i3"),
    ],
)
def test_bernard_against_published_median_ranks(rank, n, published):
    from scipy import stats

    assert bernard_median_rank(rank, n) == pytest.approx((rank - 0.3) / (n + 0.4), rel=1e-15)
    assert stats.beta.ppf(0.5, rank, n - rank + 1) == pytest.approx(published, abs=5e-5)
    # Bernard's approximation is within 0.2 % (absolute) of the exact median rank
    assert bernard_median_rank(rank, n) == pytest.approx(published, abs=2e-3)


@settings(max_examples=50, deadline=None)
@given(n=st.integers(min_value=1, max_value=60), data=st.data())
def test_bernard_close_to_exact_beta_median(n, data):
    from scipy import stats

    i = data.draw(st.integers(min_value=1, max_value=n))
    assert abs(bernard_median_rank(i, n) - stats.beta.ppf(0.5, i, n - i + 1)) < 2e-3


def test_johnson_ranks_hand_computed():
    # derived by hand from Johnson's formula, n = 5, order F S F F S:
    #   1st F: 0 + (6 − 0)/(1 + 5)    = 1
    #   2nd F: 1 + (6 − 1)/(1 + 3)    = 2.25   (the 2nd blade was censored)
    #   3rd F: 2.25 + (6 − 2.25)/(1 + 2) = 3.5
    lives = [10.0, 20.0, 30.0, 40.0, 50.0]
    failed = [True, False, True, True, False]
    assert johnson_adjusted_ranks(lives, failed) == pytest.approx([1.0, 2.25, 3.5])


@settings(max_examples=30, deadline=None)
@given(st.lists(st.floats(min_value=1.0, max_value=1e6), min_size=1, max_size=30))
def test_johnson_without_censoring_gives_plain_ranks(lives):
    assert johnson_adjusted_ranks(lives, [True] * len(lives)) == pytest.approx(
        list(range(1, len(lives) + 1))
    )


def test_weibull_plot_points_and_line():
    lives, failed = censored_sample(1.8, 60_000.0, 20, 70_000.0, 1)
    fit = fit_weibull(lives, failed)
    plot = weibull_plot(lives, failed, fit, line_points=5)
    assert len(plot.points) == sum(failed)
    for p in plot.points:
        assert p.x == pytest.approx(math.log(p.life_cm2))
        assert p.y == pytest.approx(math.log(-math.log(1 - p.median_rank)))
        assert p.median_rank == pytest.approx((p.adjusted_rank - 0.3) / (len(lives) + 0.4))
    # the line is y = β (x − ln η): slope β, crossing y = 0 at ln η (derived)
    (x0, y0), (x1, y1) = plot.line[0], plot.line[-1]
    assert (y1 - y0) / (x1 - x0) == pytest.approx(fit.shape)
    assert y0 - fit.shape * (x0 - math.log(fit.scale_cm2)) == pytest.approx(0.0, abs=1e-12)
    assert weibull_plot(lives, failed).line is None


# ---- failure modes --------------------------------------------------------------------


def test_failure_mode_table_has_the_troubleshooting_modes():
    # band-saw troubleshooting table (common practice)
    table = failure_modes()
    assert list(table) == [
        "worn-out",  # the normal end of a life: wear, no failure and no causes
        "stripped",
        "dull",
        "body-crack",
        "back-crack",
        "weld",
        "crooked",
        "chips-welded",
    ]
    assert "heavy feed on entry" in table["stripped"].causes
    assert "over-tension" in table["body-crack"].causes
    assert "worn back-up bearings" in table["back-crack"].causes
    assert all("common practice" in m.source for m in table.values() if m.is_failure)
    assert table["worn-out"].kind == "wear" and table["worn-out"].causes == ()
    assert all(m.kind == "failure" and m.causes for c, m in table.items() if c != "worn-out")
    with pytest.raises(BadDataError):
        failure_mode("melted")


def test_rank_failure_modes_counts_and_shares():
    ranking = rank_failure_modes(["weld", "stripped", "stripped", None, "dull", "Stripped", ""])
    assert [(m.code, m.count) for m in ranking.modes] == [
        ("stripped", 3),
        ("dull", 1),  # ties in table order: dull before weld
        ("weld", 1),
    ]
    assert ranking.modes[0].share == pytest.approx(3 / 5)
    assert ranking.recorded == 5 and ranking.unrecorded == 2


def test_early_failure_warning_for_shape_below_one():
    lives, failed = censored_sample(0.6, 20_000.0, 60, 40_000.0, 11)
    fit = fit_weibull(lives, failed)
    assert fit.shape < 1 and fit.early_failures()
    fail_lives = [x for x, f in zip(lives, failed, strict=True) if f]
    # the short-lived blades stripped teeth, the long-lived ones dulled
    modes = ["stripped" if x < fit.median_life_cm2 else "dull" for x in fail_lives]
    warning = early_failure_warning(fit, modes, fail_lives)
    assert warning is not None
    assert warning.mode == "stripped"
    assert "new blade not broken in" in warning.causes  # common practice
    assert any("break-in" in c for c in warning.setup_checks)
    assert any("tension" in c for c in warning.setup_checks)
    assert any("guide" in c for c in warning.setup_checks)
    assert "manual" in warning.caution
    assert warning.confirmed == (fit.shape_ci[1] < 1)


def test_no_early_failure_warning_for_wear_out():
    lives, failed = censored_sample(3.0, 20_000.0, 40, 25_000.0, 12)
    fit = fit_weibull(lives, failed)
    assert fit.shape > 1 and not fit.early_failures()
    assert early_failure_warning(fit, ["stripped"] * fit.failures) is None
    assert early_failure_warning(fit_weibull([1, 2], [False, False]), ["dull"]) is None
