"""Setting up a cut and scoring each candidate pitch (docs/pitch.md, docs/feed-and-time.md).

A plan fixes what does not depend on the pitch — band speed, kerf, the
material bite, the chord samples — so every pitch of the catalogue can be
scored with plain arithmetic.  ``choice`` picks among the scored pitches.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, replace
from typing import Protocol

from sawplan.cutting import constants as K
from sawplan.cutting.feed import CutConditions, FeedIntegral, Quadrature, integrate, sample
from sawplan.cutting.mechanics import kerf_mm
from sawplan.cutting.pitch import Pitch, catalogue, parse_pitch
from sawplan.cutting.ploughing import min_chip_thickness_mm
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
    thinnest_chord_mm: float
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
    set_feed_mm_min: float | None = None  # a down-feed the operator chose


@dataclass(frozen=True)
class Candidate:
    pitch: Pitch
    teeth: TeethChoice
    run: FeedIntegral
    teeth_thinnest: float  # coarse-pitch teeth over the whole chord at its thinnest depth
    teeth_widest: float  # mean-pitch teeth in the widest chord
    too_few: bool
    too_many: bool

    @property
    def stalled(self) -> bool:
        return self.run.stalled

    @property
    def allowed(self) -> bool:
        return not (self.too_few or self.too_many or self.stalled)

    @property
    def rubs_most(self) -> bool:
        """Bite under the rubbing floor over most of the metal cut."""
        return self.run.rubbing_share > K.number("bite", "rubbing_most_share")

    @property
    def time(self) -> float:
        return self.run.cut_time_min


def material_bite_mm(material: MaterialLike) -> float:
    """h_mat = A′_ref·p_ref / (W_ref·V_ref): the bite the handbook rate implies (derived)."""
    p_ref = parse_pitch(str(K.value("bite", "reference_pitch"))).spacing_mean_mm
    w_ref = K.number("bite", "reference_width_mm")
    rate_mm2_min = material.cutting_rate_cm2_min * 100.0
    return rate_mm2_min * p_ref / (w_ref * material.band_speed_m_min * 1000.0)


def rubbing_floor_mm() -> float:
    """h_min = ratio × cutting-edge radius (minimum chip thickness)."""
    return min_chip_thickness_mm(
        K.number("bite", "edge_radius_mm"), K.number("bite", "min_chip_ratio")
    )


def check_fits(saw: Saw, section: SectionLike, alternatives: Iterable[Saw] | None = None) -> None:
    """BadDataError when the work does not fit the saw; a bundle names the largest that does,
    one piece the saws that take it (``alternatives``, as for ``saws.check_capacity``)."""
    if section.pieces > 1:
        from sawplan.sections import largest_bundle

        fits = (
            section.width_mm <= saw.capacity_rect_w_mm + 1e-9
            and section.height_mm <= saw.capacity_rect_h_mm + 1e-9
        )
        if not fits:
            largest = largest_bundle(section, saw.capacity_rect_w_mm, saw.capacity_rect_h_mm)
            rows, cols = getattr(section, "bundle_rows", 0), getattr(section, "bundle_cols", 0)
            what = f"a {rows}×{cols} bundle" if rows else "the bundle"
            tail = "; not even one piece fits"
            if largest:
                tail = f"; the largest bundle that fits is {largest[0]}×{largest[1]}"
                keep = (min(rows, largest[0]), min(cols, largest[1]))
                if rows and keep != largest and keep != (rows, cols):
                    tail += f" ({keep[0]}×{keep[1]} keeps to your rows and columns)"
            raise BadDataError(
                f"{what} is {section.width_mm:.4g} wide × {section.height_mm:.4g} mm high, over "
                f"the {saw.name} capacity of {saw.capacity_rect_w_mm:g} × "
                f"{saw.capacity_rect_h_mm:g} mm (wide × high){tail}",
                field="bundle",
                hint=f"--bundle {largest[0]}x{largest[1]}" if largest else None,
            )
    check_capacity(saw, section, alternatives)


def make_plan(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    *,
    dry: bool,
    blade_material: str,
    band_speed_m_min: float | None,
    calibration: float,
    set_feed_mm_min: float | None = None,
) -> Plan:
    ok = isinstance(calibration, int | float) and math.isfinite(calibration) and calibration > 0
    if not ok:
        raise BadDataError(f"must be a positive factor, got {calibration!r}", field="calibration")
    if set_feed_mm_min is not None and not (math.isfinite(set_feed_mm_min) and set_feed_mm_min > 0):
        raise BadDataError(f"must be a positive down-feed, got {set_feed_mm_min!r}", field="feed")
    check_fits(saw, section)
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
        removal_floor=K.number("plough", "removal_floor"),
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
        set_feed_mm_min=set_feed_mm_min,
    )


def single_solid(section: SectionLike) -> bool:
    """One solid bar: the solids' reading of the tooth-count rules applies."""
    return section.is_solid and section.pieces == 1


def thin_wall(section: SectionLike) -> bool:
    wall = section.min_wall_mm
    return wall is not None and wall < K.number("bite", "thin_wall_mm")


def score(
    plan: Plan,
    pitch: Pitch,
    *,
    quad: Quadrature | None = None,
    thinnest_mm: float | None = None,
    widest_mm: float | None = None,
    solid: bool | None = None,
    set_feed: bool = True,
) -> Candidate:
    """Tooth counts, tooth form and the time through the section for one pitch.

    The keywords score the pitch on another chord profile (the average width
    of cut read as a solid, ``choice.chart_pitch``).
    """
    section = plan.section
    thinnest_mm = section.thinnest_chord_mm if thinnest_mm is None else thinnest_mm
    widest_mm = section.max_chord_mm if widest_mm is None else widest_mm
    solid = single_solid(section) if solid is None else solid
    thinnest = pitch.teeth_in(thinnest_mm)
    widest = pitch.teeth_in(widest_mm, coarse=False)
    teeth = choose_teeth(
        plan.material.group,
        pitch,
        is_solid=solid,
        widest_chord_mm=widest_mm,
        fewest_teeth=thinnest,
        thin_wall=thin_wall(section) and quad is None,
    )
    cond = replace(plan.base, gullet_factor=teeth.gullet_factor)
    run = integrate(
        pitch,
        plan.quad if quad is None else quad,
        cond,
        constant_feed=not plan.saw.force_limited,
        set_feed_mm_min=plan.set_feed_mm_min if set_feed else None,
    )
    too_few = thinnest < K.number("bite", "min_teeth")
    too_many = solid and widest > K.number("bite", "max_teeth_widest_chord")
    return Candidate(pitch, teeth, run, thinnest, widest, too_few, too_many)


def available(saw: Saw) -> list[Pitch]:
    """Catalogue pitches made in the saw's blade width (all of them if none is)."""
    fits = [p for p in catalogue() if p.fits_blade(saw.blade_width_mm)]
    return fits or list(catalogue())
