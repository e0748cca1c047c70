"""How a blade's life ended: worn out over a normal life, or a failure.

External references: scipy's Weibull fit and quantiles (``scipy.stats.weibull_min``)
for the expected range of a blade type; the failure-mode table's causes are
common practice (data/failure_modes.csv).  The lives are invented.
"""

from __future__ import annotations

import pytest

from sawplan.life.end_of_life import (
    HIGH_P,
    LOW_P,
    ExpectedLife,
    end_of_life,
    expected_from_fit,
    expected_from_reference,
    expected_from_worn_out,
)
from sawplan.life.weibull import fit_weibull

# invented worn-out lives of one blade type, cm²
WORN = [18_500.0, 24_000.0, 27_300.0, 31_800.0, 35_200.0, 41_000.0, 46_500.0]
RANGE = ExpectedLife(12_000.0, 60_000.0, "worn-out blades", 7, "7 blades")


def test_expected_range_is_the_middle_of_scipys_weibull_fit_of_worn_out_lives():
    # reference: scipy.stats.weibull_min.fit on the complete sample (floc=0), then its
    # 5th and 95th percentiles
    from scipy import stats

    shape, _loc, scale = stats.weibull_min.fit(WORN, floc=0)
    found = expected_from_worn_out(WORN)
    assert found is not None and found.basis == "worn-out blades" and found.blades == 7
    assert found.low_cm2 == pytest.approx(
        stats.weibull_min.ppf(LOW_P, shape, scale=scale), rel=0.01
    )
    assert found.high_cm2 == pytest.approx(
        stats.weibull_min.ppf(HIGH_P, shape, scale=scale), rel=0.01
    )


def test_too_few_worn_out_blades_give_no_range_and_an_early_failing_type_none_either():
    assert expected_from_worn_out(WORN[:2]) is None
    # a type whose shape interval lies wholly below 1 fails early: no normal life
    early = fit_weibull(
        [5.0, 30.0, 80.0, 200.0, 900.0, 3_000.0, 9_000.0, 40_000.0] * 3, [True] * 24
    )
    assert early.shape_ci[1] < 1.0
    assert expected_from_fit(early) is None
    wear = fit_weibull(WORN * 2, [True] * 14)
    found = expected_from_fit(wear)
    assert found is not None and found.low_cm2 == pytest.approx(wear.quantile_cm2(LOW_P))


@pytest.mark.parametrize(
    ("mode", "life", "kind", "counted", "position"),
    [
        pytest.param("worn-out", 25_400.0, "wear", "worn-out", "within", id="worn out within"),
        pytest.param("dull", 25_400.0, "wear", "worn-out", "within", id="dull at a normal life is wear"),
        pytest.param("dull", 90_000.0, "wear", "worn-out", "above", id="dull beyond the range is wear"),
        pytest.param("dull", 2_000.0, "failure", "dull", "below", id="dull below the range dulled early"),
        pytest.param("worn-out", 2_000.0, "failure", "dull", "below", id="worn out below the range dulled early"),
        pytest.param("stripped", 25_400.0, "failure", "stripped", "within", id="a break is a failure at any life"),
        pytest.param("weld", 90_000.0, "failure", "weld", "above", id="weld break beyond the range"),
    ],
)  # fmt: skip
def test_the_life_reached_decides_between_wear_and_a_failure(mode, life, kind, counted, position):
    end = end_of_life(mode, life, RANGE)
    assert (end.kind, end.counted_as, end.position) == (kind, counted, position)
    if kind == "wear":
        assert end.causes == ()
        assert "dulled early" not in end.verdict
    else:
        assert end.causes  # the usual causes of that failure (common practice)


def test_dull_at_a_normal_life_does_not_speak_of_early_dulling():
    end = end_of_life("dull", 25_400.0, RANGE)
    assert end.name == "worn out at the end of a normal life"
    assert "within the expected" in end.verdict and "not as an early failure" in end.verdict
    assert not any("band speed too high" in c for c in end.causes)
    early = end_of_life("dull", 2_000.0, RANGE)
    assert early.name == "teeth dulled early" and "below the expected" in early.verdict
    assert "band speed too high" in early.causes


def test_without_an_expected_life_the_word_stands_and_a_zero_life_is_said():
    assert end_of_life("worn-out", 25_400.0, None).kind == "wear"
    assert end_of_life("dull", 25_400.0, None).kind == "failure"
    ref = expected_from_reference(32_000.0, 129_000.0, "memory")
    assert "before cutting anything" in end_of_life("stripped", 0.0, ref).verdict
