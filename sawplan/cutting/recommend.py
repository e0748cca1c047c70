"""Choose a blade pitch for a cut, or evaluate the blade already on the saw.

``recommend`` scores every catalogue pitch made in the saw's blade width and
picks one (``choice``); ``evaluate`` scores one given pitch, at a given band
speed and down-feed if the operator set them, and says what goes wrong;
``compare`` sets the two side by side.  Both also plan what a shop weighs
next: a bundle against single cuts, and the other ways to lay the work.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, replace
from typing import Any

from sawplan.cutting import advice, explain, warn
from sawplan.cutting import tool_life as tl
from sawplan.cutting.breakin import BREAKIN_CAUTION, breakin_schedule
from sawplan.cutting.choice import Choice, choose
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
    score,
)
from sawplan.cutting.result import CAUTION, Comparison, CutResult, ProfilePoint
from sawplan.cutting.words import Phrase, feed, fmt_ratio, say, speed, time
from sawplan.errors import BadDataError
from sawplan.saws import Saw

PROFILE_POINTS = 41


@dataclass(frozen=True)
class Setup:
    """What the operator chose besides the section: blade, speed, feed, coolant."""

    dry: bool = False
    blade_material: str = "bi-metal"
    band_speed_m_min: float | None = None
    feed_mm_min: float | None = None
    calibration: float = 1.0


@dataclass(frozen=True)
class Planned:
    """One planned cut before it becomes a result: the plan, every pitch scored, the pick."""

    plan: Plan
    cands: list[Candidate]
    choice: Choice
    shown: Candidate  # the chosen pitch, with the operator's down-feed if one was set


def _plan(
    material: MaterialLike, section: SectionLike, saw: Saw, setup: Setup, pitch: Pitch | None
) -> Planned:
    plan = make_plan(
        material,
        section,
        saw,
        dry=setup.dry,
        blade_material=setup.blade_material,
        band_speed_m_min=setup.band_speed_m_min,
        calibration=setup.calibration,
        set_feed_mm_min=setup.feed_mm_min,
    )
    cands = [score(plan, p, set_feed=False) for p in available(saw)]
    if pitch is None:
        choice = choose(plan, cands)
    else:
        same = [c for c in cands if c.pitch.same_teeth(pitch)]
        choice = Choice(same[0] if same else score(plan, pitch, set_feed=False), "given")
    shown = choice.chosen
    if setup.feed_mm_min is not None:
        shown = score(plan, shown.pitch)
    return Planned(plan, cands, choice, shown)


def _profile(plan: Plan, cand: Candidate) -> tuple[ProfilePoint, ...]:
    if cand.stalled:
        return ()
    cond = replace(plan.base, gullet_factor=cand.teeth.gullet_factor)
    height = plan.section.height_mm
    constant = not plan.saw.force_limited
    longest = getattr(plan.section, "longest_run_mm", None)
    points = []
    for k in range(PROFILE_POINTS):
        y = height * k / (PROFILE_POINTS - 1)
        chord = max(0.0, float(plan.section.chord_mm(y)))
        b = bite(cand.pitch, chord, cond, longest(y) if longest else None)
        allowed = feed_mm_min(cand.pitch, b.effective_mm, cond.band_speed_m_min)
        if plan.set_feed_mm_min is not None:
            feed = plan.set_feed_mm_min if constant else min(plan.set_feed_mm_min, allowed)
        else:
            feed = cand.run.feed_set_mm_min if constant else allowed
        shown = cand.run.bite_mean_mm if constant else b.nominal_mm
        points.append(ProfilePoint(y, chord, allowed, feed, shown * 1000.0, b.limit))
    return tuple(points)


def _explanation(planned: Planned, given: bool) -> tuple[str, ...]:
    plan, cand = planned.plan, planned.shown
    if given:
        lines = [f"{cand.pitch.label} as given"]
    else:
        lines = [explain.why_chosen(planned.choice, plan)]
        line = explain.neighbours(planned.choice, planned.cands, plan.section)
        if line:
            lines.append(line)
    lines.append(say("{}; {}", cand.teeth.form_why, cand.teeth.set_why))
    lines.append(explain.speed_line(plan))
    lines.append(explain.feed_line(plan, cand))
    if plan.calibration != 1.0 and not cand.stalled:
        lines.append(explain.calibration_line(plan, cand))
    lines.extend(plan.notes)
    return tuple(lines)


def _setting(plan: Plan, model_mm_min: float) -> float:
    """The down-feed to set: the operator's own when given, else the model's slowed by
    the shop's calibration (it slows every feed alike)."""
    if plan.set_feed_mm_min is not None:
        return plan.set_feed_mm_min
    return model_mm_min / plan.calibration


def _result(
    planned: Planned, *, given: bool, off: advice.OffSetting | None = None, **extra: Any
) -> CutResult:
    plan, cand = planned.plan, planned.shown
    section, run, saw = plan.section, cand.run, plan.saw
    stalled = cand.stalled
    time = None if stalled else run.cut_time_min * plan.calibration
    exp = tl.exponent_for(plan.blade_material)
    pieces = int(getattr(section, "pieces", 1))
    return CutResult(
        material=plan.material.key,
        designation=plan.material.designation,
        section=section.label(),
        saw=saw.name,
        feed_type=saw.feed_type,
        chosen_by="given" if given else "recommended",
        pitch_label=cand.pitch.label,
        tpi_coarse=cand.pitch.tpi_coarse,
        tpi_fine=cand.pitch.tpi_fine,
        tooth_form=cand.teeth.tooth_form,
        tooth_set=cand.teeth.tooth_set,
        blade_material=plan.blade_material,
        dry=plan.dry,
        band_speed_m_min=plan.speed.band_speed_m_min,
        band_speed_clipped=plan.speed.clipped,
        feed_mm_min=None if time is None else section.height_mm / time,
        # the shop's calibration slows every feed alike, the setting included
        feed_set_mm_min=None if stalled else _setting(plan, run.feed_set_mm_min),
        cut_time_min=time,
        cut_time_model_min=None if stalled else run.cut_time_min,
        calibration_factor=plan.calibration,
        area_mm2=section.area_mm2,
        height_mm=section.height_mm,
        max_chord_mm=section.max_chord_mm,
        mean_chord_mm=section.mean_chord_mm,
        min_wall_mm=section.min_wall_mm,
        thinnest_chord_mm=section.thinnest_chord_mm,
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
        warnings=tuple(
            warn.warnings(plan, cand, planned.cands, off.lines if off else (), given=given)
        ),
        explanation=_explanation(planned, given),
        profile=_profile(plan, cand),
        breakin=()
        if stalled
        else breakin_schedule(
            run.feed_set_mm_min / plan.calibration, section.area_mm2, plan.material.group
        ),
        caution=f"{CAUTION} {BREAKIN_CAUTION}",
        cutting_rate_mm2_min=None if time is None else section.area_mm2 / time,
        stalled=stalled,
        stall_reason=warn.stall_reason(plan, cand) if stalled else None,
        pieces=pieces,
        time_per_piece_min=None if time is None else time / pieces,
        band_speed_recommended_m_min=plan.speed.recommended_m_min,
        wear_ratio=off.wear_ratio if off else None,
        feed_wear_factor=off.feed_factor if off else 1.0,
        taylor_n=exp.n,
        taylor_source=exp.source,
        feed_given=plan.set_feed_mm_min is not None,
        **extra,
    )


def _off(
    material: MaterialLike, section: SectionLike, saw: Saw, setup: Setup, planned: Planned
) -> advice.OffSetting | None:
    """Blade wear and warnings of a given speed or feed against the recommendation."""
    if setup.band_speed_m_min is None and setup.feed_mm_min is None:
        return None
    pitch = planned.choice.chosen.pitch
    ref = None
    if setup.band_speed_m_min is not None:
        base = replace(setup, band_speed_m_min=None, feed_mm_min=None)
        ref = _plan(material, section, saw, base, pitch).choice.chosen
    with_feed = planned.shown if setup.feed_mm_min is not None else None
    return advice.off_recommendation(planned.plan, planned.choice.chosen, ref, with_feed)


def _bundle(
    material: MaterialLike, section: SectionLike, saw: Saw, setup: Setup, planned: Planned,
    pitch: Pitch | None,
) -> dict[str, Any]:  # fmt: skip
    rows, cols = getattr(section, "bundle_rows", 1), getattr(section, "bundle_cols", 1)
    if rows * cols <= 1:
        return {}
    single_section = dataclasses.replace(section, bundle_rows=1, bundle_cols=1, nested=False)
    single = _plan(material, single_section, saw, setup, pitch)
    verdict = advice.bundle_verdict(
        planned.plan, planned.shown, single.plan, single.shown, rows=rows, cols=cols
    )
    return {"bundle": verdict}


def _orientations(
    material: MaterialLike, section: SectionLike, saw: Saw, setup: Setup, planned: Planned,
    pitch: Pitch | None,
) -> dict[str, Any]:  # fmt: skip
    from sawplan.sections import SHAPES, orientation_words

    shape = getattr(section, "shape", None)
    if shape not in SHAPES or len(SHAPES[shape].orientations) < 2:
        return {}
    options = []
    bundled = getattr(section, "pieces", 1) > 1
    for name in SHAPES[shape].orientations:
        if name == section.orientation or (bundled and name == "corner"):
            continue  # a bundle cannot be clamped standing on its corners
        turned = dataclasses.replace(section, orientation=name)
        try:
            other = _plan(material, turned, saw, setup, pitch)
        except BadDataError:  # does not fit the saw turned this way
            continue
        options.append(
            advice.orientation_option(
                name,
                orientation_words(shape, name),
                other.shown,
                other.plan,
                planned.shown,
                planned.plan,
            )  # fmt: skip
        )
    options_t = tuple(options)
    return {
        "orientations": options_t,
        "better_orientation": advice.better_orientation_line(options_t),
    }


def _full(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    setup: Setup,
    pitch: Pitch | None,
    *,
    extras: bool,
) -> CutResult:
    planned = _plan(material, section, saw, setup, pitch)
    off = _off(material, section, saw, setup, planned)
    more: dict[str, Any] = {}
    if extras:
        more.update(_bundle(material, section, saw, setup, planned, pitch))
        more.update(_orientations(material, section, saw, setup, planned, pitch))
    return _result(planned, given=pitch is not None, off=off, **more)


def recommend(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    *,
    dry: bool = False,
    blade_material: str = "bi-metal",
    calibration: float = 1.0,
    band_speed_m_min: float | None = None,
    feed_mm_min: float | None = None,
    extras: bool = True,
) -> CutResult:
    """The pitch to fit, with speed, feed and time (and, with ``extras``, bundle and orientations).

    A given band speed or down-feed is planned as the operator set it, with
    its consequence for blade wear; ``extras`` off skips the bundle and
    orientation comparisons (a cut list plans many sections).
    """
    setup = Setup(dry, blade_material, band_speed_m_min, feed_mm_min, calibration)
    return _full(material, section, saw, setup, None, extras=extras)


def evaluate(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    pitch: Pitch | str,
    *,
    dry: bool = False,
    band_speed_m_min: float | None = None,
    feed_mm_min: float | None = None,
    blade_material: str = "bi-metal",
    calibration: float = 1.0,
    extras: bool = False,
) -> CutResult:
    """The cut with the blade already on the saw; the warnings say what goes wrong."""
    if isinstance(pitch, str):
        pitch = parse_pitch(pitch)
    setup = Setup(dry, blade_material, band_speed_m_min, feed_mm_min, calibration)
    return _full(material, section, saw, setup, pitch, extras=extras)


def cut_time_min(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    pitch: Pitch | str,
    *,
    dry: bool = False,
    band_speed_m_min: float | None = None,
    blade_material: str = "bi-metal",
    calibration: float = 1.0,
) -> float | None:
    """Only the time of one cut with one pitch (calibrated), None when it will not cut.

    What ``evaluate(...).cut_time_min`` gives, without the explanation, the
    other pitches and the comparisons: for callers that time a cut at many
    band speeds (the cost-per-cut curve).
    """
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
    cand = score(plan, pitch, set_feed=False)
    return None if cand.stalled else cand.time * plan.calibration


def _describe(r: CutResult, *, at_speed: bool, with_feed: bool) -> Phrase:
    text = say("{}", r.pitch_label)
    if at_speed:
        text = say("{} at {}", text, speed(r.band_speed_m_min))
    if with_feed and r.feed_given and r.feed_set_mm_min is not None:
        text = say("{} with {} down-feed", text, feed(r.feed_set_mm_min))
    return text


def compare(
    material: MaterialLike,
    section: SectionLike,
    saw: Saw,
    pitch: Pitch | str | None,
    **kw: Any,
) -> Comparison:
    """The cut as the operator set it against the recommendation: a time ratio and one line.

    ``pitch`` None with a band speed or down-feed in ``kw`` compares the
    recommended pitch at those settings with the full recommendation.
    """
    if pitch is None:
        chosen = recommend(material, section, saw, **kw)
    else:
        chosen = evaluate(material, section, saw, pitch, extras=True, **kw)
    rec_kw = {k: v for k, v in kw.items() if k not in ("band_speed_m_min", "feed_mm_min")}
    recommended = recommend(material, section, saw, extras=False, **rec_kw)
    return Comparison(chosen, recommended, *_summary(chosen, recommended))


def _summary(chosen: CutResult, rec: CutResult) -> tuple[float | None, Phrase, float | None]:
    at_speed = abs(chosen.band_speed_m_min - rec.band_speed_m_min) > 1e-9
    with_feed = chosen.feed_given
    c_text = _describe(chosen, at_speed=at_speed, with_feed=with_feed)
    r_text = _describe(rec, at_speed=at_speed, with_feed=False)
    if chosen.cut_time_min is None:
        if rec.cut_time_min is None:
            return None, say("{} will not cut on {}, nor will any pitch", c_text, chosen.saw), None
        return (
            None,
            say(
                "{} will not cut on {}: the head force cannot load its teeth; {} takes {}",
                c_text,
                chosen.saw,
                r_text,
                time(rec.cut_time_min),
            ),  # fmt: skip
            None,
        )
    if rec.cut_time_min is None:
        return None, say("{} will not cut on {}; {} does", r_text, chosen.saw, c_text), None
    ratio = chosen.cut_time_min / rec.cut_time_min
    wear = None
    if at_speed or with_feed:
        exp = tl.exponent_for(chosen.blade_material)
        speed_ratio = chosen.band_speed_m_min / rec.band_speed_m_min
        wear = tl.wear_per_cut_ratio(speed_ratio, ratio, exp.n) * chosen.feed_wear_factor
    same_pitch = chosen.pitch_label == rec.pitch_label
    if same_pitch and abs(ratio - 1) < 0.005 and not (at_speed or with_feed):
        return ratio, say("{} is the recommended pitch for this cut", chosen.pitch_label), wear
    times = say(
        "{} takes {} the time of {} ({} against {})",
        c_text, fmt_ratio(ratio), r_text, time(chosen.cut_time_min), time(rec.cut_time_min),
    )  # fmt: skip
    if ratio < 0.995 and wear is not None and wear > 1.05:
        exp = tl.exponent_for(chosen.blade_material)
        note = advice.taylor_note(exp, feed=with_feed)
        return ratio, say("{}: faster, but {} ({})", times, advice.wear_text(wear), note), wear
    if ratio < 0.995:
        why = chosen.warnings[0] if chosen.warnings else "both are within the rules"
        return ratio, say("{}: faster, but {}", times, why), wear
    if with_feed and chosen.governing_limit == "set" and not chosen.warnings:
        model = rec.feed_set_mm_min or 0.0
        problem = say("slower: the down-feed is set under what the model allows ({})", feed(model))
    else:
        problem = (
            chosen.warnings[0] if chosen.warnings else explain.SHORT_WHY[chosen.governing_limit]
        )
    return ratio, say("{}: {}", times, problem), wear
