"""Text and chart views of a planned cut (``sawplan cut``)."""

from __future__ import annotations

from typing import Any

from sawplan.display import Display, UnitSystem, as_display, fmt_percent


def _time_line(r: Any, d: Display) -> str:
    from sawplan.cutting.explain import LIMIT_WORDS

    if r.cut_time_min is None:
        return f"Time        {d.text(r.stall_reason)}"
    share = dict(r.limit_shares).get(r.governing_limit, 1.0)
    time = f"Time {d.fmt('time', r.cut_time_min)} per cut"
    if r.pieces > 1:
        time += f" ({d.fmt('time', r.time_per_piece_min)} per piece)"
    return (
        f"Rate        {d.fmt('rate', r.cutting_rate_mm2_min)}   {time}   "
        f"Limit {LIMIT_WORDS[r.governing_limit]} ({fmt_percent(share)} of the cut)"
    )


def _feed_line(r: Any, d: Display) -> str:
    """The card's one down-feed: the setting, or a force-fed head's average and slowest."""
    if r.cut_time_min is None:
        return "Down-feed   —"
    if r.feed_given:
        text = f"Down-feed   set {d.fmt('feed', r.feed_set_mm_min)}"
        if r.feed_type != "constant" and r.feed_mm_min < r.feed_set_mm_min * 0.99:
            text += f", {d.fmt('feed', r.feed_mm_min)} average where the head's force holds it back"
        return text
    if r.feed_type == "constant":
        return f"Down-feed   set {d.fmt('feed', r.feed_set_mm_min)}"
    return (
        f"Down-feed   {d.fmt('feed', r.feed_mm_min)} average, "
        f"{d.fmt('feed', r.feed_set_mm_min)} at the slowest depth"
    )


def render_cut(
    r: Any,
    units: UnitSystem | Display,
    *,
    section_label: str | None = None,
    calibration: Any = None,
) -> str:
    """The operator's card: blade, speed, feed, time, why, bundle, orientation, warnings,
    break-in."""
    d = as_display(units)
    lines = [f"{r.material} · {section_label or r.section} · saw {r.saw} ({r.feed_type} feed)"]
    blade = f"{r.pitch_label} TPI, {r.tooth_form} teeth, {r.tooth_set} set ({r.blade_material})"
    lines.append(f"Blade       {blade}")
    speed = d.fmt("speed", r.band_speed_m_min)
    if r.band_speed_clipped:
        speed += f"  (held at the saw's {r.band_speed_clipped})"
    if r.dry:
        speed += "  dry"
    lines.append(f"Band speed  {speed}")
    lines.append(_feed_line(r, d))
    lines.append(_time_line(r, d))
    for i, text in enumerate(r.explanation):
        lines.append(("Why         " if i == 0 else "            ") + d.text(text))
    if calibration is not None:
        lines.append(
            f"            (calibration from {_count(calibration.entries, 'timed log entry')} "
            f"holding {_count(calibration.cuts, 'cut')} on this saw and material group)"
        )
    if r.bundle is not None:
        lines.append(f"Bundle      {d.text(r.bundle.why)}")
    if r.better_orientation:
        lines.append(f"Orient      {d.text(r.better_orientation)}")
    warnings = [w for w in r.warnings if w != r.stall_reason]
    for i, text in enumerate(warnings):
        lines.append(("Warnings    ! " if i == 0 else "            ! ") + d.text(text))
    if r.breakin:
        steps = [
            f"{d.num('area', s.area_from_mm2)}–{d.fmt('area', s.area_to_mm2)} "
            f"at {s.feed_percent:.0f} %"
            for s in r.breakin
        ]
        lines.append("Break-in    new blade: " + " · ".join(steps) + ", then full feed")
    lines.append(
        f"Blade care  kerf {d.fmt('length', r.kerf_mm)}, bending "
        f"{d.fmt('stress', r.bending_stress_mpa)} at the wheels, "
        f"{r.flex_cycles_per_min:.0f} flex cycles/min"
    )
    lines.append(f"Caution     {r.caution}")
    return "\n".join(lines)


def _count(n: int, word: str) -> str:
    """``1 cut``, ``4,390 cuts``, ``200 timed log entries``."""
    from sawplan.display import fmt_count

    if n == 1:
        return f"1 {word}"
    return fmt_count(n) + " " + (word[:-1] + "ies" if word.endswith("y") else word + "s")
