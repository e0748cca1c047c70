"""Bundles: the gullet fills over one stretch of metal, force and power see the whole
chord, and the operator wants the time per piece.

Derived from the model (docs/feed-and-time.md): chip load h·W ≤ φ_s·A_g over one
stretch of metal, so a tooth that crosses a gap between bars starts the next bar
with an empty gullet, while the head's force and the motor's power are shared by
everything in the chord.
"""

from __future__ import annotations

import dataclasses

import pytest

from sawplan.cutting import evaluate, recommend
from sawplan.errors import BadDataError
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import largest_bundle, parse_section

CAT = load_catalogue()
MID = get_saw("mid-production")
SMALL = get_saw("small-horizontal")


@pytest.fixture(scope="module")
def setup():
    return CAT.get("1018"), MID


@pytest.mark.parametrize("spec", ["tube 60mm 3mm", "round 30mm"])
def test_a_bundle_costs_less_per_piece_than_single_cuts(setup, spec):
    mat, saw = setup
    single = evaluate(mat, parse_section(spec), saw, "10/14")
    bundle = evaluate(mat, parse_section(f"{spec} --bundle 3x4"), saw, "10/14")
    assert bundle.cut_time_min / 12 < single.cut_time_min
    assert bundle.time_per_piece_min == pytest.approx(bundle.cut_time_min / 12)
    assert bundle.pieces == 12


def test_gullet_limit_uses_the_longest_stretch_not_the_sum(setup):
    mat, saw = setup
    # two Ø30 rounds side by side: same gullet load per stretch as one round,
    # so the gullet-limited bite is the same even though W doubles
    one = evaluate(mat, parse_section("round 30mm"), saw, "10/14")
    two = evaluate(mat, parse_section("round 30mm --bundle 1x2"), saw, "10/14")
    if one.governing_limit == "gullet" and two.governing_limit == "gullet":
        assert two.cut_time_min == pytest.approx(one.cut_time_min, rel=0.05)
    else:  # power or force then governs the wider cut: it can only be slower
        assert two.cut_time_min >= one.cut_time_min * 0.999


@pytest.mark.parametrize(
    ("key", "spec", "saw"),
    [
        # a thin-wall tube: the material's bite holds each tooth, four tubes share a pass
        pytest.param("1018", "tube 60mm 3mm", MID, id="thin-wall tube, hydraulic"),
        # a small solid on a production saw: one bar leaves power unused
        pytest.param("1018", "round 30mm", MID, id="solid round, hydraulic"),
    ],
)
def test_bundling_beats_single_cuts_and_says_why(key, spec, saw):
    result = recommend(CAT.get(key), parse_section(f"{spec} --bundle 3x4"), saw)
    single = recommend(CAT.get(key), parse_section(spec), saw, extras=False)
    verdict = result.bundle
    assert verdict is not None and verdict.better == "bundle"
    assert verdict.single_min == pytest.approx(single.cut_time_min)
    assert verdict.per_piece_min == pytest.approx(result.cut_time_min / 12)
    assert verdict.ratio == pytest.approx(verdict.per_piece_min / single.cut_time_min)
    assert verdict.ratio < 1
    # the reason: side by side pieces share each pass; stacked rows only save handling
    assert "side by side share each pass" in verdict.why
    assert "rows are cut one after another" in verdict.why


def test_a_force_fed_head_makes_a_wide_bundle_slower_per_piece():
    # 4140 squares on the small gravity saw: one 40 mm square already uses the head's
    # 350 N; four side by side share it over 160 mm of chord, so each tooth bites less
    # and the bundle is slower per piece (derived: h = (F/n − F0)/(k_t·kerf))
    result = recommend(CAT.get("4140"), parse_section("square 40mm --bundle 1x4"), SMALL)
    verdict = result.bundle
    assert verdict is not None and verdict.better == "single"
    assert verdict.ratio > 1.1
    assert result.governing_limit == "force"
    assert "head force" in verdict.why and "each tooth bites less" in verdict.why


def test_same_pitch_bundle_against_single_with_a_given_blade():
    result = evaluate(
        CAT.get("1018"), parse_section("tube 60mm 3mm --bundle 2x4"), MID, "8/12", extras=True
    )
    assert result.bundle is not None
    assert result.bundle.single_pitch == "8/12"  # the blade on the saw cuts both


@pytest.mark.parametrize(
    ("spec", "saw", "largest"),
    [
        # 3 rows of Ø60 tube are 180 mm high, over the 178 mm throat: 2 rows of 5 fit
        # in 305 × 178 mm (closed form: ⌊178/60⌋ = 2, ⌊305/60⌋ = 5)
        pytest.param("tube 60mm 3mm --bundle 3x4", SMALL, (2, 5), id="tubes over the throat"),
        # nested rounds sit D·√3/2 apart: 1 + ⌊(178 − 60)/51.96⌋ = 3 rows of
        # ⌊(305 − 30)/60⌋ = 4 (closed form)
        pytest.param("round 60mm --bundle 4x4 --nest", SMALL, (3, 4), id="nested rounds"),
    ],
)
def test_a_bundle_over_capacity_names_the_largest_that_fits(spec, saw, largest):
    section = parse_section(spec)
    assert largest_bundle(section, saw.capacity_rect_w_mm, saw.capacity_rect_h_mm) == largest
    with pytest.raises(BadDataError) as err:
        recommend(CAT.get("1018"), section, saw)
    assert err.value.field == "bundle"
    assert f"largest bundle that fits is {largest[0]}×{largest[1]}" in str(err.value)
    fits = dataclasses.replace(section, bundle_rows=largest[0], bundle_cols=largest[1])
    assert recommend(CAT.get("1018"), fits, saw, extras=False).cut_time_min is not None
