"""Text view of a cut's economics: three band speeds side by side, and where every figure comes from."""

from __future__ import annotations

from typing import Any

from sawplan.display import (
    Display,
    UnitSystem,
    as_display,
    fmt_duration,
    fmt_money,
    fmt_number,
    fmt_percent,
)

RUN_TITLES = {"recommended": "recommended", "cost": "cheapest", "production": "fastest"}
HELD = {
    "saw-min": "held at the saw's slowest speed",
    "saw-max": "held at the saw's fastest speed",
    "feed-limit": "held where the motor stops the feed rising",
}


def render_economics(econ: Any, units: UnitSystem | Display, *, currency: str | None = None) -> str:
    """The cost of one cut at the recommended, cheapest and fastest band speeds."""
    d = as_display(units)
    cur = f" ({currency})" if currency else ""
    runs = econ.runs
    head = ["", *(RUN_TITLES[r.run] for r in runs)]
    per_area = d.label("large_area")
    table = [
        ["band speed", *(d.fmt("speed", r.band_speed_m_min, 3) for r in runs)],
        ["cut time", *(fmt_duration(r.cost.cut_time_min) for r in runs)],
        ["blade life", *(d.fmt("area", r.cost.blade_life_cm2 * 100.0, 3) for r in runs)],
        ["cuts per blade", *(fmt_number(r.cost.cuts_per_blade, 3) for r in runs)],
        [f"machine{cur}", *(fmt_money(r.cost.machine) for r in runs)],
        [f"blade{cur}", *(fmt_money(r.cost.blade) for r in runs)],
        [f"blade change{cur}", *(fmt_money(r.cost.change) for r in runs)],
        [f"per cut{cur}", *(fmt_money(r.cost.total) for r in runs)],
        [
            f"per {per_area} cut{cur}",
            *(fmt_money(d.per("large_area", r.cost.cost_per_m2 / 1e6)) for r in runs),
        ],
        ["time per cut", *(fmt_duration(r.cost.time_per_cut_min) for r in runs)],
    ]
    widths = [max(len(str(row[i])) for row in [head, *table]) for i in range(len(head))]
    lines = ["Cost per cut at three band speeds"]
    for row in [head, *table]:
        cells = [str(row[0]).ljust(widths[0])]
        cells += [str(c).rjust(w) for c, w in zip(row[1:], widths[1:], strict=True)]
        lines.append("  " + "   ".join(cells).rstrip())
    for r in runs:
        if r.held_by:
            best = d.fmt("speed", r.optimum_m_min, 3)
            lines.append(f"  {RUN_TITLES[r.run]}: {HELD[r.held_by]} (optimum {best})")
    cheapest, rec = econ.run("cost"), econ.run("recommended")
    saving = rec.cost.total - cheapest.cost.total
    if saving > 0.005:
        lines.append(
            f"  running at {d.fmt('speed', cheapest.band_speed_m_min, 3)} saves "
            f"{fmt_money(saving)}{cur} per cut ({fmt_percent(saving / rec.cost.total)}) against the "
            "recommended speed"
        )
    lines.append("Where the figures come from")
    i = econ.inputs
    lines.append(
        f"  shop rate {fmt_money(i.rate_per_h.value)}{cur} per hour — {i.rate_per_h.source}"
    )
    lines.append(
        f"  handling {fmt_duration(i.handling_min.value)} per cut — {i.handling_min.source}"
    )
    lines.append(f"  blade price {fmt_money(i.blade_price.value)}{cur} — {i.blade_price.source}")
    lines.append(f"  blade change {fmt_duration(i.change_min.value)} — {i.change_min.source}")
    lines.append(f"  cut time — {econ.time_source}")
    life = econ.life
    n_text = f"n = {life.n:.3f}"
    if life.n_ci:
        n_text += f" ({life.n_ci[0]:.3f}–{life.n_ci[1]:.3f})"
    # C is the speed for a life of one unit of area: for 1 in² instead of 1 cm² it is
    # C·(cm² per in²)^n, since V = C·L^(−n)
    unit_cm2 = 1.0 / d.value("area", 100.0)  # one display area unit in cm²
    lines.append(
        f"  blade life V·Lⁿ = C (Taylor), life as area cut: {n_text}, "
        f"C = {d.fmt('speed', life.c_m_min * unit_cm2**-life.n, 3)} for 1 {d.label('area')}"
        f" — {d.text(life.source)}"
    )
    if life.note:
        lines.append(f"  ! {d.text(life.note)}")
    lines.append(
        f"  speeds: Gilbert's optimum blade lives, in minutes of cutting: cheapest "
        f"{fmt_duration(econ.run('cost').optimum_life_min)}, fastest "
        f"{fmt_duration(econ.run('production').optimum_life_min)}"
    )
    return "\n".join(lines)


def render_run_quote(
    quote: Any, units: UnitSystem | Display, *, currency: str | None = None
) -> str:
    """Per section: cost per cut at three speeds; then the job's saw and blades at ``--run``."""
    d = as_display(units)
    cur = f" ({currency})" if currency else ""
    lines = [f"Band speeds and cost per cut{cur}, per section"]
    for s in quote.sections:
        cells = []
        for r in s.economics.runs:
            cells.append(
                f"{RUN_TITLES[r.run]} {d.fmt('speed', r.band_speed_m_min, 3)}: "
                f"{fmt_money(r.cost.total)}, {fmt_duration(r.cost.time_per_cut_min)}"
            )
        lines.append(f"  {d.text(s.section)} ({s.cuts} cuts): " + " · ".join(cells))
        if s.economics.life.note:
            lines.append(f"    ! {d.text(s.economics.life.note)}")
    lines.append(
        f"Quote at the {RUN_TITLES[quote.run]} speeds: saw, operator and blades "
        f"{fmt_money(quote.saw_and_blades)}{cur}, {fmt_duration(quote.time_min)} at the saw "
        "(rates and prices as sourced in `sawplan cut … --economics`)"
    )
    return "\n".join(lines)


def render_blade_choice(
    choice: Any, units: UnitSystem | Display, *, currency: str | None = None
) -> str:
    """Blade types for the group, cheapest per cut first, and which to buy next and why."""
    d = as_display(units)
    cur = f" ({currency})" if currency else ""
    per_area = d.label("large_area")
    lines = [f"Blade types the log knows for {choice.material_group}, each at its cheapest speed"]
    for o in choice.options:
        basis = "fitted" if o.fitted else "published n"
        lines.append(
            f"  {d.text(o.blade_type)}: {fmt_money(o.cost_per_cut)}{cur} per cut, "
            f"{fmt_money(d.per('large_area', o.cost_per_m2 / 1e6))} per {per_area}, at "
            f"{d.fmt('speed', o.best.band_speed_m_min, 3)} ({o.blades} blades, {basis})"
        )
    for text in choice.not_costed:
        lines.append(f"  not costed: {text}")
    if choice.buy and choice.runner_up:
        why = (
            f"Buy next: {choice.buy} — {fmt_money(choice.saving_per_cut)}{cur} less per cut "
            f"({fmt_percent(choice.saving_share)}) than {choice.runner_up} at each one's cheapest speed"
        )
        if not choice.on_fits:
            why += "; the ranking rests on a published exponent: log speeds to confirm it"
        lines.append(why)
    return "\n".join(lines)
