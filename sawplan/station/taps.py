"""The taps of a station page: start, cut done, blade off, new blade on, remnant, note.

Each tap is one form with its own key.  The values typed are read through the
field table (``forms``), then the write runs through the store's own calls
inside ``station_rows.once``: the write and the key in one transaction, so a
tap sent twice writes once and a refused tap writes nothing.  After a tap the
browser is sent back to the station page, which says what was saved; a
refusal shows the page again with one sentence beside the field at fault.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable
from typing import TYPE_CHECKING, Any
from urllib.parse import quote

from starlette.concurrency import run_in_threadpool
from starlette.requests import Request
from starlette.responses import RedirectResponse, Response

from sawplan.errors import BadDataError, ConflictError, SawplanError, UsageError
from sawplan.station.floor import UNWORN, StationView, missing, next_settings, page_context
from sawplan.station.floor import station_view as load_view
from sawplan.station.forms import KINDS, Typed, place, typed
from sawplan.station.tap_fixes import fix, undo
from sawplan.station.web import display_of, log_of, render

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.display import Display
    from sawplan.store.db import Log
    from sawplan.store.station_rows import Saved

Step = Callable[[], "str | Saved"]
# A measured time under a fifth of the model's is a Start tapped late or a Cut done tapped
# early: logging it would drag the calibration (actual ÷ model time) down for nothing.
TOO_QUICK = 0.2


async def tap(request: Request) -> Response:
    kind = request.path_params["kind"]
    if kind not in KINDS:
        return missing(request, request.path_params["saw"])
    async with request.form() as form:
        sent = typed(kind, form)
    return await run_in_threadpool(_tap, request, request.path_params["saw"], sent)


def _tap(request: Request, saw_name: str, sent: Typed) -> Response:
    from sawplan.store.station_rows import once, tap_said

    d = display_of(request)
    key = sent.values.get("tap", "")
    with log_of(request) as db:
        view = load_view(db, saw_name, for_tap=True)
        if view is None:
            return missing(request, saw_name)
        if tap_said(db, key) is None:  # a tap seen before is answered below, not run again
            try:
                step = BUILDERS[sent.kind](db, view, sent, d)
                if not view.in_log:
                    step = _adding_saw(db, view, step)
                with request.app.state.write_lock:
                    once(db, key, sent.kind, step, at=now().isoformat(), saw_name=view.saw.name)
            except SawplanError as err:
                fresh = load_view(db, saw_name) or view
                context = page_context(fresh, d, error=place(sent.kind, err), typed=sent)
                return render(request, "station.html", context, status=422)
    return RedirectResponse(f"/saw/{quote(view.saw.name, safe='')}?tap={key}#saved", 303)


def _adding_saw(db: Log, view: StationView, step: Step) -> Step:
    """A known saw's first tap: its profile goes into the log in the tap's transaction."""
    from sawplan.store.saw_rows import saw_row_id

    def first() -> str | Saved:
        saw_row_id(db, view.saw.name, view.saw, on=today())
        return step()

    return first


def now() -> dt.datetime:
    """The station's clock (local time with its offset): when a cut started and ended."""
    return dt.datetime.now().astimezone()


def today() -> str:
    from sawplan.store.dates import parse_day

    return parse_day(None)


def _length_unit(d: Display) -> str:
    """Bare numbers typed at the station are in the unit the page shows."""
    return d.label("length")


# --- start and cut done ----------------------------------------------------------------------------


def start(db: Log, view: StationView, sent: Typed, d: Display) -> Step:
    from sawplan.store.station_rows import start_cut

    cut = _cut_id(sent)
    at = now()

    def step() -> str:
        row = start_cut(db, view.saw.name, cut, at=at.isoformat())
        return f"Started {cut_words(row, d)} at {at:%H:%M}."

    return step


def done(db: Log, view: StationView, sent: Typed, d: Display) -> Step:
    from sawplan import fields
    from sawplan.store.records import CutEntry
    from sawplan.store.station_rows import Saved, finish_cuts, queue_from

    if view.blade is None:
        raise UsageError(f"no blade is fitted on {view.saw.name}: fit one under New blade on")
    first = _cut_id(sent)
    count = sent.whole("cuts", 1)
    typed_min = sent.quantity("time", default_unit="min")
    bundle = sent.checked("bundle") and count > 1
    rows = queue_from(db, view.saw.name, first, count)
    if len(rows) < count:
        raise BadDataError(
            f"only {len(rows)} cut{'s are' if len(rows) != 1 else ' is'} left in the queue "
            "from there",
            field="cuts",
        )
    ended = now()
    head = rows[0]
    model = None
    if not bundle and view.blade is not None:
        settings = next_settings(db, view.saw, view.blade, head)
        if settings["cut"] is not None:
            model = settings["cut"].cut_time_model_min * count
    minutes, how = typed_min, "as typed"
    if minutes is None:
        minutes, how = measured_minutes(head.get("started_at"), ended)
        if minutes is not None and model is not None and minutes < model * TOO_QUICK:
            how = (
                f"not logged: {d.fmt('time', minutes)} from Start is far less than the "
                f"{d.fmt('time', model)} these cuts take; type the time if it is right"
            )
            minutes = None
        elif minutes is not None:
            fields.check("time", minutes)
    heats = {r["heat"] for r in rows}

    def entry(target, chosen: list[dict[str, Any]]) -> CutEntry:
        return CutEntry(
            blade_id=target.blade.id,
            saw_id=target.saw_id,
            cut_on=ended.date().isoformat(),
            material=head["material"],
            material_group=head["material_group"],
            section=head["section"],
            area_mm2=sum(float(r["area_mm2"]) for r in chosen),
            pieces=len(chosen) if bundle else 1,
            count=1 if bundle else len(chosen),
            time_min=minutes,
            predicted_time_min=model,
            job=head["job"],
            heat=heats.pop() if len(heats) == 1 else None,
        )

    def step() -> Saved:
        cut_id, logged, chosen = finish_cuts(
            db, view.saw.name, [r["id"] for r in rows], entry, on=ended.date().isoformat()
        )
        what = cut_words(chosen[0], d) if len(chosen) == 1 else _cuts_words(chosen, bundle)
        if logged.time_min is not None:
            time = f"{d.fmt('time', logged.time_min)} {how}"
        else:
            time = f"time {how}" if how else "no time (Start was not tapped)"
        tag = view.blade.tag if view.blade is not None else "the fitted blade"
        said = f"Logged {what} on blade {tag}: {d.fmt('area', logged.area_mm2)}, {time}."
        return Saved(said, cut_id=cut_id)

    return step


def measured_minutes(started_at: str | None, ended: dt.datetime) -> tuple[float | None, str]:
    """Minutes from "start" to "cut done" (None when start was not tapped or the clock ran back)."""
    if not started_at:
        return None, ""
    began = dt.datetime.fromisoformat(started_at)
    minutes = (ended - began).total_seconds() / 60.0
    return (minutes, "measured") if minutes > 0 else (None, "")


def cut_words(row: dict[str, Any], d: Display) -> str:
    """``bar 2, piece A (body slice) at 120 mm`` — one queued cut in words."""
    where = f"at {d.tape(row['position_mm'])}" if row["position_mm"] is not None else ""
    if row["step"] == "trim":
        what = f"squaring cut {where}"
    else:
        what = f"piece {row['mark']} ({row['part']}) {where}"
    return f"job {row['job']}, bar {row['bar']}, {what}".strip()


def _cuts_words(rows: list[dict[str, Any]], bundle: bool) -> str:
    bars = sorted({r["bar"] for r in rows})
    marks = ", ".join(r["mark"] or "trim" for r in rows)
    kind = "cut at once as a bundle" if bundle else "cuts"
    return f"{len(rows)} {kind} of job {rows[0]['job']} (bar {', '.join(map(str, bars))}: {marks})"


def _cut_id(sent: Typed) -> int:
    raw = sent.required("cut")
    if not raw.isdigit():
        raise UsageError("this form names no cut; open the page again", field="cut")
    return int(raw)


# --- blades ----------------------------------------------------------------------------------------


def blade_off(db: Log, view: StationView, sent: Typed, d: Display) -> Step:
    from sawplan.store.fields import check_failure_mode
    from sawplan.store.records import fitted_on_saws, remove_blade, retire_blade

    tag = sent.required("tag")
    reason = sent.required("reason")
    note = sent.words("note")
    code = None if reason == UNWORN else check_failure_mode(reason, field="failure")
    on = today()

    def step() -> str:
        fitted = fitted_on_saws(db).get(view.saw.name.lower())
        if fitted is None or fitted.lower() != tag.lower():
            raise ConflictError(f"blade {tag} is no longer on {view.saw.name}", field="tag")
        if code is None:
            remove_blade(db, tag, on=on)
            return f"Blade {fitted} taken off unworn: back on the shelf."
        from sawplan.life.failure_modes import failure_modes

        blade = retire_blade(db, tag, code, on=on, note=note)
        return (
            f"Blade {blade.tag} off ({failure_modes()[code].name}) after "
            f"{d.fmt('area', blade.area_mm2)} cut; its life is in the log."
        )

    return step


def blade_on(db: Log, view: StationView, sent: Typed, d: Display) -> Step:
    from sawplan.store.records import add_blade, fit_blade

    spec = _new_blade(view, sent, d)
    tag = spec.tag if spec is not None else sent.text("shelf")
    if tag is None:
        raise UsageError("pick a blade from the shelf or add a new one", field="shelf")
    on = today()

    def step() -> str:
        if spec is not None:
            add_blade(db, spec, added_on=on)
        fitted = fit_blade(db, tag, view.saw.name, on=on, saw_profile=view.saw)
        off = f"; blade {fitted.displaced} taken off" if fitted.displaced else ""
        return (
            f"Blade {fitted.blade} fitted on {fitted.saw}{off}. "
            "Break it in: normal band speed, reduced feed (common practice)."
        )

    return step


def _new_blade(view: StationView, sent: Typed, d: Display):
    """The blade typed into "add a new blade" (read as ``sawplan blade add`` reads it), or
    None when no tag was typed.  Width and thickness default to the saw's blade."""
    from sawplan.store.blade_input import blade_spec

    tag = sent.text("tag")
    if tag is None:
        return None
    saw = view.saw
    return blade_spec(
        tag,
        pitch=sent.required("pitch"),
        width=sent.text("width") or f"{saw.blade_width_mm!r}mm",
        thickness=sent.text("thickness") or f"{saw.blade_thickness_mm!r}mm",
        length=f"{saw.blade_length_mm!r}mm" if saw.blade_length_mm else None,
        supplier=sent.words("supplier"),
        lot=sent.words("lot"),
        price=sent.text("price"),
    )


# --- remnants and notes ----------------------------------------------------------------------------


def remnant(db: Log, view: StationView, sent: Typed, d: Display) -> Step:
    from sawplan.store.station_rows import RemnantEntry, rack_remnant

    length = sent.quantity("length", default_unit=_length_unit(d))
    if length is None:
        raise UsageError("expected the remnant's length, got nothing", field="length")
    head = view.queue[0] if view.queue else None
    entry = RemnantEntry(
        length_mm=length,
        racked_on=today(),
        saw=view.saw.name,
        job_id=head["job_id"] if head else None,
        bar=head["bar"] if head else None,
        material=head["material"] if head else None,
        section=head["section"] if head else None,
        heat=sent.words("heat"),
        rack=sent.words("rack"),
        note=sent.words("note"),
    )

    def step() -> str:
        rack_remnant(db, entry)
        parts = [d.tape(entry.length_mm), f"heat {entry.heat}" if entry.heat else "no heat number"]
        if entry.rack:
            parts.append(f"at {entry.rack}")
        return f"Remnant racked: {', '.join(parts)}."

    return step


def note(db: Log, view: StationView, sent: Typed, d: Display) -> Step:
    from sawplan.store.station_rows import add_note

    text = sent.words("note")
    if text is None:
        raise UsageError("expected a note, got nothing", field="note")
    head = view.queue[0] if view.queue else None

    def step() -> str:
        add_note(db, view.saw.name, text, on=today(), job_id=head["job_id"] if head else None)
        short = text if len(text) <= 60 else text[:57] + "..."
        return f"Note saved: {short}"

    return step


BUILDERS: dict[str, Callable[[Log, StationView, Typed, Display], Step]] = {
    "start": start,
    "done": done,
    "blade-off": blade_off,
    "blade-on": blade_on,
    "remnant": remnant,
    "note": note,
    "fix": fix,
    "undo": undo,
}
assert set(BUILDERS) == set(KINDS)
