"""Terminal charts of the blade log, drawn with plotext 6 and returned as text.

Each chart takes a result from ``sawplan.life`` and gives back a string: the
plot, then a one-line key (plotext's own legend box covers data at terminal
sizes, so it is switched off).  The same data are available as rows through
the ``*_rows`` functions, for ``--json`` and ``--csv``.

plotext 6 keeps one global figure: every chart clears it first, and the
terminal size limit is switched off so the size asked for is the size drawn,
with or without a terminal.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

from sawplan.display import Display, UnitSystem, as_display, fmt_percent, fmt_plain
from sawplan.render import terminal_text

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import BladeCost, ModeRanking, WearCurve, WeibullPlot

WIDTH = 72
HEIGHT = 20


def _figure(width: int, height: int) -> Any:
    import plotext

    plotext.terminal.limit(False, False)
    fig = plotext.figure
    fig.clear()
    fig.plot_size(width, height)
    fig.legend(False)
    return fig


def _text(fig: Any, key: str, colorless: bool) -> str:
    body = fig.build().string(colorless=colorless).rstrip("\n")
    lines = [line.rstrip() for line in body.split("\n")]
    return "\n".join(lines) + ("\n" + key if key else "")


def _nice_ticks(lo: float, hi: float, count: int = 5) -> list[float]:
    """Round tick values (1, 2, 5 × 10ⁿ steps) covering [lo, hi]."""
    if hi <= lo:
        return [lo]
    raw = (hi - lo) / max(count - 1, 1)
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw)
    first = math.ceil(lo / step - 1e-9) * step
    ticks = []
    v = first
    while v <= hi + 1e-9 * step:
        ticks.append(round(v, 10))
        v += step
    return ticks


# --- wear curve ---------------------------------------------------------------------------


def wear_rows(curve: WearCurve) -> tuple[list[str], list[list[Any]]]:
    headers = [
        "cut",
        "area_cm2",
        "cumulative_area_cm2",
        "time_min",
        "rate_cm2_min",
        "trend_rate_cm2_min",
        "in_break_in",
        "rise",
    ]
    rows = [
        [
            p.index + 1,
            p.area_cm2,
            p.cumulative_area_cm2,
            p.time_min,
            p.rate_cm2_min,
            1.0 / p.trend_min_per_cm2,
            int(p.in_break_in),
            p.rise,
        ]
        for p in curve.points
    ]
    return headers, rows


def wear_chart(
    curve: WearCurve,
    *,
    title: str = "wear curve",
    units: UnitSystem | Display = UnitSystem.METRIC,
    width: int = WIDTH,
    height: int = HEIGHT,
    colorless: bool = True,
    verdict: str | None = None,
) -> str:
    """Cutting rate of each cut against area cut so far, with the trend and the steady level.

    A falling rate at the same feed setting is the wear; the end-of-life line
    sits ``rise_threshold`` slower than the steady rate.  ``verdict`` replaces the
    curve's own verdict, e.g. the life line of a blade already retired.
    """
    if not curve.points:
        return terminal_text(f"{title}: no timed cuts to draw")
    d = as_display(units)
    area = 100.0  # cm² → core mm²
    xs = [d.value("area", p.cumulative_area_cm2 * area) for p in curve.points]
    rates = [d.value("rate", p.rate_cm2_min * area) for p in curve.points]
    trend = [d.value("rate", area / p.trend_min_per_cm2) for p in curve.points]
    fig = _figure(width, height)
    fig.title(terminal_text(title))
    fig.label(f"area cut ({d.label('area')})", "x")
    fig.label(f"rate ({d.label('rate')})", "y")
    key = ["o each cut", "▚ trend (median of 5)"]
    if curve.steady_rate_cm2_min is not None:
        steady = d.value("rate", curve.steady_rate_cm2_min * area)
        fig.line(steady, 0)
        fig.line(steady / (1.0 + curve.rise_threshold), 0)
        key.append(
            f"── steady rate {fmt_plain(steady)}, and end-of-life signs "
            f"(time per area +{fmt_percent(curve.rise_threshold)})"
        )
    if len(xs) > 1:
        fig.draw(fig.signal(xs, trend).lines(True))
    fig.draw(fig.signal(xs, rates, marker="o"))
    levels = rates + trend
    if curve.steady_rate_cm2_min is not None:
        levels.append(steady / (1.0 + curve.rise_threshold))
    top = max(levels) * 1.05
    bottom = _nice_floor(min(levels) * 0.9)
    fig.ruler("y").lim(bottom, top)
    ticks = _nice_ticks(bottom, top)
    fig.ruler("y").ticks(ticks, labels=[fmt_plain(t) for t in ticks])
    x_hi = max(xs) * 1.02
    x_ticks = _nice_ticks(0, x_hi)
    fig.ruler("x").lim(0, x_hi)
    fig.ruler("x").ticks(x_ticks, labels=[fmt_plain(t) for t in x_ticks])
    status = (
        verdict
        or {
            "break-in": "still breaking in",
            "steady": "steady wear",
            "end-of-life-signs": "end-of-life signs",
            "too-few-cuts": "too few cuts after break-in to judge",
        }[curve.status]
    )
    return _text(fig, "   ".join(key) + f"\nverdict: {status}", colorless)


def _covering_ticks(top: float, *, integer: bool = False, count: int = 5) -> list[float]:
    """0, step, 2·step … up to the first tick at or above ``top`` (1, 2, 2.5, 5 × 10ⁿ steps)."""
    raw = top / max(count - 1, 1)
    mag = 10 ** math.floor(math.log10(raw))
    steps = (1, 2, 5, 10) if integer else (1, 2, 2.5, 5, 10)
    step = next(m * mag for m in steps if m * mag >= raw)
    if integer:
        step = max(1, round(step))
    ticks = [0.0]
    while ticks[-1] < top - 1e-9 * step:
        ticks.append(round(ticks[-1] + step, 10))
    return ticks


def _nice_floor(v: float) -> float:
    """Round ``v`` down to one significant figure (0 stays 0)."""
    if v <= 0:
        return 0.0
    mag = 10 ** math.floor(math.log10(v))
    return math.floor(v / mag) * mag


# --- Weibull probability plot -------------------------------------------------------------


def weibull_rows(plot: WeibullPlot) -> tuple[list[str], list[list[Any]]]:
    headers = ["kind", "life_cm2", "adjusted_rank", "median_rank", "x_ln_life", "y_ln_ln"]
    rows: list[list[Any]] = [
        ["failure", p.life_cm2, p.adjusted_rank, p.median_rank, p.x, p.y] for p in plot.points
    ]
    for x, y in plot.line or ():
        rows.append(["fit", math.exp(x), None, 1.0 - math.exp(-math.exp(y)), x, y])
    return headers, rows


def weibull_chart(
    plot: WeibullPlot,
    *,
    title: str = "Weibull probability plot",
    units: UnitSystem | Display = UnitSystem.METRIC,
    width: int = WIDTH,
    height: int = HEIGHT,
    colorless: bool = True,
) -> str:
    """Failures at their median ranks on Weibull axes; a Weibull sample lies on a line."""
    if not plot.points:
        return terminal_text(f"{title}: no failures to plot")
    d = as_display(units)
    to_display = d.value("area", 100.0)  # one cm² in display units
    xs = [p.x for p in plot.points]
    ys = [p.y for p in plot.points]
    all_x = xs + [x for x, _ in plot.line or ()]
    all_y = ys + [y for _, y in plot.line or ()]
    x_lo, x_hi = min(all_x) - 0.05, max(all_x) + 0.05
    y_lo, y_hi = min(all_y) - 0.1, max(all_y) + 0.1
    fig = _figure(width, height)
    fig.title(terminal_text(title))
    fig.label(f"life, area cut ({d.label('area')}, log scale)", "x")
    fig.label("failed", "y")
    key = ["o failures (median ranks)"]
    if plot.line:
        fig.draw(fig.signal([x for x, _ in plot.line], [y for _, y in plot.line]).lines(True))
        key.append("▚ fitted Weibull")
    fig.draw(fig.signal(xs, ys, marker="o"))
    fig.ruler("x").lim(x_lo, x_hi)
    fig.ruler("y").lim(y_lo, y_hi)
    probs = _probability_ticks(y_lo, y_hi, rows=height - 5)
    y_labels = [f"{100 * p:g}%" for p in probs]
    columns = width - max((len(label) for label in y_labels), default=0) - 2
    lives = _log_ticks(math.exp(x_lo) * to_display, math.exp(x_hi) * to_display, columns)
    fig.ruler("x").ticks(
        [math.log(v / to_display) for v in lives], labels=[fmt_plain(v) for v in lives]
    )
    fig.ruler("y").ticks([weibull_ordinate(p) for p in probs], labels=y_labels)
    return _text(fig, "   ".join(key), colorless)


def weibull_ordinate(p: float) -> float:
    """Weibull-paper ordinate ln(−ln(1 − p)) of a failed fraction ``p``."""
    return math.log(-math.log1p(-p))


# probability labels, most wanted first: η (63.2 %), B10, median, then the rest
PROBABILITY_PRIORITY = (0.632, 0.1, 0.5, 0.9, 0.01, 0.99, 0.2, 0.05, 0.02)


def _probability_ticks(y_lo: float, y_hi: float, rows: int) -> list[float]:
    """Probability ticks inside [y_lo, y_hi], one per text row.

    plotext puts a tick on row round((y − y_lo) / (y_hi − y_lo) · (rows − 1)) and a later
    label on the same row overprints an earlier one, so only the most useful level of
    each row is kept.
    """
    taken: set[int] = set()
    kept: list[float] = []
    for p in PROBABILITY_PRIORITY:
        y = weibull_ordinate(p)
        row = round((y - y_lo) / (y_hi - y_lo) * (rows - 1))
        if y_lo <= y <= y_hi and row not in taken:
            taken.add(row)
            kept.append(p)
    return sorted(kept)


LABEL_GAP = 2  # blank columns wanted between two tick labels


def _log_ticks(lo: float, hi: float, columns: int = WIDTH) -> list[float]:
    """Round values for a log axis from ``lo`` to ``hi`` drawn ``columns`` wide.

    1, 2, 5 × 10ⁿ when their labels fit; else whole decades (every second, third …
    decade on a crowded axis); on an axis shorter than a decade, 1 … 9 × 10ⁿ.  The largest 1-2-5 value on the axis is always kept, so
    the ticks run to the top of the data rather than stopping a decade short.
    """
    span = math.log(hi / lo)

    def column(v: float) -> float:
        return math.log(v / lo) / span * (columns - 1)

    def clash(a: float, b: float) -> bool:
        room = (len(fmt_plain(a)) + len(fmt_plain(b))) / 2 + LABEL_GAP
        return abs(column(a) - column(b)) < room

    def fits(ticks: list[float]) -> bool:
        return all(not clash(a, b) for a, b in zip(ticks, ticks[1:], strict=False))

    candidates = _mantissa_values(lo, hi, (1, 2, 5))
    if len(candidates) < 2:
        candidates = _mantissa_values(lo, hi, range(1, 10))
    if not candidates:
        return [lo, hi]  # a very short axis: its two ends
    top = candidates[-1]
    if fits(candidates):
        return candidates
    decades = [v for v in candidates if _is_decade(v)]
    e_top = round(math.log10(decades[-1])) if decades else 0
    for every in range(1, len(decades) + 1):
        level = [v for v in decades if (round(math.log10(v)) - e_top) % every == 0]
        ticks = sorted(set(level) | {top})
        if len(ticks) > 1 and not _is_decade(top) and clash(ticks[-2], top):
            del ticks[-2]  # the top of the data matters more than the decade just below it
        if fits(ticks):
            return ticks
    for every in range(2, len(candidates) + 1):  # no decade on the axis: every n-th value
        ticks = candidates[::-1][::every][::-1]
        if fits(ticks):
            return ticks
    return [top]


def _mantissa_values(lo: float, hi: float, mantissas: Any) -> list[float]:
    """m × 10ⁿ values inside [lo, hi], smallest first."""
    out = []
    for e in range(math.floor(math.log10(lo)), math.ceil(math.log10(hi)) + 1):
        for m in mantissas:
            v = float(f"{m}e{e}")  # exact decimal, no 2 × 10⁻¹ drift
            if lo <= v <= hi:
                out.append(v)
    return out


def _is_decade(v: float) -> bool:
    return f"{v:e}".startswith("1.")


# --- bar charts ----------------------------------------------------------------------------


def modes_rows(ranking: ModeRanking) -> tuple[list[str], list[list[Any]]]:
    headers = ["mode", "name", "count", "share", "usual_causes"]
    rows = [[m.code, m.name, m.count, m.share, "; ".join(m.causes)] for m in ranking.modes]
    return headers, rows


def modes_chart(
    ranking: ModeRanking,
    *,
    title: str = "failure modes",
    width: int = WIDTH,
    height: int | None = None,
    colorless: bool = True,
) -> str:
    """Retired blades by failure mode, most frequent on top."""
    if not ranking.modes:
        return terminal_text(f"{title}: no failures recorded")
    labels = [m.code for m in ranking.modes]
    counts = [m.count for m in ranking.modes]
    text = _hbars(labels, counts, title, "blades", width, height, colorless, integer=True)
    if ranking.unrecorded:
        text += f"\n{ranking.unrecorded} failure(s) without a recorded mode are not shown"
    return text


def cost_rows(costs: Sequence[BladeCost]) -> tuple[list[str], list[list[Any]]]:
    headers = ["blade_type", "price", "life_cm2", "life_method", "blades", "cost_per_m2"]
    rows = [
        [c.blade_type, c.price, c.life_cm2, c.life_method, c.blades, c.cost_per_m2] for c in costs
    ]
    return headers, rows


def cost_chart(
    costs: Sequence[BladeCost],
    *,
    title: str = "blade cost per area cut",
    units: UnitSystem | Display = UnitSystem.METRIC,
    width: int = WIDTH,
    height: int | None = None,
    colorless: bool = True,
) -> str:
    """Price ÷ life per blade type, cheapest on top (currency as the prices were logged)."""
    if not costs:
        return terminal_text(f"{title}: no blade type has both a price and a retired blade yet")
    d = as_display(units)
    labels = [d.text(c.blade_type) for c in costs]
    values = [d.per("large_area", c.cost_per_m2 / 1e6) for c in costs]
    per = d.label("large_area")
    return _hbars(labels, values, title, f"cost per {per} cut", width, height, colorless)


def _hbars(
    labels: Sequence[str],
    values: Sequence[float],
    title: str,
    x_label: str,
    width: int,
    height: int | None,
    colorless: bool,
    *,
    integer: bool = False,
) -> str:
    """Horizontal bars, the first item on top, from 0 to a round upper limit."""
    height = height or max(8, 3 * len(labels) + 5)
    labels = [terminal_text(label) for label in labels]  # blade types hold stored text
    fig = _figure(width, height)
    fig.title(terminal_text(title))
    fig.label(x_label, "x")
    # plotext draws the first bar at the bottom: reverse so the first item is on top
    fig.draw(fig.bar(list(reversed(labels)), list(reversed(values)), orientation="h"))
    top = max(values)
    ticks = _covering_ticks(top, integer=integer)
    upper = ticks[-1]
    fig.ruler("x").lim(0, upper)
    fig.ruler("x").ticks(ticks, labels=[fmt_plain(t) for t in ticks])
    return _text(fig, "", colorless)


# --- one cut: width of cut and feed against depth -----------------------------------------


def cut_chart(r: Any, units: UnitSystem | Display, *, width: int = 72, height: int = 18) -> str:
    """Chord W(y) and the predicted feed through the cut, against depth."""
    from sawplan.cutting.explain import LIMIT_WORDS

    d = as_display(units)
    ys = [d.value("length", p.y_mm) for p in r.profile]
    chords = [d.value("length", p.chord_mm) for p in r.profile]
    feeds = [d.value("feed", p.feed_mm_min) for p in r.profile]
    allowed = [d.value("feed", p.allowed_feed_mm_min) for p in r.profile]
    parts = []
    fig = _figure(width, height // 2 + 2)
    fig.title(f"width of cut ({d.label('length')}) against depth ({d.label('length')})")
    fig.draw(fig.signal(ys, chords).lines(True))
    _depth_axes(fig, ys, chords)
    parts.append(_text(fig, "", True))
    fig = _figure(width, height // 2 + 2)
    fig.title(f"down-feed ({d.label('feed')}) against depth ({d.label('length')})")
    fig.draw(fig.signal(ys, allowed).lines(True))
    fig.draw(fig.signal(ys, feeds, marker="o"))
    _depth_axes(fig, ys, allowed + feeds)
    slow = min(r.profile, key=lambda p: p.allowed_feed_mm_min)
    key = (
        "▚ what the limits allow   o what the saw runs   slowest at "
        f"{d.fmt('length', slow.y_mm, 3)} deep ({LIMIT_WORDS[slow.limit]})"
    )
    parts.append(_text(fig, key, True))
    return "\n".join(parts)


def _depth_axes(fig: Any, xs: list[float], ys: list[float]) -> None:
    top = max(ys) * 1.08 if max(ys) > 0 else 1.0
    y_ticks = _nice_ticks(0, top, 4)
    fig.ruler("y").lim(0, top)
    fig.ruler("y").ticks(y_ticks, labels=[fmt_plain(t) for t in y_ticks])
    x_hi = max(xs) if max(xs) > 0 else 1.0
    x_ticks = _nice_ticks(0, x_hi)
    fig.ruler("x").lim(0, x_hi)
    fig.ruler("x").ticks(x_ticks, labels=[fmt_plain(t) for t in x_ticks])


# --- one cut: cost per cut against band speed ---------------------------------------------

RUN_MARKS = {"recommended": "R", "cost": "C", "production": "P"}


def speed_cost_rows(curve: Sequence[Any]) -> tuple[list[str], list[list[Any]]]:
    """``cutting.cut_cost.cost_curve`` points as rows (money in the shop's currency)."""
    headers = [
        "band_speed_m_min",
        "cut_time_min",
        "blade_life_cm2",
        "machine",
        "blade",
        "change",
        "total",
        "time_per_cut_min",
    ]
    rows = [
        [p.band_speed_m_min, p.cut_time_min, p.blade_life_cm2, p.machine, p.blade, p.change,
         p.total, p.time_per_cut_min]
        for p in curve
    ]  # fmt: skip
    return headers, rows


def speed_cost_chart(
    curve: Sequence[Any],
    runs: Sequence[Any] = (),
    *,
    title: str = "cost per cut against band speed",
    units: UnitSystem | Display = UnitSystem.METRIC,
    width: int = WIDTH,
    height: int = HEIGHT,
    colorless: bool = True,
) -> str:
    """The three cost terms stacked at each band speed; the speeds of ``runs`` marked.

    ``curve`` is ``cost_curve`` of one cut (as many points as the plot has columns
    reads best); ``runs`` are ``RunSpeed`` results (recommended, cheapest, fastest).
    """
    if not curve:
        return terminal_text(f"{title}: no speeds to draw")
    d = as_display(units)
    xs = [d.value("speed", p.band_speed_m_min) for p in curve]
    fig = _figure(width, height)
    fig.title(terminal_text(title))
    fig.label(f"band speed ({d.label('speed')})", "x")
    fig.label("cost per cut", "y")
    top = _covering_ticks(max(p.total for p in curve) * 1.1)
    # drawn as totals from the top term down, so the last drawn owns each shared text cell
    layers = (
        ([p.total for p in curve], "░"),
        ([p.machine + p.blade for p in curve], "▒"),
        ([p.machine for p in curve], "█"),
    )
    for values, marker in layers:
        fig.draw(fig.bar(xs, values, marker=marker, width=1.0, lines=False))
    key = ["█ machine and operator", "▒ blade", "░ blade change"]
    marks = []
    for r in runs:
        x = d.value("speed", r.band_speed_m_min)
        mark = RUN_MARKS.get(r.run, "?")
        fig.line(x, "v", style="dotted")
        fig.draw(fig.text(x, top[-1] * 0.97, mark))
        marks.append(f"{mark} {r.run} {fmt_plain(x)} {d.label('speed')}")
    lo, hi = min(xs), max(xs)
    fig.ruler("x").lim(lo, hi if hi > lo else lo + 1.0)
    x_ticks = _nice_ticks(lo, hi, 6)
    fig.ruler("x").ticks(x_ticks, labels=[fmt_plain(t) for t in x_ticks])
    fig.ruler("y").lim(0, top[-1])
    fig.ruler("y").ticks(top, labels=[fmt_plain(t) for t in top])
    return _text(fig, "   ".join(key) + ("\n" + " · ".join(marks) if marks else ""), colorless)
