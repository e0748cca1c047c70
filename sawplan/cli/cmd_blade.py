"""``sawplan blade add|fit|remove|retire|list|show``: the blades in the log and their lives."""

from __future__ import annotations

from typing import Annotated, Any

import typer

from sawplan.cli.options import (
    ChartHeightOpt,
    ChartWidthOpt,
    CsvOpt,
    DateOpt,
    DbOpt,
    FractionsOpt,
    JsonOpt,
    NoteOpt,
    SawsFileOpt,
    TagArg,
    UnitsOpt,
    command,
    opt,
)
from sawplan.display import Display, as_display, fmt_money, fmt_number, section_text
from sawplan.units import UnitSystem

BLADE_MATERIALS = {
    "bi-metal": "bi-metal",
    "bimetal": "bi-metal",
    "carbon": "carbon",
    "carbon-steel": "carbon",
    "carbide": "carbide",
    "carbide-tipped": "carbide",
}
TOOTH_FORMS = ("regular", "hook", "skip")
TOOTH_SETS = ("raker", "wavy", "alternate")
_WELDED_TEXT = {"in-house": "welded in house", "bought": "bought welded"}
BLADE_CAUTION = (
    "Caution: fit and tension blades with the saw stopped and isolated, guards back on before "
    "running; break a new blade in at reduced feed. The saw maker's manual, the blade maker's "
    "data and shop rules govern."
)

HELP = """The blades in the blade log: add, fit, remove, retire, list, show.

A blade's life is the area it cut. A retired blade counts as a failure in
`sawplan life`; a blade still fitted, or removed unworn, counts as "at least
this long".

\b
Examples:
  sawplan blade add B-021 --pitch 3/4 --blade-width 27mm --blade-thickness 0.9mm --price 60
  sawplan blade fit B-017 --saw "bay 2"
  sawplan blade show B-017 --chart
"""

ADD_HELP = """Record a new blade with its tag, size, pitch and where it came from.

\b
Examples:
  sawplan blade add B-021 --pitch 3/4 --blade-width 27mm --blade-thickness 0.9mm --blade-length 3505mm --price 60
  sawplan blade add B-022 --pitch 4/6 --blade-width 1in --blade-thickness 0.035in --grade M42 --form hook --set raker --supplier "north depot" --lot 2291 --bought 2024-03-02 --welded in-house
"""

FIT_HELP = """Fit a blade to a saw. Any blade already on that saw is taken off (removed).

\b
Examples:
  sawplan blade fit B-017 --saw "bay 2"
  sawplan blade fit B-017 --saw mid-production --tension 200MPa --break-in --break-in-how "half feed, 500 cm2"
"""

REMOVE_HELP = """Take a blade off its saw, unworn (it may be fitted again later).

\b
Examples:
  sawplan blade remove B-017
  sawplan blade remove B-017 --date yesterday
"""

RETIRE_HELP = """Retire a blade for good, with the failure that ended it.

--failure is one of: stripped, body-crack, back-crack, weld, dull, crooked,
chips-welded. A retired blade counts as a failure in the life statistics.

\b
Examples:
  sawplan blade retire B-017 --failure dull
  sawplan blade retire B-009 --failure body-crack --location "gullet, 40 cm from weld"
"""

LIST_HELP = """List the blades in the log with their status, saw and area cut.

\b
Examples:
  sawplan blade list
  sawplan blade list --status fitted --units us
"""

SHOW_HELP = """Show one blade: its details, fittings, cuts, events and wear.

--chart draws the wear curve (cutting rate against area cut); --csv prints
the curve's data.

\b
Examples:
  sawplan blade show B-017
  sawplan blade show B-017 --chart
  sawplan blade show B-017 --csv > b017.csv
"""


def _length(text: str | None, key: str) -> float | None:
    from sawplan.fields import parse

    return None if text is None else parse(key, text)


def _choice(value: str | None, allowed: tuple[str, ...], field: str) -> str | None:
    from sawplan.errors import UsageError

    if value is None:
        return None
    key = value.strip().lower()
    if key not in allowed:
        raise UsageError(f"must be one of {', '.join(allowed)}, got {value!r}", field=field)
    return key


def blade_add_command(
    tag: TagArg,
    pitch: Annotated[str, opt("pitch")],
    width: Annotated[str, opt("blade_width")],
    thickness: Annotated[str, opt("blade_thickness")],
    length: Annotated[str | None, opt("blade_length")] = None,
    material: Annotated[str, opt("blade_material", show_default=True)] = "bi-metal",
    grade: Annotated[str | None, opt("grade")] = None,
    form: Annotated[str | None, opt("tooth_form")] = None,
    tooth_set: Annotated[str | None, opt("tooth_set")] = None,
    supplier: Annotated[str | None, opt("supplier")] = None,
    lot: Annotated[str | None, opt("lot")] = None,
    price: Annotated[float | None, opt("blade_price")] = None,
    bought: Annotated[str | None, opt("bought")] = None,
    welded: Annotated[str, opt("welded", show_default=True)] = "bought",
    notes: NoteOpt = None,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.cutting.pitch import parse_pitch
    from sawplan.errors import BadDataError
    from sawplan.render import to_json
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.records import WELDED, BladeSpec, add_blade

    p = parse_pitch(pitch, field="pitch")
    blade_material = BLADE_MATERIALS.get(material.strip().lower())
    if blade_material is None:
        raise BadDataError(
            f"must be bi-metal, carbon or carbide, got {material!r}", field="blade material"
        )
    spec = BladeSpec(
        tag=tag,
        width_mm=_length(width, "blade_width"),
        thickness_mm=_length(thickness, "blade_thickness"),
        length_mm=_length(length, "blade_length"),
        tpi_coarse=p.tpi_coarse,
        tpi_fine=p.tpi_fine,
        blade_material=blade_material,
        grade=grade,
        tooth_form=_choice(form, TOOTH_FORMS, "form"),
        tooth_set=_choice(tooth_set, TOOTH_SETS, "set"),
        supplier=supplier,
        lot=lot,
        price=price,
        bought_on=None if bought is None else parse_day(bought, field="bought"),
        welded=_choice(welded, WELDED, "welded") or "bought",
        notes=notes,
    )
    with connect(db) as database:
        blade = add_blade(database, spec, added_on=parse_day(None))
    if json_out:
        print(to_json(blade, kind="blade"))
        return
    print(f"added blade {blade.tag}: {describe(blade, Display(units, fractions))}")


def describe(blade: Any, units: UnitSystem | Display) -> str:
    """``bi-metal M42, 27 × 0.9 mm, 3/4 TPI, 3,505 mm long``."""

    d = as_display(units)
    size = (
        f"{d.num('length', blade.width_mm)} × {d.num('length', blade.thickness_mm)} "
        f"{d.label('length')}"
    )
    parts = [
        " ".join(p for p in (blade.blade_material, blade.grade) if p),
        size,
        f"{blade.pitch} TPI",
    ]
    if blade.length_mm:
        parts.append(f"{d.bar_length(blade.length_mm)} long")
    return ", ".join(parts)


def blade_fit_command(
    tag: TagArg,
    saw: Annotated[str, opt("saw", help="The saw it goes on.")],
    date: DateOpt = None,
    tension: Annotated[str | None, opt("tension")] = None,
    break_in: Annotated[bool | None, opt("break_in")] = None,
    break_in_how: Annotated[str | None, opt("break_in_how")] = None,
    saws_file: SawsFileOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan.fields import parse
    from sawplan.saws import load_saws
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.records import find_saw, fit_blade

    on = parse_day(date)
    tension_mpa = None if tension is None else parse("tension", tension)
    known = load_saws(saws_file)  # read (and check) a --saws file even when the log has the saw
    with connect(db) as database:
        profile = find_saw(database, saw) or known.get(saw.strip().lower())
        outcome = fit_blade(
            database,
            tag,
            saw,
            on=on,
            saw_profile=profile,
            tension_mpa=tension_mpa,
            break_in=break_in,
            break_in_how=break_in_how,
        )
    print(f"fitted blade {outcome.blade} on {outcome.saw} ({outcome.fitted_on})")
    if outcome.moved_from:
        print(f"  it was on {outcome.moved_from}: that fitting is closed")
    if outcome.displaced:
        print(f"  blade {outcome.displaced} was taken off {outcome.saw} (status: removed)")
    print(BLADE_CAUTION)


def blade_remove_command(
    tag: TagArg,
    date: DateOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.records import remove_blade

    on = parse_day(date)
    with connect(db) as database:
        saw = remove_blade(database, tag, on=on)
    print(f"removed blade {tag} from {saw} ({on}); it counts as unworn until retired")


def blade_retire_command(
    tag: TagArg,
    cause: Annotated[str, opt("failure")],
    date: DateOpt = None,
    location: Annotated[str | None, opt("location")] = None,
    note: NoteOpt = None,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.life.failure_modes import failure_mode
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.records import retire_blade

    on = parse_day(date)
    with connect(db) as database:
        blade = retire_blade(database, tag, cause, on=on, location=location, note=note)
    mode = failure_mode(blade.retire_cause or cause)
    area = Display(units, fractions).fmt("area", blade.area_mm2)
    cuts = "1 cut" if blade.cuts == 1 else f"{blade.cuts:,} cuts"
    print(f"retired blade {blade.tag} ({on}) after {area} in {cuts}: {mode.name}")
    print("usual causes (common practice): " + "; ".join(mode.causes))


def blade_list_command(
    status: Annotated[str | None, opt("status")] = None,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import table, to_csv, to_json
    from sawplan.store import connect
    from sawplan.store.records import list_blades

    with connect(db, create=False) as database:
        blades = list_blades(database, status=status)
    if json_out:
        print(to_json(blades, kind="blades"))
        return
    d = Display(units, fractions)
    headers = [
        "tag",
        "type",
        "status",
        "saw",
        "cuts",
        f"area {d.label('area')}",
        "price",
        "retired",
    ]
    rows = [
        [
            b.tag,
            d.text(b.blade_type),
            b.status,
            b.saw or "",
            b.cuts,
            d.num("area", b.area_mm2),
            "" if b.price is None else fmt_money(b.price),
            " ".join(x for x in (b.retired_on, b.retire_cause) if x),
        ]
        for b in blades
    ]
    if csv_out:
        print(to_csv(headers, rows), end="")
    elif not rows:
        print(
            "no blades in the log yet; add one: sawplan blade add TAG --pitch 3/4 "
            "--blade-width 27mm --blade-thickness 0.9mm"
        )
    else:
        print(table(headers, rows, align="lllllrrl"))


def blade_show_command(
    tag: TagArg,
    chart: Annotated[bool, opt("chart", help="Draw the wear curve.")] = False,
    width: ChartWidthOpt = 72,
    height: ChartHeightOpt = 20,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import to_csv, to_json
    from sawplan.store import connect
    from sawplan.store.blades import blade_history

    with connect(db, create=False) as database:
        history = blade_history(database, tag)
    if json_out:
        print(to_json(history, kind="blade-history"))
        return
    if csv_out:
        from sawplan.charts import wear_rows

        if history.wear is None:
            print(to_csv(*wear_rows_empty()), end="")
        else:
            print(to_csv(*wear_rows(history.wear)), end="")
        return
    if chart:
        print(wear_chart_text(history, Display(units, fractions), width, height))
        return
    print(render_history(history, Display(units, fractions)))


def wear_rows_empty() -> tuple[list[str], list[list[Any]]]:
    from sawplan.charts import wear_rows
    from sawplan.life import wear_curve

    headers, _ = wear_rows(wear_curve([1.0], [1.0]))
    return headers, []


def wear_chart_text(history: Any, units: UnitSystem | Display, width: int, height: int) -> str:
    import sys

    from sawplan.charts import wear_chart

    if history.wear is None:
        return (
            f"blade {history.blade.tag}: no timed cuts yet, so no wear curve (log cuts with --time)"
        )
    off_saw = history.blade.status in ("retired", "removed")
    text = wear_chart(
        history.wear,
        title=f"blade {history.blade.tag}: cutting rate against area cut",
        units=units,
        width=width,
        height=height,
        colorless=not sys.stdout.isatty(),
        # a retired or removed blade's verdict is its life, not "still breaking in"
        verdict=as_display(units).text(history.wear_summary) if off_saw else None,
    )
    return "\n".join([text, *history.wear_notes])


def render_history(h: Any, units: UnitSystem | Display) -> str:
    from sawplan.render import key_values, table

    d = as_display(units)
    b = h.blade
    pairs = [
        ("blade", f"{b.tag}: {describe(b, units)}"),
        ("status", b.status + (f" on {b.saw}" if b.saw else "")),
    ]
    if b.status == "retired":
        pairs.append(("retired", f"{b.retired_on}: {b.retire_cause}"))
    made = [x for x in (b.supplier, f"lot {b.lot}" if b.lot else None, f"bought {b.bought_on}" if b.bought_on else None,
                        _WELDED_TEXT.get(b.welded or "")) if x]  # fmt: skip
    if made:
        pairs.append(("from", ", ".join(made)))
    if b.price is not None:
        pairs.append(("price", fmt_money(b.price)))
    pairs.append(
        ("cut", f"{d.fmt('area', b.area_mm2)} in {b.cuts:,} cut{'' if b.cuts == 1 else 's'}")
    )
    if h.cost_per_m2 is not None:
        per_unit = fmt_number(d.per("large_area", h.cost_per_m2 / 1e6))
        pairs.append(("cost so far", f"{per_unit} per {d.label('large_area')} cut"))
    if b.notes:
        pairs.append(("notes", b.notes))
    out = [key_values(pairs)]
    if h.fittings:
        rows = [
            [f["saw"], f["fitted_on"], f["removed_on"] or "(on the saw)",
             d.fmt("stress", f["tension_mpa"]) if f["tension_mpa"] is not None else "",
             {None: "", 1: "yes", 0: "no"}[f["break_in"]] + (f" ({f['break_in_how']})" if f["break_in_how"] else "")]
            for f in h.fittings
        ]  # fmt: skip
        out.append(
            table(
                ["saw", "fitted", "removed", "tension", "break-in"],
                rows,
                align="lllll",
                title="\nfittings",
            )
        )
    if h.cuts:
        rows = [
            [c["cut_on"], c["material"], section_text(d, c["section"]), c["count"],
             d.num("area", c["area_mm2"]),
             "" if c["time_min"] is None else fmt_number(c["time_min"]),
             "" if c["predicted_time_min"] is None else fmt_number(c["predicted_time_min"]),
             c["saw"] or "", c["job"] or ""]
            for c in h.cuts[-h.shown_cuts:]
        ]  # fmt: skip
        title = (
            "\ncuts"
            if len(h.cuts) <= h.shown_cuts
            else f"\nlast {h.shown_cuts} of {len(h.cuts)} entries"
        )
        headers = [
            "date",
            "material",
            "section",
            "cuts",
            f"area {d.label('area')}",
            "min",
            "model min",
            "saw",
            "job",
        ]
        out.append(table(headers, rows, align="lllrrrrll", title=title))
    if h.events:
        rows = [[e["happened_on"], e["kind"], e["mode"] or "", e["teeth"] or "", e["location"] or "", e["note"] or ""]
                for e in h.events]  # fmt: skip
        out.append(
            table(
                ["date", "event", "mode", "teeth", "where", "note"],
                rows,
                align="llllll",
                title="\nevents",
            )
        )
    out.append("\nwear: " + d.text(h.wear_summary))
    out.extend(h.wear_notes)
    if h.wear is not None:
        out.append(h.wear.caution)
    return "\n".join(out)


def register(app: typer.Typer) -> None:
    group = typer.Typer(
        help=HELP, no_args_is_help=True, rich_markup_mode=None, add_completion=False
    )
    command(group, "add", ADD_HELP)(blade_add_command)
    command(group, "fit", FIT_HELP)(blade_fit_command)
    command(group, "remove", REMOVE_HELP)(blade_remove_command)
    command(group, "retire", RETIRE_HELP)(blade_retire_command)
    command(group, "list", LIST_HELP)(blade_list_command)
    command(group, "show", SHOW_HELP)(blade_show_command)
    app.add_typer(group, name="blade", help=HELP)
