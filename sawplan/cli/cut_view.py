"""Text and chart views of a planned cut (``sawplan cut``)."""

from __future__ import annotations

from typing import Any

from sawplan.display import Display, UnitSystem, as_display, fmt_percent


def render_cut(
    r: Any,
    units: UnitSystem | Display,
    *,
    section_label: str | None = None,
    calibration_cuts: int = 0,
) -> str:
    """The operator's card: blade, speed, feed, time, why, warnings, break-in."""
    from sawplan.cutting.explain import LIMIT_WORDS

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
    if r.feed_type == "constant":
        feed = f"set {d.fmt('feed', r.feed_set_mm_min)}"
    else:
        feed = (
            f"{d.fmt('feed', r.feed_mm_min)} average, "
            f"{d.fmt('feed', r.feed_set_mm_min)} at the slowest depth"
        )
    lines.append(f"Down-feed   {feed}")
    share = dict(r.limit_shares).get(r.governing_limit, 1.0)
    lines.append(
        f"Rate        {d.fmt('rate', r.cutting_rate_mm2_min)}   "
        f"Time {d.fmt('time', r.cut_time_min)} per cut   "
        f"Limit {LIMIT_WORDS[r.governing_limit]} ({fmt_percent(share)} of the cut)"
    )
    for i, text in enumerate(r.explanation):
        lines.append(("Why         " if i == 0 else "            ") + d.text(text))
    if calibration_cuts:
        lines.append(
            f"            (calibration from {calibration_cuts:,} logged cuts on this saw and "
            "material group)"
        )
    for i, text in enumerate(r.warnings):
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
