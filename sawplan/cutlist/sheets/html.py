"""The printable cut sheet: one self-contained HTML page, one to-scale SVG per bar.

No scripts, no external files: the page prints the same on any machine.  CSS
sets ``@page { size: auto; margin: 12mm }`` so A4 and Letter both work; every
drawing is ``width: 100%`` with a ``viewBox``, so it never runs off the page;
a bar's block is kept on one page (``break-inside: avoid``).  Table headers
wrap only between words, and the calibration note of a cut time takes a line
of its own, so the tables fit the 186 mm of an A4 page between its margins
without splitting words (``tests/test_sheet_browser.py`` checks the layout in
Chromium at A4 and Letter width).  All user text is escaped.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import replace
from html import escape

from sawplan.cutlist.sheets.bar_rows import PerPattern, StockText, piece_rows
from sawplan.cutlist.sheets.palette import piece_tints
from sawplan.cutlist.sheets.text import breakin_text, forecast_text, short_banner
from sawplan.display import Display, UnitSystem, as_display, fmt_money, fmt_number

VIEW_W = 1000.0  # drawing width in viewBox units
# The drawing is about 690 px wide on an A4 page (186 mm between the margins), so
# one viewBox unit prints at about 0.69 px: 16-unit text prints near 8 pt.
FONT = 16.0  # marks and the bar's length, in viewBox units
TICK_FONT = 14.0  # cut positions under the bar
CHAR_W = 0.62  # width of a bold sans-serif character, in ems (estimate for fitting labels)
BAR_Y, BAR_H = 30.0, 38.0
LABEL_GAP = 64.0  # least distance between two position labels
MAX_SINGLE_MARKS = 8  # longer runs of one part are marked once, "A ×56"

CSS = """
@page { size: auto; margin: 12mm }
* { box-sizing: border-box }
html { -webkit-print-color-adjust: exact; print-color-adjust: exact }
body { font: 10pt/1.35 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: #000;
       margin: 0 auto; max-width: 190mm; overflow-wrap: anywhere }
@media screen { body { padding: 12px } }
@media print { body { max-width: none } a { color: inherit } }
h1 { font-size: 15pt; margin: 0 0 2mm }
h2 { font-size: 12pt; margin: 5mm 0 2mm; break-after: avoid; page-break-after: avoid }
h3 { font-size: 10.5pt; margin: 0 0 1mm }
table { border-collapse: collapse; width: 100%; margin: 1mm 0 }
th, td { border: 0.5pt solid #888; padding: 1px 4px; text-align: left; vertical-align: top }
th { background: #eee; overflow-wrap: normal }
td.n, th.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap }
td.step { white-space: nowrap }
td.n .sub { display: block; white-space: normal; font-size: 8.5pt }
.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0 6mm; margin: 0 }
.facts dt { font-weight: 600 }
.facts dd { margin: 0 }
.bar { border: 0.8pt solid #000; padding: 2mm; margin: 3mm 0;
       break-inside: avoid; page-break-inside: avoid }
.bar svg { display: block; width: 100%; height: auto; max-width: 100% }
.lift-aid { font-weight: 700 }
.keep { font-weight: 700 }
.cautions { border: 1.2pt solid #000; padding: 2mm 3mm; break-inside: avoid;
            page-break-inside: avoid }
.cautions li, .notes li { margin: 0.5mm 0 }
footer { margin-top: 4mm; font-size: 8pt; color: #444 }
"""


def render_html(plan, units: UnitSystem | Display = UnitSystem.METRIC) -> str:
    """The whole sheet as one HTML document (UTF-8, self-contained)."""
    from sawplan import __version__

    d = as_display(units)
    e = escape
    body = [
        f"<h1>Cut sheet: {e(plan.job)}</h1>",
        f'<p class="warn"><strong>{e(short_banner(plan, d))}</strong></p>'
        if not plan.complete
        else "",
        _facts(plan, d),
        "<h2>Blade and settings per section</h2>",
        _sections_table(plan, d),
        "<h2>Bars</h2>",
        *_bar_blocks(plan, d),
        _remnants(plan, d),
        "<h2>Blades and quote</h2>",
        _quote(plan, d),
        _cautions(plan, d),
        f"<footer>sawplan {e(__version__)} · {e(plan.file)} · estimates only</footer>",
    ]
    return (
        '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n'
        f"<title>Cut sheet: {e(plan.job)}</title>\n<style>{CSS}</style>\n</head>\n<body>\n"
        + "\n".join(part for part in body if part)
        + "\n</body>\n</html>\n"
    )


def _facts(plan, d: Display) -> str:
    materials = "; ".join(f"{d.text(s.group)} ({s.designation})" for s in plan.sections)
    rows = []
    if plan.customer:
        rows.append(("Customer", plan.customer))
    if plan.due:
        rows.append(("Due", plan.due))
    rows += [
        ("Material", materials),
        ("Saw", plan.saw),
        (
            "Bars",
            f"{plan.bars_used}"
            + (" (proven optimal)" if plan.proven_optimal and plan.complete else ""),
        ),
        ("Bars to fetch", d.fmt("mass", plan.bars_weight_kg)),
        ("Pieces to ship", d.fmt("mass", plan.pieces_weight_kg)),
        ("Remnants to rack", d.fmt("mass", plan.remnants_weight_kg)),
        ("Pieces / cuts", f"{plan.pieces} / {plan.cuts}"),
        ("Waste", f"{plan.waste_pct:.1f} % of {d.bar_length(plan.stock_length_mm)}"),
        (
            "Time",
            f"{d.fmt('time', plan.total_time_min)} ({d.fmt('time', plan.total_cut_time_min)} cutting)",
        ),
        ("Blades on hand", str(plan.blades_needed)),
        ("Job file", plan.file),
    ]
    items = "".join(f"<dt>{escape(k)}</dt><dd>{escape(v)}</dd>" for k, v in rows)
    return f'<dl class="facts">{items}</dl>'


def _sections_table(plan, d: Display) -> str:
    head = (
        "<tr><th>Material and section</th><th>Blade</th><th class=n>Band speed</th>"
        "<th class=n>Feed</th><th class=n>Kerf</th><th class=n>Time/cut</th>"
        "<th class=n>Cuts</th><th class=n>Bars (⌈LP⌉)</th></tr>"
    )
    rows = []
    for s in plan.sections:
        label = escape(d.text(s.group))
        per_cut = escape(d.fmt("time", s.cut_time_min))
        if s.calibration_n:  # on a line of its own, so the column can stay narrow
            per_cut += f' <span class="sub">(×{s.calibration_factor:.2f} from log)</span>'
        rows.append(
            f"<tr><td>{label}</td>"
            f"<td>{escape(f'{s.pitch} TPI, {s.tooth_form}, {s.tooth_set} set')}</td>"
            f"<td class=n>{escape(d.fmt('speed', s.band_speed_m_min, 3))}</td>"
            f"<td class=n>{escape(d.fmt('feed', s.feed_mm_min, 3))}</td>"
            f"<td class=n>{escape(d.length(s.kerf_mm))}</td>"
            f"<td class=n>{per_cut}</td><td class=n>{s.cuts}</td>"
            f"<td class=n>{s.bars_used} ({s.lp_bound_bars})</td></tr>"
        )
        if s.breakin_cuts:
            rows.append(f"<tr><td colspan=8>{label}: {escape(breakin_text(s, d))}</td></tr>")
        for w in s.warnings:
            rows.append(f"<tr><td colspan=8>⚠ {label}: {escape(d.text(w))}</td></tr>")
    return f"<table>{head}{''.join(rows)}</table>"


# Stands for a bar's number in the text kept for all the bars cut alike; every
# text from the job is escaped, so "<" never comes from it.
_NUMBER = "<bar-number/>"


def _bar_blocks(plan, d: Display) -> Iterator[str]:
    """Every bar's block; the drawing and table are worked out once per bar pattern."""
    body = PerPattern(lambda b: _bar_body(replace(b, bar=_NUMBER), d))
    stock = StockText(d)
    for b in plan.bars:
        yield _bar_block(b, d, stock(b), body(b).replace(_NUMBER, str(b.bar)))


def _bar_block(b, d: Display, stock: str, body: str) -> str:
    e = escape
    lift = f'<span class="{e(b.handling)}">{e(b.handling)}</span>'
    title = (
        f"<h3>Bar {b.bar} · {e(stock)}"
        + (f" · heat {e(b.heat)}" if b.heat else "")
        + (f" · rack {e(b.location)}" if b.location else "")
        + f" · {e(d.fmt('mass', b.weight_kg))} {lift}</h3>"
    )
    return f'<section class="bar" id="bar-{b.bar}">{title}{body}</section>'


def _bar_body(b, d: Display) -> str:
    """The bar's drawing and its table of steps."""
    e = escape
    rows = []
    if b.trim_cut_mm is not None:
        rows.append(
            f"<tr><td class=step>trim</td><td class=n>{e(d.span(0.0, b.trim_mm))}</td>"
            "<td>squaring cut</td><td></td><td></td></tr>"
        )
    for row in piece_rows(b):
        p = row.first
        extra = "".join(f" · {e(x)}" for x in (p.drawing, p.tolerance) if x)
        rows.append(
            f"<tr><td class=step>{e(row.step(d))}</td><td class=n>{e(row.span(d))}</td>"
            f"<td>{e(row.what(d))}{extra}</td>"
            f"<td class=n>{e(row.weight(d))}</td><td>{e(p.handling)}</td></tr>"
        )
    if b.length_mm - b.remnant_start_mm > 1e-9:
        if b.remnant_kept:
            what = (
                f'<span class="keep">keep remnant {e(d.tape(b.remnant_mm))}, '
                f"mark heat {e(b.heat or '—')}</span>"
            )
        else:
            what = f"scrap {e(d.tape(b.remnant_mm))}"
        weight = e(d.fmt("mass", b.remnant_weight_kg)) if b.remnant_mm > 0 else ""
        rows.append(
            f"<tr><td class=step>end</td>"
            f"<td class=n>{e(d.span(b.remnant_start_mm, b.length_mm))}</td>"
            f"<td>{what}</td><td class=n>{weight}</td><td></td></tr>"
        )
    head = (
        f"<tr><th>Step</th><th class=n>From head ({e(d.label('length'))})</th><th>Piece</th>"
        "<th class=n>Weight</th><th>Lift</th></tr>"
    )
    return f"{bar_svg(b, d)}<table>{head}{''.join(rows)}</table>"


def bar_svg(b, d: Display) -> str:
    """The bar to scale: trim, pieces with marks, kerfs, remnant or scrap, cut positions."""
    e = escape
    total = b.length_mm if b.length_mm > 0 else 1.0
    sx = VIEW_W / total
    height = BAR_Y + BAR_H + TICK_FONT + 12
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="-4 0 {VIEW_W + 8:g} {height:g}" '
        f'role="img" aria-label="bar {b.bar}, {e(d.tape(b.length_mm))}" '
        f'font-family="sans-serif" font-size="{FONT:g}">',
        f'<defs><pattern id="keep-{b.bar}" width="8" height="8" patternUnits="userSpaceOnUse" '
        'patternTransform="rotate(45)"><rect width="8" height="8" fill="#fff"/>'
        '<line x1="0" y1="0" x2="0" y2="8" stroke="#2a7" stroke-width="3"/></pattern></defs>',
        f'<text x="0" y="{FONT:g}">head</text><text x="{VIEW_W:g}" y="{FONT:g}" '
        'text-anchor="end">'
        f"{e(d.tape(b.length_mm))}</text>",
    ]

    def rect(x0: float, x1: float, fill: str, cls: str) -> str:
        w = max((x1 - x0) * sx, 0.6)
        return (
            f'<rect class="{cls}" x="{x0 * sx:.2f}" y="{BAR_Y:g}" width="{w:.2f}" '
            f'height="{BAR_H:g}" fill="{fill}" stroke="#000" stroke-width="0.5"/>'
        )

    def label(x0: float, x1: float, text: str, *, bold: bool = False) -> str:
        w = (x1 - x0) * sx
        if w < CHAR_W * FONT * len(text) + 4:
            return ""
        weight = ' font-weight="bold"' if bold else ""
        return (
            f'<text x="{(x0 + x1) / 2 * sx:.2f}" y="{BAR_Y + BAR_H / 2 + FONT * 0.35:g}" '
            f'text-anchor="middle"{weight}>{e(text)}</text>'
        )

    if b.trim_mm > 0:
        out.append(rect(0.0, b.trim_mm, "#555", "trim"))
    marks = sorted({p.mark for p in b.pieces})
    tints = piece_tints()
    for i, p in enumerate(b.pieces):
        colour = tints[marks.index(p.mark) % len(tints)]
        out.append(rect(p.start_mm, p.end_mm, colour, "piece"))
        nxt = b.pieces[i + 1].start_mm if i + 1 < len(b.pieces) else None
        if nxt is not None and nxt > p.end_mm:
            out.append(rect(p.end_mm, nxt, "#000", "kerf"))
    for row in piece_rows(b, run=2):
        first, last = row.first, row.last
        one = label(first.start_mm, first.end_mm, first.mark, bold=True)
        # each piece its own mark when a few pieces are wide enough; a long run gets "A ×56"
        if row.count == 1 or (one and row.count <= MAX_SINGLE_MARKS):
            for p in b.pieces[first.seq - 1 : last.seq]:
                out.append(label(p.start_mm, p.end_mm, p.mark, bold=True))
            continue
        text = f"{first.mark} ×{row.count}"
        mid = (first.start_mm + last.end_mm) / 2 * sx
        half = CHAR_W * FONT * len(text) / 2 + 4
        out.append(
            f'<rect x="{mid - half:.2f}" y="{BAR_Y + BAR_H / 2 - FONT * 0.7:g}" '
            f'width="{2 * half:.2f}" height="{FONT * 1.3:g}" rx="3" fill="#fff" fill-opacity="0.9"/>'
        )
        out.append(
            f'<text x="{mid:.2f}" y="{BAR_Y + BAR_H / 2 + FONT * 0.35:g}" text-anchor="middle" '
            f'font-weight="bold">{e(text)}</text>'
        )
    if b.length_mm - b.remnant_start_mm > 1e-9:
        last = b.pieces[-1].end_mm if b.pieces else b.trim_mm
        if b.remnant_start_mm > last:
            out.append(rect(last, b.remnant_start_mm, "#000", "kerf"))
        if b.remnant_mm > 0:
            if b.remnant_kept:
                out.append(rect(b.remnant_start_mm, b.length_mm, f"url(#keep-{b.bar})", "remnant"))
                text = f"R {d.tape(b.remnant_mm)}" + (f" {b.heat}" if b.heat else "")
                out.append(
                    label(b.remnant_start_mm, b.length_mm, text, bold=True)
                    or label(b.remnant_start_mm, b.length_mm, "R", bold=True)
                )
            else:
                out.append(rect(b.remnant_start_mm, b.length_mm, "#ddd", "scrap"))
                out.append(label(b.remnant_start_mm, b.length_mm, "scrap"))
    # cut positions under the bar, skipping labels that would overlap
    ticks = [0.0]
    if b.trim_cut_mm is not None:
        ticks.append(b.trim_mm)
    ticks += [p.end_mm for p in b.pieces]
    ticks.append(b.length_mm)
    shown = -LABEL_GAP
    y = BAR_Y + BAR_H
    for i, x in enumerate(ticks):
        px = x * sx
        out.append(f'<line x1="{px:.2f}" y1="{y:g}" x2="{px:.2f}" y2="{y + 6:g}" stroke="#000"/>')
        is_end = i == len(ticks) - 1
        if px - shown >= LABEL_GAP and (is_end or VIEW_W - px >= LABEL_GAP):
            anchor = "start" if i == 0 else "end" if is_end else "middle"
            out.append(
                f'<text x="{px:.2f}" y="{y + TICK_FONT + 6:g}" text-anchor="{anchor}" '
                f'font-size="{TICK_FONT:g}">'
                f"{e(d.pos(x))}</text>"
            )
            shown = px
    out.append("</svg>")
    return "".join(part for part in out if part)


def _remnants(plan, d: Display) -> str:
    if not plan.remnants:
        return ""
    rows = "".join(
        f"<tr><td class=n>{r.bar}</td><td>{escape(d.text(r.group))}</td>"
        f"<td class=n>{escape(d.tape(r.length_mm))}</td><td>{escape(r.heat or '—')}</td>"
        f"<td>{escape(r.location or '—')}</td><td class=n>{escape(d.fmt('mass', r.weight_kg))}</td></tr>"
        for r in plan.remnants
    )
    return (
        "<h2>Remnants to mark and rack</h2><table><tr><th class=n>Bar</th><th>Material and "
        "section</th><th class=n>Length</th><th>Heat</th><th>Rack</th><th class=n>Weight</th></tr>"
        f"{rows}</table>"
    )


def _quote(plan, d: Display) -> str:
    c = plan.currency
    rows = [
        ("Area cut", d.fmt("area", plan.cut_area_cm2 * 100, 4)),
        ("Blades worn by this job", f"{fmt_number(plan.blades_consumed, 2)}"),
        (
            "Blades to have on hand",
            f"{plan.blades_needed} ({forecast_text(plan)})",
        ),
        ("Blade life", d.text(plan.blade_life_source)),
        *(
            (f"{q.item.capitalize()} ({d.text(q.basis)})", fmt_money(q.amount, c))
            for q in plan.quote
        ),
    ]
    body = "".join(f"<tr><th>{escape(k)}</th><td>{escape(v)}</td></tr>" for k, v in rows)
    return f"<table>{body}</table>"


def _cautions(plan, d: Display) -> str:
    notes = "".join(f"<li>{escape(d.text(n))}</li>" for n in plan.notes)
    cautions = "".join(f"<li>{escape(d.text(c))}</li>" for c in plan.cautions)
    out = ""
    if notes:
        out += f'<h2>Notes</h2><ul class="notes">{notes}</ul>'
    out += f'<div class="cautions"><h2>Cautions</h2><ul>{cautions}</ul></div>'
    return out
