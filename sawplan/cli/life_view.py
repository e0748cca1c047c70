"""How blade life, forecasts and the log's charts are shown."""

from __future__ import annotations

import sys
from typing import Any

from sawplan.display import Display, as_display, fmt_count, fmt_money, fmt_number, fmt_percent
from sawplan.units import UnitSystem


def colorless() -> bool:
    import os

    return not sys.stdout.isatty() or bool(os.environ.get("NO_COLOR"))


def _area(d: Any, cm2: float | None) -> str:
    return d.fmt("area", None if cm2 is None else cm2 * 100.0)


def render_life(r: Any, units: UnitSystem | Display) -> str:
    from sawplan.config import money_suffix
    from sawplan.render import table

    d = as_display(units)
    o = r.overall
    pct = fmt_percent(r.confidence)
    lines = [
        f"blade life (area cut): {_n(o.blades, 'blade')}, {o.failed} retired, "
        f"{o.censored} still running or removed unworn (censored)"
    ]
    if o.failed:
        lines.append(
            f"  the Weibull fit counts every retired blade as a failure: "
            f"{o.failed - o.worn_out} failed, {o.worn_out} worn out at the end of a normal life "
            "(failures of wear)"
        )
    if o.fitted:
        lo, hi = o.shape_ci
        kind = (
            "early failures"
            if o.weibull_shape < 1
            else "wear-out"
            if o.weibull_shape > 1
            else "random"
        )
        lines += [
            f"  Weibull shape β {o.weibull_shape:.2f} ({pct} interval {lo:.2f}-{hi:.2f}): {kind}",
            f"  scale η {_area(d, o.weibull_scale_cm2)}; median life {_area(d, o.median_life_cm2)}; "
            f"mean {_area(d, o.mean_life_cm2)}",
            f"  B10 life {_area(d, o.b10_life_cm2)} ({pct} interval {_area(d, o.b10_ci_cm2[0])} to "
            f"{_area(d, o.b10_ci_cm2[1])}): 1 blade in 10 fails before it",
        ]
    elif o.blades:
        lines.append(f"  no Weibull fit: {o.reason}")
        if o.mean_failure_life_cm2 is not None:
            lines.append(f"  mean life of the retired blades: {_area(d, o.mean_failure_life_cm2)}")
    if r.groups:
        keys = list(r.group_keys)
        headers = [*keys, "blades", "retired", "worn out", "β", f"η {d.label('area')}",
                   f"median {d.label('area')}", f"B10 {d.label('area')}"]  # fmt: skip
        rows = [
            [*(d.text(k) for k in g.keys), g.blades, g.failed, g.worn_out,
             "—" if g.weibull_shape is None else f"{g.weibull_shape:.2f}",
             area_number(d, g.weibull_scale_cm2), area_number(d, g.median_life_cm2), area_number(d, g.b10_life_cm2)]
            for g in r.groups
        ]  # fmt: skip
        align = "l" * len(keys) + "rrrrrrr"
        title = "\nby " + " and ".join(keys)
        lines.append(table(headers, rows, align=align, title=title))
        unfitted = [g for g in r.groups if not g.fitted]
        if unfitted:
            no_fit = "; ".join(f"{d.text(g.key)}: {g.reason}" for g in unfitted)
            lines.append("  — no fit: " + no_fit)
    lines += _warning_lines(r, d)
    lines += _lot_lines(r, d)
    modes = r.failure_modes
    if modes.modes:
        rows = [[m.code, m.name, m.count, fmt_percent(m.share)] for m in modes.modes]
        title = "\nfailure modes, most frequent first (failures only)"
        lines.append(table(["failure mode", "", "blades", "share"], rows,
                           align="llrr", title=title))  # fmt: skip
        top = modes.modes[0]
        if top.code not in _warned_modes(r):  # its causes are printed with the warning
            lines.append(
                f"  usual causes of {top.name} (common practice): " + "; ".join(top.causes)
            )
        if modes.unrecorded:
            lines.append(f"  {modes.unrecorded} retired blade(s) without a recorded mode")
    lines += _worn_out_lines(r.worn_out_blades)
    if r.costs:
        per = d.label("large_area")
        rows = [[d.text(c.blade_type), fmt_money(c.price), area_number(d, c.life_cm2), c.life_method,
                 fmt_number(d.per("large_area", c.cost_per_m2 / 1e6))]
                for c in r.costs]  # fmt: skip
        lines.append(table(["blade type", f"price{money_suffix()}", f"life {d.label('area')}", "life from", f"cost per {per}"],
                           rows, align="lrrlr", title="\ncost per area cut, cheapest first"))  # fmt: skip
    if r.costs_missing:
        lines.append("  no cost yet for " + "; ".join(d.text(m) for m in r.costs_missing))
    if r.calibration:
        rows = [[c.saw or "(no saw)", c.material_group or "—", fmt_count(c.entries), fmt_count(c.cuts),
                 "—" if c.factor is None else f"{c.factor:.2f}",
                 "" if c.low is None else f"{c.low:.2f}-{c.high:.2f}",
                 "in use" if c.factor is not None else f"needs {c.needed} entries"]
                for c in r.calibration]  # fmt: skip
        lines.append(table(["saw", "material group", "entries", "cuts", "actual ÷ model", "middle half", "status"], rows,
                           align="llrrrll", title="\ncut-time calibration (median of actual ÷ model time per timed entry)"))  # fmt: skip
    if r.left_out:
        lines.append(f"\nleft out (retired before cutting anything): {', '.join(r.left_out)}")
    lines += [f"\nnote: {d.text(n)}" for n in r.notes]
    from sawplan.render import terminal_text

    return terminal_text("\n".join(lines), lines=True)  # group names are stored text


def _lot_lines(r: Any, d: Any) -> list[str]:
    """Lots that fail early or die young, named with their supplier and purchase date."""
    lines: list[str] = []
    for lot in r.suspect_lots:
        lines += [
            "",
            f"WARNING for {lot.label}, {d.text(lot.blade_type)}: {d.text(lot.message)}",
            f"  leave it out of forecasts and plans with --without-lot {lot.lot}",
        ]
    return lines


def _worn_out_lines(w: Any) -> list[str]:
    """Blades that wore out over a normal life: counted apart from the failures."""
    if not (w.blades or w.worn_out_early):
        return []
    how = []
    if w.recorded_worn_out:
        how.append(f"{w.recorded_worn_out} retired worn-out")
    if w.dull_at_normal_life:
        how.append(f"{w.dull_at_normal_life} retired dull within their type's expected life")
    lines = [
        "",
        f"worn out at the end of a normal life: {_n(w.blades, 'blade')}"
        + (f" ({', '.join(how)})" if how else "")
        + "; not failures, so not in the failure table or the early-failure warnings",
    ]
    if w.worn_out_early:
        lines.append(
            f"  {w.worn_out_early} retired worn-out below their type's expected life count as "
            "teeth dulled early"
        )
    return lines


def _warned_modes(r: Any) -> set[str]:
    """Failure modes whose usual causes a warning already lists."""
    found = [r.early_failure] + [g.early_failure for g in r.groups]
    return {w.mode for w in found if w is not None and w.mode is not None}


def _warning_lines(r: Any, d: Any) -> list[str]:
    """The early-failure warnings (β < 1) of all blades and of each group, as JSON has them.

    Each warning names its most frequent early failure mode and that mode's usual
    causes; the set-up checks and the caution, the same for all, follow once.
    """
    warnings = [
        (" for " + ", ".join(f"{k} {d.text(v)}" for k, v in zip(r.group_keys, g.keys, strict=True)),
         g.early_failure)
        for g in r.groups
        if g.early_failure is not None
    ]  # fmt: skip
    if r.early_failure is not None:
        warnings.insert(0, (" for all blades" if warnings else "", r.early_failure))
    lines: list[str] = []
    for who, w in warnings:
        lines += ["", f"WARNING{who}: {d.text(w.message)}"]
        if w.causes:
            lines.append(
                f"  usual causes of {w.mode_name} (common practice): " + "; ".join(w.causes)
            )
    if warnings:
        w = warnings[0][1]
        lines.append("  check: " + "; ".join(d.text(c) for c in w.setup_checks))
        lines.append("  " + w.caution)
    return lines


def _n(n: int, word: str) -> str:
    return f"{n:,} {word}" + ("" if n == 1 else "s")


def area_number(d: Any, cm2: float | None) -> str:
    return d.num("area", None if cm2 is None else cm2 * 100.0)


def weibull_text(report: Any, units: UnitSystem | Display, width: int, height: int) -> str:
    from sawplan.charts import weibull_chart

    plot = weibull_plot_of(report)
    if plot is None:
        return "Weibull probability plot: no failures to plot"
    return weibull_chart(plot, units=units, width=width, height=height, colorless=colorless())


def weibull_plot_of(report: Any):
    from sawplan.life import weibull_plot

    lives = report.lives
    if not any(b.failed for b in lives):
        return None
    fit = report.overall.fit if report.overall.fitted else None
    return weibull_plot([b.area_cm2 for b in lives], [b.failed for b in lives], fit)


def render_forecast(f: Any, units: UnitSystem | Display) -> str:

    d = as_display(units)
    what = f" of {f.material} ({f.material_group})" if f.material else ""
    lines = [f"blades needed to cut {_area(d, f.area_cm2)}{what}: {f.blades_needed}"]
    if f.method.startswith("weibull"):
        lines.append(
            f"  {fmt_percent(f.confidence)} sure from the blade log's Weibull fit (β {f.weibull_shape:.2f}, "
            f"η {_area(d, f.weibull_scale_cm2)}); expected {f.expected_blades:.1f} blades"
        )
        if f.method == "weibull-normal":
            lines.append(
                "  so many blades that the sum of their lives is taken as normal "
                "(central limit theorem), not simulated"
            )
    else:
        lines.append(f"  area ÷ life per blade {_area(d, f.life_cm2)}, rounded up")
    lines.append(f"  {d.text(f.note)}")
    lines += _lot_warning(f, d)
    from sawplan.render import terminal_text

    return terminal_text("\n".join(lines), lines=True)  # group names are stored text


def _lot_warning(f: Any, d: Any) -> list[str]:
    """An early-failing lot that holds much of the blades behind a forecast."""
    if not f.lot_warning:
        return []
    lines = [f"  WARNING {d.text(f.lot_warning)}"]
    if f.blades_needed_without_lot is not None:
        lines.append(
            f"  without lot {f.lot_named}: {_n(f.blades_needed_without_lot, 'blade')} "
            f"at {fmt_percent(f.confidence)}"
        )
    return lines


def render_job_forecast(j: Any, units: UnitSystem | Display) -> str:
    from sawplan.render import table

    d = as_display(units)
    rows = [
        [g.material_group, area_number(d, g.area_cm2), g.blades_needed, g.life_source]
        for g in j.groups
    ]
    out = [
        table(
            ["material group", f"area {d.label('area')}", "blades if alone", "life from"],
            rows,
            align="lrrl",
        ),
        f"blades needed: {j.blades_needed} ({fmt_percent(j.confidence)} confidence; one cut per part, "
        "bar-end trim cuts not counted)",
    ]
    if j.combined_on:
        out.append(
            f"  one blade cuts every group: areas put on the {j.combined_on} scale by mean life, "
            "as `sawplan plan` does"
        )
    for g in j.groups:
        out.append(f"  {g.material_group}: {d.text(g.note)}")
        out += [f"  {g.material_group}:{line[1:]}" for line in _lot_warning(g, d)]
    from sawplan.render import terminal_text

    return terminal_text("\n".join(out), lines=True)


def emit_rows(
    headers: list[str], rows: list[list[Any]], kind: str, json_out: bool, csv_out: bool
) -> bool:
    from sawplan.render import terminal_text, to_csv, to_json

    if json_out:
        print(to_json([dict(zip(headers, r, strict=True)) for r in rows], kind=kind))
        return True
    if csv_out:
        # stored text on the terminal: no raw control characters
        print(terminal_text(to_csv(headers, rows), lines=True), end="")
        return True
    return False


def weibull_rows_empty() -> tuple[list[str], list[list[Any]]]:
    from sawplan.charts import weibull_rows
    from sawplan.life import WeibullPlot

    return weibull_rows(WeibullPlot((), None, 0))
