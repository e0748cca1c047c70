"""A band speed or down-feed off the recommendation: the time it saves and the blade it costs.

Taylor's tool-life relation V·Tⁿ = C with n = 0.125 for high-speed-steel teeth
(Groover, Fundamentals of Modern Manufacturing, from memory) and its extension
V·Tⁿ·fʸ = C with y = 0.6 (Kalpakjian & Schmid, from memory); the recommended band
is ±15 % of the chart speed (common practice, memory).
"""

from __future__ import annotations

import pytest

from sawplan.cutting import compare, evaluate, recommend
from sawplan.cutting import tool_life as tl
from sawplan.errors import BadDataError
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section

CAT = load_catalogue()
MID = get_saw("mid-production")
SMALL = get_saw("small-horizontal")


def _speed_warnings(result):
    return [w for w in result.warnings if w.startswith("band speed") and "Taylor" in w]


@pytest.mark.parametrize(
    ("factor", "warned"),
    [
        pytest.param(1.0, False, id="at the recommendation"),
        pytest.param(1.1, False, id="10 % over: inside the band"),
        pytest.param(0.9, False, id="10 % under: inside the band"),
        pytest.param(1.3, True, id="30 % over"),
        pytest.param(0.7, True, id="30 % under"),
    ],
)
def test_speed_warning_only_outside_the_recommended_band(factor, warned):
    material, section = CAT.get("304"), parse_section("round 4in")
    rec = recommend(material, section, MID, extras=False)
    result = evaluate(
        material, section, MID, rec.pitch_label, band_speed_m_min=rec.band_speed_m_min * factor
    )
    assert bool(_speed_warnings(result)) is warned
    assert result.band_speed_recommended_m_min == pytest.approx(rec.band_speed_m_min)


def test_over_speed_costs_blade_by_taylor():
    # 2× the recommended speed: the teeth last 2^-8 = 1/256 as long (n = 0.125); the cut is
    # faster, so the wear per cut is 256 × (time ratio) (derived)
    material, section = CAT.get("304"), parse_section("round 60mm")
    rec = recommend(material, section, MID, extras=False)
    fast = evaluate(
        material, section, MID, rec.pitch_label, band_speed_m_min=2 * rec.band_speed_m_min
    )
    time_ratio = fast.cut_time_min / rec.cut_time_min
    assert time_ratio < 1
    assert fast.wear_ratio == pytest.approx(256 * time_ratio, rel=1e-6)
    assert fast.taylor_n == 0.125 and "Groover" in fast.taylor_source
    [line] = _speed_warnings(fast)
    assert "1/256 as long" in line and "over ten times the blade wear per cut" in line


def test_comparison_line_names_the_blade_wear_not_only_the_time():
    # the case: 2/3 at 75 m/min on 17-4PH where 30 m/min is recommended
    comparison = compare(
        CAT.get("17-4PH"), parse_section("round 7in"), SMALL, "2/3", band_speed_m_min=75.0
    )
    assert comparison.time_ratio < 1
    assert "faster, but" in comparison.summary
    assert "the blade wear per cut" in comparison.summary
    assert "Taylor's relation" in comparison.summary and "n = 0.125" in comparison.summary
    assert comparison.wear_ratio > 10


def test_band_speed_alone_plans_the_recommended_pitch_at_that_speed():
    material, section = CAT.get("1018"), parse_section("round 60mm")
    comparison = compare(material, section, MID, None, band_speed_m_min=40.0)
    assert comparison.chosen.band_speed_m_min == 40.0
    assert comparison.chosen.chosen_by == "recommended"
    assert comparison.time_ratio > 1  # slower than at the recommended speed
    assert any(w.startswith("band speed 40") and "under" in w for w in comparison.chosen.warnings)


def test_speed_outside_the_saw_range_says_the_range():
    with pytest.raises(BadDataError) as err:
        evaluate(CAT.get("1018"), parse_section("round 60mm"), MID, "4/6", band_speed_m_min=150)
    assert err.value.field == "band-speed"
    assert "20-100 m/min" in str(err.value)


def test_feed_over_the_model_costs_blade_by_the_extended_relation():
    # constant-feed saw: the model sets the feed for the widest chord; 1.5× that feed gives
    # 1.5× the bite, the extended relation gives 1.5^(0.6/0.125) = 1.5^4.8 less life, and
    # the cut takes 1/1.5 the time: 1.5^3.8 ≈ 4.7× the wear per cut (derived)
    saw = get_saw("large-column")
    material, section = CAT.get("1018"), parse_section("round 100mm")
    rec = recommend(material, section, saw, extras=False)
    assert rec.governing_limit == "material"
    fed = evaluate(material, section, saw, rec.pitch_label, feed_mm_min=1.5 * rec.feed_set_mm_min)
    assert fed.cut_time_min == pytest.approx(rec.cut_time_min / 1.5, rel=1e-6)
    assert fed.wear_ratio == pytest.approx(1.5**3.8, rel=1e-3)
    assert fed.wear_ratio == pytest.approx(
        tl.feed_wear_per_cut_ratio(1.5, 1 / 1.5, tl.HSS.n), rel=1e-3
    )
    line = next(w for w in fed.warnings if w.startswith("down-feed"))
    assert "extended Taylor relation" in line and "4.7×" in line
    summary = compare(
        material, section, saw, rec.pitch_label, feed_mm_min=1.5 * rec.feed_set_mm_min
    ).summary
    assert "faster, but about 4.7× the blade wear per cut" in summary


def test_a_force_fed_head_cannot_push_more_than_its_force():
    # small gravity saw: a set feed far above what 350 N can push is held to the force limit
    material, section = CAT.get("17-4PH"), parse_section("round 7in")
    rec = recommend(material, section, SMALL, extras=False)
    fed = evaluate(material, section, SMALL, rec.pitch_label, feed_mm_min=200.0)
    assert fed.cut_time_min > 178 / 200  # cannot run the whole height at 200 mm/min
    assert any("head's force cannot push the set down-feed" in w for w in fed.warnings)


def test_feed_below_the_model_is_not_an_overload():
    saw = get_saw("large-column")
    material, section = CAT.get("1018"), parse_section("round 100mm")
    rec = recommend(material, section, saw, extras=False)
    slow = evaluate(material, section, saw, rec.pitch_label, feed_mm_min=0.9 * rec.feed_set_mm_min)
    assert not any(w.startswith("down-feed") for w in slow.warnings)
    assert slow.cut_time_min > rec.cut_time_min
