"""Setting up a cut and scoring each candidate pitch (reference §1–4).

A plan fixes what does not depend on the pitch — band speed, kerf, the
material bite, the chord samples — so every pitch of the catalogue can be
scored with plain arithmetic.  The pick is the fastest pitch that keeps at
least three teeth in the thinnest wall (solids: across the widest chord) and,
on solids, at most about 24 teeth in the widest chord.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Protocol

from sawplan.cutting import constants as K
from sawplan.cutting.feed import CutConditions, FeedIntegral, Quadrature, integrate, sample
from sawplan.cutting.mechanics import kerf_mm
from sawplan.cutting.pitch import Pitch, catalogue, parse_pitch
from sawplan.cutting.speed import BandSpeed, band_speed
from sawplan.cutting.teeth import TeethChoice, choose_teeth
from sawplan.errors import BadDataError
from sawplan.saws import Saw, check_capacity


class MaterialLike(Protocol):
    key: str
    designation: str
    group: str
    band_speed_m_min: float
    unit_energy_j_mm3: float
    cutting_rate_cm2_min: float
    work_hardens: bool


class SectionLike(Protocol):
    shape: str
    area_mm2: float
    height_mm: float
    width_mm: float
    max_chord_mm: float
    mean_chord_mm: float
    min_wall_mm: float | None
    is_solid: bool
    pieces: int

    def chord_mm(self, y_mm: float) -> float: ...

    def breakpoints_mm(self) -> tuple[float, ...]: ...

    def label(self) -> str: ...


@dataclass(frozen=True)
class Plan:
    material: MaterialLike
    section: SectionLike
    saw: Saw
    speed: BandSpeed
    quad: Quadrature
    base: CutConditions  # gullet factor replaced per tooth form
    dry: bool
    blade_material: str
    calibration: float
    notes: tuple[str, ...]


@dataclass(frozen=True)
class Candidate:
    pitch: Pitch
    teeth: TeethChoice
    run: FeedIntegral
    teeth_thinnest: float
    teeth_widest: float
    too_few: bool
    too_many: bool

    @property
    def allowed(self) -> bool:
        return not (self.too_few or self.too_many)


def material_bite_mm(material: MaterialLike) -> float:
    """h_mat = A′_ref·p_ref / (W_ref·V_ref): the bite the handbook rate implies (reference §4)."""
    p_ref = parse_pitch(str(K.value("bite", "reference_pitch"))).spacing_mean_mm
    w_ref = K.number("bite", "reference_width_mm")
    rate_mm2_min = material.cutting_rate_cm2_min * 100.0
    return rate_mm2_min * p_ref / (w_ref * material.band_speed_m_min * 1000.0)


def rubbing_floor_mm() -> float:
    """h_min = ratio × cutting-edge radius (reference §4)."""
    return K.number("bite", "edge_radius_mm") * K.number("bite", "min_chip_ratio")


def make_plan(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    *,
    dry: bool,
    blade_material: str,
    band_speed_m_min: float | None,
    calibration: float,
) -> Plan:
    ok = isinstance(calibration, int | float) and math.isfinite(calibration) and calibration > 0
    if not ok:
        raise BadDataError(f"must be a positive factor, got {calibration!r}", field="calibration")
    check_capacity(saw, section)
    notes: list[str] = []
    if not saw.coolant and not dry:
        dry = True
        notes.append(f"{saw.name} has no coolant: planned as a dry cut")
    speed = band_speed(
        material.band_speed_m_min,
        section.mean_chord_mm,
        speed_min_m_min=saw.band_speed_min_m_min,
        speed_max_m_min=saw.band_speed_max_m_min,
        dry=dry,
        blade_material=blade_material,
        given_m_min=band_speed_m_min,
    )
    kerf = kerf_mm(saw.blade_thickness_mm)
    thrust = K.number("bite", "thrust_ratio") * material.unit_energy_j_mm3 * 1000.0  # N/mm²
    base = CutConditions(
        band_speed_m_min=speed.band_speed_m_min,
        kerf_mm=kerf,
        material_bite_mm=material_bite_mm(material),
        tooth_max_mm=K.number("bite", "tooth_max_mm"),
        rubbing_floor_mm=rubbing_floor_mm(),
        gullet_factor=K.number("gullet", "c_regular"),
        fill_fraction=K.number("gullet", "fill_fraction"),
        unit_energy_j_mm3=material.unit_energy_j_mm3,
        cutting_power_w=saw.cutting_power_w,
        head_force_n=saw.head_force_n if saw.force_limited else None,
        thrust_n_mm2=thrust,
        plough_force_n=thrust * kerf * K.number("bite", "plough_depth_mm"),
    )
    return Plan(
        material=material,
        section=section,
        saw=saw,
        speed=speed,
        quad=sample(section),
        base=base,
        dry=dry,
        blade_material=blade_material,
        calibration=float(calibration),
        notes=tuple(notes),
    )


def thin_wall(section: SectionLike) -> bool:
    wall = section.min_wall_mm
    return wall is not None and wall < K.number("bite", "thin_wall_mm")


def thinnest_length_mm(section: SectionLike) -> float:
    """Where the three-tooth rule is checked: the thinnest wall, or a solid's widest chord."""
    wall = section.min_wall_mm
    return wall if wall is not None else section.max_chord_mm


def score(plan: Plan, pitch: Pitch) -> Candidate:
    """Tooth counts, tooth form and the time through the section for one pitch."""
    section = plan.section
    thinnest = pitch.teeth_in(thinnest_length_mm(section))
    widest = pitch.teeth_in(section.max_chord_mm, coarse=False)
    teeth = choose_teeth(
        plan.material.group,
        pitch,
        is_solid=section.is_solid,
        widest_chord_mm=section.max_chord_mm,
        fewest_teeth=thinnest,
        thin_wall=thin_wall(section),
    )
    cond = replace(plan.base, gullet_factor=teeth.gullet_factor)
    run = integrate(pitch, plan.quad, cond, constant_feed=not plan.saw.force_limited)
    too_few = thinnest < K.number("bite", "min_teeth")
    too_many = section.is_solid and widest > K.number("bite", "max_teeth_widest_chord")
    return Candidate(pitch, teeth, run, thinnest, widest, too_few, too_many)


def available(saw: Saw) -> list[Pitch]:
    """Catalogue pitches made in the saw's blade width (all of them if none is)."""
    fits = [p for p in catalogue() if p.fits_blade(saw.blade_width_mm)]
    return fits or list(catalogue())


def pool(cands: list[Candidate], *, solid: bool) -> list[Candidate]:
    """Variable pitches for solids (as in the MH31 width-of-cut pairs), all for walls."""
    if solid:
        variable = [c for c in cands if c.pitch.kind == "variable" and c.allowed]
        if variable:
            return [c for c in cands if c.pitch.kind == "variable"]
    return cands


def pick(cands: list[Candidate], *, work_hardens: bool, solid: bool) -> Candidate:
    """The fastest pitch within the tooth-count rules.

    Variable pitches damp vibration, so on walled sections a constant pitch must
    be clearly faster; among pitches nearly as fast the coarsest wins (bigger
    gullets, longer life — more so on work-hardening materials).  When no pitch
    meets the rules: the finest for thin walls and small solids, the coarsest
    for very wide solids.
    """
    cands = pool(cands, solid=solid)
    allowed = [c for c in cands if c.allowed]
    if allowed:
        penalty = K.number("bite", "constant_pitch_penalty")

        def weighted(c: Candidate) -> float:
            return c.run.cut_time_min * (1.0 if c.pitch.kind == "variable" else penalty)

        best = min(weighted(c) for c in allowed)
        name = "similar_time_ratio_work_hardening" if work_hardens else "similar_time_ratio"
        near = [c for c in allowed if weighted(c) <= best * K.number("bite", name)]
        return min(near, key=lambda c: (c.pitch.tpi_mean, weighted(c)))
    if any(c.too_few for c in cands):
        return max(cands, key=lambda c: (c.pitch.tpi_coarse, c.pitch.tpi_fine))
    return min(cands, key=lambda c: (c.pitch.tpi_mean, c.run.cut_time_min))
