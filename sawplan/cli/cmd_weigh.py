"""``sawplan weigh``: mass per length, piece and lot weight, and how to lift it."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import JsonOpt, MaterialsFileOpt, UnitsOpt
from sawplan.display import Display
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
constant), with the reach worked out from the piece's size unless --reach
gives it, and what the piece is: rounds roll, structurals tip, bars from
about 2 m take two people or a lift aid. Shop rules and local regulations
govern.
"""


def weigh_command(
    material: Annotated[str, typer.Argument(help="Material key, e.g. 4140.", show_default=False)],
    section: Annotated[
        list[str], typer.Argument(help="Shape and sizes, e.g. round 60mm.", show_default=False)
    ],
    length: Annotated[
        str, typer.Option("--length", "-l", help="Length of one piece, e.g. 1m, 12ft, 300mm.")
    ],
    count: Annotated[int, typer.Option("--count", "-n", help="Number of pieces.")] = 1,
    reach: Annotated[
        str | None,
        typer.Option(
            "--reach",
            help="Hands' distance in front of the ankles at the lift (default 25cm).",
            show_default=False,
        ),
    ] = None,
    lift_from: Annotated[
        str | None,
        typer.Option(
            "--lift-from",
            help="Height of the hands at the start of the lift (default 75cm).",
            show_default=False,
        ),
    ] = None,
    travel: Annotated[
        str | None,
        typer.Option(
            "--travel", help="Vertical travel of the lift (default 25cm).", show_default=False
        ),
    ] = None,
    lifts_per_min: Annotated[
        float, typer.Option("--lifts-per-min", help="How often the lift is repeated.")
    ] = 0.2,
    units: UnitsOpt = UnitSystem.METRIC,
    json_out: JsonOpt = False,
    materials_file: MaterialsFileOpt = None,
) -> None:
    from sawplan.handling import LiftConditions
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json
    from sawplan.sections import parse_section
    from sawplan.units import to_core
    from sawplan.weights import weigh

    mat = load_catalogue(materials_file).get(material)
    sec = parse_section(section)
    length_mm = to_core(length, "length", field="length")
    defaults = LiftConditions()
    conditions = LiftConditions(
        horizontal_cm=to_core(reach, "length", field="reach") / 10
        if reach is not None
        else defaults.horizontal_cm,
        vertical_cm=to_core(lift_from, "length", field="lift-from") / 10
        if lift_from is not None
        else defaults.vertical_cm,
        travel_cm=to_core(travel, "length", field="travel") / 10
        if travel is not None
        else defaults.travel_cm,
        frequency_per_min=lifts_per_min,
    )
    result = weigh(mat, sec, length_mm, count, conditions, reach_given=reach is not None)
    if json_out:
        print(to_json(result, kind="weigh"))
        return
    print(render_weigh(result, Display(units)))


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
    app.command("weigh", help=HELP)(weigh_command)
