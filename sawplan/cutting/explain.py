"""Plain-language lines for a planned cut: why this pitch, what goes wrong.

Kept apart from the physics so the wording can change without touching it.
"""

from __future__ import annotations

from sawplan.cutting import constants as K
from sawplan.cutting.mechanics import wheel_ratio_warning
from sawplan.cutting.pitch import catalogue
from sawplan.cutting.plan import Candidate, Plan, SectionLike, pool, thin_wall, thinnest_length_mm

LIMIT_WORDS = {
    "material": "the material's bite",
    "gullet": "gullet capacity",
    "tooth": "tooth strength",
    "power": "motor power",
    "force": "head force",
}
SHORT_WHY = {
    "gullet": "gullets full",
    "material": "bite held by the material, wider tooth spacing",
    "power": "motor-limited",
    "force": "head force spread over the teeth",
    "tooth": "tooth strength",
}
CLIP_NOTICE = 1.03  # a speed held back by under 3 % is not worth a warning


def where_thinnest(section: SectionLike) -> str:
    if section.min_wall_mm is not None:
        return f"the {section.min_wall_mm:.3g} mm wall"
    return f"the {section.max_chord_mm:.3g} mm width"


def ratio_text(ratio: float) -> str:
    if ratio >= 1.05:
        return f"{ratio:.1f}× slower"
    if ratio > 1 / 1.05:
        return "about as fast"
    return f"{1 / ratio:.1f}× faster"


def _teeth_text(cand: Candidate, section: SectionLike) -> str:
    if section.is_solid:
        teeth = f"{cand.teeth_thinnest:.1f}" if cand.too_few else f"{cand.teeth_widest:.0f}"
        return f"{teeth} teeth in the {section.max_chord_mm:.3g} mm widest chord"
    return f"{cand.teeth_thinnest:.1f} teeth in {where_thinnest(section)}"


def why_chosen(cand: Candidate, section: SectionLike) -> str:
    run = cand.run
    share = dict(run.limit_shares).get(run.governing_limit, 0.0)
    limit = f"{LIMIT_WORDS[run.governing_limit]} sets the feed for {share:.0%} of the cut"
    teeth = _teeth_text(cand, section)
    if cand.allowed:
        return f"{cand.pitch.label} cuts fastest within the tooth-count rules ({teeth}); {limit}"
    if cand.too_few:
        return f"{cand.pitch.label}: the finest pitch, still only {teeth}; {limit}"
    return f"{cand.pitch.label}: the coarsest pitch, {teeth}; {limit}"


def neighbour_line(side: str, cand: Candidate, chosen: Candidate, section: SectionLike) -> str:
    label = f"{side} {cand.pitch.label}"
    if cand.too_few:
        return f"{label}: only {cand.teeth_thinnest:.1f} teeth in {where_thinnest(section)}"
    if cand.too_many:
        width = f"{section.max_chord_mm:.3g} mm"
        return f"{label}: {cand.teeth_widest:.0f} teeth in the {width} widest chord (over about 24)"
    why = SHORT_WHY[cand.run.governing_limit]
    if cand.run.rubbing_share > 0.05:
        why += ", teeth rub"
    return f"{label}: {why}, {ratio_text(cand.run.cut_time_min / chosen.run.cut_time_min)}"


def neighbours(chosen: Candidate, cands: list[Candidate], section: SectionLike) -> str | None:
    """What the next finer and next coarser pitch of the same family would do."""
    family = [c for c in pool(cands, solid=section.is_solid) if c.pitch.kind == chosen.pitch.kind]
    if not any(c.pitch.same_teeth(chosen.pitch) for c in family):
        family = cands
    ordered = sorted(family, key=lambda c: (c.pitch.tpi_mean, c.pitch.tpi_coarse))
    i = next(k for k, c in enumerate(ordered) if c.pitch.same_teeth(chosen.pitch))
    parts = []
    if i + 1 < len(ordered):
        parts.append(neighbour_line("finer", ordered[i + 1], chosen, section))
    if i > 0:
        parts.append(neighbour_line("coarser", ordered[i - 1], chosen, section))
    return "; ".join(parts) if parts else None


def _coarser_keeps_three_teeth(plan: Plan, cand: Candidate) -> bool:
    length = thinnest_length_mm(plan.section)
    need = K.number("bite", "min_teeth")
    return any(p.tpi_mean < cand.pitch.tpi_mean and p.teeth_in(length) >= need for p in catalogue())


def _tooth_count_warnings(plan: Plan, cand: Candidate) -> list[str]:
    section = plan.section
    need = K.number("bite", "min_teeth")
    out = []
    if thin_wall(section):
        out.append(
            f"walls under {K.number('bite', 'thin_wall_mm'):g} mm cannot hold {need:.0f} teeth "
            "even with the finest pitch: wavy set, light feed, support the work close to the cut"
        )
    elif cand.too_few:
        out.append(
            f"only {cand.teeth_thinnest:.1f} teeth of {cand.pitch.label} in "
            f"{where_thinnest(section)} (fewer than {need:.0f}): teeth can snag and strip; "
            "use a finer pitch"
        )
    if cand.too_many:
        most = K.number("bite", "max_teeth_widest_chord")
        out.append(
            f"{cand.teeth_widest:.0f} teeth in the {section.max_chord_mm:.3g} mm widest chord "
            f"(over about {most:.0f}): gullets pack; a coarser pitch cuts faster"
        )
    return out


def _rubbing_warnings(plan: Plan, cand: Candidate) -> list[str]:
    run = cand.run
    if run.rubbing_share <= 0.0:
        return []
    floor_um = plan.base.rubbing_floor_mm * 1000
    head = (
        f"tooth bite falls to {run.min_bite_mm * 1000:.2g} µm, under the {floor_um:.2g} µm "
        f"rubbing floor, for {run.rubbing_share:.0%} of the cut: teeth rub instead of cutting"
    )
    if _coarser_keeps_three_teeth(plan, cand):
        out = [f"{head}; coarser pitch needed"]
    else:
        out = [
            f"{head}; a coarser pitch would leave fewer than 3 teeth in "
            f"{where_thinnest(plan.section)}, so expect a slow cut across the "
            f"{plan.section.max_chord_mm:.3g} mm chord"
        ]
    if plan.material.work_hardens:
        out.append(
            f"rubbing work-hardens {plan.material.key}: keep the feed up and never let the "
            "blade dwell in the cut"
        )
    return out


def _limit_warnings(plan: Plan, cand: Candidate) -> list[str]:
    run, saw = cand.run, plan.saw
    shares = dict(run.limit_shares)
    out = []
    material_um = plan.base.material_bite_mm * 1000
    if shares.get("gullet", 0.0) > 0.5 and run.bite_mean_mm * 1000 < 0.5 * material_um:
        out.append(
            f"gullets overloaded: chips fill them at a {run.bite_mean_mm * 1000:.2g} µm bite, "
            f"under half the {material_um:.2g} µm the material takes"
        )
    if shares.get("power", 0.0) > 0.2:
        out.append(
            f"power-limited for {shares['power']:.0%} of the cut: "
            f"{saw.cutting_power_w:.0f} W at the blade "
            f"({saw.motor_power_w:.0f} W motor × {saw.drive_efficiency:g})"
        )
    if shares.get("force", 0.0) > 0.2:
        out.append(
            f"head force {saw.head_force_n:.0f} N is shared by up to {cand.teeth_widest:.0f} "
            f"teeth: it sets the feed for {shares['force']:.0%} of the cut"
        )
    if run.stalled:
        out.append(
            "the head force is too low for the teeth to bite at the widest chord: "
            "add force or use a coarser pitch"
        )
    return out


def _speed_warning(plan: Plan) -> list[str]:
    s = plan.speed
    if not s.clipped:
        return []
    wanted = s.base_m_min * s.width_factor * s.blade_factor * s.coolant_factor
    held = s.band_speed_m_min
    if max(wanted, held) / min(wanted, held) < CLIP_NOTICE:
        return []
    which = "highest" if s.clipped == "max" else "lowest"
    return [
        f"band speed held at the saw's {which} {held:g} m/min (the cut wants {wanted:.0f} m/min)"
    ]


def warnings(plan: Plan, cand: Candidate) -> list[str]:
    out = _tooth_count_warnings(plan, cand)
    width = plan.saw.blade_width_mm
    if cand.pitch.source != "given" and not cand.pitch.fits_blade(width):
        out.append(
            f"{cand.pitch.label} is not usually made in a {width:g} mm wide blade "
            f"(made {cand.pitch.min_blade_width_mm:g}-{cand.pitch.max_blade_width_mm:g} mm, memory)"
        )
    out += _rubbing_warnings(plan, cand)
    out += _limit_warnings(plan, cand)
    out += _speed_warning(plan)
    wheel = wheel_ratio_warning(plan.saw.blade_thickness_mm, plan.saw.wheel_diameter_mm)
    if wheel:
        out.append(wheel)
    return out


def speed_line(plan: Plan) -> str:
    s = plan.speed
    if s.given:
        return f"band speed {s.band_speed_m_min:.0f} m/min as given"
    parts = [f"{s.base_m_min:.0f} m/min for {plan.material.key}"]
    if abs(s.width_factor - 1) > 0.005:
        parts.append(
            f"{s.width_factor - 1:+.0%} for a {s.width_of_cut_mm:.3g} mm mean width of cut"
        )
    if s.blade_factor != 1:
        parts.append(f"{s.blade_factor - 1:+.0%} {plan.blade_material} blade")
    if s.coolant_factor != 1:
        parts.append(f"{s.coolant_factor - 1:+.0%} dry")
    if s.clipped:
        parts.append(f"held to the saw's {'highest' if s.clipped == 'max' else 'lowest'} speed")
    return f"band speed {s.band_speed_m_min:.0f} m/min: " + ", ".join(parts)


def feed_line(plan: Plan, cand: Candidate) -> str:
    run = cand.run
    if plan.saw.force_limited:
        return (
            f"{plan.saw.feed_type} feed follows the chord: {run.feed_mean_mm_min:.3g} mm/min on "
            f"average, {run.feed_set_mm_min:.3g} mm/min at the slowest depth"
        )
    return f"set the down-feed to {run.feed_set_mm_min:.3g} mm/min, safe at the widest chord"
