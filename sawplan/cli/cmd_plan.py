"""``sawplan plan``: lay out a job's cut lists on the stock on hand, time, blade and cost it."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated, Any

import typer

from sawplan.cli.options import (
    DbOpt,
    ForceOpt,
    FractionsOpt,
    JsonOpt,
    LotChoiceOpt,
    MaterialsFileOpt,
    SawsFileOpt,
    SupplierChoiceOpt,
    UnitsOpt,
    WithoutLotOpt,
    arg,
    command,
    opt,
)
from sawplan.display import Display
from sawplan.units import UnitSystem

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.outputs import Input, Target

HELP = """Plan a job: cut lists from stock on hand, time, blades, quote.

JOBFILE is a TOML file with a [job] table (name, kerf, trim, grip,
min_remnant, saw, shop_rate, handling_time, blade_price, currency, customer,
due, stock_file, remnant_credit), [[stock]] entries (material, section, length, count, price or
price_per_kg, heat, location, remnant) and [[part]] entries (name, material,
section, length, count, tolerance, drawing). Lengths carry their unit.
stock_file names a CSV with the [[stock]] columns, in the job file's folder;
files elsewhere are read only with --allow.

Parts are cut only from stock of the same material and section. The plan
prints the bars to fetch, every cut from the head end, remnants to keep
(with the heat number to mark on them), weights and how to lift them, blade
and settings per section, time, blades to have on hand and the quote.
Nothing is written when the job has an error.

When the stock on hand cannot finish the job, the plan shows what can be
cut now under a SHORT banner, lists the bars to order (a [[stock]] line
with count = 0 names a length to buy) and exits with status 8; --order
prints the order list alone (--csv-dir DIR also writes it as order.csv).
--time-limit bounds the whole plan; the same job always gives the same
plan unless the limit stops the optimiser, which the plan then says.
--lot, --without-lot and --supplier choose the blades of the log that blade
life (blades on hand) comes from; the plan's notes say which.
--send puts the plan's cuts, in cut-sheet order, into the saw's queue on
the station (`sawplan serve`).
--sheet and --csv-dir replace files that exist only with --force, and never
a file the plan reads (the job file, its stock file, the materials, saws and
config files, the blade log).

\b
Examples:
  sawplan plan job.toml
  sawplan plan job.toml --sheet job.html
  sawplan plan job.toml --sheet job.md --units us
  sawplan plan job.toml --csv-dir out --saw large-column
  sawplan plan job.toml --json --db shop-log.sqlite
  sawplan plan job.toml --run cost
  sawplan plan job.toml --order
  sawplan plan job.toml --without-lot T-3309
  sawplan plan job.toml --send

Estimates only: the saw maker's manual, the blade maker's data, shop rules and
local regulations govern.
"""


def plan_command(
    jobfile: Annotated[Path, arg("job_file", help="The job file (TOML).")],
    json_out: JsonOpt = False,
    csv_dir: Annotated[
        Path | None,
        opt("csv_dir", help="Write cuts.csv, bars.csv, summary.csv and order.csv into DIR."),
    ] = None,
    sheet: Annotated[Path | None, opt("sheet")] = None,
    force: ForceOpt = False,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    db: DbOpt = None,
    saw_name: Annotated[
        str | None, opt("saw", help="Saw to plan for (overrides saw in [job]).")
    ] = None,
    saws_file: SawsFileOpt = None,
    materials_file: MaterialsFileOpt = None,
    time_limit: Annotated[
        float,
        opt("time_limit", show_default=True),
    ] = 10.0,
    order: Annotated[bool, opt("order")] = False,
    allow: Annotated[bool, opt("allow")] = False,
    run: Annotated[str | None, opt("run")] = None,
    lot: LotChoiceOpt = None,
    without_lot: WithoutLotOpt = None,
    supplier: SupplierChoiceOpt = None,
    send: Annotated[bool, opt("send")] = False,
) -> int:
    import sys
    import time

    started = time.perf_counter()

    from sawplan.cli.progress import progress
    from sawplan.cutlist.jobfile.load import load_job
    from sawplan.cutlist.plan.job import plan_job
    from sawplan.errors import ExitCode, UsageError
    from sawplan.materials import load_catalogue
    from sawplan.render import to_json

    if saw_name is not None and not saw_name.strip():
        raise UsageError(
            "expected a saw name, got nothing", field="saw", hint="see `sawplan saw list`"
        )
    catalogue = load_catalogue(materials_file)
    job = load_job(jobfile, catalogue, allow_outside=allow)
    job = with_shop_currency(job)
    targets = output_targets(csv_dir, sheet)
    inputs = plan_inputs(job, jobfile, db, materials_file, saws_file, allow) if targets else []
    if targets:  # refused before any planning, and again just before writing
        from sawplan.outputs import check_targets

        check_targets(targets, inputs, force=force)
        check_sheet_kind(sheet)
    from sawplan.store.blade_groups import blade_choice
    from sawplan.store.lookup import BladeLog

    log = BladeLog(db, choice=blade_choice(lot, without_lot, supplier))
    saw = choose_saw(job, saw_name, saws_file, log)
    sections = len(job.groups())
    what = f"planning {sections} section{'' if sections == 1 else 's'} on {saw.name}"
    with progress(what, quiet=json_out):
        plan = plan_job(
            job,
            saw,
            calibration_for=log.calibration,
            life_for=log.life,
            log_label=log.label,
            deadline=started + time_limit,
        )
    quote = None
    if run is not None:
        from sawplan import fields
        from sawplan.cli.cut_economics import plan_economics

        quote = plan_economics(plan, job, saw, log, fields.check_choice("run", run))
    d = Display(units, fractions)
    outputs = render_outputs(plan, d, csv_dir, sheet)
    if order:
        print(order_text(plan, d, json_out))
    elif json_out:
        if quote is None:
            print(to_json(plan, kind="plan"))
        else:
            from sawplan.render import jsonable

            print(to_json({**jsonable(plan), "run_quote": jsonable(quote)}, kind="plan"))
    else:
        from sawplan.cutlist.sheets.text import render_plan

        print(render_plan(plan, d))
        if quote is not None:
            from sawplan.cli.economics_view import render_run_quote

            print()
            print(render_run_quote(quote, d, currency=plan.currency))
    written = write_all(outputs, targets, inputs, force=force)
    for path in written:
        print(f"wrote {path}", file=sys.stderr if json_out else sys.stdout)
    if send:
        print(send_text(plan, saw, jobfile, db), file=sys.stderr if json_out else sys.stdout)
    return 0 if plan.complete else int(ExitCode.PLAN_INCOMPLETE)


def send_text(plan, saw, jobfile: Path, db: str | None) -> str:
    """Put the plan's cuts in the saw's queue on the station; one line saying so."""
    import dataclasses

    from sawplan.cutlist.plan.queue import queued_cuts
    from sawplan.store import connect
    from sawplan.store.dates import parse_day
    from sawplan.store.station_rows import send_job

    cuts = [dataclasses.asdict(c) for c in queued_cuts(plan)]
    with connect(db) as database:
        sent = send_job(
            database,
            name=plan.job or jobfile.stem,
            saw_name=saw.name,
            profile=saw,
            cuts=cuts,
            on=parse_day(None),
            file=jobfile.name,
            customer=plan.customer or None,
            due=plan.due or None,
        )
    line = f"sent {sent.cuts} cuts of job {sent.name!r} to the queue of {sent.saw} (sawplan serve)"
    if not plan.complete:
        line += "; the stock on hand is short, so only the cuts planned now were sent"
    return line


def order_text(plan, d: Display, json_out: bool) -> str:
    """The order list alone: text (or 'nothing to order'), or JSON."""
    if json_out:
        from sawplan.render import to_json

        return to_json({"complete": plan.complete, "order": order_rows(plan)}, kind="plan-order")
    if plan.complete:
        return "nothing to order: the stock on hand finishes the job"
    from sawplan.cutlist.sheets.text import order_list

    return order_list(plan, d)


def order_rows(plan) -> list[dict]:
    """One row per stock length to buy (metric, units in the keys)."""
    return [
        {
            "group": o.group,
            "stock_entry": o.stock_entry,
            "bars": o.count,
            "length_mm": o.length_mm,
            "price_each": o.price_each,
            "cost": o.price_each * o.count,
            "pieces_not_planned": "; ".join(f"{name} x{n}" for name, n in f.pieces),
        }
        for f in plan.shortfalls
        for o in f.order
    ]


def with_shop_currency(job):
    """The job, priced in the configured currency when its [job] table names none."""
    import dataclasses

    from sawplan import config

    currency = config.get("currency")
    if job.header.currency or not currency:
        return job
    return dataclasses.replace(job, header=dataclasses.replace(job.header, currency=currency))


def choose_saw(job, saw_name: str | None, saws_file: Path | None, log: Any):
    """``--saw``, else ``saw`` in [job], else the configured saw when it takes every section,
    else the smallest saw that does."""
    from sawplan import config
    from sawplan.cutlist.jobfile.load import Where, located
    from sawplan.errors import BadDataError, SawplanError
    from sawplan.saws import check_capacity, get_saw, load_saws

    extra = log.saws()
    if saw_name:
        return get_saw(saw_name, saws_file, extra)
    if job.header.saw:
        try:
            return get_saw(job.header.saw, saws_file, extra)
        except SawplanError as err:
            raise located(err, Where(job.file, "[job]", job.job_lines.get("saw"))) from None
    sections = [job.sections[g[1]] for g in job.groups()]
    saws = sorted(
        load_saws(saws_file, extra).values(),
        key=lambda s: (s.capacity_round_mm, s.capacity_rect_w_mm, s.name),
    )
    shop_saw = config.get("saw")  # the shop's usual saw, when it takes the job
    if shop_saw:
        saws = [get_saw(shop_saw, saws_file, extra)] + saws
    for saw in saws:
        try:
            for section in sections:
                check_capacity(saw, section)
        except SawplanError:
            continue
        return saw
    raise BadDataError(
        "no known saw takes every section of the job",
        field="saw",
        hint="name one with --saw or add yours with --saws FILE",
    )


# --- files --------------------------------------------------------------------------------


def render_outputs(
    plan, units: UnitSystem | Display, csv_dir: Path | None, sheet: Path | None
) -> dict[Path, str]:
    """Every file to write, as text, before anything touches the disk."""
    outputs: dict[Path, str] = {}
    if csv_dir is not None:
        for name, text in plan_csv(plan).items():
            outputs[csv_dir / name] = text
    if sheet is not None:
        if sheet.suffix.lower() == ".md":
            from sawplan.cutlist.sheets.markdown import render_markdown

            outputs[sheet] = render_markdown(plan, units)
        else:
            from sawplan.cutlist.sheets.html import render_html

            outputs[sheet] = render_html(plan, units)
    return outputs


def output_targets(csv_dir: Path | None, sheet: Path | None) -> list[Target]:
    """The files ``--csv-dir`` and ``--sheet`` name, known before the plan is made."""
    from sawplan.outputs import Target

    found = [Target(csv_dir / name, "--csv-dir") for name in PLAN_CSV] if csv_dir else []
    if sheet is not None:
        found.append(Target(sheet, "--sheet"))
    return found


def check_sheet_kind(sheet: Path | None) -> None:
    """A sheet named .pdf or .txt would get HTML inside: say which kinds there are."""
    if sheet is not None and sheet.suffix.lower() not in SHEET_SUFFIXES:
        from sawplan.errors import UsageError

        raise UsageError(
            f"{sheet.name}: a cut sheet is written as .html or .md",
            field="--sheet",
            hint="for a PDF, write the .html sheet and print it from a browser",
        )


SHEET_SUFFIXES = (".html", ".htm", ".md")  # HTML to print, Markdown to paste


def plan_inputs(
    job,
    jobfile: Path,
    db: str | None,
    materials_file: Path | None,
    saws_file: Path | None,
    allow: bool,
) -> list[Input]:
    """Every file the plan reads: none of them may be written over."""
    from sawplan.cutlist.jobfile.load import resolve_stock_file
    from sawplan.outputs import run_inputs

    stock = job.header.stock_file
    stock_path = resolve_stock_file(stock, jobfile.parent, allow_outside=allow) if stock else None
    return run_inputs(
        db,
        [
            ("the job file", jobfile),
            ("the job's stock file", stock_path),
            ("the materials file", materials_file),
            ("the saws file", saws_file),
        ],
    )


def write_all(
    outputs: dict[Path, str], targets: list[Target], inputs: list[Input], *, force: bool
) -> list[Path]:
    """Check the targets again, then write each beside itself and move them all into place."""
    from sawplan.outputs import check_targets, write_files

    if not outputs:
        return []
    check_targets(targets, inputs, force=force)
    return write_files(dict(outputs))


PLAN_CSV = ("cuts.csv", "bars.csv", "summary.csv", "order.csv")


def plan_csv(plan) -> dict[str, str]:
    """cuts.csv, bars.csv, summary.csv and order.csv (metric, units in the headers, cells
    neutralised)."""
    from sawplan.render import to_csv

    cuts = to_csv(
        ["bar", "stock", "heat", "seq", "mark", "part", "start_mm", "end_mm", "length_mm",
         "weight_kg", "handling", "drawing", "tolerance"],
        [
            [b.bar, b.stock, b.heat, p.seq, p.mark, p.part, _r(p.start_mm), _r(p.end_mm),
             _r(p.length_mm), _r(p.weight_kg, 3), p.handling, p.drawing, p.tolerance]
            for b in plan.bars
            for p in b.pieces
        ],
    )  # fmt: skip
    bars = to_csv(
        ["bar", "group", "stock_entry", "stock", "location", "heat", "length_mm", "pieces", "cuts",
         "trim_mm", "kerf_mm", "remnant_mm", "remnant_kept", "weight_kg", "handling", "cost",
         "cut_time_min"],
        [
            [b.bar, b.group, b.stock_entry, b.stock, b.location, b.heat, _r(b.length_mm),
             len(b.pieces), b.cuts, _r(b.trim_mm), _r(b.kerf_mm), _r(b.remnant_mm),
             "yes" if b.remnant_kept else "no", _r(b.weight_kg, 3), b.handling, _r(b.cost, 2),
             _r(b.cut_time_min, 2)]
            for b in plan.bars
        ],
    )  # fmt: skip
    rows = [
        [s.group, s.bars_used, s.lp_bound_bars, s.gap_bars, s.pieces, s.cuts, _r(s.kerf_mm),
         s.pitch, _r(s.band_speed_m_min, 1), _r(s.feed_mm_min, 1), _r(s.cut_time_min, 3),
         _r(s.total_time_min, 2), _r(s.cut_area_cm2, 1), _r(s.blades_consumed, 3),
         _r(s.waste_pct, 2), _r(s.material_cost, 2)]
        for s in plan.sections
    ]  # fmt: skip
    rows.append(
        ["total", plan.bars_used, plan.lp_bound_bars, plan.gap_bars, plan.pieces, plan.cuts, "",
         "", "", "", "", _r(plan.total_time_min, 2), _r(plan.cut_area_cm2, 1),
         _r(plan.blades_consumed, 3), _r(plan.waste_pct, 2), _r(plan.material_cost, 2)]
    )  # fmt: skip
    summary = to_csv(
        ["group", "bars_used", "lp_bound_bars", "gap_bars", "pieces", "cuts", "kerf_mm", "pitch",
         "band_speed_m_min", "feed_mm_min", "cut_time_min", "total_time_min", "cut_area_cm2",
         "blades_consumed", "waste_pct", "material_cost"],
        rows,
    )  # fmt: skip
    keys = ["group", "stock_entry", "bars", "length_mm", "price_each", "cost", "pieces_not_planned"]
    order = to_csv(keys, [[row[k] for k in keys] for row in order_rows(plan)])
    return {"cuts.csv": cuts, "bars.csv": bars, "summary.csv": summary, "order.csv": order}


def _r(value: float, digits: int = 1) -> float:
    return round(value, digits)


def register(app: typer.Typer) -> None:
    command(app, "plan", HELP)(plan_command)
