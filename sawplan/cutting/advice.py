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
from sawplan.cutting.words import (
    Phrase,
    fmt_number,
    fmt_ratio,
    power,
    rate,
    say,
    share,
    speed,
    time,
)
from sawplan.cutting.words import bite as um
from sawplan.cutting.words import feed as feed_text
from sawplan.cutting.words import force as newton
from sawplan.cutting.words import length as mm


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
    lines: tuple[Phrase, ...]
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
    lines: list[Phrase] = []
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
        rec = say("{} recommended for this cut", speed(s.recommended_m_min))
        given = speed(s.band_speed_m_min)
        if side == "above":
            life = tl.life_ratio(s.off_ratio, exp.n)
            lines.append(
                say(
                    "band speed {} is {} the {} (more than {} % over): the teeth last {} in "
                    "minutes of cutting, {} ({}); expect dull teeth, heat and discoloured chips",
                    given,
                    fmt_ratio(s.off_ratio),
                    rec,
                    f"{band:g}",
                    _life_text(life),
                    wear_text(speed_wear),
                    taylor_note(exp),
                )  # fmt: skip
            )
        elif side == "below":
            lines.append(
                say(
                    "band speed {} is under the {} (more than {} % under): the cut takes {} as "
                    "long; {} ({})",
                    given,
                    rec,
                    f"{band:g}",
                    fmt_ratio(time_ratio),
                    wear_text(speed_wear),
                    taylor_note(exp),
                )  # fmt: skip
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
) -> list[Phrase]:
    run = fed.run
    out = []
    over = run.overload
    slowest = "" if not plan.saw.force_limited else " at the slowest depth"
    head = say(
        "down-feed {} is over the {}{} the model allows",
        feed_text(plan.set_feed_mm_min or 0.0), feed_text(model.run.feed_set_mm_min), slowest,
    )  # fmt: skip
    if over is not None:
        x = fmt_ratio(over.ratio)
        where = f"across {share(over.share)} of the cut"
        if over.limit == "material":
            out.append(
                say(
                    "{}: the bite reaches {} what {} takes {}: {} (extended Taylor relation "
                    "V·Tⁿ·fʸ = C, y = {}, n = {})",
                    head,
                    x,
                    plan.material.key,
                    where,
                    wear_text(feed_wear),
                    f"{tl.FEED_EXPONENT:g}",
                    f"{exp.n:g}",
                )  # fmt: skip
            )
        elif over.limit == "gullet":
            out.append(
                say(
                    "{}: chips overfill the gullets ({} their capacity) {}: they pack and strip "
                    "teeth; expect a crooked cut or a broken blade",
                    head,
                    x,
                    where,
                )  # fmt: skip
            )
        elif over.limit == "tooth":
            out.append(
                say(
                    "{}: the bite is {} what the teeth stand {}: teeth can break off",
                    head,
                    x,
                    where,
                )
            )
        elif over.limit == "power":
            out.append(
                say(
                    "{}: {} the motor's power {}: the band slows or stalls in the cut",
                    head,
                    x,
                    where,
                )
            )
        else:
            out.append(
                say("{}: {} is exceeded {}", head, LIMIT_WORDS.get(over.limit, over.limit), where)
            )
    forced = dict(run.limit_shares).get("force", 0.0)
    if forced > 0.05:
        out.append(
            say(
                "the head's force cannot push the set down-feed for {} of the cut time: there "
                "the feed falls to what {} allows",
                share(forced),
                newton(plan.saw.head_force_n or 0.0),
            )  # fmt: skip
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
            say("{} will not cut on {}: the head cannot load the teeth", which, plan_b.saw.name),
        )  # fmt: skip
    per = cand_b.time / pieces
    ratio = per / cand_s.time
    notable = K.number("choice", "notable_time_ratio")
    pitches = (
        ""
        if cand_b.pitch.same_teeth(cand_s.pitch)
        else f" ({cand_b.pitch.label} for the bundle, {label_s} for one piece)"
    )
    numbers = say(
        "{} per piece bundled against {} one at a time{}", time(per), time(cand_s.time), pitches
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
            say("bundling {}×{} saves time: {}: {}{}", rows, cols, numbers, why, stacked),
        )  # fmt: skip
    if ratio > notable:
        why = _why_bundle_slower(plan_b, cand_b, plan_s, cand_s, cols)
        return BundleVerdict(
            pieces, per, cand_s.time, label_s, ratio, "single",
            say("one at a time is faster than bundling {}×{}: {}: {}", rows, cols, numbers, why),
        )  # fmt: skip
    return BundleVerdict(
        pieces, per, cand_s.time, label_s, ratio, "same",
        say(
            "bundling {}×{} takes about the same saw time per piece, {}; it saves handling and "
            "clamping only",
            rows, cols, numbers,
        ),
    )  # fmt: skip


def _touching(plan_b: Plan, plan_s: Plan) -> bool:
    """Pieces that touch side by side make longer stretches of metal than one piece has."""
    longest_b = max(plan_b.quad.runs_mm or plan_b.quad.chords_mm, default=0.0)
    longest_s = max(plan_s.quad.runs_mm or plan_s.quad.chords_mm, default=0.0)
    return longest_b > longest_s * 1.01


def _rate(plan: Plan, cand: Candidate) -> Phrase:
    return rate(plan.section.area_mm2 / cand.time)


def _rates(plan: Plan, cand: Candidate, plan_s: Plan, cand_s: Candidate) -> Phrase:
    return say(
        "the saw removes {} against {} on one piece", _rate(plan, cand), _rate(plan_s, cand_s)
    )


def _why_bundle_faster(
    plan: Plan, cand: Candidate, plan_s: Plan, cand_s: Candidate, cols: int
) -> Phrase:
    limit = cand.run.governing_limit
    side = f"the {cols} pieces side by side share each pass of the head; " if cols > 1 else ""
    rates = _rates(plan, cand, plan_s, cand_s)
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
    return say("{}{}; {}", side, rates, held)


def _why_bundle_slower(
    plan_b: Plan, cand_b: Candidate, plan_s: Plan, cand_s: Candidate, cols: int
) -> Phrase:
    shares_b = dict(cand_b.run.limit_shares)
    saw = plan_b.saw
    rates = _rates(plan_b, cand_b, plan_s, cand_s)
    if shares_b.get("force", 0) > 0.3:
        return say(
            "{}: the head force ({}) is shared by the teeth across the whole {} chord, so each "
            "tooth bites less",
            rates, newton(saw.head_force_n or 0.0), mm(plan_b.section.max_chord_mm),
        )  # fmt: skip
    if shares_b.get("power", 0) > 0.3:
        return say(
            "{}: the motor's {} at the blade is spread over {} of metal in the chord instead "
            "of {}",
            rates, power(saw.cutting_power_w), mm(plan_b.section.max_chord_mm),
            mm(plan_s.section.max_chord_mm),
        )  # fmt: skip
    if cand_b.run.rubbing_share > cand_s.run.rubbing_share + 0.1 and _touching(plan_b, plan_s):
        return say(
            "{}: the pieces touch, so chips fill the gullets over longer stretches of metal "
            "and the bite falls under the {} rubbing floor across {} of the metal",
            rates, um(plan_b.base.rubbing_floor_mm), share(cand_b.run.rubbing_share),
        )  # fmt: skip
    if not saw.force_limited:
        return say(
            "{}: the down-feed is set for the bundle's widest chord ({}), slower than one "
            "piece needs",
            rates, mm(plan_b.section.max_chord_mm),
        )  # fmt: skip
    return say(
        "{}: {} holds the bundle's feed down", rates, LIMIT_WORDS[cand_b.run.governing_limit]
    )


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


def better_orientation_line(options: tuple[OrientationOption, ...]) -> Phrase | None:
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
    return say(
        "laid {}{} (--orient {}) with {}: {} the time and {} the blade wear per cut ({})",
        best.words, vee, best.orientation, best.pitch_label, fmt_ratio(best.time_ratio),
        fmt_ratio(best.wear_ratio), time(best.cut_time_min),
    )  # fmt: skip
