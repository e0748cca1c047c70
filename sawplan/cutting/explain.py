"""Plain-language lines for a planned cut: why this pitch, what its neighbours would do.

Kept apart from the physics so the wording can change without touching it.
Warnings are in ``warnings``; bundles, orientations and off-recommendation
speeds and feeds in ``advice``.
"""

from __future__ import annotations

from sawplan.cutting import constants as K
from sawplan.cutting.choice import Choice, beyond_window, pool
from sawplan.cutting.plan import Candidate, Plan, SectionLike, single_solid
from sawplan.cutting.words import (
    Phrase,
    change,
    feed,
    fmt_ratio,
    join,
    say,
    share,
    speed,
    time,
    width,
)
from sawplan.cutting.words import length as mm

LIMIT_WORDS = {
    "material": "the material's bite",
    "gullet": "gullet capacity",
    "tooth": "tooth strength",
    "power": "motor power",
    "force": "head force",
    "set": "the down-feed as set",
}
SHORT_WHY = {
    "gullet": "gullets full",
    "material": "bite held by the material",
    "power": "motor-limited",
    "force": "head force spread over the teeth",
    "tooth": "tooth strength",
    "set": "the down-feed as set",
}


def thinnest_text(section: SectionLike) -> Phrase:
    """Where the three-tooth rule is read, in words."""
    if single_solid(section):
        return say("the {} widest chord", mm(section.max_chord_mm))
    return say("the {} of metal at the thinnest depth", mm(section.thinnest_chord_mm))


def ratio_text(ratio: float) -> str:
    """'1.4× slower', 'about as fast', 'over ten times faster'."""
    if ratio >= 1.05:
        return f"{fmt_ratio(ratio)} slower"
    if ratio > 1 / 1.05:
        return "about as fast"
    return f"{fmt_ratio(1 / ratio)} faster"


def teeth_text(cand: Candidate, section: SectionLike) -> Phrase:
    if single_solid(section):
        teeth = f"{cand.teeth_thinnest:.1f}" if cand.too_few else f"{cand.teeth_widest:.0f}"
        return say("{} teeth in the {} widest chord", teeth, mm(section.max_chord_mm))
    return say("{} teeth over {}", f"{cand.teeth_thinnest:.1f}", thinnest_text(section))


def limit_text(cand: Candidate) -> str:
    run = cand.run
    part = dict(run.limit_shares).get(run.governing_limit, 0.0)
    return f"{LIMIT_WORDS[run.governing_limit]} sets the feed for {share(part)} of the cut"


def why_chosen(choice: Choice, plan: Plan) -> Phrase:
    """The first 'Why' line of a recommendation."""
    cand, section = choice.chosen, plan.section
    label, teeth = cand.pitch.label, teeth_text(cand, section)
    if cand.stalled:
        return say("{}: the coarsest pitch, and the head still cannot load its teeth", label)
    limit = limit_text(cand)
    chart = choice.chart
    avg = say("the {} average width of cut", width(choice.width_of_cut_mm or 0.0))
    if choice.how == "fastest":
        if cand.allowed:
            return say("{} cuts fastest within the tooth-count rules ({}); {}", label, teeth, limit)
        if cand.too_few:
            return say("{}: the finest pitch, still only {}; {}", label, teeth, limit)
        return say("{}: the coarsest pitch, {}; {}", label, teeth, limit)
    assert chart is not None
    if choice.how == "chart":
        return say(
            "{}: the pitch for {} (metal area ÷ blade travel, as the trade reads tube, sections "
            "and bundles), {}; {}",
            label, avg, teeth, limit,
        )  # fmt: skip
    if choice.how == "near-chart":
        side = "finer" if cand.pitch.tpi_mean > chart.pitch.tpi_mean else "coarser"
        return say(
            "{}: one step {} than the {} read off {} (metal area ÷ blade travel), and faster "
            "here; {}; {}",
            label, side, chart.pitch.label, avg, teeth, limit,
        )  # fmt: skip
    if choice.how == "finer-for-teeth":
        return say(
            "{}: {} reads off {} but leaves {} teeth over {}; {} keeps {}; {}",
            label, chart.pitch.label, avg, f"{chart.teeth_thinnest:.1f}", thinnest_text(section),
            label, f"{cand.teeth_thinnest:.1f}", limit,
        )  # fmt: skip
    if choice.how == "coarser-for-rubbing":
        return say(
            "{}: coarser than the {} read off {}, whose bite sits under the rubbing floor "
            "across {} of the metal; {}; {}",
            label, chart.pitch.label, avg, share(chart.run.rubbing_share), teeth, limit,
        )  # fmt: skip
    if choice.how == "thin-walls":
        return say(
            "{}: the finest pitch made for this blade; no pitch keeps 3 teeth over {} ({} "
            "here); {}",
            label, thinnest_text(section), f"{cand.teeth_thinnest:.1f}", limit,
        )  # fmt: skip
    return say(
        "{}: the pitch nearest the {} read off {} that keeps 3 teeth and bites above the "
        "rubbing floor, {}; {}",
        label, chart.pitch.label, avg, teeth, limit,
    )  # fmt: skip


def neighbour_line(
    side: str, cand: Candidate, chosen: Candidate, section: SectionLike, far: str = ""
) -> Phrase | str:
    label = f"{side} {cand.pitch.label}"
    if cand.stalled:
        return f"{label}: will not cut (the head cannot load its teeth)"
    if cand.too_few:
        return say(
            "{}: only {} teeth over {}", label, f"{cand.teeth_thinnest:.1f}", thinnest_text(section)
        )
    if cand.too_many:
        most = K.number("bite", "max_teeth_widest_chord")
        return say(
            "{}: {} teeth in the {} widest chord (over about {})",
            label, f"{cand.teeth_widest:.0f}", mm(section.max_chord_mm), f"{most:.0f}",
        )  # fmt: skip
    why = SHORT_WHY[cand.run.governing_limit]
    if cand.run.governing_limit == "material" and side == "coarser":
        why += ", wider tooth spacing"
    if cand.rubs_most:
        why += f", teeth rub across {share(cand.run.rubbing_share)} of the metal"
    elif cand.run.rubbing_share > 0.05:
        why += ", teeth rub"
    if chosen.stalled:
        return f"{label}: {why}"
    ratio = cand.time / chosen.time
    return f"{label}: {why}, {ratio_text(ratio)}{far if ratio < 1 else ''}"


def neighbours(choice: Choice, cands: list[Candidate], section: SectionLike) -> Phrase | None:
    """What the next finer and next coarser pitch of the same family would do."""
    chosen = choice.chosen
    solid = single_solid(section)
    family = [c for c in pool(cands, solid=solid) if c.pitch.kind == chosen.pitch.kind]
    if not any(c.pitch.same_teeth(chosen.pitch) for c in family):
        family = cands
    ordered = sorted(family, key=lambda c: (c.pitch.tpi_mean, c.pitch.tpi_coarse))
    i = next(k for k, c in enumerate(ordered) if c.pitch.same_teeth(chosen.pitch))
    parts = []
    for side, k in (("finer", i + 1), ("coarser", i - 1)):
        if not 0 <= k < len(ordered):
            continue
        cand = ordered[k]
        far = ""
        if choice.chart is not None and beyond_window(choice, cand, cands):
            far = f", but more than a step from the {choice.chart.pitch.label} the trade reads here"
        parts.append(neighbour_line(side, cand, chosen, section, far))
    return join("; ", parts) if parts else None


def speed_line(plan: Plan) -> Phrase:
    s = plan.speed
    if s.given:
        return say(
            "band speed {} as given (recommended {})",
            speed(s.band_speed_m_min),
            speed(s.recommended_m_min),
        )
    parts: list[Phrase | str] = [say("{} for {}", speed(s.base_m_min), plan.material.key)]
    if abs(s.width_factor - 1) > 0.005:
        parts.append(
            say(
                "{} for a {} mean width of cut",
                change(s.width_factor - 1),
                width(s.width_of_cut_mm),
            )
        )
    if s.blade_factor != 1:
        parts.append(f"{change(s.blade_factor - 1)} {plan.blade_material} blade")
    if s.coolant_factor != 1:
        parts.append(f"{change(s.coolant_factor - 1)} dry")
    if s.clipped:
        parts.append(f"held to the saw's {'highest' if s.clipped == 'max' else 'lowest'} speed")
    return say("band speed {}: {}", speed(s.band_speed_m_min), join(", ", parts))


def feed_line(plan: Plan, cand: Candidate) -> Phrase | str:
    """Why the down-feed on the card is what it is; the card's Down-feed line alone
    carries the setting (and a gravity head's average), so this line repeats neither."""
    if cand.stalled:
        return f"{plan.saw.feed_type} feed: the head cannot load the teeth, so it does not advance"
    if plan.set_feed_mm_min is not None:
        if plan.saw.force_limited:
            return (
                f"down-feed as given; the {plan.saw.feed_type} head holds it where its force "
                "allows and slows where it does not"
            )
        return "down-feed as given"
    if plan.saw.force_limited:
        return (
            f"{plan.saw.feed_type} feed follows the chord: the head slows where the chord is "
            "widest and speeds up where it narrows"
        )
    return "the down-feed above is what the slowest depth allows, so it is safe at the widest chord"


def calibration_line(plan: Plan, cand: Candidate) -> Phrase:
    """The shop's time factor, with the model's own time and down-feed before it."""
    own = plan.saw.force_limited or plan.set_feed_mm_min is not None  # no model feed to name
    model_feed = "" if own else say(", {} down-feed", feed(cand.run.feed_set_mm_min))
    return say(
        "time × {} shop calibration (model {}{})",
        f"{plan.calibration:.2f}",
        time(cand.time),
        model_feed,
    )
