"""``sawplan weigh``: mass per length, piece and lot weight, and how to lift it."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import (
    JsonOpt,
    MaterialArg,
    MaterialsFileOpt,
    SectionArg,
    UnitsOpt,
    command,
    opt,
)
from sawplan.units import UnitSystem

HELP = """Weigh a bar or blank and say how to lift it.

MATERIAL is a key from `sawplan materials` (e.g. 4140, 304, 6061-T6); SECTION
is a shape word and its sizes with units.

\b
Examples:
  sawplan weigh 4140 round 60mm --length 1m
  sawplan weigh 304 flat 4in 1in --length 12ft --count 6 --units us
  sawplan weigh D2 round 10in --length 300mm --reach 45cm --json

The handling class uses the revised NIOSH lifting equation (23 kg load
constant). Shop rules and local regulations govern.
"""


def weigh_command(
    material: MaterialArg,
    section: SectionArg,
    length: Annotated[str, opt("length")],
    count: Annotated[int, opt("count", show_default=True)] = 1,
    reach: Annotated[str | None, opt("reach")] = None,
    lift_from: Annotated[str | None, opt("lift_from")] = None,
    travel: Annotated[str | None, opt("travel")] = None,
    lifts_per_min: Annotated[float, opt("lifts_per_min", show_default=True)] = 0.2,
    units: UnitsOpt = UnitSystem.METRIC,
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
        frequency_per_min=lifts_per_min,
    )
    result = weigh(mat, sec, length_mm, count, conditions)
    if json_out:
        print(to_json(result, kind="weigh"))
        return
    print(render_weigh(result, units))


def render_weigh(r, units: UnitSystem) -> str:
    from sawplan.render import key_values
    from sawplan.units import Display

    d = Display(units)
    pairs = [
        ("material", f"{r.material} ({r.designation})"),
        ("section", r.section_shape.label(units.value) if r.section_shape else r.section),
        ("metal area", d.fmt("area", r.area_mm2, 4)),
        ("mass per length", d.fmt("mass_per_length", r.mass_per_length_kg_m, 4)),
        ("piece length", d.fmt("length", r.length_mm, 4)),
        ("one piece", d.fmt("mass", r.weight_kg, 3)),
    ]
    if r.count > 1:
        pairs.append((f"{r.count} pieces", d.fmt("mass", r.lot_weight_kg, 3)))
    pairs += [
        (
            "handling",
            f"{r.handling} (lifting index {r.lifting_index:.2f}, "
            f"limit {d.fmt('mass', r.recommended_limit_kg, 3)})",
        ),
        ("", _advice(r, d)),
        ("caution", r.caution),
    ]
    return key_values(pairs)


_WHO = {
    "one-person": "one person can lift it close to the body at waist height",
    "two-person": "a two-person lift, or a lift aid",
    "lift-aid": "use a hoist, crane or lift table",
}


def _advice(r, d) -> str:
    who = _WHO.get(r.handling, r.handling)
    return f"{who}: one piece is {d.fmt('mass', r.weight_kg, 3)}"


def register(app: typer.Typer) -> None:
    command(app, "weigh", HELP)(weigh_command)
