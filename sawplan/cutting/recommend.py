"""Choose a blade pitch for a cut, or evaluate the blade already on the saw.

``recommend`` scores every catalogue pitch made in the saw's blade width and
keeps the fastest within the tooth-count rules (``plan.pick``); ``evaluate``
scores one given pitch and says what goes wrong; ``compare`` sets the two side
by side.  Speed, feed and time come from ``speed`` and ``feed``.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from sawplan.cutting import explain
from sawplan.cutting.breakin import BREAKIN_CAUTION, breakin_schedule
from sawplan.cutting.feed import bite, feed_mm_min
from sawplan.cutting.mechanics import bending_stress_mpa, flex_cycles_per_min
from sawplan.cutting.pitch import Pitch, parse_pitch
from sawplan.cutting.plan import (
    Candidate,
    MaterialLike,
    Plan,
    SectionLike,
    available,
    make_plan,
    pick,
    score,
)
from sawplan.cutting.result import CAUTION, Comparison, CutResult, ProfilePoint
from sawplan.display import Q, fmt_ratio, say
from sawplan.saws import Saw

PROFILE_POINTS = 41


def _profile(plan: Plan, cand: Candidate) -> tuple[ProfilePoint, ...]:
    cond = replace(plan.base, gullet_factor=cand.teeth.gullet_factor)
    height = plan.section.height_mm
    constant = not plan.saw.force_limited
    points = []
    for k in range(PROFILE_POINTS):
        y = height * k / (PROFILE_POINTS - 1)
        chord = max(0.0, float(plan.section.chord_mm(y)))
        longest = getattr(plan.section, "longest_run_mm", None)
        b = bite(cand.pitch, chord, cond, longest(y) if longest else None)
        allowed = feed_mm_min(cand.pitch, b.effective_mm, cond.band_speed_m_min)
        feed = cand.run.feed_set_mm_min if constant else allowed
        shown = cand.run.bite_mean_mm if constant else b.nominal_mm
        points.append(ProfilePoint(y, chord, allowed, feed, shown * 1000.0, b.limit))
    return tuple(points)


def _explanation(plan: Plan, cand: Candidate, cands: list[Candidate] | None) -> tuple[str, ...]:
    section = plan.section
    lines = [explain.why_chosen(cand, section) if cands else f"{cand.pitch.label} as given"]
    if cands:
        line = explain.neighbours(cand, cands, section)
        if line:
            lines.append(line)
    lines.append(say("{}; {}", cand.teeth.form_why, cand.teeth.set_why))
    lines.append(explain.speed_line(plan))
    lines.append(explain.feed_line(plan))
    if plan.calibration != 1.0:
        lines.append(explain.calibration_line(plan, cand))
    lines.extend(plan.notes)
    return tuple(lines)


def _result(plan: Plan, cand: Candidate, cands: list[Candidate] | None) -> CutResult:
    section, run, saw = plan.section, cand.run, plan.saw
    time = run.cut_time_min * plan.calibration
    return CutResult(
        material=plan.material.key,
        designation=plan.material.designation,
        section=section.label(),
        saw=saw.name,
        feed_type=saw.feed_type,
        chosen_by="recommended" if cands else "given",
        pitch_label=cand.pitch.label,
        tpi_coarse=cand.pitch.tpi_coarse,
        tpi_fine=cand.pitch.tpi_fine,
        tooth_form=cand.teeth.tooth_form,
        tooth_set=cand.teeth.tooth_set,
        blade_material=plan.blade_material,
        dry=plan.dry,
        band_speed_m_min=plan.speed.band_speed_m_min,
        band_speed_clipped=plan.speed.clipped,
        feed_mm_min=section.height_mm / time,
        # the shop's calibration slows every feed alike, the setting included
        feed_set_mm_min=run.feed_set_mm_min / plan.calibration,
        cut_time_min=time,
        cut_time_model_min=run.cut_time_min,
        calibration_factor=plan.calibration,
        area_mm2=section.area_mm2,
        height_mm=section.height_mm,
        max_chord_mm=section.max_chord_mm,
        mean_chord_mm=section.mean_chord_mm,
        min_wall_mm=section.min_wall_mm,
        teeth_in_thinnest=cand.teeth_thinnest,
        teeth_in_widest=cand.teeth_widest,
        governing_limit=run.governing_limit,
        limit_shares=run.limit_shares,
        rubbing_share=run.rubbing_share,
        bite_um=run.bite_mean_mm * 1000.0,
        rubbing_floor_um=plan.base.rubbing_floor_mm * 1000.0,
        kerf_mm=plan.base.kerf_mm,
        bending_stress_mpa=bending_stress_mpa(saw.blade_thickness_mm, saw.wheel_diameter_mm),
        flex_cycles_per_min=flex_cycles_per_min(
            plan.speed.band_speed_m_min, saw.blade_length_mm, saw.wheel_count
        ),
        warnings=tuple(explain.warnings(plan, cand)),
        explanation=_explanation(plan, cand, cands),
        profile=_profile(plan, cand),
        breakin=breakin_schedule(
            run.feed_set_mm_min / plan.calibration, section.area_mm2, plan.material.group
        ),
        caution=f"{CAUTION} {BREAKIN_CAUTION}",
        cutting_rate_mm2_min=section.area_mm2 / time,
    )


def recommend(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    *,
    dry: bool = False,
    blade_material: str = "bi-metal",
    calibration: float = 1.0,
) -> CutResult:
    """The fastest pitch within the tooth-count rules, with speed, feed and time."""
    plan = make_plan(
        material,
        section,
        saw,
        dry=dry,
        blade_material=blade_material,
        band_speed_m_min=None,
        calibration=calibration,
    )
    cands = [score(plan, p) for p in available(saw)]
    chosen = pick(cands, work_hardens=material.work_hardens, solid=section.is_solid)
    return _result(plan, chosen, cands)


def evaluate(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    pitch: Pitch | str,
    *,
    dry: bool = False,
    band_speed_m_min: float | None = None,
    blade_material: str = "bi-metal",
    calibration: float = 1.0,
) -> CutResult:
    """The cut with the blade already on the saw; the warnings say what goes wrong."""
    if isinstance(pitch, str):
        pitch = parse_pitch(pitch)
    plan = make_plan(
        material,
        section,
        saw,
        dry=dry,
        blade_material=blade_material,
        band_speed_m_min=band_speed_m_min,
        calibration=calibration,
    )
    return _result(plan, score(plan, pitch), None)


def compare(
    material: MaterialLike, section: SectionLike, saw: Saw, pitch: Pitch | str, **kw: Any
) -> Comparison:
    """The blade on the saw against the recommendation: a time ratio and one line."""
    chosen = evaluate(material, section, saw, pitch, **kw)
    rec_kw = {k: v for k, v in kw.items() if k != "band_speed_m_min"}
    recommended = recommend(material, section, saw, **rec_kw)
    ratio = chosen.cut_time_min / recommended.cut_time_min
    same_pitch = chosen.pitch_label == recommended.pitch_label
    if same_pitch and abs(ratio - 1) < 0.005:
        summary = f"{chosen.pitch_label} is the recommended pitch for this cut"
    else:
        problem = (
            chosen.warnings[0] if chosen.warnings else explain.SHORT_WHY[chosen.governing_limit]
        )
        summary = say(
            "{} takes {} the time of {} ({} against {}): {}",
            chosen.pitch_label,
            fmt_ratio(ratio),
            recommended.pitch_label,
            Q("time", chosen.cut_time_min),
            Q("time", recommended.cut_time_min),
            problem,
        )
    return Comparison(chosen, recommended, ratio, summary)
