"""Office actions: add and change blades and saws, withdraw or move a job.

Every action is a POST form carrying the form token (the guard refuses one
without it before this code runs) and is open to the office role only.  The
typed values are read through the station's form table (``station.forms``,
which the office forms join here) and the field rules, then written by one
store call: ``add_blade``, ``fit_blade``, ``remove_blade``, ``retire_blade``,
``add_saw``, ``withdraw_job``, ``move_job``, each one transaction, so a
refused form writes nothing.  A refusal shows the page again (422) with what
was typed and one sentence beside the field at fault; a success goes back to
the page (303), which says what was done.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING, Any
from urllib.parse import urlencode

from starlette.concurrency import run_in_threadpool
from starlette.requests import Request
from starlette.responses import RedirectResponse, Response
from starlette.routing import BaseRoute, Route

from sawplan.errors import SawplanError
from sawplan.station.forms import FORMS, FormError, Typed, place, typed
from sawplan.station.office.pages import page
from sawplan.station.web import log_of, render

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.db import Log

# The office's forms in the station's one table of forms: input name -> field key.
OFFICE_FORMS: dict[str, dict[str, str]] = {
    "blade-add": {
        "tag": "tag", "pitch": "pitch", "width": "blade_width", "thickness": "blade_thickness",
        "length": "blade_length", "material": "blade_material", "grade": "grade",
        "form": "tooth_form", "set": "tooth_set", "supplier": "supplier", "lot": "lot",
        "price": "blade_price", "bought": "bought", "welded": "welded", "notes": "note",
    },
    "blade-fit": {"tag": "tag", "saw": "saw", "date": "date", "tension": "tension",
                  "break_in": "break_in", "break_in_how": "break_in_how"},
    "blade-remove": {"tag": "tag", "date": "date"},
    "blade-retire": {"tag": "tag", "cause": "failure", "date": "date", "location": "location",
                     "note": "note"},
    "saw-add": {"name": "saw", "like": "like", "wheel": "wheel", "blade_length": "blade_length",
                "blade_width": "blade_width", "blade_thickness": "blade_thickness",
                "speed_range": "speed_range", "power": "power", "notes": "note"},
    "job-withdraw": {"job": "job"},
    "job-move": {"saw": "saw"},
}  # fmt: skip
FORMS.update({f"office-{kind}": inputs for kind, inputs in OFFICE_FORMS.items()})

# what the page says after an action (``what``: the tag, saw or job it was done to)
DONE = {
    "blade-add": "Added blade {}.",
    "blade-fit": "Fitted blade {}.",
    "blade-remove": "Took blade {} off its saw; it is back on the shelf.",
    "blade-retire": "Retired blade {}.",
    "saw-add": "Added saw {} to the log.",
    "job-withdraw": "Withdrew job {} from its saw's queue.",
    "job-move": "Moved job {}.",
}

Work = Callable[["Log", Typed, Request], str]


def routes() -> list[BaseRoute]:
    return [
        Route("/blades", blades_page),
        Route("/blades/{kind}", blade_action, methods=["POST"]),
        Route("/saws", saws_page),
        Route("/saws/add", saw_action, methods=["POST"]),
        Route("/jobs/{job:int}/{kind}", job_action, methods=["POST"]),
    ]


# --- pages -----------------------------------------------------------------------------------


def blades_page(request: Request, error: FormError | None = None, sent: Typed | None = None,
                status: int = 200) -> Response:  # fmt: skip
    from sawplan.life.failure_modes import failure_modes
    from sawplan.store.records import list_blades, logged_saws

    with log_of(request) as db:
        blades = list_blades(db)
        saws = [s.name for s in logged_saws(db)]
    context = {
        "blades": blades,
        "saws": saw_choices(saws),
        "modes": [(m.code, m.name) for m in failure_modes().values()],
        **form_state(request, error, sent),
    }
    return page(request, "blades", context, status=status)


def saws_page(request: Request, error: FormError | None = None, sent: Typed | None = None,
              status: int = 200) -> Response:  # fmt: skip
    from sawplan.store.records import logged_saws

    with log_of(request) as db:
        saws = logged_saws(db)
    context = {"saws": saws, "profiles": _profiles(), **form_state(request, error, sent)}
    return page(request, "saws", context, status=status)


def form_state(request: Request, error: FormError | None, sent: Typed | None) -> dict[str, Any]:
    """What a page's forms show: the refusal beside its field, what was typed, what was done."""
    done = request.query_params.get("done")
    what = request.query_params.get("what", "")
    said = DONE[done].format(what) if done in DONE and what else None
    return {"error": error, "sent": sent, "said": said}


# --- actions ---------------------------------------------------------------------------------


async def blade_action(request: Request) -> Response:
    kind = f"blade-{request.path_params['kind']}"
    if kind not in BLADE_WORK:
        return render(request, "missing.html", {"what": "no such blade action"}, status=404)
    return await _act(request, kind, BLADE_WORK[kind], blades_page, "/office/blades")


async def saw_action(request: Request) -> Response:
    return await _act(request, "saw-add", _add_saw, saws_page, "/office/saws")


async def job_action(request: Request) -> Response:
    from sawplan.station.office.queue_pages import job_page

    job = request.path_params["job"]
    kind = f"job-{request.path_params['kind']}"
    if kind not in JOB_WORK:
        return render(request, "missing.html", {"what": "no such job action"}, status=404)
    return await _act(request, kind, JOB_WORK[kind], job_page, f"/office/jobs/{job}")


async def _act(request: Request, kind: str, work: Work, page: Callable, back: str) -> Response:
    async with request.form() as form:
        sent = typed(f"office-{kind}", form)
    return await run_in_threadpool(_run, request, kind, sent, work, page, back)


def _run(request: Request, kind: str, sent: Typed, work: Work, page: Callable, back: str):
    try:
        with log_of(request) as db:
            what = work(db, sent, request)
    except SawplanError as err:
        return page(request, error=place(sent.kind, err), sent=sent, status=422)
    return RedirectResponse(f"{back}?{urlencode({'done': kind, 'what': what})}", 303)


def _add_blade(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.store.blade_input import blade_spec
    from sawplan.store.dates import parse_day
    from sawplan.store.records import add_blade

    spec = blade_spec(
        sent.required("tag"),
        pitch=sent.required("pitch"),
        width=sent.required("width"),
        thickness=sent.required("thickness"),
        length=sent.text("length"),
        material=sent.text("material") or "bi-metal",
        grade=sent.text("grade"),
        form=sent.text("form"),
        tooth_set=sent.text("set"),
        supplier=sent.text("supplier"),
        lot=sent.text("lot"),
        price=sent.text("price"),
        bought=sent.text("bought"),
        welded=sent.text("welded") or "bought",
        notes=sent.words("notes"),
    )
    return add_blade(db, spec, added_on=parse_day(None)).tag


def _fit_blade(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.store.dates import parse_day
    from sawplan.store.records import fit_blade

    saw = sent.required("saw")
    outcome = fit_blade(
        db,
        sent.required("tag"),
        saw,
        on=parse_day(sent.text("date")),
        saw_profile=_profile(db, saw),
        tension_mpa=sent.quantity("tension"),
        break_in=True if sent.checked("break_in") else None,
        break_in_how=sent.words("break_in_how"),
    )
    return f"{outcome.blade} on {outcome.saw}"


def _remove_blade(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.store.dates import parse_day
    from sawplan.store.records import remove_blade

    tag = sent.required("tag")
    remove_blade(db, tag, on=parse_day(sent.text("date")))
    return tag


def _retire_blade(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.store.dates import parse_day
    from sawplan.store.records import retire_blade

    blade = retire_blade(
        db,
        sent.required("tag"),
        sent.required("cause"),
        on=parse_day(sent.text("date")),
        location=sent.words("location"),
        note=sent.words("note"),
    )
    return blade.tag


def _add_saw(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.errors import NotFoundError
    from sawplan.store.dates import parse_day
    from sawplan.store.records import add_saw
    from sawplan.store.saw_input import saw_profile

    like = sent.required("like")
    base = _profile(db, like)
    if base is None:
        raise NotFoundError(f"no saw {like!r} to start from", field="like")
    saw = saw_profile(
        sent.required("name"),
        base=base,
        wheel=sent.text("wheel"),
        blade_length=sent.text("blade_length"),
        blade_width=sent.text("blade_width"),
        blade_thickness=sent.text("blade_thickness"),
        speed_range=sent.text("speed_range"),
        power=sent.text("power"),
        notes=sent.words("notes"),
    )
    add_saw(db, saw, added_on=parse_day(None))
    return saw.name


def _withdraw_job(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.store.dates import parse_day
    from sawplan.store.job_rows import withdraw_job

    return withdraw_job(db, request.path_params["job"], on=parse_day(None))


def _move_job(db: Log, sent: Typed, request: Request) -> str:
    from sawplan.store.dates import parse_day
    from sawplan.store.job_rows import move_job

    saw = sent.required("saw")
    job, saw_label = move_job(
        db, request.path_params["job"], saw, _profile(db, saw), on=parse_day(None)
    )
    return f"{job} to {saw_label}"


BLADE_WORK: dict[str, Work] = {
    "blade-add": _add_blade,
    "blade-fit": _fit_blade,
    "blade-remove": _remove_blade,
    "blade-retire": _retire_blade,
}
JOB_WORK: dict[str, Work] = {"job-withdraw": _withdraw_job, "job-move": _move_job}


# --- saws the forms offer ----------------------------------------------------------------------


def _profiles() -> dict[str, Saw]:
    """The saws known without the log: packaged, then the shop's saws file."""
    from sawplan import config
    from sawplan.saws import load_saws

    return load_saws(config.get("saws_file"))


def _profile(db: Log, name: str) -> Saw | None:
    """A saw's profile: the log's, else a packaged or saws-file one (copied in on first use)."""
    from sawplan.store.records import find_saw

    return find_saw(db, name) or _profiles().get(name.strip().lower())


def saw_choices(logged: list[str]) -> list[str]:
    """The log's saws first, then the known profiles not in it."""
    names = {n.lower() for n in logged}
    return logged + [s.name for s in _profiles().values() if s.name.lower() not in names]
