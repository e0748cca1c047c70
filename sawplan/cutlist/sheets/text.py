"""The cut sheet as text: terminal summary, per-bar table, to-scale bar drawings, Markdown.

The drawings are plain ASCII so they survive e-mail, printers and any
terminal: one line per bar, ``width`` columns for the whole bar length.
``#`` is the head trim, ``[-A-]`` a piece with its mark, ``=R=`` a remnant to
keep, ``...`` scrap.  Kerfs are the seams between segments.  Pieces too narrow
to draw on their own are drawn as one run (``[A×12]``).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from sawplan.display import Display, UnitSystem, as_display, fmt_money, fmt_number, fmt_percent

DRAW_WIDTH = 72


@dataclass(frozen=True)
class PieceRow:
    """One line of a bar's cut list: a piece, or a run of equal pieces in a row."""

    first: object  # PieceCut
    last: object
    count: int

    def step(self, d: Display) -> str:
        return str(self.first.seq) if self.count == 1 else f"{self.first.seq}–{self.last.seq}"

    def span(self, d: Display) -> str:
        return d.span(self.first.start_mm, self.last.end_mm)

    def what(self, d: Display) -> str:
        p = self.first
        text = f"{p.mark} {p.part} ({d.tape(p.length_mm)})"
        if self.count > 1:
            pitch = (self.last.start_mm - p.start_mm) / (self.count - 1)
            text += f" ×{self.count}, one every {d.tape(pitch)}"
        return text

    def weight(self, d: Display) -> str:
        return d.fmt("mass", self.first.weight_kg) + (" each" if self.count > 1 else "")


def piece_rows(bar, run: int = 3) -> list[PieceRow]:
    """The bar's pieces, with ``run`` or more equal pieces in a row on one line."""
    groups: list[list] = []
    for p in bar.pieces:
        if groups and groups[-1][0].mark == p.mark:
            groups[-1].append(p)
        else:
            groups.append([p])
    rows: list[PieceRow] = []
    for g in groups:
        if len(g) >= run:
            rows.append(PieceRow(g[0], g[-1], len(g)))
        else:
            rows += [PieceRow(p, p, 1) for p in g]
    return rows


# --- drawings -----------------------------------------------------------------------------


@dataclass(frozen=True)
class Segment:
    """A stretch of the bar for drawing: [start, end) in mm and what it is."""

    kind: str  # "trim" | "piece" | "remnant" | "scrap"
    start_mm: float
    end_mm: float
    label: str


def segments(bar, *, max_segments: int = DRAW_WIDTH // 3) -> list[Segment]:
    """The bar as drawable segments; a piece takes its own length and the kerf after it.

    Runs of the same mark are merged when there are too many segments to draw
    each piece (``A×12``); if even that is too many, all pieces become one run.
    """
    out: list[Segment] = []
    if bar.trim_mm > 0:
        out.append(Segment("trim", 0.0, bar.trim_mm, "#"))
    pieces = list(bar.pieces)
    ends = [p.start_mm for p in pieces[1:]] + [bar.remnant_start_mm if pieces else bar.trim_mm]
    singles = [Segment("piece", p.start_mm, e, p.mark) for p, e in zip(pieces, ends, strict=True)]
    if len(singles) > max_segments:
        singles = _runs(singles)
    if len(singles) > max_segments and singles:
        singles = [Segment("piece", singles[0].start_mm, singles[-1].end_mm, f"{len(pieces)} pcs")]
    out.extend(singles)
    if bar.length_mm - bar.remnant_start_mm > 1e-9:
        kind = "remnant" if bar.remnant_kept else "scrap"
        label = "R" if bar.remnant_kept else ""
        out.append(Segment(kind, bar.remnant_start_mm, bar.length_mm, label))
    return out


def _runs(singles: list[Segment]) -> list[Segment]:
    runs: list[list[Segment]] = []
    for s in singles:
        if runs and runs[-1][0].label == s.label:
            runs[-1].append(s)
        else:
            runs.append([s])
    return [
        Segment("piece", r[0].start_mm, r[-1].end_mm, r[0].label + (f"×{len(r)}" * (len(r) > 1)))
        for r in runs
    ]


def columns(bounds_mm: Sequence[float], total_mm: float, width: int) -> list[int]:
    """Column of each boundary, to scale, with every segment at least one column wide."""
    n = len(bounds_mm) - 1
    cols = [round(x / total_mm * width) if total_mm > 0 else 0 for x in bounds_mm]
    cols[0], cols[-1] = 0, width
    for k in range(1, n + 1):  # at least one column each, left to right
        cols[k] = max(cols[k], cols[k - 1] + 1)
    for k in range(n - 1, 0, -1):  # and pull back from the right edge
        cols[k] = min(cols[k], cols[k + 1] - 1)
    return cols


def draw_bar(bar, width: int = DRAW_WIDTH) -> str:
    """One bar as exactly ``width`` characters, to scale."""
    segs = segments(bar, max_segments=max(1, width // 2))
    if not segs:
        return "." * width
    bounds = [segs[0].start_mm] + [s.end_mm for s in segs]
    cols = columns(bounds, bar.length_mm, width)
    out = []
    for s, a, b in zip(segs, cols, cols[1:], strict=False):
        out.append(_fill(s, b - a))
    text = "".join(out)
    return text[:width].ljust(width, ".")


def _fill(s: Segment, w: int) -> str:
    if w <= 0:
        return ""
    if s.kind == "trim":
        return "#" * w
    if s.kind == "scrap":
        return "." * w
    if s.kind == "remnant":
        return _centred("R", w, "=") if w >= 3 else "R" * min(w, 1) + "=" * (w - 1)
    label = s.label
    if w >= len(label) + 2:
        return "[" + _centred(label, w - 2, "-") + "]"
    if w == len(label) + 1:
        return label + "|"
    if w >= len(label):
        return _centred(label, w, "-")
    return label[:w]


def _centred(text: str, w: int, fill: str) -> str:
    left = (w - len(text)) // 2
    return fill * left + text + fill * (w - len(text) - left)


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
        _blades(plan, d),
        _quote(plan, d),
        _notes(plan, d),
    ]
    return "\n\n".join(b for b in blocks if b)


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
    for b in plan.bars:
        where = f" @{b.location}" if b.location else ""
        first = [str(b.bar), d.text(b.stock) + where, b.heat or "—"]
        blank = ["", "", ""]
        lead = first
        if b.trim_cut_mm is not None:
            rows.append([*lead, "trim", d.span(0.0, b.trim_mm), "squaring cut", "", ""])
            lead = blank
        for row in piece_rows(b):
            rows.append([
                *lead, row.step(d), row.span(d), row.what(d), row.weight(d), row.first.handling,
            ])  # fmt: skip
            lead = blank
        if b.remnant_mm > 0 or b.length_mm - b.remnant_start_mm > 1e-9:
            what = (
                f"keep {d.tape(b.remnant_mm)} remnant, mark heat {b.heat or '—'}"
                if b.remnant_kept
                else f"scrap {d.tape(b.remnant_mm)}"
            )
            weight = d.fmt("mass", b.remnant_weight_kg) if b.remnant_mm > 0 else ""
            span = d.span(b.remnant_start_mm, b.length_mm)
            rows.append([*lead, "end", span, what, weight, ""])
            lead = blank
        summary = f"bar {d.fmt('mass', b.weight_kg)}, {b.handling}; {b.cuts} cuts"
        rows.append(["", summary, "", "", "", "", "", ""])
    title = "CUT SHEET (positions from the head end of each bar)"
    return table(headers, rows, align="rlllrlrl", title=title)


def _drawings(plan, d: Display, width: int) -> str:
    lines = [f"BARS TO SCALE ({width} columns = one bar; # trim, [A] piece, =R= keep, ... scrap)"]
    num = max((len(str(b.bar)) for b in plan.bars), default=1)
    for b in plan.bars:
        tail = d.bar_length(b.length_mm)
        if b.remnant_kept:
            tail += f", R {d.tape(b.remnant_mm)}" + (f" heat {b.heat}" if b.heat else "")
        lines.append(f"{str(b.bar).rjust(num)} |{draw_bar(b, width)}| {tail}")
    seen: dict[str, str] = {}
    for b in plan.bars:
        for p in b.pieces:
            seen.setdefault(p.mark, f"{p.part} {d.tape(p.length_mm)}")
    counts: dict[str, int] = {}
    for b in plan.bars:
        for p in b.pieces:
            counts[p.mark] = counts.get(p.mark, 0) + 1
    lines.append("marks: " + "; ".join(f"{m} = {t} ×{counts[m]}" for m, t in seen.items()))
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


def _blades(plan, d: Display) -> str:
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


def _quote(plan, d: Display) -> str:
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


# --- Markdown sheet ---------------------------------------------------------------------------


def render_markdown(plan, units: UnitSystem | Display = UnitSystem.METRIC) -> str:
    """A Markdown cut sheet: the same content as the HTML sheet, drawings as text."""
    d = as_display(units)
    out = [f"# Cut sheet: {_md(plan.job)}", ""]
    if not plan.complete:
        out += [f"**{_md(short_banner(plan, d))}**", ""]
    head = [("file", plan.file), ("saw", plan.saw)]
    if plan.customer:
        head.insert(0, ("customer", plan.customer))
    if plan.due:
        head.append(("due", plan.due))
    out += [f"- **{k}**: {_md(v)}" for k, v in head]
    out += ["", "## Sections", ""]
    out.append(
        "| material and section | bars | ⌈LP⌉ | kerf | pitch | band speed | feed "
        "| time/cut | cuts |"
    )
    out.append("|---|---:|---:|---:|---|---:|---:|---:|---:|")
    for s in plan.sections:
        out.append(
            f"| {_md(d.text(s.group))} | {s.bars_used} | {s.lp_bound_bars} | {d.length(s.kerf_mm)} | "
            f"{_md(s.pitch)} {_md(s.tooth_form)} | {d.fmt('speed', s.band_speed_m_min, 3)} | "
            f"{d.fmt('feed', s.feed_mm_min, 3)} | {d.fmt('time', s.cut_time_min)} | {s.cuts} |"
        )
    out += ["", "## Bars", ""]
    for b in plan.bars:
        title = f"### Bar {b.bar}: {_md(d.text(b.stock))}"
        out.append(title + (f", heat {_md(b.heat)}" if b.heat else ""))
        out += ["", "```", draw_bar(b), "```", ""]
        out.append(f"| step | from head ({d.label('length')}) | piece | weight | lift |")
        out.append("|---|---|---|---:|---|")
        if b.trim_cut_mm is not None:
            out.append(f"| trim | {d.span(0.0, b.trim_mm)} | squaring cut | | |")
        for row in piece_rows(b):
            out.append(
                f"| {row.step(d)} | {row.span(d)} | {_md(row.what(d))} | {row.weight(d)} | "
                f"{row.first.handling} |"
            )
        if b.length_mm - b.remnant_start_mm > 1e-9:
            what = (
                f"keep remnant {d.tape(b.remnant_mm)}, mark heat {_md(b.heat or '—')}"
                if b.remnant_kept
                else f"scrap {d.tape(b.remnant_mm)}"
            )
            out.append(f"| end | {d.span(b.remnant_start_mm, b.length_mm)} | {what} | | |")
        out += ["", f"Bar weight {d.fmt('mass', b.weight_kg)}: **{b.handling}**.", ""]
    if not plan.complete:
        out += ["## Order list", "", "```", order_list(plan, d), "```", ""]
    out += ["## Blades and quote", "", "```", _blades(plan, d), "", _quote(plan, d), "```", ""]
    out += ["## Notes and cautions", ""]
    out += [f"- {_md(d.text(n))}" for n in plan.notes]
    out += [f"- **{_md(d.text(c))}**" for c in plan.cautions]
    return "\n".join(out) + "\n"


def _md(text: str) -> str:
    """Escape the characters that would break a Markdown table or start markup."""
    text = str(text).replace("\\", "\\\\")
    for ch in "|*_`[]<>#":
        text = text.replace(ch, "\\" + ch)
    return " ".join(text.split())
