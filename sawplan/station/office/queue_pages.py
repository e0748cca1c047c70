"""The office's view of the queues: every job sent with its progress and sheet, the shelf.

``/office/jobs`` lists every job sent to a saw (cut / to cut, area and time
left) and the blades each saw's open queue needs, forecast from the blade
log; ``/office/jobs/N`` is one job's cut sheet as queued, with the forms to
withdraw it or move it to another saw; ``/office/shelf`` sets the blades on
the shelf against what the queues need.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from starlette.requests import Request
from starlette.responses import Response
from starlette.routing import BaseRoute, Route

from sawplan.station.office.pages import page
from sawplan.station.web import display_of, log_of, render

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.station.forms import FormError, Typed


def routes() -> list[BaseRoute]:
    return [
        Route("/jobs", jobs_page),
        Route("/jobs/{job:int}", job_page),
        Route("/shelf", shelf_page),
        Route("/shelf/balance/chart.csv", shelf_chart_csv),
    ]


def jobs_page(request: Request) -> Response:
    from sawplan.station.office.views import jobs_view

    with log_of(request) as db:
        view = jobs_view(db)
    return page(request, "jobs", {"view": view})


def job_page(request: Request, error: FormError | None = None, sent: Typed | None = None,
             status: int = 200) -> Response:  # fmt: skip
    from sawplan.station.office.actions import form_state, saw_choices
    from sawplan.station.office.views import job_sheet
    from sawplan.store.records import logged_saws

    job_id = request.path_params["job"]
    with log_of(request) as db:
        sheet = job_sheet(db, job_id)
        saws = [s.name for s in logged_saws(db)]
    if sheet is None:
        return render(request, "missing.html", {"what": f"no job number {job_id}"}, status=404)
    move_to = [(n, n) for n in saw_choices(saws) if n.lower() != sheet.job.saw.lower()]
    context = {"sheet": sheet, "move_saws": move_to, **form_state(request, error, sent)}
    return page(request, "job", context, status=status)


def shelf_page(request: Request) -> Response:
    from sawplan.station.office import charts
    from sawplan.station.office.views import shelf_view

    with log_of(request) as db:
        view = shelf_view(db)
    svg = charts.shelf_svg(view, display_of(request)) if view.balance else None
    return page(request, "shelf", {"view": view, "svg": svg})


def shelf_chart_csv(request: Request) -> Response:
    from sawplan.station.office import charts
    from sawplan.station.office.pages import csv_response
    from sawplan.station.office.views import shelf_view

    with log_of(request) as db:
        view = shelf_view(db)
    return csv_response("blades-needed", *charts.shelf_csv(view))
