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
from sawplan.display import Display
from sawplan.units import UnitSystem

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
    units: UnitsOpt = UnitSystem.METRIC,
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


def render_weigh(r, d: Display) -> str:
    from sawplan.render import key_values

    pairs = [
        ("material", f"{r.material} ({r.designation})"),
        ("section", d.section(r.section_shape) if r.section_shape else r.section),
        ("metal area", d.fmt("area", r.area_mm2)),
        ("mass per length", d.fmt("mass_per_length", r.mass_per_length_kg_m)),
        ("piece length", d.bar_length(r.length_mm)),
        ("one piece", d.fmt("mass", r.weight_kg)),
    ]
    if r.count > 1:
        pairs.append((f"{r.count:,} pieces", d.fmt("mass", r.lot_weight_kg)))
    index = "—" if r.lifting_index == float("inf") else f"{r.lifting_index:.2f}"
    pairs += [
        (
            "handling",
            f"{r.handling} (lifting index {index}; one person's limit "
            f"{d.fmt('mass', r.recommended_limit_kg)} at a {d.fmt('length', r.reach_cm * 10, 3)} "
            "reach)",
        ),
        ("", d.text(r.advice)),
    ]
    pairs += [("caution" if i == 0 else "", d.text(c)) for i, c in enumerate(r.cautions)]
    pairs.append(("", r.caution))
    return key_values(pairs)


def register(app: typer.Typer) -> None:
    command(app, "weigh", HELP)(weigh_command)
