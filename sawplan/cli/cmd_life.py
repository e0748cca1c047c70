"""``sawplan life``, ``sawplan forecast`` and ``sawplan chart``: blade life from the log."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Annotated, Any

import typer

from sawplan.cli.options import (
    ChartHeightOpt,
    ChartWidthOpt,
    ConfidenceOpt,
    CsvOpt,
    DbOpt,
    FractionsOpt,
    JsonOpt,
    MaterialsFileOpt,
    TagArg,
    UnitsOpt,
    command,
    opt,
)
from sawplan.display import Display, as_display, fmt_money, fmt_number, fmt_percent
from sawplan.units import UnitSystem

LIFE_HELP = """Blade life from the log: Weibull fit, failure modes, cost per area, calibration.

Life is the area a blade cut. Retired blades are failures; blades still on a
saw or removed unworn count as "at least this long" (censored), so the fit
does not understate life. A shape below 1 means blades fail early, which
points to set-up (break-in, tension, guides) rather than wear.

\b
Examples:
  sawplan life
  sawplan life --group-by blade-type
  sawplan life --group-by material-group --json
  sawplan life --chart
"""

FORECAST_HELP = """How many blades a job needs: area to cut against blade life.

With enough history the log's Weibull fit is simulated and the count holds
at --confidence; otherwise a typical life from the reference (memory, low
confidence) gives area ÷ life, and the answer says so.

\b
Examples:
  sawplan forecast --area 5m2
  sawplan forecast --area 800in2 --material 304 --confidence 0.95
  sawplan forecast --job-file job.toml --json
"""

CHART_HELP = """Charts of the log in the terminal; every chart also as --json or --csv data.

\b
Examples:
  sawplan chart wear B-017
  sawplan chart weibull
  sawplan chart modes --csv
  sawplan chart cost --units us
"""


def _colorless() -> bool:
    import os

    return not sys.stdout.isatty() or bool(os.environ.get("NO_COLOR"))


# --- life -----------------------------------------------------------------------------------


def life_command(
    group_by: Annotated[str | None, opt("group_by")] = None,
    chart: Annotated[
        bool, opt("chart", help="Add the Weibull plot and failure-mode chart.")
    ] = False,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import to_json
    from sawplan.store import connect
    from sawplan.store.reports import life_report

    with connect(db, create=False) as database:
        report = life_report(database, group_by=group_by, confidence=confidence)
    if json_out:
        print(to_json(report, kind="life"))
        return
    print(render_life(report, Display(units, fractions)))
    if chart:
        from sawplan.charts import modes_chart

        print()
        print(_weibull_text(report, Display(units, fractions), 72, 20))
        print()
        print(modes_chart(report.failure_modes, colorless=_colorless()))


def _area(d: Any, cm2: float | None) -> str:
    return d.fmt("area", None if cm2 is None else cm2 * 100.0)


def render_life(r: Any, units: UnitSystem | Display) -> str:
    from sawplan.render import table

    d = as_display(units)
    o = r.overall
    pct = fmt_percent(r.confidence)
    lines = [
        f"blade life (area cut): {_n(o.blades, 'blade')}, {o.failed} retired (failures), "
        f"{o.censored} still running or removed unworn (censored)"
    ]
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
        headers = [r.group_by, "blades", "retired", "β", f"η {d.label('area')}",
                   f"median {d.label('area')}", f"B10 {d.label('area')}"]  # fmt: skip
        rows = [
            [d.text(g.key), g.blades, g.failed,
             "—" if g.weibull_shape is None else f"{g.weibull_shape:.2f}",
             _num(d, g.weibull_scale_cm2), _num(d, g.median_life_cm2), _num(d, g.b10_life_cm2)]
            for g in r.groups
        ]  # fmt: skip
        lines.append(table(headers, rows, align="lrrrrrr", title=f"\nby {r.group_by}"))
        unfitted = [g for g in r.groups if not g.fitted]
        if unfitted:
            no_fit = "; ".join(f"{d.text(g.key)}: {g.reason}" for g in unfitted)
            lines.append("  — no fit: " + no_fit)
    lines += _warning_lines(r, d)
    modes = r.failure_modes
    if modes.modes:
        rows = [[m.code, m.name, m.count, fmt_percent(m.share)] for m in modes.modes]
        lines.append(table(["failure mode", "", "blades", "share"], rows,
                           align="llrr", title="\nfailure modes, most frequent first"))  # fmt: skip
        top = modes.modes[0]
        if top.code not in _warned_modes(r):  # its causes are printed with the warning
            lines.append(
                f"  usual causes of {top.name} (common practice): " + "; ".join(top.causes)
            )
        if modes.unrecorded:
            lines.append(f"  {modes.unrecorded} retired blade(s) without a recorded mode")
    if r.costs:
        per = d.label("large_area")
        rows = [[d.text(c.blade_type), fmt_money(c.price), _num(d, c.life_cm2), c.life_method,
                 fmt_number(d.per("large_area", c.cost_per_m2 / 1e6))]
                for c in r.costs]  # fmt: skip
        lines.append(table(["blade type", "price", f"life {d.label('area')}", "life from", f"cost per {per}"],
                           rows, align="lrrlr", title="\ncost per area cut, cheapest first"))  # fmt: skip
    if r.costs_missing:
        lines.append("  no cost yet for " + "; ".join(d.text(m) for m in r.costs_missing))
    if r.calibration:
        rows = [[c.saw or "(no saw)", c.material_group or "—", c.cuts,
                 "—" if c.factor is None else f"{c.factor:.2f}",
                 "" if c.low is None else f"{c.low:.2f}-{c.high:.2f}",
                 "in use" if c.factor is not None else f"needs {c.needed} cuts"]
                for c in r.calibration]  # fmt: skip
        lines.append(table(["saw", "material group", "cuts", "actual ÷ model", "middle half", "status"], rows,
                           align="llrrll", title="\ncut-time calibration (median of actual ÷ model time)"))  # fmt: skip
    if r.left_out:
        lines.append(f"\nleft out (retired before cutting anything): {', '.join(r.left_out)}")
    lines += [f"\nnote: {d.text(n)}" for n in r.notes]
    return "\n".join(lines)


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
        (f" for {r.group_by} {d.text(g.key)}", g.early_failure)
        for g in r.groups
        if g.early_failure is not None
    ]
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


def _num(d: Any, cm2: float | None) -> str:
    return d.num("area", None if cm2 is None else cm2 * 100.0)


def _weibull_text(report: Any, units: UnitSystem | Display, width: int, height: int) -> str:
    from sawplan.charts import weibull_chart

    plot = _weibull_plot_of(report)
    if plot is None:
        return "Weibull probability plot: no failures to plot"
    return weibull_chart(plot, units=units, width=width, height=height, colorless=_colorless())


def _weibull_plot_of(report: Any):
    from sawplan.life import weibull_plot

    lives = report.lives
    if not any(b.failed for b in lives):
        return None
    fit = report.overall.fit if report.overall.fitted else None
    return weibull_plot([b.area_cm2 for b in lives], [b.failed for b in lives], fit)


# --- forecast -------------------------------------------------------------------------------


def forecast_command(
    area: Annotated[str | None, opt("area", help="Area to cut, e.g. 5m2, 800in2.")] = None,
    material: Annotated[
        str | None, opt("material", help="Material key: use its group's life.")
    ] = None,
    job: Annotated[
        Path | None, opt("job_file", help="A job file: its parts' cut area per material.")
    ] = None,
    life: Annotated[str | None, opt("life")] = None,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    materials_file: MaterialsFileOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan.errors import UsageError
    from sawplan.fields import parse
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json
    from sawplan.store import connect
    from sawplan.store.reports import forecast_area, forecast_job

    if (area is None) == (job is None):
        raise UsageError(
            "give either --area or --job-file", field="forecast", hint="e.g. --area 5m2"
        )
    if job is not None:
        if material is not None or life is not None:
            raise UsageError(
                "--job-file takes the materials from the job file; drop --material/--life",
                field="job file",
            )
        areas = job_cut_areas(job, load_catalogue(materials_file))
        result = forecast_job(db, areas, confidence=confidence)
        if json_out:
            print(to_json(result, kind="forecast-job"))
            return
        print(render_job_forecast(result, Display(units, fractions)))
        return
    area_cm2 = parse("area", area) / 100.0
    life_cm2 = None if life is None else parse("life", life) / 100.0
    catalogue = load_catalogue(materials_file)  # a bad --materials-file is reported, not skipped
    mat = catalogue.get(material) if material is not None else None
    with connect(db, create=False) as database:
        result = forecast_area(
            database,
            area_cm2,
            material=mat.key if mat else None,
            material_group=mat.group if mat else None,
            confidence=confidence,
            life_cm2=life_cm2,
        )
    if json_out:
        print(to_json(result, kind="forecast"))
        return
    print(render_forecast(result, Display(units, fractions)))


def job_cut_areas(path: Path, catalogue: Any) -> dict[str, float]:
    """Cut area (cm²) per material group of a job file: one cut per part piece.

    The head trim of each bar is not counted, so the area is a small underestimate.
    """
    from sawplan.cutlist.jobfile.load import load_job
    from sawplan.sections import parse_section

    job = load_job(path, catalogue)
    areas: dict[str, float] = {}
    for part in job.parts:
        section = job.sections.get(part.section) or parse_section(part.section)
        group = (
            job.materials[part.material].group
            if part.material in job.materials
            else catalogue.get(part.material).group
        )
        areas[group] = areas.get(group, 0.0) + section.area_mm2 * part.count / 100.0
    return areas


def render_forecast(f: Any, units: UnitSystem | Display) -> str:

    d = as_display(units)
    what = f" of {f.material} ({f.material_group})" if f.material else ""
    lines = [f"blades needed to cut {_area(d, f.area_cm2)}{what}: {f.blades_needed}"]
    if f.method == "weibull-simulation":
        lines.append(
            f"  {fmt_percent(f.confidence)} sure from the blade log's Weibull fit (β {f.weibull_shape:.2f}, "
            f"η {_area(d, f.weibull_scale_cm2)}); expected {f.expected_blades:.1f} blades"
        )
    else:
        lines.append(f"  area ÷ life per blade {_area(d, f.life_cm2)}, rounded up")
    lines.append(f"  {d.text(f.note)}")
    return "\n".join(lines)


def render_job_forecast(j: Any, units: UnitSystem | Display) -> str:
    from sawplan.render import table

    d = as_display(units)
    rows = [
        [g.material_group, _num(d, g.area_cm2), g.blades_needed, g.life_source] for g in j.groups
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
    out += [f"  {g.material_group}: {d.text(g.note)}" for g in j.groups]
    return "\n".join(out)


# --- charts ---------------------------------------------------------------------------------


def _emit_rows(
    headers: list[str], rows: list[list[Any]], kind: str, json_out: bool, csv_out: bool
) -> bool:
    from sawplan.render import to_csv, to_json

    if json_out:
        print(to_json([dict(zip(headers, r, strict=True)) for r in rows], kind=kind))
        return True
    if csv_out:
        print(to_csv(headers, rows), end="")
        return True
    return False


def chart_wear_command(
    tag: TagArg,
    width: ChartWidthOpt = 72,
    height: ChartHeightOpt = 20,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import wear_rows
    from sawplan.cli.cmd_blade import wear_chart_text, wear_rows_empty
    from sawplan.store import connect
    from sawplan.store.blades import blade_history

    with connect(db, create=False) as database:
        history = blade_history(database, tag)
    headers, rows = wear_rows(history.wear) if history.wear is not None else wear_rows_empty()
    if _emit_rows(headers, rows, "wear-curve", json_out, csv_out):
        return
    print(wear_chart_text(history, Display(units, fractions), width, height))


def chart_weibull_command(
    width: ChartWidthOpt = 72,
    height: ChartHeightOpt = 20,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import weibull_rows
    from sawplan.store import connect
    from sawplan.store.reports import life_report

    with connect(db, create=False) as database:
        report = life_report(database, confidence=confidence)
    plot = _weibull_plot_of(report)
    if plot is None:
        headers, rows = weibull_rows_empty()
    else:
        headers, rows = weibull_rows(plot)
    if _emit_rows(headers, rows, "weibull-plot", json_out, csv_out):
        return
    print(_weibull_text(report, Display(units, fractions), width, height))


def weibull_rows_empty() -> tuple[list[str], list[list[Any]]]:
    from sawplan.charts import weibull_rows
    from sawplan.life import WeibullPlot

    return weibull_rows(WeibullPlot((), None, 0))


def chart_modes_command(
    width: ChartWidthOpt = 72,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import modes_chart, modes_rows
    from sawplan.life import rank_failure_modes
    from sawplan.store import connect
    from sawplan.store.stats import blade_lives

    with connect(db, create=False) as database:
        ranking = rank_failure_modes(
            [b.mode for b in blade_lives(database, include_unused_failures=True) if b.failed]
        )
    if _emit_rows(*modes_rows(ranking), "failure-modes", json_out, csv_out):
        return
    print(modes_chart(ranking, width=width, colorless=_colorless()))


def chart_cost_command(
    width: ChartWidthOpt = 72,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import cost_chart, cost_rows
    from sawplan.store import connect
    from sawplan.store.reports import life_report

    with connect(db, create=False) as database:
        report = life_report(database, confidence=confidence)
    if _emit_rows(*cost_rows(report.costs), "blade-costs", json_out, csv_out):
        return
    print(
        cost_chart(
            report.costs, units=Display(units, fractions), width=width, colorless=_colorless()
        )
    )
    if report.costs_missing:
        print("no cost yet for " + "; ".join(report.costs_missing))


def register(app: typer.Typer) -> None:
    command(app, "life", LIFE_HELP)(life_command)
    command(app, "forecast", FORECAST_HELP)(forecast_command)
    group = typer.Typer(
        help=CHART_HELP, no_args_is_help=True, rich_markup_mode=None, add_completion=False
    )
    command(group, "wear", _sub("Wear curve of one blade: cutting rate against area cut.", "chart wear B-017", "chart wear B-017 --csv"))(chart_wear_command)  # fmt: skip
    command(group, "weibull", _sub("Weibull probability plot of blade lives (median ranks, censored blades counted).", "chart weibull", "chart weibull --json"))(chart_weibull_command)  # fmt: skip
    command(group, "modes", _sub("Retired blades by failure mode.", "chart modes", "chart modes --csv"))(chart_modes_command)  # fmt: skip
    command(group, "cost", _sub("Cost per area cut by blade type.", "chart cost", "chart cost --units us --json"))(chart_cost_command)  # fmt: skip
    app.add_typer(group, name="chart", help=CHART_HELP)


def _sub(text: str, *examples: str) -> str:
    lines = [text, "", "\b", "Examples:"] + [f"  sawplan {e}" for e in examples]
    return "\n".join(lines) + "\n"
