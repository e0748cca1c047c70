"""Correcting a cut done: at the saw for a short while, in the office any cut of a day.

At the saw, the last "cut done" can be corrected (its time or its number of
cuts) or taken back for ``WINDOW_MIN`` minutes, until the next "cut done" or
blade change is saved there: long enough to catch a slip, short enough that
the page never offers to rewrite the shift.  The office (``/taps``, office
role) can correct any "cut done" tap of a day.  Both go through
``sawplan.store.tap_fixes`` inside ``station_rows.once``: the correction and
its own tap row (what it changed) are one transaction, and sent twice it
writes once.
"""

from __future__ import annotations

import datetime as dt
from typing import TYPE_CHECKING, Any
from urllib.parse import quote

from starlette.concurrency import run_in_threadpool
from starlette.requests import Request
from starlette.responses import RedirectResponse, Response
from starlette.routing import BaseRoute, Route

from sawplan.errors import ConflictError, SawplanError, UsageError
from sawplan.station.forms import FormError, Typed, new_tap, place, typed
from sawplan.station.web import display_of, log_of, render

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.display import Display
    from sawplan.station.floor import StationView
    from sawplan.store.db import Log
    from sawplan.store.station_rows import Saved
    from sawplan.store.tap_fixes import Correction

WINDOW_MIN = 15  # minutes after a cut done during which the station may correct it
FIX_KINDS = ("fix", "undo")


# --- at the saw ------------------------------------------------------------------------------


def last_cut(db: Log, saw_name: str) -> dict[str, Any] | None:
    """The saw's last cut while the station may still correct it, and until when."""
    from sawplan.station.taps import now
    from sawplan.store.tap_fixes import last_cut_tap

    found = last_cut_tap(db, saw_name, now=now(), window_min=WINDOW_MIN)
    if found is None:
        return None
    until = dt.datetime.fromisoformat(found["tapped_at"]) + dt.timedelta(minutes=WINDOW_MIN)
    return {**found, "until": f"{until:%H:%M}"}


def fix(db: Log, view: StationView, sent: Typed, d: Display):
    """The station's "correct the last cut": a new time and/or number of cuts."""
    from sawplan.store.tap_fixes import correct_cut

    tap_id, (time_min, cuts) = _tap_ref(sent), _typed_change(sent)

    def step() -> Saved:
        _still_open(db, view.saw.name, tap_id)
        return saved(correct_cut(db, tap_id, time_min=time_min, cuts=cuts), d)

    return step


def undo(db: Log, view: StationView, sent: Typed, d: Display):
    """The station's "take it back": the last cut was tapped by mistake."""
    from sawplan.store.tap_fixes import take_back_cut

    tap_id = _tap_ref(sent)

    def step() -> Saved:
        _still_open(db, view.saw.name, tap_id)
        return saved(take_back_cut(db, tap_id), d)

    return step


def _still_open(db: Log, saw_name: str, tap_id: int) -> None:
    """Inside the write: the cut is still the saw's last and within its window."""
    last = last_cut(db, saw_name)
    if last is None or last["id"] != tap_id:
        raise ConflictError(
            f"that cut can no longer be corrected here: the station corrects the last cut for "
            f"{WINDOW_MIN} min, until the next cut done or blade change; the office can correct "
            "any cut of the day"
        )


def _tap_ref(sent: Typed) -> int:
    raw = sent.required("last")
    if not raw.isdigit():
        raise UsageError("this form names no cut; open the page again", field="last")
    return int(raw)


def _typed_change(sent: Typed) -> tuple[float | None, int | None]:
    """The time and number of cuts typed (None: keep); read by the field table's rules."""
    from sawplan import fields

    time_min = sent.quantity("time", default_unit="min")
    if time_min is not None:
        fields.check("time", time_min)
    cuts = sent.whole("cuts", 0) or None
    return time_min, cuts


def saved(c: Correction, d: Display) -> Saved:
    """The correction's words, and what its tap row keeps (the change, the tap corrected)."""
    from sawplan.store.station_rows import Saved

    when = c.tapped_at[11:16]
    if c.after is None:
        n = c.cuts[0]
        said = (
            f"Took back the cut done at {when} ({d.fmt('area', c.before['area_mm2'])}): "
            f"{n} cut{'s are' if n != 1 else ' is'} to cut again."
        )
        return Saved(said, corrects=c.tap_id, change=c.change())
    parts = []
    if c.cuts[0] != c.cuts[1]:
        parts.append(f"cuts {c.cuts[0]} → {c.cuts[1]}")
    if "area_mm2" in c.after:
        parts.append(f"area {d.fmt('area', c.after['area_mm2'])}")
    if "time_min" in c.after:
        old = c.before["time_min"]
        was = d.fmt("time", old) if old is not None else "no time"
        parts.append(f"time {was} → {d.fmt('time', c.after['time_min'])}")
    said = f"Corrected the cut done at {when}: {', '.join(parts)}."
    return Saved(said, cut_id=c.cut_id, corrects=c.tap_id, change=c.change())


# --- in the office: any cut done of a day --------------------------------------------------------


def routes() -> list[BaseRoute]:
    return [
        Route("/taps", day_page),
        Route("/taps/{kind}", office_fix, methods=["POST"]),
    ]


def day_page(request: Request) -> Response:
    """GET ``/taps?day=YYYY-MM-DD``: every cut done that day, each with its correction forms."""
    from sawplan.station.access import require_office

    require_office(request)
    try:
        day = _day(request.query_params.get("day"))
    except SawplanError as err:
        return _day_answer(request, None, error=place("fix", err), status=422)
    return _day_answer(request, day, saved=_said(request, request.query_params.get("tap", "")))


async def office_fix(request: Request) -> Response:
    from sawplan.station.access import require_office

    require_office(request)
    kind = request.path_params["kind"]
    if kind not in FIX_KINDS:
        return render(request, "missing.html", {"what": "No such correction."}, status=404)
    async with request.form() as form:
        sent = typed(kind, form)
        day = str(form.get("day", ""))
    return await run_in_threadpool(_office_fix, request, sent, day)


def _office_fix(request: Request, sent: Typed, day: str) -> Response:
    from sawplan.station.taps import now
    from sawplan.store.station_rows import once, tap_said
    from sawplan.store.tap_fixes import correct_cut, cut_tap, take_back_cut

    d = display_of(request)
    key = sent.values.get("tap", "")
    try:
        day = _day(day)
    except SawplanError:
        day = _day(None)
    with log_of(request) as db:
        if tap_said(db, key) is None:
            try:
                tap_id = _tap_ref(sent)
                found = cut_tap(db, tap_id)
                if found is None:
                    raise UsageError("no such cut done tap; open the page again", field="last")
                if sent.kind == "fix":
                    time_min, cuts = _typed_change(sent)
                    step = lambda: saved(correct_cut(db, tap_id, time_min=time_min, cuts=cuts), d)  # noqa: E731
                else:
                    step = lambda: saved(take_back_cut(db, tap_id), d)  # noqa: E731
                with request.app.state.write_lock:
                    once(db, key, sent.kind, step, at=now().isoformat(), saw_name=found["saw"])
            except SawplanError as err:
                error = place(sent.kind, err)
                return _day_answer(request, day, error=error, typed=sent, status=422)
    return RedirectResponse(f"/taps?day={quote(day)}&tap={key}#saved", 303)


def _said(request: Request, key: str) -> str | None:
    from sawplan.store.station_rows import tap_said

    if not key:
        return None
    with log_of(request) as db:
        return tap_said(db, key)


def _day(text: str | None) -> str:
    from sawplan.store.dates import parse_day

    return parse_day(text or None)


def _day_answer(
    request: Request,
    day: str | None,
    *,
    saved: str | None = None,
    error: FormError | None = None,
    typed: Typed | None = None,
    status: int = 200,
) -> Response:
    from sawplan.store.tap_fixes import day_cut_taps

    if day is None:
        day = _day(None)
    with log_of(request) as db:
        taps = day_cut_taps(db, day)
    for t in taps:  # each form its own key (the fix and the undo of each tap)
        t["keys"] = {kind: new_tap() for kind in FIX_KINDS}
    context = {
        "day": day,
        "taps": taps,
        "saved": saved,
        "error": error,
        "typed": typed,
    }
    return render(request, "taps.html", context, status=status)
