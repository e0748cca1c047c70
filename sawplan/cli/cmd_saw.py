"""``sawplan saw add|list``: saw profiles kept in the blade log, beside the packaged ones."""

from __future__ import annotations

import re
from typing import Annotated, Any

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

_RANGE = re.compile(
    r"^\s*(?P<lo>[\d.]+)\s*(?P<lo_unit>[^\d\s\-–]*)\s*(?:-|–|to|\.\.)\s*(?P<hi>[\d.]+)\s*(?P<unit>\S+)\s*$"
)


def parse_speed_range(text: str) -> tuple[float, float]:
    """``20-90m/min`` or ``65-330 ft/min`` → (low, high) in m/min."""
    from sawplan.errors import BadDataError, UsageError
    from sawplan.fields import parse

    words = "band speed range"
    m = _RANGE.match(text)
    if not m:
        raise UsageError(
            f"expected LOW-HIGH with a unit, got {text!r}", field=words, hint="e.g. 20-90m/min"
        )
    unit = m.group("unit")
    lo = parse("band_speed", m.group("lo") + (m.group("lo_unit") or unit), words=words)
    hi = parse("band_speed", m.group("hi") + unit, words=words)
    if lo > hi:
        raise BadDataError(f"the low speed is above the high one in {text!r}", field=words)
    return lo, hi


def parse_rect(text: str) -> tuple[float, float]:
    """``350x260mm`` → (width, height) in mm."""
    from sawplan.errors import UsageError
    from sawplan.fields import parse
    from sawplan.sections import split_sizes

    sizes = split_sizes(text.split())
    if len(sizes) != 2:
        raise UsageError(
            f"expected WIDTHxHEIGHT with a unit, got {text!r}",
            field="rectangle capacity",
            hint="e.g. 350x260mm",
        )
    w, h = (parse("capacity_rect", s) for s in sizes)
    return w, h


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
    import dataclasses

    from sawplan.errors import UsageError
    from sawplan.fields import parse
    from sawplan.render import to_json
    from sawplan.saws import Saw, get_saw
    from sawplan.store import connect, saws_from_db
    from sawplan.store.dates import parse_day
    from sawplan.store.records import add_saw

    values: dict[str, Any] = {}
    if like is not None:
        base = get_saw(like, saws_file, saws_from_db(db))
        values = {f.name: getattr(base, f.name) for f in dataclasses.fields(Saw)}
        values["source"] = f"like {base.name}"
        values["notes"] = ""  # the base saw's notes describe that saw, not this one
    values["name"] = name
    given = {
        "kind": kind,
        "feed_type": feed_type,
        "drive_efficiency": efficiency,
        "coolant": coolant,
        "wheel_count": wheels,
        "notes": notes,
    }
    quantities = {
        "wheel_diameter_mm": (wheel, "wheel"),
        "blade_length_mm": (blade_length, "blade_length"),
        "blade_width_mm": (blade_width, "blade_width"),
        "blade_thickness_mm": (blade_thickness, "blade_thickness"),
        "capacity_round_mm": (capacity_round, "capacity_round"),
        "motor_power_w": (power, "power"),
        "head_force_n": (head_force, "head_force"),
    }
    for key, (text, field_key) in quantities.items():
        if text is not None:
            given[key] = parse(field_key, text)
    if speed_range is not None:
        given["band_speed_min_m_min"], given["band_speed_max_m_min"] = parse_speed_range(
            speed_range
        )
    if capacity_rect is not None:
        given["capacity_rect_w_mm"], given["capacity_rect_h_mm"] = parse_rect(capacity_rect)
    values.update({k: v for k, v in given.items() if v is not None})
    values.setdefault("source", "blade log")
    missing = [_OPTION_OF[f.name] for f in dataclasses.fields(Saw) if f.name not in values
               and f.default is dataclasses.MISSING]  # fmt: skip
    missing = list(dict.fromkeys(missing))
    if missing:
        raise UsageError(
            f"missing {', '.join(missing)}",
            field="saw",
            hint="give them, or start from a known saw with --like NAME (see `sawplan saw list`)",
        )
    saw = Saw(**values)
    with connect(db) as database:
        add_saw(database, saw, added_on=parse_day(None), replace=replace)
    if json_out:
        print(to_json(saw, kind="saw"))
        return
    print(render_saw(saw, Display(units, fractions)))
    print(
        f"\nSaved in the blade log; use it with `sawplan blade fit TAG --saw {_quote(saw.name)}`."
    )


_OPTION_OF = {
    "kind": "--kind",
    "wheel_diameter_mm": "--wheel",
    "blade_length_mm": "--blade-length",
    "blade_width_mm": "--blade-width",
    "blade_thickness_mm": "--blade-thickness",
    "band_speed_min_m_min": "--speed-range",
    "band_speed_max_m_min": "--speed-range",
    "motor_power_w": "--power",
    "drive_efficiency": "--efficiency",
    "capacity_round_mm": "--capacity-round",
    "capacity_rect_w_mm": "--capacity-rect",
    "capacity_rect_h_mm": "--capacity-rect",
    "feed_type": "--feed-type",
}


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
    from sawplan.render import table, to_csv, to_json
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
        print(to_csv(headers, rows), end="")
    else:
        print(table(headers, rows, align="llrrrrlll"))


def register(app: typer.Typer) -> None:
    sub = group(app, "saw", HELP)
    command(sub, "add", ADD_HELP)(saw_add_command)
    command(sub, "list", LIST_HELP)(saw_list_command)
