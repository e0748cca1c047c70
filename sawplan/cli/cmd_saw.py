"""``sawplan saw add|list``: saw profiles kept in the blade log, beside the packaged ones."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import (
    CsvOpt,
    DbOpt,
    FractionsOpt,
    JsonOpt,
    NoteOpt,
    SawsFileOpt,
    UnitsOpt,
    arg,
    command,
    group,
    opt,
)
from sawplan.cli.saw_view import render_saw, saw_json, saw_table
from sawplan.display import Display

HELP = """Saw profiles: add your own saws and list every saw known.

\b
Examples:
  sawplan saw add "bay 3" --like mid-production --wheel 450mm --power 2.2kW
  sawplan saw list
"""

ADD_HELP = """Keep a saw's profile in the blade log.

`sawplan blade fit` and `sawplan cut --saw NAME` can then use it.

Start from a known profile with --like and change what differs, or give every
field. Sizes take units (mm, in); the speed range is LOW-HIGH with a unit.

\b
Examples:
  sawplan saw add "bay 3" --like mid-production --wheel 450mm --power 1.5kW --speed-range 20-90m/min
  sawplan saw add hyd-330 --kind horizontal --wheel 400mm --blade-length 3660mm --blade-width 27mm --blade-thickness 0.9mm --speed-range 20-100m/min --power 1.5kW --efficiency 0.75 --capacity-round 260mm --capacity-rect 350x260mm --feed-type hydraulic --head-force 2500N
"""

LIST_HELP = """List every saw known: packaged, from your saws file and in the log.

\b
Examples:
  sawplan saw list
  sawplan saw list --units us --csv
"""


def saw_add_command(
    name: Annotated[str, arg("saw", help="The saw's name in your shop.")],
    like: Annotated[str | None, opt("like")] = None,
    kind: Annotated[str | None, opt("saw_kind")] = None,
    wheel: Annotated[str | None, opt("wheel")] = None,
    blade_length: Annotated[str | None, opt("blade_length")] = None,
    blade_width: Annotated[str | None, opt("blade_width")] = None,
    blade_thickness: Annotated[str | None, opt("blade_thickness")] = None,
    speed_range: Annotated[str | None, opt("speed_range")] = None,
    power: Annotated[str | None, opt("power")] = None,
    efficiency: Annotated[float | None, opt("efficiency")] = None,
    capacity_round: Annotated[str | None, opt("capacity_round")] = None,
    capacity_rect: Annotated[str | None, opt("capacity_rect")] = None,
    feed_type: Annotated[str | None, opt("feed_type")] = None,
    head_force: Annotated[str | None, opt("head_force")] = None,
    coolant: Annotated[bool | None, opt("coolant")] = None,
    wheels: Annotated[int | None, opt("wheels")] = None,
    notes: NoteOpt = None,
    replace: Annotated[bool, opt("replace")] = False,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    saws_file: SawsFileOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan.render import to_json
    from sawplan.saws import get_saw
    from sawplan.store import connect, saws_from_db
    from sawplan.store.dates import parse_day
    from sawplan.store.records import add_saw
    from sawplan.store.saw_input import saw_profile

    base = get_saw(like, saws_file, saws_from_db(db)) if like is not None else None
    saw = saw_profile(
        name,
        base=base,
        kind=kind,
        wheel=wheel,
        blade_length=blade_length,
        blade_width=blade_width,
        blade_thickness=blade_thickness,
        speed_range=speed_range,
        power=power,
        efficiency=efficiency,
        capacity_round=capacity_round,
        capacity_rect=capacity_rect,
        feed_type=feed_type,
        head_force=head_force,
        coolant=coolant,
        wheels=wheels,
        notes=notes,
    )
    with connect(db) as database:
        add_saw(database, saw, added_on=parse_day(None), replace=replace)
    if json_out:
        print(to_json(saw, kind="saw"))
        return
    print(render_saw(saw, Display(units, fractions)))
    print(
        f"\nSaved in the blade log; use it with `sawplan blade fit TAG --saw {_quote(saw.name)}`."
    )


def _quote(name: str) -> str:
    return f'"{name}"' if " " in name else name


def saw_list_command(
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    saws_file: SawsFileOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan.render import table, terminal_text, to_csv, to_json
    from sawplan.saws import load_saws
    from sawplan.store import connect
    from sawplan.store.records import fitted_on_saws, logged_saws

    with connect(db, create=False) as database:
        logged = logged_saws(database)
        fitted = fitted_on_saws(database)
    saws = list(load_saws(saws_file, logged).values())
    if json_out:
        print(to_json([saw_json(s, fitted) for s in saws], kind="saws"))
        return
    headers, rows = saw_table(saws, fitted, Display(units, fractions))
    if csv_out:
        # stored text on the terminal: no raw control characters
        print(terminal_text(to_csv(headers, rows), lines=True), end="")
    else:
        print(table(headers, rows, align="llrrrrlll"))


def register(app: typer.Typer) -> None:
    sub = group(app, "saw", HELP)
    command(sub, "add", ADD_HELP)(saw_add_command)
    command(sub, "list", LIST_HELP)(saw_list_command)
