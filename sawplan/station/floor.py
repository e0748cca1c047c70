"""The floor: the list of saws and each saw's station page.

The station page is made for a tablet at the saw: the fitted blade (tag, pitch,
area cut against its expected life, a wear bar), the settings the cutting model
recommends for the next cut with that blade, the queue of cuts sent to the saw
in cut-sheet order, and the taps (``sawplan.station.taps``).  Each form on the
page carries a new tap key; after a tap the page says what was saved.
"""

from __future__ import annotations

import contextlib
import threading
from dataclasses import dataclass
from functools import lru_cache
from typing import TYPE_CHECKING, Any

from starlette.requests import Request
from starlette.responses import Response
from starlette.routing import BaseRoute, Route

from sawplan.station.forms import FormError, Typed, new_tap
from sawplan.station.web import display_of, log_of, render

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.display import Display
    from sawplan.saws import Saw
    from sawplan.store.db import Log
    from sawplan.store.records import Blade

QUEUE_SHOWN = 30  # rows of the queue on the page; the office pages show whole jobs
UNWORN = "unworn"  # the blade-off reason that keeps the blade for later (not the end of a life)


def routes() -> list[BaseRoute]:
    from sawplan.station import taps

    return [
        Route("/", saws_page),
        Route("/saw/{saw}", station_page),
        Route("/saw/{saw}/tap/{kind}", taps.tap, methods=["POST"]),
    ]


def saws_page(request: Request) -> Response:
    from sawplan.store.records import fitted_on_saws, logged_saws
    from sawplan.store.station_rows import job_progress

    with log_of(request) as db:
        saws = logged_saws(db)
        fitted = fitted_on_saws(db)
        jobs = job_progress(db)
    logged = {s.name.lower() for s in saws}
    profiles = [p.name for key, p in known_profiles().items() if key not in logged]
    to_cut: dict[str, int] = {}
    for job in jobs:
        if job["withdrawn_on"] is None:
            key = job["saw"].lower()
            to_cut[key] = to_cut.get(key, 0) + int(job["cuts"]) - int(job["done"])
    rows = [
        {"name": s.name, "blade": fitted.get(s.name.lower()), "to_cut": to_cut.get(s.name.lower())}
        for s in saws
    ]
    return render(request, "saws.html", {"saws": rows, "profiles": profiles})


def known_profiles() -> dict[str, Saw]:
    """The saw profiles the server knows besides the log: packaged, and the shop's saws file
    (``saws_file`` in the config, or ``SAWPLAN_SAWS``); none when that file cannot be
    read (``sawplan saw list`` says what is wrong with it)."""
    from sawplan import config
    from sawplan.errors import SawplanError
    from sawplan.saws import load_saws

    try:
        return load_saws(config.get("saws_file"))
    except SawplanError:
        return {}


def station_page(request: Request) -> Response:
    """GET: the page; ``?tap=KEY`` after a tap shows what that tap saved."""
    from sawplan.store.station_rows import tap_said

    name = request.path_params["saw"]
    tap = request.query_params.get("tap", "")
    with log_of(request) as db:
        view = station_view(db, name)
        if view is None:
            return missing(request, name)
        saved = tap_said(db, tap) if tap else None
    return render(request, "station.html", page_context(view, display_of(request), saved=saved))


def missing(request: Request, name: str) -> Response:
    return render(
        request, "missing.html", {"what": f"There is no saw called {name!r} in the blade log."},
        status=404,
    )  # fmt: skip


# --- what the page shows -------------------------------------------------------------------------


@dataclass
class StationView:
    saw: Saw
    blade: Blade | None
    life: dict[str, Any] | None
    queue: list[dict[str, Any]]
    more: bool
    jobs: list[dict[str, Any]]
    settings: dict[str, Any] | None
    shelf: list[Blade]
    reasons: list[tuple[str, str]]
    recent: list[dict[str, Any]]
    in_log: bool = True  # False: a known profile, added to the log with the first tap saved
    last: dict[str, Any] | None = None  # the last cut done, while the station may correct it


def station_view(db: Log, name: str, *, for_tap: bool = False) -> StationView | None:
    """Everything the station page of saw ``name`` shows (None: no such saw).

    A saw not in the log yet but with a known profile (``known_profiles``) has a
    page too: no blade, no queue; the first tap saved adds it to the log.
    ``for_tap``: only what a tap needs (the saw, its blade, the head of the queue).
    """
    from sawplan.life.failure_modes import failure_modes
    from sawplan.station.tap_fixes import last_cut
    from sawplan.store.records import find_saw, fitted_on_saws, get_blade, list_blades
    from sawplan.store.station_rows import job_progress, recent_taps, saw_queue

    saw = find_saw(db, name)
    if saw is None:
        profile = known_profiles().get(name.strip().lower())
        if profile is None:
            return None
        shelf = [] if for_tap else list_blades(db, status="new") + list_blades(db, status="removed")
        return StationView(profile, None, None, [], False, [], None, shelf, [], [], in_log=False)
    tag = fitted_on_saws(db).get(saw.name.lower())
    blade = get_blade(db, tag) if tag else None
    if for_tap:
        queue = saw_queue(db, saw.name, limit=1)
        return StationView(saw, blade, None, queue, False, [], None, [], [], [])
    queue = saw_queue(db, saw.name, limit=QUEUE_SHOWN + 1)
    nxt = queue[0] if queue else None
    jobs = [
        j for j in job_progress(db, saw.name) if j["withdrawn_on"] is None and j["done"] < j["cuts"]
    ]
    shelf = list_blades(db, status="new") + list_blades(db, status="removed")
    reasons = [(m.code, m.name) for m in failure_modes().values()]
    reasons.append((UNWORN, "taken off unworn, back on the shelf"))
    return StationView(
        saw=saw,
        blade=blade,
        life=blade_life(db, blade, nxt["material_group"] if nxt else None) if blade else None,
        queue=queue[:QUEUE_SHOWN],
        more=len(queue) > QUEUE_SHOWN,
        jobs=jobs,
        settings=next_settings(db, saw, blade, nxt) if nxt and blade else None,
        shelf=shelf,
        reasons=reasons,
        recent=recent_taps(db, saw.name, limit=5),
        last=last_cut(db, saw.name),
    )


def page_context(
    view: StationView,
    d: Display,
    *,
    saved: str | None = None,
    error: FormError | None = None,
    typed: Typed | None = None,
) -> dict[str, Any]:
    """The template's values: the view, a fresh tap key per form, what was saved or refused."""
    from sawplan.station.forms import KINDS
    from sawplan.station.tap_fixes import WINDOW_MIN

    values = dict(typed.values) if typed is not None else {}
    for row in view.queue:
        row["what"] = section_label(d, row)
    return {
        "v": view,
        "next": view.queue[0] if view.queue else None,
        "taps": {kind: new_tap() for kind in KINDS},
        "saved": saved,
        "error": error,
        "typed_kind": typed.kind if typed is not None else None,
        "typed": values,
        "window_min": WINDOW_MIN,
    }


# --- the blade's life and the next cut's settings (cached: the page must be quick) ---------------


def blade_life(db: Log, blade: Blade, material_group: str | None) -> dict[str, Any]:
    """Area cut against the expected life of such blades (the log's Weibull mean, else the
    typical life from memory); ``share`` fills the wear bar."""
    expected, source = expected_life(db, material_group)
    share = blade.area_cm2 / expected if expected > 0 else 0.0
    return {"expected_mm2": expected * 100.0, "source": source, "share": share}


_LIVES: dict[tuple[Any, ...], tuple[float, str]] = {}
_LIVES_LOCK = threading.Lock()


def expected_life(db: Log, material_group: str | None) -> tuple[float, str]:
    """(expected life in cm², where it comes from), recomputed only when a life changed:
    a blade added, fitted, taken off or retired (every retirement writes an event), or a
    cut corrected (every correction writes a tap)."""
    from sawplan.store.reports import life_basis

    counts = db.execute(
        "SELECT (SELECT COUNT(*) FROM blades), (SELECT COUNT(*) FROM fittings), "
        "(SELECT COUNT(*) FROM events), (SELECT COUNT(*) FROM fittings "
        "WHERE removed_on IS NOT NULL), (SELECT COUNT(*) FROM taps WHERE corrects IS NOT NULL)"
    ).fetchone()
    key = (db.location.label, tuple(counts), material_group)
    with _LIVES_LOCK:
        if key in _LIVES:
            return _LIVES[key]
    basis = life_basis(db, material_group)
    if basis.fit is not None:
        found = (basis.fit.mean_life_cm2, f"mean life of {basis.blades} blades in the log")
    else:
        found = (basis.default.life_cm2, "typical life (no fit from the log yet)")
    with _LIVES_LOCK:
        if len(_LIVES) > 256:
            _LIVES.clear()
        _LIVES[key] = found
    return found


def next_settings(db: Log, saw: Saw, blade: Blade, row: dict[str, Any]) -> dict[str, Any]:
    """What the cutting model recommends for the next queued cut with the fitted blade."""
    from sawplan.store.calibration import calibration_of

    factor = 1.0
    if row["material_group"]:
        found = calibration_of(db, saw.name, row["material_group"])
        factor = found.factor if found is not None else 1.0
    return _settings(
        row["material"], row["section"], saw, blade.tpi_coarse, blade.tpi_fine,
        blade.blade_material, round(factor, 4), row["pitch"], blade.pitch,
    )  # fmt: skip


@lru_cache(maxsize=256)
def _settings(
    material: str,
    section: str,
    saw: Saw,
    tpi_coarse: float,
    tpi_fine: float,
    blade_material: str,
    factor: float,
    planned_pitch: str | None,
    blade_pitch: str,
) -> dict[str, Any]:
    from sawplan.cutting.with_blade import cut_with_blade

    mat, sec = material_and_section(material, section)
    result, why = cut_with_blade(
        mat, sec, saw, tpi_coarse, tpi_fine, blade_material, calibration=factor
    )
    other_pitch = planned_pitch if planned_pitch and planned_pitch != blade_pitch else None
    return {"cut": result, "why": why, "section": sec, "planned_pitch": other_pitch}


@lru_cache(maxsize=256)
def material_and_section(material: str, section: str) -> tuple[Any, Any]:
    """The catalogue entry and parsed section a queued cut names."""
    from sawplan.materials import load_catalogue
    from sawplan.sections import parse_section

    return load_catalogue().get(material), parse_section(section.split())


def section_label(d: Display, row: dict[str, Any]) -> str:
    """A queued cut's material and section in the display's units."""
    with contextlib.suppress(Exception):
        mat, sec = material_and_section(row["material"], row["section"])
        return f"{mat.key} {d.section(sec)}"
    return f"{row['material']} {row['section']}"
