"""The floor: the list of saws and each saw's station page with its taps."""

from __future__ import annotations

from starlette.requests import Request
from starlette.responses import Response
from starlette.routing import BaseRoute, Route

from sawplan.station.web import log_of, render


def routes() -> list[BaseRoute]:
    return [
        Route("/", saws_page),
        Route("/saw/{saw}", station_page),
    ]


def saws_page(request: Request) -> Response:
    from sawplan.store.records import fitted_on_saws, logged_saws

    with log_of(request) as db:
        saws = logged_saws(db)
        fitted = fitted_on_saws(db)
    rows = [{"name": s.name, "blade": fitted.get(s.name.lower())} for s in saws]
    return render(request, "saws.html", {"saws": rows})


def station_page(request: Request) -> Response:
    from sawplan.store.records import find_saw, fitted_on_saws, get_blade

    name = request.path_params["saw"]
    with log_of(request) as db:
        saw = find_saw(db, name)
        if saw is None:
            return render(
                request, "missing.html", {"what": f"no saw {name!r} in the log"}, status=404
            )
        tag = fitted_on_saws(db).get(saw.name.lower())
        blade = get_blade(db, tag) if tag else None
    return render(request, "station.html", {"saw": saw, "blade": blade})
