"""The office pages' charts: matplotlib figures rendered on the server to inline SVG.

Each chart is drawn from a view (``views.py``) in the display units of the
shop, with its axes labelled and its unit named; the SVG carries a
``<title>`` and ``<desc>`` (read by screen readers and shown on hover), and
every chart has its data as rows for the ``chart.csv`` link beside it (the
rows the CLI's ``sawplan chart … --csv`` gives, where it has the chart).

matplotlib is imported inside the functions (it costs about half a second)
and used through its object API with the Agg/SVG canvas, never ``pyplot``:
no global figure, no GUI.  Its settings (text kept as text, fixed ids) are
global, so drawing holds a lock.
"""

from __future__ import annotations

import io
import math
import re
import threading
from collections.abc import Sequence
from html import escape
from typing import TYPE_CHECKING, Any

from sawplan.charts import cost_rows, modes_rows, weibull_ordinate, weibull_rows
from sawplan.display import Display, fmt_percent, fmt_plain

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import BladeCost, ModeRanking
    from sawplan.station.office.views import (
        BladeBalance,
        CalibrationView,
        ShelfView,
        WeibullView,
    )

WIDTH_IN, HEIGHT_IN = 7.5, 4.2  # figure size in inches (the page scales the SVG to fit)
# fractions failed labelled on the Weibull plot, most wanted first: η (63.2 %), B10, the median
PROBABILITY_TICKS = (0.632, 0.1, 0.5, 0.9, 0.01, 0.99, 0.2, 0.05, 0.02, 0.001, 0.3, 0.8, 0.95,
                     0.005, 0.002, 0.0001, 0.0005, 0.0002, 0.999)  # fmt: skip
TICK_GAP = 1 / 16  # least gap between two labelled fractions, as a share of the axis
_LOCK = threading.Lock()
_RC = {
    "svg.fonttype": "none",  # text stays text: smaller, searchable, read aloud
    "svg.hashsalt": "sawplan-office",  # the same ids on every run
    "font.size": 10.0,
    "axes.grid": True,
    "grid.alpha": 0.35,
}


def _svg(fig: Any, name: str, title: str, desc: str) -> str:
    """The figure as an ``<svg>`` element to put inline: ids prefixed, no style, title first."""
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    text = buf.getvalue()
    text = text[text.index("<svg") :]
    ids = re.findall(r'\bid="([^"]+)"', text)
    for old in sorted(set(ids), key=len, reverse=True):
        text = text.replace(f'id="{old}"', f'id="{name}-{old}"')
        text = text.replace(f"#{old})", f"#{name}-{old})").replace(f'#{old}"', f'#{name}-{old}"')
    text = re.sub(r"<style[^>]*>.*?</style>", "", text, flags=re.S)
    text = re.sub(r'style="([^"]*)"', _presentation, text)
    head_end = text.index(">") + 1
    label = (
        f' role="img" aria-labelledby="{name}-title {name}-desc" class="chart"'
        ' stroke-linejoin="round" stroke-linecap="butt"'
        f'><title id="{name}-title">{escape(title)}</title><desc id="{name}-desc">{escape(desc)}</desc>'
    )
    return text[: head_end - 1] + label + text[head_end:]


def _presentation(style: Any) -> str:
    """``style="fill: #fff; stroke-width: 0.8"`` as presentation attributes.

    The station's Content-Security-Policy allows no inline styles; SVG's
    presentation attributes are part of the drawing and are not styles, so the
    charts look the same under it.  matplotlib only writes properties that
    have an attribute of the same name.
    """
    pairs = [d.split(":", 1) for d in style.group(1).split(";") if ":" in d]
    return " ".join(f'{k.strip()}="{v.strip()}"' for k, v in pairs)


def _draw(
    name: str, title: str, desc: str, paint, height_in: float = HEIGHT_IN, *, panels: bool = False
) -> str:
    """Draw with ``paint(axes)`` (``paint(figure)`` for ``panels``) and return the SVG."""
    from matplotlib import rc_context
    from matplotlib.figure import Figure

    with _LOCK, rc_context(_RC):
        fig = Figure(figsize=(WIDTH_IN, height_in), layout="constrained")
        paint(fig if panels else fig.add_subplot())
        return _svg(fig, name, title, desc)


def _area(d: Display, cm2: float) -> float:
    """A life in cm² as the shop reads areas (cm² or in²)."""
    return d.value("area", cm2 * 100.0)


# --- Weibull probability plot ------------------------------------------------------------


def weibull_svg(view: WeibullView, d: Display) -> str:
    """Failures at their adjusted median ranks on Weibull axes, the fit and its band."""
    pct = fmt_percent(view.confidence)
    points = view.plot.points
    title = "Weibull probability plot of blade life"
    desc = f"{len(points)} failures of {view.plot.n} blades on Weibull axes"
    if view.shape is not None:
        desc += (
            f"; fitted shape {view.shape:.2f}, scale {d.fmt('area', view.scale_cm2 * 100.0)}; "
            f"shaded: the {pct} likelihood-ratio interval of the life at each fraction failed"
        )

    def paint(ax: Any) -> None:
        ax.set_xscale("log")
        band = [b for b in view.bands if math.isfinite(b.low_cm2) and math.isfinite(b.high_cm2)]
        if band:
            ax.fill_betweenx(
                [weibull_ordinate(b.failed_fraction) for b in band],
                [_area(d, b.low_cm2) for b in band],
                [_area(d, b.high_cm2) for b in band],
                color="#9ecae1",
                alpha=0.55,
                linewidth=0,
                label=f"{pct} interval (likelihood ratio)",
            )
        if view.plot.line:
            ax.plot(
                [_area(d, math.exp(x)) for x, _ in view.plot.line],
                [y for _, y in view.plot.line],
                color="#08519c",
                linewidth=1.8,
                label=f"Weibull fit, shape {view.shape:.2f}",
            )
        ax.plot(
            [_area(d, p.life_cm2) for p in points],
            [p.y for p in points],
            "o",
            color="#111111",
            markersize=4,
            label="retired blades (adjusted median ranks)",
        )
        ys = [p.y for p in points] + [y for _, y in view.plot.line or ()]
        lo, hi = min(ys) - 0.2, max(ys) + 0.2
        ticks = probability_ticks(lo, hi)
        ax.set_yticks([weibull_ordinate(p) for p in ticks], [f"{100 * p:g} %" for p in ticks])
        ax.set_ylim(lo, hi)
        _plain_log_ticks(ax.xaxis)
        ax.set_xlabel(f"life: area cut ({d.label('area')}, log scale)")
        ax.set_ylabel("blades failed (Weibull scale)")
        ax.legend(loc="upper left", fontsize=8)

    return _draw("weibull", title, desc, paint)


def _plain_log_ticks(axis: Any) -> None:
    """Label a log axis 10, 100, 1,000 (as the tables read), not as powers of ten."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    axis.set_major_locator(LogLocator(base=10.0))
    axis.set_major_formatter(FuncFormatter(lambda v, _pos: fmt_plain(v)))
    axis.set_minor_formatter(NullFormatter())


def probability_ticks(lo: float, hi: float) -> list[float]:
    """Fractions failed to label between the ordinates ``lo`` and ``hi``, none crowded."""
    kept: list[float] = []
    for p in PROBABILITY_TICKS:
        y = weibull_ordinate(p)
        if lo <= y <= hi and all(
            abs(y - weibull_ordinate(q)) >= TICK_GAP * (hi - lo) for q in kept
        ):
            kept.append(p)
    return sorted(kept)


def weibull_csv(view: WeibullView | None) -> tuple[list[str], list[list[Any]]]:
    """The CLI's Weibull rows (points and fit line), then the band's lower and upper edges."""
    from sawplan.life import WeibullPlot

    headers, rows = weibull_rows(view.plot if view else WeibullPlot((), None, 0))
    for b in view.bands if view else ():
        y = weibull_ordinate(b.failed_fraction)
        for kind, life in (("band-low", b.low_cm2), ("band-high", b.high_cm2)):
            rows.append([kind, life, None, b.failed_fraction, math.log(life), y])
    return headers, rows


# --- failure modes and cost per area --------------------------------------------------------


def modes_svg(ranking: ModeRanking) -> str:
    """Failed blades by failure mode, the most frequent on top (worn-out blades left out)."""
    modes = list(ranking.modes)
    desc = "; ".join(f"{m.name}: {m.count}" for m in modes) or "no failures recorded"

    def paint(ax: Any) -> None:
        names = [m.name for m in reversed(modes)]
        ax.barh(names, [m.count for m in reversed(modes)], color="#d95f0e")
        ax.set_xlabel("failed blades")
        ax.xaxis.get_major_locator().set_params(integer=True)
        ax.grid(axis="y", visible=False)

    return _draw("modes", "Failed blades by failure mode", desc, paint, _bars_height(len(modes)))


def modes_csv(ranking: ModeRanking) -> tuple[list[str], list[list[Any]]]:
    return modes_rows(ranking)


def cost_svg(costs: Sequence[BladeCost], d: Display, currency: str = "") -> str:
    """Blade price ÷ area one blade cuts, by blade type, the cheapest on top."""
    per = d.label("large_area")
    money = f" ({currency})" if currency else ""
    values = [d.per("large_area", c.cost_per_m2 / 1e6) for c in costs]
    desc = "; ".join(
        f"{d.text(c.blade_type)}: {v:,.2f}{money} per {per}"
        for c, v in zip(costs, values, strict=True)
    )

    def paint(ax: Any) -> None:
        ax.barh(
            [d.text(c.blade_type) for c in reversed(costs)], list(reversed(values)), color="#31a354"
        )
        ax.set_xlabel(f"blade cost per {per} cut{money}")
        ax.grid(axis="y", visible=False)

    title = "Blade cost per area cut, by blade type"
    return _draw("cost", title, desc or "no blade type priced yet", paint, _bars_height(len(costs)))


def cost_csv(costs: Sequence[BladeCost]) -> tuple[list[str], list[list[Any]]]:
    return cost_rows(costs)


def _bars_height(bars: int) -> float:
    return max(2.2, 0.9 + 0.42 * bars)


# --- calibration trend ----------------------------------------------------------------------


def calibration_svg(view: CalibrationView) -> str:
    """actual ÷ model time per block of entries against the date: one panel per saw,
    a line per material group, the quartiles shaded."""
    import datetime as dt

    saws: dict[str, dict[str, list]] = {}
    for p in view.trend:
        saws.setdefault(p.saw or "(no saw)", {}).setdefault(
            p.material_group or "(no group)", []
        ).append(p)
    desc = (
        "; ".join(
            f"{saw} · {group}: {pts[0].factor:.2f} to {pts[-1].factor:.2f} over {len(pts)} blocks"
            for saw, groups in saws.items()
            for group, pts in groups.items()
        )
        or "no saw has 3 timed entries yet"
    )

    def paint(fig: Any) -> None:
        from matplotlib.dates import AutoDateLocator, ConciseDateFormatter

        axes = fig.subplots(max(len(saws), 1), 1, sharex=True, sharey=True, squeeze=False)[:, 0]
        for ax, (saw, groups) in zip(axes, saws.items(), strict=False):
            for group, pts in groups.items():
                xs = [dt.date.fromisoformat(p.last_on) for p in pts]
                (line,) = ax.plot(
                    xs, [p.factor for p in pts], marker="o", markersize=3, label=group
                )
                ax.fill_between(xs, [p.low for p in pts], [p.high for p in pts],
                                color=line.get_color(), alpha=0.15, linewidth=0)  # fmt: skip
            ax.axhline(1.0, color="#444444", linestyle="--", linewidth=1)
            ax.set_title(f"saw {saw}", fontsize=9, loc="left")
            ax.set_ylabel("actual ÷ model")
            ax.legend(fontsize=7, loc="upper left", ncols=2)
        locator = AutoDateLocator()
        axes[-1].xaxis.set_major_locator(locator)
        axes[-1].xaxis.set_major_formatter(ConciseDateFormatter(locator))
        axes[-1].set_xlabel("date of the block's last timed entry (dashed: the model's own time)")

    height = max(HEIGHT_IN, 0.6 + 2.1 * len(saws))
    return _draw("calibration", "Cut-time calibration over time", desc, paint, height, panels=True)


def calibration_csv(view: CalibrationView) -> tuple[list[str], list[list[Any]]]:
    headers = ["saw", "material_group", "first_on", "last_on", "entries", "cuts", "factor",
               "low_quartile", "high_quartile"]  # fmt: skip
    rows = [
        [p.saw, p.material_group, p.first_on, p.last_on, p.entries, p.cuts, p.factor, p.low, p.high]
        for p in view.trend
    ]
    return headers, rows


def _series(saw: str | None, group: str | None) -> str:
    return f"{saw or '(no saw)'} · {group or '(no group)'}"


# --- blades on the shelf against the queues' needs --------------------------------------------


def shelf_svg(view: ShelfView, d: Display) -> str:
    """Per blade size and pitch: blades the open queues need beside those fitted and shelved."""
    rows = list(view.balance)
    labels = [_blade_label(b, d) for b in rows]
    desc = (
        "; ".join(
            f"{label}: {b.needed} needed, {len(b.fitted)} fitted, {len(b.on_shelf)} on the shelf"
            for label, b in zip(labels, rows, strict=True)
        )
        or "no open queue"
    )
    pct = fmt_percent(view.confidence)

    def paint(ax: Any) -> None:
        ys = list(range(len(rows)))[::-1]
        height = 0.38
        ax.barh([y + height / 2 for y in ys], [b.needed for b in rows], height,
                color="#d95f0e", label=f"needed by the open queues ({pct} sure)")  # fmt: skip
        ax.barh([y - height / 2 for y in ys], [len(b.fitted) for b in rows], height,
                color="#08519c", label="fitted now")  # fmt: skip
        ax.barh([y - height / 2 for y in ys], [len(b.on_shelf) for b in rows], height,
                left=[len(b.fitted) for b in rows], color="#9ecae1", label="on the shelf")  # fmt: skip
        ax.set_yticks(ys, labels)
        ax.set_xlabel("blades")
        ax.xaxis.get_major_locator().set_params(integer=True)
        ax.grid(axis="y", visible=False)
        ax.legend(fontsize=8, loc="lower right")

    title = "Blades needed by the queues against blades to hand"
    return _draw("shelf", title, desc, paint, _bars_height(len(rows) + len(rows) // 2))


def shelf_csv(view: ShelfView) -> tuple[list[str], list[list[Any]]]:
    headers = ["width_mm", "thickness_mm", "pitch", "saws", "needed", "fitted", "on_shelf",
               "short", "fitted_tags", "shelf_tags"]  # fmt: skip
    rows = [
        [b.width_mm, b.thickness_mm, b.pitch, "; ".join(b.saws), b.needed, len(b.fitted),
         len(b.on_shelf), b.short, " ".join(b.fitted), " ".join(b.on_shelf)]
        for b in view.balance
    ]  # fmt: skip
    return headers, rows


def _blade_label(b: BladeBalance, d: Display) -> str:
    if b.width_mm is None or b.thickness_mm is None:
        return f"pitch {b.pitch}"
    return f"{d.size(b.width_mm)}×{d.size(b.thickness_mm)} {d.label('length')}, {b.pitch}"
