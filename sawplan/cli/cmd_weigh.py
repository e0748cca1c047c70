"""``sawplan weigh``: mass per length, piece and lot weight, and how to lift it."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import (
    FractionsOpt,
    JsonOpt,
    MaterialArg,
    MaterialsFileOpt,
    SectionArg,
    UnitsOpt,
    command,
    opt,
)
from sawplan.cli.weigh_view import render_weigh
from sawplan.display import Display

HELP = """Weigh a bar or blank and say how to lift it.

MATERIAL is a key from `sawplan materials` (e.g. 4140, 304, 6061-T6); SECTION
is a shape word and its sizes with units.

\b
Examples:
  sawplan weigh A36 channel 150mm 75mm 5.5mm 9mm --length 6m
  sawplan weigh 1018 flat 4in 1in --length 12ft --count 6 --units us --fractions
  sawplan weigh D2 round 10in --length 300mm --reach 45cm --json
  sawplan weigh 6061-T6 tube 48.3mm 3.2mm --length 6m --lift-from 20cm --twist 45

The handling class uses the revised NIOSH lifting equation (23 kg load
constant), with the reach worked out from the piece's size unless --reach
gives it, and what the piece is: rounds roll, structurals tip, bars from
about 2 m take two people or a lift aid. Shop rules and local regulations
govern.
"""


def weigh_command(
    material: MaterialArg,
    section: SectionArg,
    length: Annotated[str, opt("length")],
    count: Annotated[int, opt("count", show_default=True)] = 1,
    reach: Annotated[str | None, opt("reach")] = None,
    lift_from: Annotated[str | None, opt("lift_from")] = None,
    travel: Annotated[str | None, opt("travel")] = None,
    twist: Annotated[float, opt("twist", show_default=True)] = 0.0,
    lifts_per_min: Annotated[float, opt("lifts_per_min", show_default=True)] = 0.2,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    materials_file: MaterialsFileOpt = None,
) -> None:
    from sawplan.fields import parse
    from sawplan.handling import LiftConditions
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json
    from sawplan.sections import parse_section
    from sawplan.weights import weigh

    mat = load_catalogue(materials_file).get(material)
    sec = parse_section(section)
    length_mm = parse("length", length)
    defaults = LiftConditions()
    conditions = LiftConditions(
        horizontal_cm=defaults.horizontal_cm if reach is None else parse("reach", reach) / 10,
        vertical_cm=defaults.vertical_cm
        if lift_from is None
        else parse("lift_from", lift_from) / 10,
        travel_cm=defaults.travel_cm if travel is None else parse("travel", travel) / 10,
        asymmetry_deg=twist,
        frequency_per_min=lifts_per_min,
    )
    result = weigh(mat, sec, length_mm, count, conditions, reach_given=reach is not None)
    if json_out:
        print(to_json(result, kind="weigh"))
        return
    print(render_weigh(result, Display(units, fractions)))


def register(app: typer.Typer) -> None:
    command(app, "weigh", HELP)(weigh_command)
