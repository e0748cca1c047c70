"""``sawplan cut``: which blade, how fast, how hard, how long — or what the fitted blade will do."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import (
    BundleOpt,
    DbOpt,
    FractionsOpt,
    JsonOpt,
    MaterialArg,
    MaterialsFileOpt,
    NestOpt,
    OrientOpt,
    SawsFileOpt,
    SectionArg,
    UnitsOpt,
    command,
    opt,
    saw_opt,
)
from sawplan.display import Display

HELP = """Choose the blade, band speed and feed for one cut, and time it.

Without --pitch it recommends a pitch, tooth form and set for the section;
with it, it says what that blade will do instead (time, what limits it, what
goes wrong) beside the recommendation.  --band-speed and --feed plan the cut
as set on the saw and say what it costs in blade wear.  Bundles are timed per
piece against single cuts; sections that can lie another way say so when it
saves time or blade.

\b
Examples:
  sawplan cut A36 ibeam 200mm 100mm 5.6mm 8.5mm
  sawplan cut 304 round 250mm --saw large-column --chart
  sawplan cut 1045 square 80mm --pitch 4/6
  sawplan cut 4140 round 5-1/2in --units us --fractions
  sawplan cut 6061-T6 tube 60mm 3mm --bundle 3x4 --json
  sawplan cut 4140 round 7in --pitch 2/3 --band-speed 300ft/min
  sawplan cut 4140 round 150mm --economics --shop-rate 75 --chart

Estimates only: the saw maker's manual and the blade maker's data govern.
"""

DEFAULT_SAW = "mid-production"


def cut_command(
    material: MaterialArg,
    section: SectionArg,
    saw: Annotated[
        str,
        saw_opt(
            f"Saw profile (see `sawplan saw list`); default: config saw, else {DEFAULT_SAW}.",
            DEFAULT_SAW,
        ),
    ] = None,
    blade_tpi: Annotated[
        str | None, opt("pitch", help="Evaluate this pitch, e.g. 3/4 or 6.")
    ] = None,
    band_speed: Annotated[
        str | None, opt("band_speed", help="Run at this band speed, e.g. 60m/min or 200ft/min.")
    ] = None,
    feed: Annotated[
        str | None, opt("feed", help="Run at this down-feed, e.g. 25mm/min or 1in/min.")
    ] = None,
    dry: Annotated[bool, opt("dry")] = False,
    blade_material: Annotated[str, opt("blade_material", show_default=True)] = "bi-metal",
    orient: OrientOpt = None,
    bundle: BundleOpt = None,
    nest: NestOpt = False,
    chart: Annotated[
        bool, opt("chart", help="Chart width of cut and feed through the cut.")
    ] = False,
    economics: Annotated[bool, opt("economics")] = False,
    shop_rate: Annotated[float | None, opt("shop_rate")] = None,
    handling_time: Annotated[str | None, opt("handling_time")] = None,
    change_time: Annotated[str | None, opt("change_time")] = None,
    blade_price: Annotated[
        float | None, opt("blade_price", help="Blade price, for the cost per cut.")
    ] = None,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    db: DbOpt = None,
    saws_file: SawsFileOpt = None,
    materials_file: MaterialsFileOpt = None,
) -> None:
    from sawplan.charts import cut_chart
    from sawplan.cli.cut_view import render_cut
    from sawplan.cutting import check_fits, compare, recommend
    from sawplan.errors import UsageError
    from sawplan.fields import parse
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json
    from sawplan.saws import get_saw, load_saws
    from sawplan.sections import parse_section
    from sawplan.store.lookup import BladeLog

    if blade_material not in ("bi-metal", "carbon", "carbide"):
        raise UsageError(
            f"expected bi-metal, carbon or carbide, got {blade_material!r}", field="blade-material"
        )
    mat = load_catalogue(materials_file).get(material)
    sec = parse_section(section, orientation=orient, bundle=bundle, nest=nest)
    log = BladeLog(db)
    the_saw = get_saw(saw, saws_file, extra=log.saws())
    check_fits(the_saw, sec, load_saws(saws_file, log.saws()).values())
    found = log.calibration(the_saw.name, mat.group)
    calibration = found.factor if found else 1.0
    kw = {"dry": dry, "blade_material": blade_material, "calibration": calibration}
    if band_speed is not None:
        kw["band_speed_m_min"] = parse("band_speed", band_speed)
    if feed is not None:
        kw["feed_mm_min"] = parse("feed", feed)
    summary = None
    if blade_tpi is None and band_speed is None and feed is None:
        result = recommend(mat, sec, the_saw, **kw)
    else:
        comparison = compare(mat, sec, the_saw, blade_tpi, **kw)
        result, summary = comparison.chosen, comparison.summary
    econ = times = choice = None
    if economics and not result.stalled:  # a cut that does not progress has no cost per cut
        from sawplan.cli.cut_economics import (
            ShopFigures,
            blade_choice_for_cut,
            economics_of_cut,
        )

        figures = ShopFigures(
            shop_rate_per_h=shop_rate,
            handling_min=_minutes(handling_time, "handling_time"),
            blade_price=blade_price,
            change_min=_minutes(change_time, "change_time"),
        )
        econ, (times, _fit) = economics_of_cut(result, mat, sec, the_saw, log, figures, dry=dry)
        choice = blade_choice_for_cut(result, mat, sec, the_saw, log, figures, dry=dry)
    elif not economics and any(
        v is not None for v in (shop_rate, handling_time, change_time, blade_price)
    ):
        raise UsageError(
            "the shop's rates and prices are for the cost per cut",
            field="economics",
            hint="add --economics",
        )
    if json_out:
        from sawplan.render import jsonable

        payload = {
            **jsonable(result),
            "comparison": summary,
            "calibration_entries": found.entries if found else 0,
            "calibration_cuts": found.cuts if found else 0,
        }
        if econ is not None:
            payload["economics"] = jsonable(econ)
            payload["blade_choice"] = jsonable(choice) if choice is not None else None
            if chart:
                payload["cost_curve"] = _curve_rows(econ, times, the_saw)
        print(to_json(payload, kind="cut"))
        return
    d = Display(units, fractions)
    if summary:
        print(d.text(summary))
        print()
    print(render_cut(result, d, section_label=d.section(sec), calibration=found))
    if economics and result.stalled:
        print()
        print("No cost per cut: the cut does not progress.")
    if econ is not None:
        from sawplan.cli.economics_view import render_economics

        print()
        print(render_economics(econ, d))
        if choice is not None:
            from sawplan.cli.economics_view import render_blade_choice

            print()
            print(render_blade_choice(choice, d))
    if chart:
        print()
        print(cut_chart(result, d) if result.profile else "No chart: the cut does not progress.")
        if econ is not None:
            from sawplan.charts import speed_cost_chart

            print()
            print(speed_cost_chart(_curve(econ, times, the_saw), econ.runs, units=d))


def _minutes(text: str | None, key: str) -> float | None:
    """A time typed with its unit (30s, 15min), in minutes, inside the field's range."""
    if text is None:
        return None
    from sawplan import fields

    return fields.parse(key, text, default_unit="min")


def _curve(econ, times, saw):
    from sawplan.charts import WIDTH
    from sawplan.cutting.cut_cost import cost_curve

    span = (saw.band_speed_min_m_min, saw.band_speed_max_m_min)
    return cost_curve(econ.area_mm2, times, econ.life, econ.inputs, span, points=WIDTH - 6)


def _curve_rows(econ, times, saw) -> list[dict]:
    from sawplan.charts import speed_cost_rows

    headers, rows = speed_cost_rows(_curve(econ, times, saw))
    return [dict(zip(headers, row, strict=True)) for row in rows]


def register(app: typer.Typer) -> None:
    command(app, "cut", HELP)(cut_command)
