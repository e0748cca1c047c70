"""Cutting physics: pitch choice, bite limits, time through a section, break-in.

Check values carry their source: MH31 (Machinery's Handbook, 31st edition),
a named paper or book, common practice, memory, derived (follows from the
model's formulas, docs/pitch.md and docs/feed-and-time.md).
"""

from __future__ import annotations

import dataclasses
import json
import math

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from sawplan.cutting import (
    breakin_schedule,
    compare,
    evaluate,
    power_limited_rate_mm2_min,
    recommend,
)
from sawplan.cutting.feed import CutConditions, integrate, sample
from sawplan.cutting.pitch import catalogue, parse_pitch
from sawplan.cutting.plan import material_bite_mm
from sawplan.errors import BadDataError
from sawplan.materials import load_catalogue
from sawplan.render import jsonable
from sawplan.saws import get_saw
from sawplan.sections import parse_section

IN2 = 6.4516  # cm² per in² (exact: 2.54²)
MID = get_saw("mid-production")
CAT = load_catalogue()
VARIABLE = [p.label for p in catalogue() if p.kind == "variable"]  # coarsest first


def step(label: str) -> int:
    return VARIABLE.index(label)


# --- pitch choice ---------------------------------------------------------------------------


@pytest.mark.parametrize("key", ["1018", "4140"])
@pytest.mark.parametrize("shape", ["round", "square"])
@pytest.mark.parametrize(
    ("width", "mh31"),
    [
        pytest.param("0.25in", "10/14", id="1/4in->10/14 MH31"),
        pytest.param("0.75in", "6/10", id="3/4in->6/10 MH31"),
        pytest.param("1.25in", "4/6", id="1 1/4in->4/6 MH31"),
        pytest.param("4in", "3/4", id="4in->3/4 MH31"),
        pytest.param("8in", "2/3", id="8in->2/3 MH31"),
    ],
)
def test_mh31_width_of_cut_pairs_within_one_step(key, shape, width, mh31):
    result = recommend(CAT.get(key), parse_section(f"{shape} {width}"), MID)
    assert abs(step(result.pitch_label) - step(mh31)) <= 1, result.explanation


@st.composite
def walled_sections(draw):
    """Tubes and structural shapes with walls of 3.2-12 mm that fit the mid-size saw.

    24 TPI is the finest catalogue pitch, so 3 teeth fit walls from 3 × 25.4/24 =
    3.175 mm (derived); thinner walls are covered by the warning test below.
    """
    wall = draw(st.floats(3.2, 12.0))
    kind = draw(st.sampled_from(["tube", "stube", "rtube", "angle", "channel", "ibeam"]))
    size = draw(st.floats(max(30.0, 5 * wall), 220.0))
    if kind in ("tube", "stube"):
        return parse_section(f"{kind} {size:.2f}mm {wall:.2f}mm")
    if kind == "rtube":
        return parse_section(f"rtube {size:.2f}mm {size * 0.6:.2f}mm {wall:.2f}mm")
    if kind == "angle":
        return parse_section(f"angle {size / 2:.2f}mm {size / 2:.2f}mm {wall:.2f}mm")
    return parse_section(f"{kind} {size:.2f}mm {size / 2:.2f}mm {wall:.2f}mm {wall * 1.4:.2f}mm")


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(walled_sections(), st.sampled_from(["1018", "304", "6061-T6"]))
def test_three_tooth_rule_over_the_whole_chord(section, key):
    # common practice (Machining Fundamentals, Goodheart-Willcox): at least 3 teeth in
    # contact, counted over the whole chord where it is thinnest — at a tube's equator
    # the blade is in both walls: TPI_coarse ≥ 3 / chord[in]
    result = recommend(CAT.get(key), section, MID)
    chord_in = section.thinnest_chord_mm / 25.4
    assert result.tpi_coarse >= 3 / chord_in - 1e-9
    assert result.teeth_in_thinnest >= 3 - 1e-9
    # the chord counted is never less than one wall (walls of 3.2 mm and more here)
    assert section.thinnest_chord_mm >= section.min_wall_mm - 1e-9


@pytest.mark.parametrize(
    "section",
    [
        # 2·t·24/25.4 < 3 for t < 1.59 mm (derived): no catalogue pitch keeps 3 teeth
        pytest.param("tube 25mm 1mm", id="1 mm tube wall"),
        pytest.param("stube 50mm 1.5mm", id="1.5 mm box"),
    ],
)
def test_walls_too_thin_for_any_pitch_get_the_finest_wavy_set_and_one_warning(section):
    result = recommend(CAT.get("1018"), parse_section(section), MID)
    finest = max(p.tpi_coarse for p in catalogue() if p.fits_blade(MID.blade_width_mm))
    assert result.tpi_coarse == finest
    assert result.tooth_set == "wavy"  # common practice: wavy set for thin walls
    thin = [w for w in result.warnings if "too thin" in w]
    assert len(thin) == 1
    # never the self-contradiction "finest pitch" beside "use a finer pitch"
    assert not any("finer pitch" in w for w in result.warnings)


def test_a_2mm_tube_wall_keeps_three_teeth_over_both_walls():
    # the blade crosses both 2 mm walls at the equator: 4 mm of metal, 24 TPI gives
    # 4 × 24 / 25.4 = 3.8 teeth (derived), so the tube is not "too thin" any more
    result = recommend(CAT.get("1018"), parse_section("tube 40mm 2mm"), MID)
    assert result.thinnest_chord_mm == pytest.approx(4.0, abs=1e-6)
    assert result.teeth_in_thinnest >= 3
    assert not any("too thin" in w for w in result.warnings)


def test_explanation_names_the_next_finer_and_coarser():
    result = recommend(CAT.get("1018"), parse_section("round 4in"), MID)
    assert result.pitch_label == "3/4"  # MH31 pair for 4 in
    assert any("finer 4/6" in line and "coarser 2/3" in line for line in result.explanation)


# --- bite limits and time ------------------------------------------------------------------


def _conditions(**over) -> CutConditions:
    """Every limit switched off (huge) unless given: isolates one limit at a time."""
    base = dict(
        band_speed_m_min=88.0,
        kerf_mm=1.6,
        material_bite_mm=1e6,
        tooth_max_mm=1e6,
        rubbing_floor_mm=1e-9,
        gullet_factor=0.25,
        fill_fraction=1e6,
        unit_energy_j_mm3=4.0,
        cutting_power_w=1e12,
        head_force_n=None,
        thrust_n_mm2=4000.0,
        plough_force_n=1.0,
        removal_floor=0.2,
    )
    base.update(over)
    return CutConditions(**base)


def test_power_worked_check():
    # worked check (derived from A′ = ηP/(u·kerf)): Ø100 mm 1018, kerf 1.6 mm, u = 4 J/mm³,
    # 1.1 kW × 0.75 -> A′ ≈ 77 cm²/min (12 in²/min), v_f at the centre ≈ 77 mm/min
    rate = power_limited_rate_mm2_min(1100, 0.75, 4.0, 1.6)
    assert rate / 100 == pytest.approx(77, rel=0.01)
    assert rate / 100 / IN2 == pytest.approx(12, rel=0.01)
    section = parse_section("round 100mm")
    cond = _conditions(cutting_power_w=1100 * 0.75)
    run = integrate(parse_pitch("3/4"), sample(section), cond, constant_feed=False)
    # power alone: v_f = ηP/(u·kerf·W) so t = u·kerf·A/(ηP) exactly (derived)
    assert section.area_mm2 / run.cut_time_min == pytest.approx(rate, rel=1e-4)
    assert run.governing_limit == "power"
    assert run.feed_set_mm_min == pytest.approx(77, rel=0.01)  # at the 100 mm centre chord
    # h ≈ 6 µm at 88 m/min with 3/4 pitch (derived: h = v_f·p/(1000·V))
    bite_um = run.feed_set_mm_min * parse_pitch("3/4").spacing_mean_mm / 88.0
    assert bite_um == pytest.approx(6.4, abs=0.5)


def test_material_bite_from_the_handbook_rate():
    # derived from h = A′·p/(W·V): 1018 at 12 in²/min, 4 in, 3/4, 88 m/min -> h ≈ 6 µm;
    # 304 at 2.5 in²/min, 37 m/min -> h ≈ 3 µm
    assert material_bite_mm(CAT.get("1018")) * 1000 == pytest.approx(6.4, abs=0.5)
    assert material_bite_mm(CAT.get("304")) * 1000 == pytest.approx(3.2, abs=0.5)


@pytest.mark.parametrize("constant_feed", [False, True])
def test_gullet_limit_integrates_to_the_closed_form(constant_feed):
    # gullet alone: v_f = 1000·V·φ·c·p_f²/(W·p) -> force-fed t = A·p/(1000·V·φ·c·p_f²);
    # constant feed at the widest chord: t = H·W_max·p/(1000·V·φ·c·p_f²)  (derived)
    section = parse_section("round 150mm")
    pitch = parse_pitch("2/3")
    cond = _conditions(fill_fraction=0.06)
    k = 1000 * 88.0 * 0.06 * 0.25 * pitch.spacing_fine_mm**2 / pitch.spacing_mean_mm
    run = integrate(pitch, sample(section), cond, constant_feed=constant_feed)
    expected = 150 * 150 / k if constant_feed else section.area_mm2 / k
    assert run.cut_time_min == pytest.approx(expected, rel=1e-3)
    assert run.governing_limit == "gullet"


def test_rubbing_floor_slows_removal_by_a_bounded_share():
    # below h_min a tooth removes ρ = ρ0 + (1 − ρ0)·h/h_min of its bite (docs/feed-and-time.md;
    # ρ0 the removal floor, memory): at h = h_min/2 and ρ0 = 0.2, ρ = 0.6 (derived)
    section = parse_section("square 50mm")
    pitch = parse_pitch("3/4")
    quad = sample(section)
    cutting = integrate(
        pitch,
        quad,
        _conditions(material_bite_mm=0.004, rubbing_floor_mm=0.002, removal_floor=0.2),
        constant_feed=False,
    )
    rubbing = integrate(
        pitch,
        quad,
        _conditions(material_bite_mm=0.001, rubbing_floor_mm=0.002, removal_floor=0.2),
        constant_feed=False,
    )
    # 4 µm cuts fully; 1 µm removes 0.6 × 1 µm: 4 / 0.6 = 6.67× slower (derived)
    assert rubbing.cut_time_min / cutting.cut_time_min == pytest.approx(4 / 0.6, rel=1e-6)
    assert rubbing.rubbing_share == 1.0 and cutting.rubbing_share == 0.0


def test_force_limit_shares_the_head_force():
    # linear edge-force model (derived): h = (F/n − F0)/(k_t·kerf), n = W·TPI/25.4
    pitch = parse_pitch("4")
    section = parse_section("square 100mm")
    cond = _conditions(head_force_n=1000.0, plough_force_n=5.0, thrust_n_mm2=5000.0)
    run = integrate(pitch, sample(section), cond, constant_feed=False)
    n = 100 * 4 / 25.4
    h = (1000 / n - 5.0) / (5000.0 * 1.6)
    assert run.governing_limit == "force"
    assert run.bite_mean_mm == pytest.approx(h, rel=1e-9)
    assert run.cut_time_min == pytest.approx(
        100 / (1000 * 88.0 * h / pitch.spacing_mean_mm), rel=1e-9
    )


@settings(max_examples=25, deadline=None)
@given(
    st.floats(5.0, 160.0),
    st.floats(1.1, 2.0),
    st.sampled_from(["1018", "304", "D2", "718"]),
    st.sampled_from(["round", "square", "hex"]),
)
def test_time_grows_with_section_size_for_one_blade(d, grow, key, shape):
    # From a 100 mm chord the tooth form turns to hook, whose deeper gullet (c 0.27
    # against 0.25, memory) may cut up to 8 % faster; 10 % more size outgrows it.
    big = d * grow
    assume(big <= 250)
    material = CAT.get(key)
    small_sec = parse_section(f"{shape} {d:.3f}mm")
    big_sec = parse_section(f"{shape} {big:.3f}mm")
    small_t = evaluate(material, small_sec, MID, "3/4").cut_time_min
    assert evaluate(material, big_sec, MID, "3/4").cut_time_min > small_t


@settings(max_examples=25, deadline=None)
@given(
    st.floats(5.0, 160.0),
    st.floats(1.5, 3.0),
    st.sampled_from(["1018", "304", "D2", "718", "6061-T6"]),
    st.sampled_from(["round", "square", "hex"]),
)
def test_time_grows_with_section_size_for_the_recommended_blade(d, grow, key, shape):
    # The pick may take a coarser pitch up to 30 % slower than the fastest
    # (work-hardening materials), so the recommended time can step down where
    # the pick changes; over a 1.5× larger section the height alone outgrows
    # that step (derived: 1.5 > 1.3).
    big = d * grow
    assume(big <= 250)
    material = CAT.get(key)
    small_t = recommend(material, parse_section(f"{shape} {d:.3f}mm"), MID).cut_time_min
    assert recommend(material, parse_section(f"{shape} {big:.3f}mm"), MID).cut_time_min > small_t


def test_fine_pitch_on_a_large_solid_is_gullet_limited_and_slow():
    # common practice: a fine blade on a large solid packs its gullets, bites under the
    # rubbing floor and takes several times longer
    material, section = CAT.get("4140"), parse_section("round 10in")
    comparison = compare(material, section, MID, "6/10")
    assert comparison.chosen.governing_limit == "gullet"
    assert comparison.time_ratio >= 3
    assert comparison.recommended.pitch_label in ("2/3", "1.4/2")  # common practice: 150-600 mm
    assert any("rubbing floor" in w for w in comparison.chosen.warnings)
    assert "6/10 takes" in comparison.summary


def test_small_motor_makes_a_large_section_power_limited():
    material, section = CAT.get("1018"), parse_section("round 6in")
    normal = recommend(material, section, MID)
    weak = recommend(material, section, dataclasses.replace(MID, motor_power_w=250.0))
    assert normal.governing_limit != "power"
    assert weak.governing_limit == "power"
    assert weak.cut_time_min > normal.cut_time_min
    assert any("power-limited" in w for w in weak.warnings)


@pytest.mark.parametrize(
    ("key", "low", "high"),
    [
        # common practice and memory, in²/min (shop cutting-rate ranges)
        pytest.param("1018", 9, 15, id="1018 9-15"),
        pytest.param("4140", 8, 15, id="4140 8-15"),
        pytest.param("1045", 5, 10, id="1045 5-10"),
        pytest.param("A2", 2, 7, id="A2 2-7"),
        pytest.param("D2", 2, 7, id="D2 2-7"),
        pytest.param("304", 2, 3, id="304 2-3"),
        pytest.param("17-4PH", 1.5, 3, id="17-4PH 1.5-3"),
        pytest.param("Ti-6Al-4V", 1.5, 3, id="Ti 1.5-3"),
        pytest.param("718", 0.5, 1.5, id="718 0.5-1.5"),
        pytest.param("6061-T6", 20, 60, id="6061 20-60"),
        pytest.param("C360", 15, 30, id="C360 15-30"),
        pytest.param("gray-30", 5, 10, id="cast iron 5-10"),
    ],
)
def test_cutting_rates_in_common_practice_ranges(key, low, high):
    material = CAT.get(key)
    # a 4 in square is the handbook's 4 in width of cut
    square = recommend(material, parse_section("square 4in"), MID).cutting_rate_cm2_min / IN2
    assert low <= square <= high
    # a 4 in round averages π/4 of that width (mean chord πD/4, closed form)
    round_ = recommend(material, parse_section("round 4in"), MID).cutting_rate_cm2_min / IN2
    assert low * math.pi / 4 <= round_ <= high


# --- the result record -----------------------------------------------------------------------


def test_result_is_consistent_and_json_ready():
    section = parse_section("round 120mm")
    result = recommend(CAT.get("4140"), section, MID)
    assert result.cut_time_min == pytest.approx(result.cut_time_model_min)
    assert result.cutting_rate_cm2_min == pytest.approx(
        section.area_mm2 / result.cut_time_min / 100
    )
    assert result.feed_mm_min == pytest.approx(section.height_mm / result.cut_time_min)
    assert result.feed_set_mm_min <= result.feed_mm_min + 1e-9  # slowest ≤ mean
    assert sum(share for _, share in result.limit_shares) == pytest.approx(1.0)
    assert result.profile[0].y_mm == 0 and result.profile[-1].y_mm == pytest.approx(120)
    assert max(p.chord_mm for p in result.profile) == pytest.approx(120, rel=1e-3)
    assert 1.5 * 0.9 <= result.kerf_mm <= 1.7 * 0.9  # memory: kerf 1.5-1.7 × t
    body = jsonable(result)
    assert "cutting_rate_cm2_min" in body and "cutting_rate_mm2_min" not in body
    json.dumps(body)


def test_constant_feed_saw_sets_one_feed_for_the_worst_depth():
    section = parse_section("round 200mm")
    result = recommend(CAT.get("1018"), section, get_saw("large-column"))
    assert result.feed_type == "constant"
    assert result.cut_time_min == pytest.approx(section.height_mm / result.feed_set_mm_min)
    assert all(p.feed_mm_min == result.feed_set_mm_min for p in result.profile)


def test_calibration_scales_time_and_says_so():
    section, material = parse_section("round 100mm"), CAT.get("1018")
    plain = recommend(material, section, MID)
    calibrated = recommend(material, section, MID, calibration=1.25)
    assert calibrated.cut_time_min == pytest.approx(1.25 * plain.cut_time_min)
    assert calibrated.cut_time_model_min == pytest.approx(plain.cut_time_min)
    assert calibrated.calibration_factor == 1.25
    assert any("shop calibration" in line for line in calibrated.explanation)
    with pytest.raises(BadDataError):
        recommend(material, section, MID, calibration=0)


def test_evaluate_warns_about_rubbing_on_a_work_hardening_material():
    result = evaluate(CAT.get("304"), parse_section("square 100mm"), MID, "14/18")
    assert result.chosen_by == "given"
    assert any("rubbing floor" in w and "a coarser pitch such as" in w for w in result.warnings)
    assert any("work-hardens 304" in w for w in result.warnings)
    assert any("over about 24" in w for w in result.warnings)


def test_same_blade_compares_as_recommended():
    material, section = CAT.get("1018"), parse_section("round 4in")
    comparison = compare(material, section, MID, "3/4")
    assert comparison.time_ratio == pytest.approx(1.0)
    assert "recommended pitch" in comparison.summary


def test_saw_without_coolant_plans_dry():
    saw = dataclasses.replace(MID, coolant=False)
    result = recommend(CAT.get("1018"), parse_section("round 50mm"), saw)
    assert result.dry and any("no coolant" in line for line in result.explanation)


def test_capacity_is_checked():
    with pytest.raises(BadDataError) as err:
        recommend(CAT.get("1018"), parse_section("round 12in"), MID)
    assert "260 mm" in str(err.value)


# --- break-in -----------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("group", "start"),
    [
        pytest.param("carbon-steel", 50, id="about 50% common practice"),
        pytest.param("tool-steel", 75, id="about 75% on hard alloys common practice"),
    ],
)
def test_breakin_schedule(group, start):
    steps = breakin_schedule(100.0, 5000.0, group)
    assert steps[0].feed_percent == pytest.approx(start)
    assert steps[0].area_from_mm2 == 0
    # common practice: raised step by step over the first 300-650 cm²
    assert 300 <= steps[-1].area_to_mm2 / 100 <= 650
    percents = [s.feed_percent for s in steps]
    assert percents == sorted(percents) and percents[-1] < 100
    for a, b in zip(steps, steps[1:], strict=False):
        assert a.area_to_mm2 == b.area_from_mm2
    assert steps[0].feed_mm_min == pytest.approx(start)  # percent of 100 mm/min
    assert steps[0].cuts == pytest.approx((steps[0].area_to_mm2) / 5000.0)


def test_result_carries_breakin_and_caution():
    result = recommend(CAT.get("D2"), parse_section("round 80mm"), MID)
    assert result.breakin[0].feed_percent == 75  # tool steel: hard alloy
    assert "manual" in result.caution


def test_model_constants_sit_in_their_sources_ranges():
    from sawplan.cutting import constants as K

    # c ≈ 0.23-0.29 regular (memory); φ_s ≈ 0.05-0.08 reproduces the MH31 pairs (derived)
    assert 0.23 <= K.number("gullet", "c_regular") <= 0.29
    assert 0.05 <= K.number("gullet", "fill_fraction") <= 0.08
    # edge radius 5-15 µm (Sarwar et al., from memory); h_min 0.2-0.3 × r_e (Vogler, DeVor
    # and Kapoor 2004, from memory), so about 1-4 µm
    assert 0.005 <= K.number("bite", "edge_radius_mm") <= 0.015
    from sawplan.cutting.plan import rubbing_floor_mm

    assert 0.001 <= rubbing_floor_mm() <= 0.004
    # tooth strength 0.02-0.05 mm (memory)
    assert 0.02 <= K.number("bite", "tooth_max_mm") <= 0.05
    assert "MH31" in K.source("speed", "width_percent")
    assert 0.2 <= K.number("bite", "min_chip_ratio") <= 0.3  # Vogler et al. 2004 (from memory)


def test_pitch_not_made_in_the_saw_blade_width_is_flagged():
    result = evaluate(
        CAT.get("1018"), parse_section("round 170mm"), get_saw("small-horizontal"), "1.4/2"
    )
    assert any("not usually made in a 20 mm wide blade" in w for w in result.warnings)
