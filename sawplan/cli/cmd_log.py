"""``sawplan log cut|event|list``: what each blade cut and what happened to it."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.log_view import LoggedCut, cut_table, render_logged
from sawplan.cli.options import (
    BundleOpt,
    CsvOpt,
    DateOpt,
    DbOpt,
    FractionsOpt,
    JsonOpt,
    MaterialArg,
    MaterialsFileOpt,
    NestOpt,
    NoteOpt,
    OrientOpt,
    SawsFileOpt,
    SectionArg,
    TagArg,
    UnitsOpt,
    arg,
    command,
    group,
    opt,
    saw_opt,
)
from sawplan.display import Display, fmt_number, fmt_plain, say

HELP = """Log what the blades cut and what happened to them.

\b
Examples:
  sawplan log cut 304 round 60mm --cuts 12 --time 30min
  sawplan log event B-017 teeth-lost --teeth 2
  sawplan log list --blade B-017
"""

CUT_HELP = """Log a cut, or a batch of identical cuts, on the fitted blade.

MATERIAL is a key from `sawplan materials`; SECTION is a shape word and its
sizes with units, as for `sawplan cut`. The blade is the one fitted on the saw
(give --saw when several saws carry blades) unless --blade names it.

--cuts N logs N identical cuts as one entry: the area is N times the section's
area and --time is the total for the batch. --area gives the area of one cut
when less than the whole section was cut.

\b
Examples:
  sawplan log cut 304 round 60mm
  sawplan log cut 4140 flat 100mm 25mm --orient edge --cuts 12 --time 30min --job J-2291 --heat H77812
  sawplan log cut A36 round 40mm --bundle 3x4 --blade B-017 --band-speed 60m/min --feed 3 --dry --date yesterday
"""

EVENT_HELP = """Log something that happened to a blade.

KIND is teeth-lost, crooked, stall or failure. A failure needs --failure and
retires the blade, judged against its type's expected life as `sawplan blade
retire` does (--failure worn-out: the end of a normal life).

\b
Examples:
  sawplan log event B-017 teeth-lost --teeth 3 --note "hit a hard spot"
  sawplan log event B-017 crooked --failure crooked
  sawplan log event B-017 failure --failure weld --location weld
"""

LIST_HELP = """List logged cut entries, newest first.

\b
Examples:
  sawplan log list
  sawplan log list --blade B-017 --csv
  sawplan log list --job J-2291 --limit 0
"""


def log_cut_command(
    material: MaterialArg,
    section: SectionArg,
    orient: OrientOpt = None,
    bundle: BundleOpt = None,
    nest: NestOpt = False,
    blade: Annotated[str | None, opt("blade")] = None,
    saw: Annotated[
        str | None, saw_opt("The saw (picks its fitted blade).", use_config=False)
    ] = None,
    cuts: Annotated[int, opt("cuts", show_default=True)] = 1,
    area: Annotated[
        str | None, opt("area", help="Area of one cut when less than the section, e.g. 20cm2.")
    ] = None,
    time: Annotated[str | None, opt("time")] = None,
    date: DateOpt = None,
    speed: Annotated[str | None, opt("band_speed", help="Band speed used, e.g. 60m/min.")] = None,
    feed: Annotated[str | None, opt("feed")] = None,
    dry: Annotated[bool, opt("dry")] = False,
    job: Annotated[str | None, opt("job")] = None,
    heat: Annotated[str | None, opt("heat")] = None,
    note: NoteOpt = None,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    materials_file: MaterialsFileOpt = None,
    saws_file: SawsFileOpt = None,
    db: DbOpt = None,
) -> None:
    from sawplan import config
    from sawplan.fields import parse
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json
    from sawplan.sections import parse_section
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.records import CutEntry, record_cut

    mat = load_catalogue(materials_file).get(material)
    if saws_file is not None:  # read (and check) a --saws file even when the log has the saw
        from sawplan.saws import load_saws

        load_saws(saws_file)
    words = list(section)
    if orient is not None:
        words += ["--orient", orient]
    if bundle is not None:
        words += ["--bundle", bundle]
    if nest:
        words.append("--nest")
    sec = parse_section(words)
    one_cut_mm2 = batch_cut_area(sec.area_mm2, None if area is None else parse("area", area))
    time_min = None if time is None else parse("time", time)
    speed_m_min = None if speed is None else parse("band_speed", speed)
    feed_mm_min, feed_setting = parse_feed(feed)
    on = parse_day(date)
    notes: list[str] = []

    def entry_for(target) -> CutEntry:
        notes.clear()  # the step may run again after a conflict with another station
        predicted = None
        if area is None and target.saw is not None:
            predicted, why = predict_minutes(
                mat, sec, target.saw, target.blade, dry=dry, speed_m_min=speed_m_min
            )
            if predicted is None:
                notes.append(say("no model time: {}", why))
            else:
                predicted *= cuts
        return CutEntry(
            blade_id=target.blade.id,
            saw_id=target.saw_id,
            cut_on=on,
            material=mat.key,
            material_group=mat.group,
            section=sec.spec(),
            area_mm2=one_cut_mm2 * cuts,
            pieces=sec.pieces,
            count=cuts,
            band_speed_m_min=speed_m_min,
            feed_mm_min=feed_mm_min,
            feed_setting=feed_setting,
            time_min=time_min,
            predicted_time_min=predicted,
            coolant=not dry,
            job=job,
            heat=heat,
            note=note,
        )

    def profile_of(name: str):
        from sawplan.saws import load_saws

        return load_saws(saws_file).get(name.strip().lower())

    # the shop's configured saw only chooses between several saws that carry blades
    shop_saw = config.get("saw") if blade is None and saw is None else None
    with connect(db) as database:
        entry_id, entry, after = record_cut(
            database, blade, saw, entry_for, on=on, profile_of=profile_of, preferred_saw=shop_saw
        )
    if json_out:
        result = LoggedCut(entry_id, after.tag, after.saw, after.area_mm2, tuple(notes), entry)
        print(to_json(result, kind="logged-cut"))
        return
    print(render_logged(entry, sec, mat, after, Display(units, fractions), notes))


def batch_cut_area(section_area_mm2: float, area_mm2: float | None) -> float:
    """Area of one cut: the section's, or less when ``--area`` says so (never more)."""
    from sawplan.errors import BadDataError

    if area_mm2 is None:
        return section_area_mm2
    if not area_mm2 > 0:
        raise BadDataError(f"must be above 0, got {fmt_plain(area_mm2)} mm²", field="area")
    if area_mm2 > section_area_mm2 * (1 + 1e-9):
        raise BadDataError(
            f"{fmt_number(area_mm2 / 100)} cm² is more than the section allows "
            f"({fmt_number(section_area_mm2 / 100)} cm² per cut)",
            field="area",
            hint="give the area of one cut, at most the section's; --cuts N counts the cuts",
        )
    return area_mm2


def parse_feed(text: str | None) -> tuple[float | None, str | None]:
    """A rate with a unit (mm/min, in/min) or a bare dial setting, kept as text."""
    from sawplan.errors import UsageError
    from sawplan.fields import check, parse

    if text is None:
        return None, None
    if not text.strip():
        raise UsageError("expected a feed, got nothing", field="feed", hint="e.g. 40mm/min or 3")
    try:
        setting = float(text)
    except ValueError:
        return parse("feed", text), None
    check("feed_setting", setting)  # a dial setting is a number on the saw's dial
    return None, text.strip()


def predict_minutes(mat, sec, saw_obj, blade, *, dry: bool, speed_m_min: float | None):
    """The cutting model's time for one cut with this blade, or None and why."""
    from sawplan.cutting.with_blade import cut_with_blade

    result, why = cut_with_blade(
        mat, sec, saw_obj, blade.tpi_coarse, blade.tpi_fine, blade.blade_material,
        dry=dry, speed_m_min=speed_m_min,
    )  # fmt: skip
    return (None, why) if result is None else (result.cut_time_model_min, None)


def log_event_command(
    tag: TagArg,
    kind: Annotated[str, arg("event_kind", help="teeth-lost, crooked, stall or failure.")],
    mode: Annotated[str | None, opt("failure", help="Failure mode, e.g. stripped, weld.")] = None,
    location: Annotated[str | None, opt("location")] = None,
    teeth: Annotated[int | None, opt("teeth")] = None,
    date: DateOpt = None,
    note: NoteOpt = None,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.life_ends import retirement
    from sawplan.store.records import EventEntry, log_event

    entry = EventEntry(
        blade_tag=tag,
        kind=kind,
        happened_on=parse_day(date),
        mode=mode,
        location=location,
        teeth=teeth,
        note=note,
    )
    with connect(db) as database:
        blade = log_event(database, entry)
        ended = retirement(database, blade) if kind.strip().lower() == "failure" else None
    if ended is not None:
        from sawplan.cli.blade_view import render_retirement

        print(render_retirement(ended, entry.happened_on, Display(units, fractions)))
    else:
        from sawplan.render import terminal_text

        print(
            terminal_text(
                f"logged {kind.strip().lower()} on blade {blade.tag} ({entry.happened_on})"
            )
        )


def log_list_command(
    blade: Annotated[str | None, opt("blade", help="Only this blade.")] = None,
    saw: Annotated[str | None, opt("saw", help="Only this saw.")] = None,
    job: Annotated[str | None, opt("job", help="Only this job.")] = None,
    limit: Annotated[int, opt("limit", show_default=True)] = 30,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    db: DbOpt = None,
) -> None:
    from sawplan.render import table, terminal_text, to_csv, to_json
    from sawplan.store import connect
    from sawplan.store.records import list_cuts

    with connect(db, create=False) as database:
        entries = list_cuts(database, blade=blade, saw=saw, job=job, limit=limit)
    if json_out:
        print(to_json(entries, kind="cuts"))
        return
    headers, body = cut_table(entries, Display(units, fractions))
    if csv_out:
        # stored text on the terminal: no raw control characters
        print(terminal_text(to_csv(headers, body), lines=True), end="")
    elif not body:
        print("no cuts logged yet; log one: sawplan log cut MATERIAL SECTION...")
    else:
        print(table(headers, body, align="rlllllrrrrll"))


def register(app: typer.Typer) -> None:
    sub = group(app, "log", HELP)
    command(sub, "cut", CUT_HELP)(log_cut_command)
    command(sub, "event", EVENT_HELP)(log_event_command)
    command(sub, "list", LIST_HELP)(log_list_command)
