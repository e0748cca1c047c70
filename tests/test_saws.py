"""Saw profiles: packaged and user saws, lookup, capacity, blade mechanics."""

from __future__ import annotations

import dataclasses
import math

import pint
import pytest

from sawplan.cutting.mechanics import (
    bending_stress_mpa,
    blade_length_mm,
    flex_cycles_per_min,
    gauge_elongation_mm,
    kerf_mm,
    min_contour_radius_mm,
    tension_force_n,
    tension_range,
    wheel_ratio_warning,
)
from sawplan.errors import BadDataError, DamagedFileError, NotFoundError
from sawplan.saws import Saw, check_capacity, get_saw, load_saws
from sawplan.sections import parse_section

REF = pint.UnitRegistry()

USER_SAW = """
[saw.bench-buddy]
kind = "vertical"
wheel_diameter_mm = 350
blade_length_mm = 2900
blade_width_mm = 13
blade_thickness_mm = 0.65
band_speed_min_m_min = 20
band_speed_max_m_min = 900
motor_power_w = 550
drive_efficiency = 0.9
capacity_round_mm = 150
capacity_rect_w_mm = 300
capacity_rect_h_mm = 150
feed_type = "gravity"
head_force_n = 120
coolant = false
"""


def test_packaged_profiles():
    saws = load_saws()
    assert {"small-horizontal", "mid-production", "large-column"} <= set(saws)
    for saw in saws.values():
        assert saw.source == "generic example (memory)"
        assert saw.band_speed_min_m_min < saw.band_speed_max_m_min
        # memory: metal saws run wheel/thickness about 300-450
        assert 300 <= saw.wheel_diameter_mm / saw.blade_thickness_mm <= 450
        assert wheel_ratio_warning(saw.blade_thickness_mm, saw.wheel_diameter_mm) is None


def test_user_file_by_argument_and_environment(tmp_path, monkeypatch):
    path = tmp_path / "saws.toml"
    path.write_text(USER_SAW)
    saw = get_saw("Bench-Buddy", user_file=path)
    assert saw.kind == "vertical" and saw.head_force_n == 120 and not saw.coolant
    assert saw.source == str(path)
    monkeypatch.setenv("SAWPLAN_SAWS", str(path))
    assert "bench-buddy" in load_saws()
    assert "mid-production" in load_saws()  # packaged saws stay


def test_user_saw_replaces_packaged_and_extra_wins(tmp_path):
    path = tmp_path / "saws.toml"
    path.write_text(USER_SAW.replace("bench-buddy", "mid-production"))
    assert get_saw("mid-production", user_file=path).kind == "vertical"
    logged = dataclasses.replace(get_saw("large-column"), name="mid-production", source="blade log")
    assert get_saw("mid-production", user_file=path, extra=[logged]).source == "blade log"


def test_unknown_saw_suggests_the_closest():
    with pytest.raises(NotFoundError) as err:
        get_saw("mid-prodution")
    assert "did you mean mid-production" in str(err.value)
    with pytest.raises(NotFoundError) as err:
        get_saw("zzz")
    assert "known saws" in str(err.value)


@pytest.mark.parametrize(
    ("text", "field"),
    [
        pytest.param(USER_SAW.replace("head_force_n = 120\n", ""), "head_force_n", id="no force"),
        pytest.param(USER_SAW.replace('"vertical"', '"sideways"'), "kind", id="bad kind"),
        pytest.param(
            USER_SAW.replace("motor_power_w = 550", "motor_power_w = -1"),
            "motor_power_w",
            id="negative",
        ),
        pytest.param(
            USER_SAW.replace("drive_efficiency = 0.9", "drive_efficiency = 1.5"),
            "drive_efficiency",
            id="efficiency",
        ),
        pytest.param(
            USER_SAW.replace("coolant = false", "colant = false"), "colant", id="typo field"
        ),
        pytest.param(
            USER_SAW.replace("wheel_diameter_mm = 350\n", ""), "wheel_diameter_mm", id="missing"
        ),
        pytest.param(
            USER_SAW.replace("band_speed_min_m_min = 20", "band_speed_min_m_min = 2000"),
            "band_speed_min_m_min",
            id="speeds",
        ),
    ],
)
def test_bad_user_saws(tmp_path, text, field):
    path = tmp_path / "saws.toml"
    path.write_text(text)
    with pytest.raises(BadDataError) as err:
        load_saws(path)
    assert err.value.field == field


def test_damaged_or_missing_saws_file(tmp_path):
    path = tmp_path / "saws.toml"
    path.write_text("[saw.x\nkind=")
    with pytest.raises(DamagedFileError):
        load_saws(path)
    with pytest.raises(NotFoundError):
        load_saws(tmp_path / "nope.toml")


@pytest.mark.parametrize(
    ("section", "message"),
    [
        pytest.param("round 300mm", "capacity of 260 mm round", id="round over 260"),
        pytest.param("flat 400mm 50mm", "350 × 260 mm", id="flat wider than 350"),
        pytest.param("square 270mm", "350 × 260 mm", id="square higher than 260"),
    ],
)
def test_capacity(section, message):
    saw = get_saw("mid-production")
    with pytest.raises(BadDataError) as err:
        check_capacity(saw, parse_section(section))
    assert message in str(err.value)
    check_capacity(saw, parse_section("round 260mm"))  # exactly at capacity is fine


def test_bending_stress_worked_case():
    # derived (beam theory σ = E·t/D): 0.9 mm blade on a 300 mm wheel -> about 600-620 MPa
    assert 600 <= bending_stress_mpa(0.9, 300) <= 620
    # closed form: E·t/D with E = 200 GPa; the pitch-diameter variant divides by D + t
    assert bending_stress_mpa(0.9, 300) == pytest.approx(200_000 * 0.9 / 300)
    assert bending_stress_mpa(0.9, 300, pitch_diameter=True) == pytest.approx(200_000 * 0.9 / 300.9)


def test_small_wheel_warns():
    # memory: D/t under about 300 shortens blade life
    assert "under about 300" in wheel_ratio_warning(1.3, 300)
    assert wheel_ratio_warning(0.9, 300) is None


def test_tension_worked_case():
    # derived (F = σ·w·t, 25 ksi common practice): 1/2 in x 0.025 in at 25 ksi -> 312 lbf
    width = REF.Quantity(0.5, "inch").to("mm").magnitude
    thick = REF.Quantity(0.025, "inch").to("mm").magnitude
    stress = REF.Quantity(25, "ksi").to("MPa").magnitude
    force = REF.Quantity(tension_force_n(width, thick, stress), "N").to("lbf").magnitude
    assert force == pytest.approx(312.5, rel=0.005)


def test_tension_ranges_common_practice():
    ksi = REF.Quantity(1, "ksi").to("MPa").magnitude
    bimetal = tension_range("bi-metal")  # 25-30 ksi, not over 35 ksi
    assert bimetal.low_mpa == pytest.approx(25 * ksi, rel=0.01)
    assert bimetal.high_mpa == pytest.approx(30 * ksi, rel=0.01)
    assert bimetal.max_mpa == pytest.approx(35 * ksi, rel=0.01)
    carbon = tension_range("carbon")  # 15-20 ksi
    assert carbon.low_mpa == pytest.approx(15 * ksi, rel=0.01)


def test_gauge_strain():
    # derived (Hooke's law ε = σ/E): 30 ksi -> 0.001 in/in
    # (that figure takes E = 30,000 ksi = 207 GPa; ours is 200)
    stress = REF.Quantity(30, "ksi").to("MPa").magnitude
    assert gauge_elongation_mm(stress, 1.0) == pytest.approx(0.001, rel=0.04)


def test_blade_length_open_belt():
    # equal wheels: L = 2C + π(D + t) (open-belt geometry, derived)
    assert blade_length_mm(1000, 400, thickness_mm=0.9) == pytest.approx(2000 + math.pi * 400.9)
    # unequal wheels, by tangent geometry (derived): straight runs + arcs of π ± 2β
    c, d1, d2 = 900.0, 500.0, 300.0
    beta = math.asin((d1 - d2) / (2 * c))
    geometric = (
        2 * math.sqrt(c**2 - ((d1 - d2) / 2) ** 2)
        + (math.pi + 2 * beta) * d1 / 2
        + (math.pi - 2 * beta) * d2 / 2
    )
    assert blade_length_mm(c, d1, d2) == pytest.approx(geometric)
    with pytest.raises(BadDataError):
        blade_length_mm(100, 500, 200)


def test_flex_cycles_and_kerf():
    # wheels · V / L: 2 × 60 m/min over a 3 m band = 40 bends per minute
    assert flex_cycles_per_min(60, 3000) == pytest.approx(40)
    assert flex_cycles_per_min(60, 3000, wheels=3) == pytest.approx(60)
    # memory: kerf 1.5-1.7 × thickness
    assert 1.5 * 0.9 <= kerf_mm(0.9) <= 1.7 * 0.9


def test_contour_radius_common_practice():
    # 1/2 in blade -> 2 1/2 in radius; 1/4 in -> 5/8 in
    assert min_contour_radius_mm(12.7) == pytest.approx(63.5, abs=1)
    assert min_contour_radius_mm(6.35) == pytest.approx(15.9, abs=0.5)
    assert min_contour_radius_mm(41) is None


def test_saw_validation_in_code():
    base = get_saw("small-horizontal")
    with pytest.raises(BadDataError):
        dataclasses.replace(base, feed_type="magic")
    with pytest.raises(BadDataError):
        Saw(**{**dataclasses.asdict(base), "blade_width_mm": 0})
    assert base.force_limited and base.cutting_power_w == pytest.approx(750 * 0.75)
