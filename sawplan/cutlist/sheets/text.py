"""The cut sheet as text for the terminal: summary, sections, per-bar table, drawings.

The drawings are ``drawing``'s plain ASCII bars; the Markdown sheet is
``markdown``.  Bars cut alike share their rows and drawing (``bar_rows``), so
a plan of tens of thousands of pieces prints in a moment.
"""

from __future__ import annotations

from sawplan.cutlist.sheets.bar_rows import PerPattern, StockText, piece_rows
from sawplan.cutlist.sheets.drawing import DRAW_WIDTH, draw_bar
from sawplan.display import Display, UnitSystem, as_display, fmt_money, fmt_number, fmt_percent

__all__ = [
    "DRAW_WIDTH", "blades_text", "bound_text", "order_list", "quote_text", "render_plan",
    "short_banner",
]  # fmt: skip

# --- the terminal report --------------------------------------------------------------------


def render_plan(
    plan, units: UnitSystem | Display = UnitSystem.METRIC, width: int = DRAW_WIDTH
) -> str:
    """The terminal report: summary, sections, cut sheet, drawings, blades, quote, cautions."""
    d = as_display(units)
    blocks = [
        short_banner(plan, d),
        _header(plan, d),
        _sections(plan, d),
        _cut_table(plan, d),
        _drawings(plan, d, width),
        _remnants(plan, d),
        order_list(plan, d),
        blades_text(plan, d),
        quote_text(plan, d),
        _notes(plan, d),
    ]
    from sawplan.render import terminal_text

    # notes carry the log's lot and group names: stored text, shown through the one escape
    return terminal_text("\n\n".join(b for b in blocks if b), lines=True)


def short_banner(plan, d: Display) -> str:
    """The first thing on a short plan's sheet: it is not the whole job."""
    if plan.complete:
        return ""
    missing = sum(n for f in plan.shortfalls for _, n in f.pieces)
    bars = sum(o.count for f in plan.shortfalls for o in f.order)
    return (
        f"SHORT: stock on hand does not finish the job. {missing} piece(s) are not planned; "
        f"order {bars} bar(s) (ORDER LIST below, or `sawplan plan JOBFILE --order`)."
    )


def order_list(plan, d: Display) -> str:
    """What to buy to finish a short job, and the pieces that wait for it."""
    from sawplan.render import table

    if plan.complete:
        return ""
    rows = []
    for f in plan.shortfalls:
        waiting = ", ".join(f"{name} ×{n}" for name, n in f.pieces)
        for i, o in enumerate(f.order):
            rows.append([
                d.text(f.group) if i == 0 else "", o.count, d.bar_length(o.length_mm),
                fmt_money(o.price_each * o.count, plan.currency), waiting if i == 0 else "",
            ])  # fmt: skip
    text = table(
        ["material and section", "bars", "length", "cost", "pieces not planned"],
        rows,
        align="lrrrl",
        title="ORDER LIST (bars to buy to finish the job)",
    )
    notes = [f"  {d.text(f.group)}: {f.note}" for f in plan.shortfalls]
    return text + "\n" + "\n".join(notes)


def bound_text(s, d: Display, currency: str) -> str:
    """A section's plan against its bound, in the objective's own terms."""
    if s.objective == "bars":
        text = f"{s.bars_used} bars, ⌈LP⌉ {s.lp_bound_bars}"
    elif s.objective == "cost":
        text = (
            f"material {fmt_money(s.objective_value, currency)}, LP bound "
            f"{fmt_money(s.objective_bound, currency)} (rack remnants in the LP)"
        )
    else:
        text = (
            f"new stock {d.bar_length(s.objective_value)}, LP bound "
            f"{d.bar_length(s.objective_bound)} (rack remnants in the LP)"
        )
    if s.proven_optimal and s.objective_value > s.objective_bound + 1e-9:
        return text + ": proven optimal (the exact integer program; no whole-bar plan is cheaper)"
    if s.proven_optimal:
        return text + ": proven optimal"
    if s.objective == "bars":
        return text + f": {s.gap_bars} bar(s) above the bound"
    share = 100.0 * s.gap / s.objective_value if s.objective_value else 0.0
    return text + f": gap {share:.2f} %"


def _header(plan, d: Display) -> str:
    from sawplan.render import key_values

    pairs = [("job", plan.job), ("file", plan.file)]
    if plan.customer:
        pairs.append(("customer", plan.customer))
    if plan.due:
        pairs.append(("due", plan.due))
    pairs += [
        ("saw", plan.saw),
        (
            "bars",
            f"{plan.bars_used}; {plan.pieces} pieces, {plan.cuts} cuts"
            + ("; proven optimal" if plan.proven_optimal and plan.complete else ""),
        ),
        (
            "waste",
            f"{plan.waste_pct:.1f} % ({d.bar_length(plan.waste_mm)} of "
            f"{d.bar_length(plan.stock_length_mm)})",
        ),
        ("bars to fetch", d.fmt("mass", plan.bars_weight_kg)),
        ("pieces to ship", d.fmt("mass", plan.pieces_weight_kg)),
        ("remnants to rack", d.fmt("mass", plan.remnants_weight_kg)),
        (
            "time",
            f"{d.fmt('time', plan.total_time_min)}: {d.fmt('time', plan.total_cut_time_min)} cutting + "
            f"{d.fmt('time', plan.total_handling_time_min)} handling",
        ),
        (
            "blades on hand",
            f"{plan.blades_needed} ({fmt_number(plan.blades_consumed, 2)} worn by this job)",
        ),
        ("quoted total", fmt_money(plan.total_cost, plan.currency)),
    ]
    return key_values(pairs, title="JOB")


def _sections(plan, d: Display) -> str:
    from sawplan.render import table

    headers = [
        "material and section", "bars", "⌈LP⌉", "gap", "kerf", "pitch", "band speed", "feed",
        "time/cut", "cuts", "cut time", "total time",
    ]  # fmt: skip
    rows = []
    for s in plan.sections:
        per_cut = d.fmt("time", s.cut_time_min)
        if s.calibration_n:
            per_cut += f" (×{s.calibration_factor:.2f} log)"
        rows.append([
            d.text(s.group), s.bars_used, s.lp_bound_bars, s.gap_bars, d.length(s.kerf_mm),
            f"{s.pitch} {s.tooth_form}", d.fmt("speed", s.band_speed_m_min, 3),
            d.fmt("feed", s.feed_mm_min, 3), per_cut, s.cuts, d.fmt('time', s.cutting_time_min),
            d.fmt('time', s.total_time_min),
        ])  # fmt: skip
    text = table(headers, rows, align="lrrrrllrrrrr", title="SECTIONS")
    extra = []
    for s in plan.sections:
        label = d.text(s.group)
        extra.append(
            f"  {label}: {s.designation}; kerf from the {s.kerf_source}; "
            f"{s.tooth_set} set; limited by {s.governing_limit}; optimiser {s.method}"
        )
        extra.append(f"  {label}: {bound_text(s, d, plan.currency)}")
        if s.breakin_cuts:
            extra.append(f"  {label}: {breakin_text(s, d)}")
        extra += [f"  {label}: warning: {d.text(w)}" for w in s.warnings]
    return text + "\n" + "\n".join(extra)


def _cut_table(plan, d: Display) -> str:
    from sawplan.render import table

    unit = d.label("length")
    headers = ["bar", "stock", "heat", "step", f"from head {unit}", "piece", "weight", "lift"]
    rows: list[list[str]] = []
    body = PerPattern(lambda b: _bar_rows(b, d))
    stock = StockText(d)
    blank = ["", "", ""]
    for b in plan.bars:
        where = f" @{b.location}" if b.location else ""
        lead = [str(b.bar), stock(b) + where, b.heat or "—"]
        tails, summary = body(b)
        for tail in tails:
            rows.append([*lead, *tail])
            lead = blank
        rows.append(["", summary, "", "", "", "", "", ""])
    title = "CUT SHEET (positions from the head end of each bar)"
    return table(headers, rows, align="rlllrlrl", title=title)


def _bar_rows(b, d: Display) -> tuple[list[tuple[str, ...]], str]:
    """One bar's rows without the bar's number and stock (step, span, piece, weight,
    lift), and its summary line."""
    tails: list[tuple[str, ...]] = []
    if b.trim_cut_mm is not None:
        tails.append(("trim", d.span(0.0, b.trim_mm), "squaring cut", "", ""))
    for row in piece_rows(b):
        tails.append((row.step(d), row.span(d), row.what(d), row.weight(d), row.first.handling))
    if b.remnant_mm > 0 or b.length_mm - b.remnant_start_mm > 1e-9:
        what = (
            f"keep {d.tape(b.remnant_mm)} remnant, mark heat {b.heat or '—'}"
            if b.remnant_kept
            else f"scrap {d.tape(b.remnant_mm)}"
        )
        weight = d.fmt("mass", b.remnant_weight_kg) if b.remnant_mm > 0 else ""
        tails.append(("end", d.span(b.remnant_start_mm, b.length_mm), what, weight, ""))
    return tails, f"bar {d.fmt('mass', b.weight_kg)}, {b.handling}; {b.cuts} cuts"


def _drawings(plan, d: Display, width: int) -> str:
    lines = [f"BARS TO SCALE ({width} columns = one bar; # trim, [A] piece, =R= keep, ... scrap)"]
    num = max((len(str(b.bar)) for b in plan.bars), default=1)

    def drawn(b) -> str:
        tail = d.bar_length(b.length_mm)
        if b.remnant_kept:
            tail += f", R {d.tape(b.remnant_mm)}" + (f" heat {b.heat}" if b.heat else "")
        return f"|{draw_bar(b, width)}| {tail}"

    line = PerPattern(drawn)
    seen: dict[str, object] = {}
    counts: dict[str, int] = {}
    for b in plan.bars:
        lines.append(f"{str(b.bar).rjust(num)} {line(b)}")
        for p in b.pieces:
            if p.mark not in seen:
                seen[p.mark] = p
            counts[p.mark] = counts.get(p.mark, 0) + 1
    marks = (f"{m} = {p.part} {d.tape(p.length_mm)} ×{counts[m]}" for m, p in seen.items())
    lines.append("marks: " + "; ".join(marks))
    return "\n".join(lines)


def _remnants(plan, d: Display) -> str:
    if not plan.remnants:
        return ""
    from sawplan.render import table

    rows = [
        [
            r.bar,
            d.text(r.group),
            d.tape(r.length_mm),
            r.heat or "—",
            r.location or "—",
            d.fmt("mass", r.weight_kg),
        ]
        for r in plan.remnants
    ]
    return table(
        ["bar", "material and section", "length", "heat", "rack", "weight"],
        rows,
        align="rlrllr",
        title="REMNANTS TO MARK AND RACK",
    )


def blades_text(plan, d: Display) -> str:
    from sawplan.render import key_values

    pairs = [
        ("area cut", d.fmt("area", plan.cut_area_cm2 * 100, 4)),
        ("blades worn", f"{fmt_number(plan.blades_consumed, 2)}"),
        ("have on hand", f"{plan.blades_needed} ({forecast_text(plan)})"),
        ("blade life", d.text(plan.blade_life_source)),
    ]
    return key_values(pairs, title="BLADES")


def breakin_text(s, d: Display) -> str:
    """How to run in a new blade on this section (common practice)."""
    return (
        f"new blade: start at {s.breakin_start_percent:.0f} % of the feed and raise it step by "
        f"step over the first {d.fmt('area', s.breakin_area_cm2 * 100, 3)} "
        f"(about {s.breakin_cuts:.0f} {'cut' if round(s.breakin_cuts) == 1 else 'cuts'})"
    )


def forecast_text(plan) -> str:
    """How the blades-on-hand figure was reached, in words."""
    if plan.blade_forecast_method == "weibull-simulation":
        return f"Weibull forecast, {fmt_percent(plan.blade_confidence)} confidence"
    if plan.blade_forecast_method == "deterministic":
        return "area cut ÷ blade life, rounded up"
    return plan.blade_forecast_method


def quote_text(plan, d: Display) -> str:
    from sawplan.render import key_values

    pairs = [
        (f"{q.item} ({d.text(q.basis)})", fmt_money(q.amount, plan.currency)) for q in plan.quote
    ]
    return key_values(pairs, title="QUOTE")


def _notes(plan, d: Display) -> str:
    lines = []
    if plan.notes:
        lines.append("NOTES")
        lines += [f"- {d.text(n)}" for n in plan.notes]
        lines.append("")
    lines.append("CAUTIONS")
    lines += [f"- {d.text(c)}" for c in plan.cautions]
    return "\n".join(lines)
