"""``sawplan blade add|fit|remove|retire|list|show``: the blades in the log and their lives."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.blade_view import (
    BLADE_CAUTION,
    blade_table,
    describe,
    render_history,
    wear_chart_text,
    wear_rows_empty,
)
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
    group,
    opt,
)
from sawplan.display import Display

HELP = """The blades in the log: add, fit, remove, retire, list, show.

A blade's life is the area it cut. A retired blade counts as a failure in
`sawplan life`; a blade still fitted, or removed unworn, counts as "at least
this long".

\b
Examples:
  sawplan blade add B-021 --pitch 3/4 --blade-width 27mm --blade-thickness 0.9mm --price 60
  sawplan blade fit B-017 --saw "bay 2"
  sawplan blade show B-017 --chart
"""

ADD_HELP = """Record a new blade: its tag, size, pitch and where it came from.

\b
Examples:
  sawplan blade add B-021 --pitch 3/4 --blade-width 27mm --blade-thickness 0.9mm --blade-length 3505mm --price 60
  sawplan blade add B-022 --pitch 4/6 --blade-width 1in --blade-thickness 0.035in --grade M42 --form hook --set raker --supplier "north depot" --lot 2291 --bought 2024-03-02 --welded in-house
"""

FIT_HELP = """Fit a blade to a saw. Any blade already on that saw is taken off (removed).

\b
Examples:
  sawplan blade fit B-017 --saw "bay 2"
  sawplan blade fit B-009 --saw mid-production --tension 200MPa --break-in --break-in-how "half feed, 500 cm2"
"""

REMOVE_HELP = """Take a blade off its saw, unworn (it may be fitted again later).

\b
Examples:
  sawplan blade remove B-017
  sawplan blade remove B-017 --date yesterday
"""

RETIRE_HELP = """Retire a blade for good: worn out, or the failure that ended it.

--failure is worn-out (the teeth wore down over a normal life) or one of the
failures: stripped, body-crack, back-crack, weld, dull, crooked,
chips-welded. The area the blade cut is compared with the expected life of
its blade type: worn-out or dull within that range is normal wear, below it
the teeth dulled early (a failure, with its usual causes). In the Weibull
fit every retired blade counts, a worn-out one as a failure of wear.

\b
Examples:
  sawplan blade retire B-017 --failure worn-out
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
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import to_json
    from sawplan.store import connect
    from sawplan.store.blade_input import blade_spec
    from sawplan.store.dates import parse_day
    from sawplan.store.records import add_blade

    spec = blade_spec(
        tag,
        pitch=pitch,
        width=width,
        thickness=thickness,
        length=length,
        material=material,
        grade=grade,
        form=form,
        tooth_set=tooth_set,
        supplier=supplier,
        lot=lot,
        price=price,
        bought=bought,
        welded=welded,
        notes=notes,
    )
    with connect(db) as database:
        blade = add_blade(database, spec, added_on=parse_day(None))
    if json_out:
        print(to_json(blade, kind="blade"))
        return
    print(f"added blade {blade.tag}: {describe(blade, Display(units, fractions))}")


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
    lines = [f"fitted blade {outcome.blade} on {outcome.saw} ({outcome.fitted_on})"]
    if outcome.moved_from:
        lines.append(f"  it was on {outcome.moved_from}: that fitting is closed")
    if outcome.displaced:
        lines.append(f"  blade {outcome.displaced} was taken off {outcome.saw} (status: removed)")
    from sawplan.render import terminal_text

    print(terminal_text("\n".join(lines), lines=True))  # names as the log holds them
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
    from sawplan.render import terminal_text

    print(
        terminal_text(f"removed blade {tag} from {saw} ({on}); it counts as unworn until retired")
    )


def blade_retire_command(
    tag: TagArg,
    cause: Annotated[str, opt("failure")],
    date: DateOpt = None,
    location: Annotated[str | None, opt("location")] = None,
    note: NoteOpt = None,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.cli.blade_view import render_retirement
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.life_ends import retirement
    from sawplan.store.records import retire_blade

    on = parse_day(date)
    with connect(db) as database:
        blade = retire_blade(database, tag, cause, on=on, location=location, note=note)
        ended = retirement(database, blade)
    print(render_retirement(ended, on, Display(units, fractions)))


def blade_list_command(
    status: Annotated[str | None, opt("status")] = None,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import table, terminal_text, to_csv, to_json
    from sawplan.store import connect
    from sawplan.store.records import list_blades

    with connect(db, create=False) as database:
        blades = list_blades(database, status=status)
    if json_out:
        print(to_json(blades, kind="blades"))
        return
    headers, rows = blade_table(blades, Display(units, fractions))
    if csv_out:
        # stored text on the terminal: no raw control characters
        print(terminal_text(to_csv(headers, rows), lines=True), end="")
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
    units: UnitsOpt = None,
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


def register(app: typer.Typer) -> None:
    sub = group(app, "blade", HELP)
    command(sub, "add", ADD_HELP)(blade_add_command)
    command(sub, "fit", FIT_HELP)(blade_fit_command)
    command(sub, "remove", REMOVE_HELP)(blade_remove_command)
    command(sub, "retire", RETIRE_HELP)(blade_retire_command)
    command(sub, "list", LIST_HELP)(blade_list_command)
    command(sub, "show", SHOW_HELP)(blade_show_command)
