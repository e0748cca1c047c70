"""Plain-language lines for a planned cut: why this pitch, what goes wrong.

Kept apart from the physics so the wording can change without touching it.
"""

from __future__ import annotations

from sawplan.cutting import constants as K
from sawplan.cutting.mechanics import wheel_ratio_warning
from sawplan.cutting.pitch import catalogue
from sawplan.cutting.plan import Candidate, Plan, SectionLike, pool, thin_wall, thinnest_length_mm
from sawplan.display import Phrase, Q, fmt_percent, fmt_ratio, join, say

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


def where_thinnest(section: SectionLike) -> Phrase:
    if section.min_wall_mm is not None:
        return say("the {} wall", Q("length", section.min_wall_mm))
    return say("the {} width", Q("length", section.max_chord_mm))


def widest_chord(section: SectionLike) -> Phrase:
    return say("the {} widest chord", Q("length", section.max_chord_mm))


def ratio_text(ratio: float) -> str:
    if ratio >= 1.05:
        return f"{fmt_ratio(ratio)} slower"
    if ratio > 1 / 1.05:
        return "about as fast"
    return f"{fmt_ratio(1 / ratio)} faster"


def _teeth_text(cand: Candidate, section: SectionLike) -> Phrase:
    if section.is_solid:
        teeth = f"{cand.teeth_thinnest:.1f}" if cand.too_few else f"{cand.teeth_widest:.0f}"
        return say("{} teeth in {}", teeth, widest_chord(section))
    return say("{} teeth in {}", f"{cand.teeth_thinnest:.1f}", where_thinnest(section))


def why_chosen(cand: Candidate, section: SectionLike) -> Phrase:
    run = cand.run
    share = dict(run.limit_shares).get(run.governing_limit, 0.0)
    limit = f"{LIMIT_WORDS[run.governing_limit]} sets the feed for {fmt_percent(share)} of the cut"
    teeth = _teeth_text(cand, section)
    label = cand.pitch.label
    if cand.allowed:
        return say("{} cuts fastest within the tooth-count rules ({}); {}", label, teeth, limit)
    if cand.too_few:
        return say("{}: the finest pitch, still only {}; {}", label, teeth, limit)
    return say("{}: the coarsest pitch, {}; {}", label, teeth, limit)


def neighbour_line(side: str, cand: Candidate, chosen: Candidate, section: SectionLike) -> Phrase:
    label = f"{side} {cand.pitch.label}"
    if cand.too_few:
        teeth = f"{cand.teeth_thinnest:.1f}"
        return say("{}: only {} teeth in {}", label, teeth, where_thinnest(section))
    if cand.too_many:
        teeth = f"{cand.teeth_widest:.0f}"
        return say("{}: {} teeth in {} (over about 24)", label, teeth, widest_chord(section))
    why = SHORT_WHY[cand.run.governing_limit]
    if cand.run.rubbing_share > 0.05:
        why += ", teeth rub"
    return say(
        "{}: {}, {}", label, why, ratio_text(cand.run.cut_time_min / chosen.run.cut_time_min)
    )


def neighbours(chosen: Candidate, cands: list[Candidate], section: SectionLike) -> Phrase | None:
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
    return join("; ", parts) if parts else None


def _coarser_keeps_three_teeth(plan: Plan, cand: Candidate) -> bool:
    length = thinnest_length_mm(plan.section)
    need = K.number("bite", "min_teeth")
    return any(p.tpi_mean < cand.pitch.tpi_mean and p.teeth_in(length) >= need for p in catalogue())


def _tooth_count_warnings(plan: Plan, cand: Candidate) -> list[str]:
    section = plan.section
    need = K.number("bite", "min_teeth")
    out: list[str] = []
    if thin_wall(section):
        out.append(
            say(
                "walls under {} cannot hold {} teeth even with the finest pitch: wavy set, "
                "light feed, support the work close to the cut",
                Q("length", K.number("bite", "thin_wall_mm")),
                f"{need:.0f}",
            )
        )
    elif cand.too_few:
        out.append(
            say(
                "only {} teeth of {} in {} (fewer than {}): teeth can snag and strip; "
                "use a finer pitch",
                f"{cand.teeth_thinnest:.1f}",
                cand.pitch.label,
                where_thinnest(section),
                f"{need:.0f}",
            )
        )
    if cand.too_many:
        most = K.number("bite", "max_teeth_widest_chord")
        out.append(
            say(
                "{} teeth in {} (over about {}): gullets pack; a coarser pitch cuts faster",
                f"{cand.teeth_widest:.0f}",
                widest_chord(section),
                f"{most:.0f}",
            )
        )
    return out


def _rubbing_warnings(plan: Plan, cand: Candidate) -> list[str]:
    run = cand.run
    if run.rubbing_share <= 0.0:
        return []
    head = say(
        "tooth bite falls to {}, under the {} rubbing floor, for {} of the cut: "
        "teeth rub instead of cutting",
        Q("bite", run.min_bite_mm, 2),
        Q("bite", plan.base.rubbing_floor_mm, 2),
        fmt_percent(run.rubbing_share),
    )
    if _coarser_keeps_three_teeth(plan, cand):
        out: list[str] = [say("{}; coarser pitch needed", head)]
    else:
        out = [
            say(
                "{}; a coarser pitch would leave fewer than 3 teeth in {}, so expect a slow "
                "cut across the {} chord",
                head,
                where_thinnest(plan.section),
                Q("length", plan.section.max_chord_mm),
            )
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
    material_mm = plan.base.material_bite_mm
    if shares.get("gullet", 0.0) > 0.5 and run.bite_mean_mm < 0.5 * material_mm:
        out.append(
            say(
                "gullets overloaded: chips fill them at a {} bite, under half the {} the "
                "material takes",
                Q("bite", run.bite_mean_mm, 2),
                Q("bite", material_mm, 2),
            )
        )
    if shares.get("power", 0.0) > 0.2:
        out.append(
            say(
                "power-limited for {} of the cut: {} at the blade ({} motor × {})",
                fmt_percent(shares["power"]),
                Q("power", saw.cutting_power_w),
                Q("power", saw.motor_power_w),
                f"{saw.drive_efficiency:g}",
            )
        )
    if shares.get("force", 0.0) > 0.2:
        out.append(
            say(
                "head force {} is shared by up to {} teeth: it sets the feed for {} of the cut",
                Q("force", saw.head_force_n),
                f"{cand.teeth_widest:.0f}",
                fmt_percent(shares["force"]),
            )
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
        say(
            "band speed held at the saw's {} {} (the cut wants {})",
            which,
            Q("speed", held),
            Q("speed", wanted),
        )
    ]


def warnings(plan: Plan, cand: Candidate) -> list[str]:
    out = _tooth_count_warnings(plan, cand)
    width = plan.saw.blade_width_mm
    if cand.pitch.source != "given" and not cand.pitch.fits_blade(width):
        out.append(
            say(
                "{} is not usually made in a {} wide blade (made {} to {}, memory)",
                cand.pitch.label,
                Q("length", width),
                Q("length", cand.pitch.min_blade_width_mm),
                Q("length", cand.pitch.max_blade_width_mm),
            )
        )
    out += _rubbing_warnings(plan, cand)
    out += _limit_warnings(plan, cand)
    out += _speed_warning(plan)
    wheel = wheel_ratio_warning(plan.saw.blade_thickness_mm, plan.saw.wheel_diameter_mm)
    if wheel:
        out.append(wheel)
    return out


def speed_line(plan: Plan) -> Phrase:
    s = plan.speed
    if s.given:
        return say("band speed {} as given", Q("speed", s.band_speed_m_min))
    parts: list[str] = [say("{} for {}", Q("speed", s.base_m_min), plan.material.key)]
    if abs(s.width_factor - 1) > 0.005:
        parts.append(
            say(
                "{} for a {} mean width of cut",
                fmt_percent(s.width_factor - 1, signed=True),
                Q("length", s.width_of_cut_mm, 3),
            )
        )
    if s.blade_factor != 1:
        parts.append(f"{fmt_percent(s.blade_factor - 1, signed=True)} {plan.blade_material} blade")
    if s.coolant_factor != 1:
        parts.append(f"{fmt_percent(s.coolant_factor - 1, signed=True)} dry")
    if s.clipped:
        parts.append(f"held to the saw's {'highest' if s.clipped == 'max' else 'lowest'} speed")
    return say("band speed {}: {}", Q("speed", s.band_speed_m_min), join(", ", parts))


def feed_line(plan: Plan) -> str:
    """Why the down-feed on the card is what it is (the card alone carries its value)."""
    if plan.saw.force_limited:
        return (
            f"{plan.saw.feed_type} feed follows the chord: the head slows where the chord is "
            "widest and speeds up where it narrows"
        )
    return "the down-feed above is what the slowest depth allows, so it is safe at the widest chord"


def calibration_line(plan: Plan, cand: Candidate) -> Phrase:
    """The shop's time factor, with the model's own time and down-feed before it."""
    run = cand.run
    feed = "" if plan.saw.force_limited else say(", {} down-feed", Q("feed", run.feed_set_mm_min))
    return say(
        "time × {} shop calibration (model {}{})",
        f"{plan.calibration:.2f}",
        Q("time", run.cut_time_min),
        feed,
    )
