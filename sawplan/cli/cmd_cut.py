"""``sawplan cut``: which blade, how fast, how hard, how long — or what the fitted blade will do."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import (
    BundleOpt,
    DbOpt,
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
)
from sawplan.units import UnitSystem

HELP = """Choose the blade, band speed and feed for one cut, and time it.

Without --pitch it recommends a pitch, tooth form and set for the section;
with it, it says what that blade will do instead (time, what limits it, what
goes wrong) beside the recommendation.

\b
Examples:
  sawplan cut 4140 round 7in
  sawplan cut 304 round 250mm --saw large-column --chart
  sawplan cut 304 round 250mm --pitch 4/6
  sawplan cut A36 ibeam 200mm 100mm 5.6mm 8.5mm --units us
  sawplan cut 1018 tube 60mm 3mm --bundle 3x4 --json

Estimates only: the saw maker's manual and the blade maker's data govern.
"""

DEFAULT_SAW = "mid-production"


def cut_command(
    material: MaterialArg,
    section: SectionArg,
    saw: Annotated[
        str, opt("saw", help="Saw profile (see `sawplan saw list`).", show_default=True)
    ] = DEFAULT_SAW,
    blade_tpi: Annotated[
        str | None, opt("pitch", help="Evaluate this pitch, e.g. 3/4 or 6.")
    ] = None,
    band_speed: Annotated[
        str | None, opt("band_speed", help="Run at this band speed, e.g. 60m/min (with --pitch).")
    ] = None,
    dry: Annotated[bool, opt("dry")] = False,
    blade_material: Annotated[str, opt("blade_material", show_default=True)] = "bi-metal",
    orient: OrientOpt = None,
    bundle: BundleOpt = None,
    nest: NestOpt = False,
    chart: Annotated[
        bool, opt("chart", help="Chart width of cut and feed through the cut.")
    ] = False,
    units: UnitsOpt = UnitSystem.METRIC,
    json_out: JsonOpt = False,
    db: DbOpt = None,
    saws_file: SawsFileOpt = None,
    materials_file: MaterialsFileOpt = None,
) -> None:
    from sawplan.charts import cut_chart
    from sawplan.cli.cut_view import render_cut
    from sawplan.cutting import compare, recommend
    from sawplan.errors import UsageError
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json
    from sawplan.saws import check_capacity, get_saw
    from sawplan.sections import parse_section
    from sawplan.store.lookup import BladeLog
    from sawplan.units import to_core

    if blade_material not in ("bi-metal", "carbon", "carbide"):
        raise UsageError(
            f"expected bi-metal, carbon or carbide, got {blade_material!r}", field="blade-material"
        )
    if band_speed is not None and blade_tpi is None:
        raise UsageError(
            "give --pitch with --band-speed (the blade on the saw)", field="band-speed"
        )
    mat = load_catalogue(materials_file).get(material)
    sec = parse_section(section, orientation=orient, bundle=bundle, nest=nest)
    log = BladeLog(db)
    the_saw = get_saw(saw, saws_file, extra=log.saws())
    check_capacity(the_saw, sec)
    calibration, calibration_n = log.calibration(the_saw.name, mat.group) or (1.0, 0)
    kw = {"dry": dry, "blade_material": blade_material, "calibration": calibration}
    summary = None
    if blade_tpi is None:
        result = recommend(mat, sec, the_saw, **kw)
    else:
        if band_speed is not None:
            kw["band_speed_m_min"] = to_core(band_speed, "speed", field="band-speed")
        comparison = compare(mat, sec, the_saw, blade_tpi, **kw)
        result, summary = comparison.chosen, comparison.summary
    if json_out:
        from sawplan.render import jsonable

        payload = {**jsonable(result), "comparison": summary, "calibration_cuts": calibration_n}
        print(to_json(payload, kind="cut"))
        return
    if summary:
        print(summary)
        print()
    label = sec.label(units.value)
    print(render_cut(result, units, section_label=label, calibration_cuts=calibration_n))
    if chart:
        print()
        print(cut_chart(result, units))


def register(app: typer.Typer) -> None:
    command(app, "cut", HELP)(cut_command)
