"""``sawplan life``, ``sawplan forecast`` and ``sawplan chart``: blade life from the log."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Any

import typer

from sawplan.cli.life_view import (
    colorless,
    emit_rows,
    render_forecast,
    render_job_forecast,
    render_life,
    weibull_plot_of,
    weibull_rows_empty,
    weibull_text,
)
from sawplan.cli.options import (
    ChartHeightOpt,
    ChartWidthOpt,
    ConfidenceOpt,
    CsvOpt,
    DbOpt,
    FractionsOpt,
    JsonOpt,
    LotChoiceOpt,
    MaterialsFileOpt,
    SupplierChoiceOpt,
    TagArg,
    UnitsOpt,
    WithoutLotOpt,
    command,
    group,
    opt,
)
from sawplan.cli.progress import progress
from sawplan.display import Display

LIFE_HELP = """Blade life from the log: Weibull fit, failure modes, costs.

Also the cost per area cut and the cut-time calibration per saw.

Life is the area a blade cut. Retired blades are failures in the fit (a
blade worn out at the end of a normal life is a failure of wear); blades
still on a saw or removed unworn count as "at least this long" (censored),
so the fit does not understate life. A shape below 1 means blades fail early,
which points to set-up (break-in, tension, guides) rather than wear. The
failure table and the early-failure warnings count failures only, and a lot
whose blades fail early is named with its supplier and purchase date.

--group-by fits each blade-type, material-group, lot, supplier or saw on its
own, or two at once: --group-by blade-type,lot.

\b
Examples:
  sawplan life
  sawplan life --group-by blade-type
  sawplan life --group-by supplier,lot
  sawplan life --group-by material-group --json
  sawplan life --chart
"""

FORECAST_HELP = """How many blades a job needs: area to cut against blade life.

With enough history the log's Weibull fit is simulated and the count holds
at --confidence; otherwise a typical life recalled from memory (low
confidence) gives area ÷ life, and the answer says so. --lot, --without-lot
and --supplier choose the blades the life comes from; when a lot that fails
early holds much of them, the answer says so.

\b
Examples:
  sawplan forecast --area 5m2
  sawplan forecast --area 800in2 --material 304 --confidence 0.95
  sawplan forecast --area 2m2 --material 304 --without-lot T-3309
  sawplan forecast --area 5m2 --supplier "east depot"
  sawplan forecast --job-file job.toml --json
"""

CHART_HELP = """Charts of the log, each also as --json or --csv data.

\b
Examples:
  sawplan chart wear B-017
  sawplan chart weibull
  sawplan chart modes --csv
  sawplan chart cost --units us
"""


# --- life -----------------------------------------------------------------------------------


def life_command(
    group_by: Annotated[str | None, opt("group_by")] = None,
    chart: Annotated[
        bool, opt("chart", help="Add the Weibull plot and failure-mode chart.")
    ] = False,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import to_json
    from sawplan.store import connect
    from sawplan.store.life_report import life_report

    with (
        connect(db, create=False, light=True) as database,
        progress("fitting blade lives", quiet=json_out),
    ):
        report = life_report(database, group_by=group_by, confidence=confidence)
    if json_out:
        print(to_json(report, kind="life"))
        return
    print(render_life(report, Display(units, fractions)))
    if chart:
        from sawplan.charts import modes_chart

        print()
        print(weibull_text(report, Display(units, fractions), 72, 20))
        print()
        print(modes_chart(report.failure_modes, colorless=colorless()))


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
    lot: LotChoiceOpt = None,
    without_lot: WithoutLotOpt = None,
    supplier: SupplierChoiceOpt = None,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = None,
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
    from sawplan.store.blade_groups import blade_choice
    from sawplan.store.reports import forecast_area, forecast_job

    if (area is None) == (job is None):
        raise UsageError(
            "give either --area or --job-file", field="forecast", hint="e.g. --area 5m2"
        )
    choice = blade_choice(lot, without_lot, supplier)
    if life is not None and choice.chosen:
        raise UsageError(
            "--life gives the life itself; --lot, --without-lot and --supplier choose blades "
            "of the log",
            field="life",
            hint="drop one of them",
        )
    if job is not None:
        if material is not None or life is not None:
            raise UsageError(
                "--job-file takes the materials from the job file; drop --material/--life",
                field="job file",
            )
        areas = job_cut_areas(job, load_catalogue(materials_file))
        with progress("forecasting blades for the job", quiet=json_out):
            result = forecast_job(db, areas, confidence=confidence, choice=choice)
        if json_out:
            print(to_json(result, kind="forecast-job"))
            return
        print(render_job_forecast(result, Display(units, fractions)))
        return
    area_cm2 = parse("area", area) / 100.0
    life_cm2 = None if life is None else parse("life", life) / 100.0
    catalogue = load_catalogue(materials_file)  # a bad --materials-file is reported, not skipped
    mat = catalogue.get(material) if material is not None else None
    with connect(db, create=False) as database, progress("forecasting blades", quiet=json_out):
        result = forecast_area(
            database,
            area_cm2,
            material=mat.key if mat else None,
            material_group=mat.group if mat else None,
            confidence=confidence,
            life_cm2=life_cm2,
            choice=choice,
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


# --- charts ---------------------------------------------------------------------------------


def chart_wear_command(
    tag: TagArg,
    width: ChartWidthOpt = 72,
    height: ChartHeightOpt = 20,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import wear_rows
    from sawplan.cli.blade_view import wear_chart_text, wear_rows_empty
    from sawplan.store import connect
    from sawplan.store.blades import blade_history

    with connect(db, create=False) as database:
        history = blade_history(database, tag)
    headers, rows = wear_rows(history.wear) if history.wear is not None else wear_rows_empty()
    if emit_rows(headers, rows, "wear-curve", json_out, csv_out):
        return
    print(wear_chart_text(history, Display(units, fractions), width, height))


def chart_weibull_command(
    width: ChartWidthOpt = 72,
    height: ChartHeightOpt = 20,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import weibull_rows
    from sawplan.store import connect
    from sawplan.store.life_report import life_report

    with (
        connect(db, create=False) as database,
        progress("fitting blade lives", quiet=json_out or csv_out),
    ):
        report = life_report(database, confidence=confidence)
    plot = weibull_plot_of(report)
    if plot is None:
        headers, rows = weibull_rows_empty()
    else:
        headers, rows = weibull_rows(plot)
    if emit_rows(headers, rows, "weibull-plot", json_out, csv_out):
        return
    print(weibull_text(report, Display(units, fractions), width, height))


def chart_modes_command(
    width: ChartWidthOpt = 72,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import modes_chart, modes_rows
    from sawplan.life import rank_failure_modes
    from sawplan.store import connect
    from sawplan.store.life_ends import with_ends
    from sawplan.store.stats import blade_lives

    with connect(db, create=False) as database:
        lives = with_ends(blade_lives(database, include_unused_failures=True))
    # failures only: a blade worn out at the end of a normal life did not fail
    ranking = rank_failure_modes([b.failure_mode for b in lives if b.failed and b.is_failure])
    if emit_rows(*modes_rows(ranking), "failure-modes", json_out, csv_out):
        return
    print(modes_chart(ranking, width=width, colorless=colorless()))


def chart_cost_command(
    width: ChartWidthOpt = 72,
    confidence: ConfidenceOpt = 0.9,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.charts import cost_chart, cost_rows
    from sawplan.render import terminal_text
    from sawplan.store import connect
    from sawplan.store.life_report import life_report

    with (
        connect(db, create=False) as database,
        progress("fitting blade lives", quiet=json_out or csv_out),
    ):
        report = life_report(database, confidence=confidence)
    if emit_rows(*cost_rows(report.costs), "blade-costs", json_out, csv_out):
        return
    print(
        cost_chart(
            report.costs, units=Display(units, fractions), width=width, colorless=colorless()
        )
    )
    if report.costs_missing:
        print(terminal_text("no cost yet for " + "; ".join(report.costs_missing)))


def register(app: typer.Typer) -> None:
    command(app, "life", LIFE_HELP)(life_command)
    command(app, "forecast", FORECAST_HELP)(forecast_command)
    sub = group(app, "chart", CHART_HELP)
    command(sub, "wear", _sub("Wear curve of one blade: cutting rate against area cut.", "chart wear B-017", "chart wear B-017 --csv"))(chart_wear_command)  # fmt: skip
    command(sub, "weibull", _sub("Weibull plot of blade lives, running blades counted.", "chart weibull", "chart weibull --json"))(chart_weibull_command)  # fmt: skip
    command(sub, "modes", _sub("Failed blades by failure mode (worn-out blades left out).", "chart modes", "chart modes --csv"))(chart_modes_command)  # fmt: skip
    command(sub, "cost", _sub("Cost per area cut by blade type.", "chart cost", "chart cost --units us --json"))(chart_cost_command)  # fmt: skip


def _sub(text: str, *examples: str) -> str:
    lines = [text, "", "\b", "Examples:"] + [f"  sawplan {e}" for e in examples]
    return "\n".join(lines) + "\n"
