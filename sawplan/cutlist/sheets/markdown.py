"""The cut sheet as Markdown: the same content as the HTML sheet, drawings as text."""

from __future__ import annotations

import re

from sawplan.cutlist.sheets.bar_rows import PerPattern, StockText, piece_rows
from sawplan.cutlist.sheets.drawing import draw_bar
from sawplan.cutlist.sheets.text import blades_text, order_list, quote_text, short_banner
from sawplan.display import Display, UnitSystem, as_display


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
    body = PerPattern(lambda b: _bar_body(b, d))
    stock = StockText(d)
    for b in plan.bars:
        title = f"### Bar {b.bar}: {_md(stock(b))}"
        out.append(title + (f", heat {_md(b.heat)}" if b.heat else ""))
        out += body(b)
    if not plan.complete:
        out += ["## Order list", "", *_fenced(order_list(plan, d)), ""]
    out += ["## Blades and quote", ""]
    out += [*_fenced(blades_text(plan, d) + "\n\n" + quote_text(plan, d)), ""]
    out += ["## Notes and cautions", ""]
    out += [f"- {_md(d.text(n))}" for n in plan.notes]
    out += [f"- **{_md(d.text(c))}**" for c in plan.cautions]
    return "\n".join(out) + "\n"


def _bar_body(b, d) -> list[str]:
    """A bar's drawing, table and weight: the same for every bar cut alike."""
    out = ["", *_fenced(draw_bar(b)), ""]
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
    return out


_MD_SPECIAL = re.compile(r"([\\`*_\[\]<>#|~&])")


def _md(text: str) -> str:
    """Inline text that stays text: every character that could start markup (emphasis,
    code, links, raw HTML, an entity, a table cell) backslash-escaped, on one line."""
    return " ".join(_MD_SPECIAL.sub(r"\\\1", str(text)).split())


def _fenced(text: str) -> list[str]:
    """A code block whose fence is longer than any run of backticks in ``text``, so no
    line of it can close the block early (CommonMark 0.31, §4.5 fenced code blocks)."""
    longest = max((len(run) for run in re.findall("`+", text)), default=0)
    fence = "`" * max(3, longest + 1)
    return [fence, text, fence]
