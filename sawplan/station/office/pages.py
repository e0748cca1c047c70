"""The office pages' routes, mounted by the station app under ``/office``.

Every office route asks for the office role first (``office_only``): a
station key reads and changes nothing here.  Pages are plain HTML with the
charts inline as SVG; each chart's data is a CSV file at ``…/chart.csv``
beside it, written by ``sawplan.render.to_csv`` (cells a spreadsheet would run
as formulas are neutralised).  Handlers are plain functions: Starlette runs
them in its worker threads, where the store and matplotlib may block.
"""

from __future__ import annotations

import functools
import inspect
from collections.abc import Callable
from pathlib import Path
from typing import Any

from starlette.requests import Request
from starlette.responses import Response
from starlette.routing import BaseRoute, Mount, Route

from sawplan.station.access import require_office
from sawplan.station.web import display_of, log_of, render

STATIC = Path(__file__).resolve().parent / "static"
LIFE_CHARTS = ("weibull", "modes", "cost")


def office_only(handler: Callable) -> Callable:
    """Refuse (403) anyone but the office before ``handler`` runs."""
    if inspect.iscoroutinefunction(handler):

        @functools.wraps(handler)
        async def guarded_async(request: Request) -> Response:
            require_office(request)
            return await handler(request)

        return guarded_async

    @functools.wraps(handler)
    def guarded(request: Request) -> Response:
        require_office(request)
        return handler(request)

    return guarded


def office_routes() -> list[BaseRoute]:
    from starlette.staticfiles import StaticFiles

    from sawplan.station.office import actions, queue_pages

    pages = [
        Route("/", index_page),
        Route("/life", life_page),
        Route("/life/{chart}/chart.csv", life_chart_csv),
        Route("/calibration", calibration_page),
        Route("/calibration/trend/chart.csv", calibration_chart_csv),
        *queue_pages.routes(),
        *actions.routes(),
    ]
    guarded: list[BaseRoute] = [
        Route(r.path, office_only(r.endpoint), methods=r.methods) for r in pages
    ]
    return [*guarded, Mount("/static", StaticFiles(directory=STATIC), name="office-static")]


def page(
    request: Request, name: str, context: dict[str, Any] | None = None, *, status: int = 200
) -> Response:
    """An office page: the station's ``render`` with the number formatters the office uses.

    Every quantity goes through ``d`` (the shop's units); plain numbers, shares,
    counts and money through these, never a format spec in a template.
    """
    from sawplan.display import fmt_count, fmt_money, fmt_number, fmt_percent, section_text

    d = display_of(request)
    values = {
        "num": fmt_number,
        "pct": fmt_percent,
        "count": fmt_count,
        "money": fmt_money,
        "section": lambda text: section_text(d, text),
        "error": None,
        "sent": None,
        "said": None,
        **(context or {}),
    }
    return render(request, f"office/{name}.html", values, status=status)


def index_page(request: Request) -> Response:
    return page(request, "index")


# --- blade life -------------------------------------------------------------------------------


def life_page(request: Request) -> Response:
    """Blade life: the Weibull plot with its band, failure modes, costs, lots flagged."""
    from sawplan import config
    from sawplan.station.office import charts
    from sawplan.station.office.views import life_view

    with log_of(request) as db:
        view = life_view(db)
    d = display_of(request)
    report = view.report
    svgs = {
        "weibull": charts.weibull_svg(view.weibull, d) if view.weibull else None,
        "modes": charts.modes_svg(report.failure_modes) if report.failure_modes.modes else None,
        "cost": charts.cost_svg(report.costs, d, config.get("currency") or "")
        if report.costs
        else None,
    }
    return page(request, "life", {"view": view, "r": report, "svgs": svgs})


def life_chart_csv(request: Request) -> Response:
    from sawplan.station.office import charts
    from sawplan.station.office.views import life_view
    from sawplan.store.life_report import life_report

    name = request.path_params["chart"]
    if name not in LIFE_CHARTS:
        return render(request, "missing.html", {"what": f"no chart {name!r}"}, status=404)
    with log_of(request) as db:
        if name == "weibull":
            rows = charts.weibull_csv(life_view(db).weibull)
        else:
            report = life_report(db)
            rows = (
                charts.modes_csv(report.failure_modes)
                if name == "modes"
                else charts.cost_csv(report.costs)
            )
    return csv_response(name, *rows)


# --- calibration ----------------------------------------------------------------------------


def calibration_page(request: Request) -> Response:
    from sawplan.station.office import charts
    from sawplan.station.office.views import calibration_view

    with log_of(request) as db:
        view = calibration_view(db)
    svg = charts.calibration_svg(view) if view.trend else None
    return page(request, "calibration", {"view": view, "svg": svg})


def calibration_chart_csv(request: Request) -> Response:
    from sawplan.station.office import charts
    from sawplan.station.office.views import calibration_view

    with log_of(request) as db:
        view = calibration_view(db)
    return csv_response("calibration-trend", *charts.calibration_csv(view))


# --- answers ---------------------------------------------------------------------------------


def csv_response(name: str, headers: list[str], rows: list[list[Any]]) -> Response:
    """A chart's data as a CSV download, through the one CSV renderer and its formula guard."""
    from sawplan.render import to_csv

    return Response(
        to_csv(headers, rows),
        media_type="text/csv; charset=utf-8",
        headers={"content-disposition": f'attachment; filename="{name}.csv"'},
    )
