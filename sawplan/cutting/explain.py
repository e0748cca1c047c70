"""Plain-language lines for a planned cut: why this pitch, what its neighbours would do.

Kept apart from the physics so the wording can change without touching it.
Warnings are in ``warnings``; bundles, orientations and off-recommendation
speeds and feeds in ``advice``.
"""

from __future__ import annotations

from sawplan.cutting import constants as K
from sawplan.cutting.choice import Choice, beyond_window, pool
from sawplan.cutting.plan import Candidate, Plan, SectionLike, single_solid
from sawplan.cutting.words import feed, share, speed
from sawplan.cutting.words import length as mm
from sawplan.units import fmt_ratio

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


def thinnest_text(section: SectionLike) -> str:
    """Where the three-tooth rule is read, in words."""
    if single_solid(section):
        return f"the {mm(section.max_chord_mm)} widest chord"
    return f"the {mm(section.thinnest_chord_mm)} of metal at the thinnest depth"


def ratio_text(ratio: float) -> str:
    """'1.4× slower', 'about as fast', 'over ten times faster'."""
    if ratio >= 1.05:
        return f"{fmt_ratio(ratio)} slower"
    if ratio > 1 / 1.05:
        return "about as fast"
    return f"{fmt_ratio(1 / ratio)} faster"


def teeth_text(cand: Candidate, section: SectionLike) -> str:
    if single_solid(section):
        teeth = f"{cand.teeth_thinnest:.1f}" if cand.too_few else f"{cand.teeth_widest:.0f}"
        return f"{teeth} teeth in the {mm(section.max_chord_mm)} widest chord"
    return f"{cand.teeth_thinnest:.1f} teeth over {thinnest_text(section)}"


def limit_text(cand: Candidate) -> str:
    run = cand.run
    part = dict(run.limit_shares).get(run.governing_limit, 0.0)
    return f"{LIMIT_WORDS[run.governing_limit]} sets the feed for {share(part)} of the cut"


def why_chosen(choice: Choice, plan: Plan) -> str:
    """The first 'Why' line of a recommendation."""
    cand, section = choice.chosen, plan.section
    label, teeth = cand.pitch.label, teeth_text(cand, section)
    if cand.stalled:
        return f"{label}: the coarsest pitch, and the head still cannot load its teeth"
    limit = limit_text(cand)
    chart = choice.chart
    width = f"the {mm(choice.width_of_cut_mm or 0.0)} average width of cut"
    if choice.how == "fastest":
        if cand.allowed:
            return f"{label} cuts fastest within the tooth-count rules ({teeth}); {limit}"
        if cand.too_few:
            return f"{label}: the finest pitch, still only {teeth}; {limit}"
        return f"{label}: the coarsest pitch, {teeth}; {limit}"
    assert chart is not None
    if choice.how == "chart":
        return (
            f"{label}: the pitch for {width} (metal area ÷ blade travel, as the trade reads "
            f"tube, sections and bundles), {teeth}; {limit}"
        )
    if choice.how == "near-chart":
        side = "finer" if cand.pitch.tpi_mean > chart.pitch.tpi_mean else "coarser"
        return (
            f"{label}: one step {side} than the {chart.pitch.label} read off {width} (metal "
            f"area ÷ blade travel), and faster here; {teeth}; {limit}"
        )
    if choice.how == "finer-for-teeth":
        return (
            f"{label}: {chart.pitch.label} reads off {width} but leaves "
            f"{chart.teeth_thinnest:.1f} teeth over {thinnest_text(section)}; {label} keeps "
            f"{cand.teeth_thinnest:.1f}; {limit}"
        )
    if choice.how == "coarser-for-rubbing":
        return (
            f"{label}: coarser than the {chart.pitch.label} read off {width}, whose bite sits "
            f"under the rubbing floor across {share(chart.run.rubbing_share)} of the metal; "
            f"{teeth}; {limit}"
        )
    if choice.how == "thin-walls":
        return (
            f"{label}: the finest pitch made for this blade; no pitch keeps 3 teeth over "
            f"{thinnest_text(section)} ({cand.teeth_thinnest:.1f} here); {limit}"
        )
    return (
        f"{label}: the pitch nearest the {chart.pitch.label} read off {width} that keeps "
        f"3 teeth and bites above the rubbing floor, {teeth}; {limit}"
    )


def neighbour_line(
    side: str, cand: Candidate, chosen: Candidate, section: SectionLike, far: str = ""
) -> str:
    label = f"{side} {cand.pitch.label}"
    if cand.stalled:
        return f"{label}: will not cut (the head cannot load its teeth)"
    if cand.too_few:
        return f"{label}: only {cand.teeth_thinnest:.1f} teeth over {thinnest_text(section)}"
    if cand.too_many:
        most = K.number("bite", "max_teeth_widest_chord")
        return (
            f"{label}: {cand.teeth_widest:.0f} teeth in the {mm(section.max_chord_mm)} widest "
            f"chord (over about {most:.0f})"
        )
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


def neighbours(choice: Choice, cands: list[Candidate], section: SectionLike) -> str | None:
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
    return "; ".join(parts) if parts else None


def speed_line(plan: Plan) -> str:
    s = plan.speed
    if s.given:
        return (
            f"band speed {speed(s.band_speed_m_min)} as given "
            f"(recommended {speed(s.recommended_m_min)})"
        )
    parts = [f"{s.base_m_min:.0f} m/min for {plan.material.key}"]  # chart speeds: whole m/min
    if abs(s.width_factor - 1) > 0.005:
        parts.append(f"{s.width_factor - 1:+.0%} for a {mm(s.width_of_cut_mm)} mean width of cut")
    if s.blade_factor != 1:
        parts.append(f"{s.blade_factor - 1:+.0%} {plan.blade_material} blade")
    if s.coolant_factor != 1:
        parts.append(f"{s.coolant_factor - 1:+.0%} dry")
    if s.clipped:
        parts.append(f"held to the saw's {'highest' if s.clipped == 'max' else 'lowest'} speed")
    return f"band speed {s.band_speed_m_min:.0f} m/min: " + ", ".join(parts)


def feed_line(plan: Plan, cand: Candidate) -> str:
    run = cand.run
    if cand.stalled:
        return f"{plan.saw.feed_type} feed: the head cannot load the teeth, so it does not advance"
    if plan.set_feed_mm_min is not None:
        if plan.saw.force_limited:
            return (
                f"down-feed set to {feed(plan.set_feed_mm_min)}; the "
                f"{plan.saw.feed_type} head holds it where its force allows, "
                f"{feed(run.feed_mean_mm_min)} on average"
            )
        return f"down-feed set to {feed(plan.set_feed_mm_min)} as given"
    if plan.saw.force_limited:
        return (
            f"{plan.saw.feed_type} feed follows the chord: {feed(run.feed_mean_mm_min)} "
            f"on average, {feed(run.feed_set_mm_min)} at the slowest depth"
        )
    return "the down-feed is what the slowest depth allows, so it is safe at the widest chord"
