"""Consequences a shop weighs: blade wear off the recommended speed or feed, bundles
against single cuts, and a better way to lay the work in the vise.

The numbers come from ``recommend`` (each alternative is planned in full);
this module turns them into ratios and lines.  Blade wear per cut follows
Taylor's tool-life relation V·Tⁿ = C and its extension with the feed per
tooth, V·Tⁿ·fʸ = C (``tool_life``).
"""

from __future__ import annotations

from dataclasses import dataclass

from sawplan.cutting import constants as K
from sawplan.cutting import tool_life as tl
from sawplan.cutting.explain import LIMIT_WORDS
from sawplan.cutting.plan import Candidate, Plan
from sawplan.cutting.result import BundleVerdict, OrientationOption
from sawplan.cutting.words import bite as um
from sawplan.cutting.words import feed as feed_text
from sawplan.cutting.words import force as newton
from sawplan.cutting.words import length as mm
from sawplan.cutting.words import power, rate, share, speed
from sawplan.units import fmt_duration, fmt_number, fmt_ratio


def wear_text(ratio: float) -> str:
    """'about 3.5× the blade wear per cut', 'over ten times …', 'about 1/60 of …'."""
    if ratio > 10:
        return "over ten times the blade wear per cut"
    if ratio < 0.1:
        return f"about 1/{fmt_number(1.0 / ratio, 2)} of the blade wear per cut"
    return f"about {fmt_ratio(ratio)} the blade wear per cut"


def taylor_note(exp: tl.TaylorExponent, *, feed: bool = False) -> str:
    tool = exp.tool.split(" (")[0]
    if feed:
        return (
            f"Taylor's relation with feed, V·Tⁿ·fʸ = C, n = {exp.n:g} for {tool} teeth, "
            f"y = {tl.FEED_EXPONENT:g}"
        )
    return f"Taylor's relation V·Tⁿ = C, n = {exp.n:g} for {tool} teeth"


def _life_text(life: float) -> str:
    if life < 0.1:
        return f"about 1/{fmt_number(1.0 / life, 3)} as long"
    return f"about {fmt_ratio(life)} as long"


@dataclass(frozen=True)
class OffSetting:
    """Blade wear of a given speed and feed against the recommendation, and the warnings."""

    wear_ratio: float | None
    lines: tuple[str, ...]
    feed_factor: float = 1.0  # (set bite ÷ model bite)^(y/n): the feed's part of the wear


def off_recommendation(
    plan: Plan,
    at_given: Candidate,
    at_recommended_speed: Candidate | None,
    with_set_feed: Candidate | None,
) -> OffSetting:
    """Warnings for a band speed outside the recommended band and a down-feed over the model.

    ``at_given`` is the pitch at the given speed with the model's feed;
    ``at_recommended_speed`` the same pitch at the recommended speed;
    ``with_set_feed`` the pitch at the given speed with the operator's feed.
    """
    exp = tl.exponent_for(plan.blade_material)
    lines: list[str] = []
    wear = 1.0
    feed_factor = 1.0
    known = False
    s = plan.speed
    ref = at_recommended_speed
    if s.given and ref is not None and not ref.stalled and not at_given.stalled:
        known = True
        time_ratio = at_given.time / ref.time
        speed_wear = tl.wear_per_cut_ratio(s.off_ratio, time_ratio, exp.n)
        wear *= speed_wear
        side = s.outside_band()
        band = K.number("speed", "recommended_band_percent")
        rec = f"{speed(s.recommended_m_min)} recommended for this cut"
        given = speed(s.band_speed_m_min)
        if side == "above":
            life = tl.life_ratio(s.off_ratio, exp.n)
            lines.append(
                f"band speed {given} is {fmt_ratio(s.off_ratio)} the {rec} (more than {band:g} % "
                f"over): the teeth last {_life_text(life)} in minutes of cutting, "
                f"{wear_text(speed_wear)} ({taylor_note(exp)}); expect dull teeth, heat and "
                "discoloured chips"
            )
        elif side == "below":
            lines.append(
                f"band speed {given} is under the {rec} (more than {band:g} % under): the cut takes "
                f"{fmt_ratio(time_ratio)} as long; {wear_text(speed_wear)} "
                f"({taylor_note(exp)})"
            )
    if with_set_feed is not None and not with_set_feed.stalled and not at_given.stalled:
        known = True
        run = with_set_feed.run
        bite_ratio = run.bite_mean_mm / at_given.run.bite_mean_mm
        time_ratio = with_set_feed.time / at_given.time
        feed_wear = tl.feed_wear_per_cut_ratio(bite_ratio, time_ratio, exp.n)
        feed_factor = 1.0 / tl.feed_life_ratio(bite_ratio, exp.n)
        wear *= feed_wear
        lines += _feed_lines(plan, with_set_feed, at_given, feed_wear, exp)
    return OffSetting(wear if known else None, tuple(lines), feed_factor)


def _feed_lines(
    plan: Plan, fed: Candidate, model: Candidate, feed_wear: float, exp: tl.TaylorExponent
) -> list[str]:
    run = fed.run
    out = []
    over = run.overload
    slowest = "" if not plan.saw.force_limited else " at the slowest depth"
    allowed = f"{feed_text(model.run.feed_set_mm_min)}{slowest}"
    head = (
        f"down-feed {feed_text(plan.set_feed_mm_min or 0.0)} is over the {allowed} the model allows"
    )
    if over is not None:
        x = fmt_ratio(over.ratio)
        where = f"across {share(over.share)} of the cut"
        if over.limit == "material":
            out.append(
                f"{head}: the bite reaches {x} what {plan.material.key} takes {where}: "
                f"{wear_text(feed_wear)} (extended Taylor relation V·Tⁿ·fʸ = C, y = "
                f"{tl.FEED_EXPONENT:g}, n = {exp.n:g})"
            )
        elif over.limit == "gullet":
            out.append(
                f"{head}: chips overfill the gullets ({x} their capacity) {where}: they pack "
                "and strip teeth; expect a crooked cut or a broken blade"
            )
        elif over.limit == "tooth":
            out.append(f"{head}: the bite is {x} what the teeth stand {where}: teeth can break off")
        elif over.limit == "power":
            out.append(
                f"{head}: {x} the motor's power {where}: the band slows or stalls in the cut"
            )
        else:
            out.append(f"{head}: {LIMIT_WORDS.get(over.limit, over.limit)} is exceeded {where}")
    forced = dict(run.limit_shares).get("force", 0.0)
    if forced > 0.05:
        out.append(
            f"the head's force cannot push the set down-feed for {share(forced)} of the cut "
            f"time: there the feed falls to what {newton(plan.saw.head_force_n or 0.0)} allows"
        )
    return out


# --- bundles ---------------------------------------------------------------------------------


def bundle_verdict(
    plan_b: Plan, cand_b: Candidate, plan_s: Plan, cand_s: Candidate, *, rows: int, cols: int
) -> BundleVerdict:
    """Per-piece time of a rows × cols bundle against one piece alone, and the governing reason."""
    pieces = rows * cols
    label_s = cand_s.pitch.label
    if cand_b.stalled or cand_s.stalled:
        which = "the bundle" if cand_b.stalled else "one piece alone"
        return BundleVerdict(
            pieces, None if cand_b.stalled else cand_b.time / pieces,
            None if cand_s.stalled else cand_s.time, label_s, None,
            "single" if cand_b.stalled and not cand_s.stalled else "neither",
            f"{which} will not cut on {plan_b.saw.name}: the head cannot load the teeth",
        )  # fmt: skip
    per = cand_b.time / pieces
    ratio = per / cand_s.time
    notable = K.number("choice", "notable_time_ratio")
    pitches = (
        ""
        if cand_b.pitch.same_teeth(cand_s.pitch)
        else f" ({cand_b.pitch.label} for the bundle, {label_s} for one piece)"
    )
    numbers = (
        f"{fmt_duration(per)} per piece bundled against {fmt_duration(cand_s.time)} one at a "
        f"time{pitches}"
    )
    stacked = (
        f"; the {rows} rows are cut one after another, so stacking saves handling, not saw time"
        if rows > 1
        else ""
    )
    if ratio < 1 / notable:
        why = _why_bundle_faster(plan_b, cand_b, plan_s, cand_s, cols)
        return BundleVerdict(
            pieces, per, cand_s.time, label_s, ratio, "bundle",
            f"bundling {rows}×{cols} saves time: {numbers}: {why}{stacked}",
        )  # fmt: skip
    if ratio > notable:
        why = _why_bundle_slower(plan_b, cand_b, plan_s, cand_s, cols)
        return BundleVerdict(
            pieces, per, cand_s.time, label_s, ratio, "single",
            f"one at a time is faster than bundling {rows}×{cols}: {numbers}: {why}",
        )  # fmt: skip
    return BundleVerdict(
        pieces, per, cand_s.time, label_s, ratio, "same",
        f"bundling {rows}×{cols} takes about the same saw time per piece ({numbers}); "
        "it saves handling and clamping only",
    )  # fmt: skip


def _touching(plan_b: Plan, plan_s: Plan) -> bool:
    """Pieces that touch side by side make longer stretches of metal than one piece has."""
    longest_b = max(plan_b.quad.runs_mm or plan_b.quad.chords_mm, default=0.0)
    longest_s = max(plan_s.quad.runs_mm or plan_s.quad.chords_mm, default=0.0)
    return longest_b > longest_s * 1.01


def _rate(plan: Plan, cand: Candidate) -> str:
    return rate(plan.section.area_mm2 / cand.time)


def _why_bundle_faster(
    plan: Plan, cand: Candidate, plan_s: Plan, cand_s: Candidate, cols: int
) -> str:
    limit = cand.run.governing_limit
    side = f"the {cols} pieces side by side share each pass of the head; " if cols > 1 else ""
    rates = f"the saw removes {_rate(plan, cand)} against {_rate(plan_s, cand_s)} on one piece"
    if limit == "gullet" and _touching(plan, plan_s):
        held = "the gullets fill over the stretches where the pieces touch"
    elif limit == "gullet":
        held = "the gullets fill over one piece at a time and empty in the gaps"
    elif limit == "material":
        held = "each tooth still takes the bite the material allows"
    elif limit == cand_s.run.governing_limit:
        held = f"{LIMIT_WORDS[limit]} sets the feed of both"
    else:
        held = f"{LIMIT_WORDS[limit]} now sets the feed, where one piece leaves it unused"
    return f"{side}{rates}; {held}"


def _why_bundle_slower(
    plan_b: Plan, cand_b: Candidate, plan_s: Plan, cand_s: Candidate, cols: int
) -> str:
    shares_b = dict(cand_b.run.limit_shares)
    saw = plan_b.saw
    rates = f"the saw removes {_rate(plan_b, cand_b)} against {_rate(plan_s, cand_s)} on one piece"
    if shares_b.get("force", 0) > 0.3:
        return (
            f"{rates}: the head force ({newton(saw.head_force_n or 0.0)}) is shared by the teeth across "
            f"the whole {mm(plan_b.section.max_chord_mm)} chord, so each tooth bites less"
        )
    if shares_b.get("power", 0) > 0.3:
        return (
            f"{rates}: the motor's {power(saw.cutting_power_w)} at the blade is spread over "
            f"{mm(plan_b.section.max_chord_mm)} of metal in the chord instead of "
            f"{mm(plan_s.section.max_chord_mm)}"
        )
    if cand_b.run.rubbing_share > cand_s.run.rubbing_share + 0.1 and _touching(plan_b, plan_s):
        return (
            f"{rates}: the pieces touch, so chips fill the gullets over longer stretches of "
            f"metal and the bite falls under the {um(plan_b.base.rubbing_floor_mm)} rubbing "
            f"floor across {share(cand_b.run.rubbing_share)} of the metal"
        )
    if not saw.force_limited:
        return (
            f"{rates}: the down-feed is set for the bundle's widest chord "
            f"({mm(plan_b.section.max_chord_mm)}), slower than one piece needs"
        )
    return f"{rates}: {LIMIT_WORDS[cand_b.run.governing_limit]} holds the bundle's feed down"


# --- orientation -----------------------------------------------------------------------------


def orientation_option(
    orientation: str,
    words: str,
    cand: Candidate,
    plan: Plan,
    current: Candidate,
    current_plan: Plan,
) -> OrientationOption:
    """The same cut turned another way: time and blade wear against the cut as planned."""
    time_ratio = wear_ratio = None
    if not cand.stalled and not current.stalled:
        time_ratio = cand.time / current.time
        n = tl.exponent_for(plan.blade_material).n
        speed_ratio = plan.speed.band_speed_m_min / current_plan.speed.band_speed_m_min
        wear_ratio = tl.wear_per_cut_ratio(speed_ratio, time_ratio, n)
    return OrientationOption(
        orientation=orientation,
        words=words,
        pitch_label=cand.pitch.label,
        cut_time_min=None if cand.stalled else cand.time * plan.calibration,
        band_speed_m_min=plan.speed.band_speed_m_min,
        time_ratio=time_ratio,
        wear_ratio=wear_ratio,
    )


def better_orientation_line(options: tuple[OrientationOption, ...]) -> str | None:
    """Name the best other orientation when it saves time or blade by a notable margin."""
    notable = K.number("choice", "notable_time_ratio")
    useful = [
        o
        for o in options
        if o.time_ratio is not None
        and o.wear_ratio is not None
        and (o.time_ratio < 1 / notable or o.wear_ratio < 1 / notable)
        and o.time_ratio <= 1.0
    ]
    if not useful:
        return None
    best = min(useful, key=lambda o: (o.time_ratio or 0.0, o.wear_ratio or 0.0))
    assert best.time_ratio is not None and best.wear_ratio is not None
    vee = " in a vee block" if best.orientation == "corner" else ""
    return (
        f"laid {best.words}{vee} (--orient {best.orientation}) with {best.pitch_label}: "
        f"{fmt_ratio(best.time_ratio)} the time and {fmt_ratio(best.wear_ratio)} the blade "
        f"wear per cut ({fmt_duration(best.cut_time_min)})"
    )
