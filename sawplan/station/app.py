"""The station's web application: the floor pages, the office pages, the key form.

``create_app`` builds a Starlette application; ``sawplan serve`` runs it with
uvicorn.  Everything it serves ships in the package (templates, one style
sheet, one small optional script): no CDN, and it works with no internet.

Layout of the site:

- ``/``: the saws, each a link to its station;
- ``/saw/NAME``: the station page of one saw, its taps posted to
  ``/saw/NAME/tap/KIND`` (``sawplan.station.floor``);
- ``/office/...``: the office pages (``sawplan.station.office.routes()``,
  mounted when that package is there);
- ``/key``: the key form (network only), ``/static/...``: the style sheet.
"""

from __future__ import annotations

import contextlib
import importlib
import threading
from collections.abc import AsyncIterator
from typing import TYPE_CHECKING

from starlette.applications import Starlette
from starlette.concurrency import run_in_threadpool
from starlette.middleware import Middleware
from starlette.requests import Request
from starlette.responses import PlainTextResponse, RedirectResponse, Response
from starlette.routing import BaseRoute, Mount, Route
from starlette.staticfiles import StaticFiles

from sawplan.errors import SawplanError
from sawplan.station import floor, tap_fixes
from sawplan.station.access import Access, Guard, Keys, Throttle, key_form_answer, sign_in
from sawplan.station.web import STATIC, LogPool, render

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.units import UnitSystem

DEFAULT_HOST = "127.0.0.1"
DEFAULT_PORT = 8470
WORKER_THREADS = 8  # requests served at once; a SQLite log takes one writer at a time anyway


def create_app(
    db: str | None = None,
    *,
    keys: Keys | None = None,
    units: UnitSystem | str | None = None,
    host: str = DEFAULT_HOST,
    secure_cookies: bool = False,
    throttle: Throttle | None = None,
    proxied: bool = False,
) -> Starlette:
    """The station application on the blade log ``db`` (``--db``'s value; None: the default).

    ``keys``: what ``sawplan serve --keys`` made (``access.load_keys()``); without
    keys only this computer is served.  ``units``: how numbers read (the
    shop's config otherwise).  ``host``: the address served, accepted as a
    host name besides localhost.  ``proxied``: every request came through a
    reverse proxy, so none is taken for this computer (keys needed throughout).
    """
    from sawplan.display import Display
    from sawplan.station.access import load_keys
    from sawplan.units import UnitSystem

    if units is None:
        from sawplan import config

        units = config.get("units") or "metric"
    access = Access(
        keys=keys if keys is not None else load_keys(),
        throttle=throttle or Throttle(),
        served_host=host,
        secure_cookies=secure_cookies,
        proxied=proxied,
    )
    logs = LogPool(db)

    @contextlib.asynccontextmanager
    async def lifespan(app: Starlette) -> AsyncIterator[None]:
        import anyio.to_thread

        anyio.to_thread.current_default_thread_limiter().total_tokens = WORKER_THREADS
        try:
            yield
        finally:
            logs.close()

    app = Starlette(
        routes=routes(),
        middleware=[Middleware(Guard, access=access)],
        lifespan=lifespan,
        exception_handlers={SawplanError: log_unusable},
    )
    app.state.access = access
    # One tap written at a time by this server.  SQLite takes one writer at a time anyway;
    # on PostgreSQL, taps of several stations read the same small tables (queue, taps) in
    # SERIALIZABLE transactions, and the server would abort all but one and have them retry.
    # Other programs writing the log (the CLI, another server) are still retried as usual.
    app.state.write_lock = threading.Lock()
    app.state.logs = logs
    app.state.db = db
    app.state.display = Display(UnitSystem(str(units)))
    return app


def routes() -> list[BaseRoute]:
    found: list[BaseRoute] = [
        Route("/key", key_page, methods=["GET", "POST"]),
        Route("/healthz", healthz),
        Mount("/static", StaticFiles(directory=STATIC), name="static"),
        *floor.routes(),
        *tap_fixes.routes(),
    ]
    office = office_routes()
    if office is not None:
        found.append(Mount("/office", routes=office))
    return found


def office_routes() -> list[BaseRoute] | None:
    """The office pages, when ``sawplan.station.office`` is installed."""
    try:
        return list(importlib.import_module("sawplan.station.office").routes())
    except ModuleNotFoundError as err:
        if err.name and err.name.startswith("sawplan.station.office"):
            return None
        raise


async def log_unusable(request: Request, err: Exception) -> Response:
    """The blade log refused below a page (damaged, disk full, server gone): one plain
    sentence, nothing saved; the details are the office's (``sawplan check``)."""
    from sawplan.errors import DamagedFileError

    what = "is damaged" if isinstance(err, DamagedFileError) else "cannot be used just now"
    return PlainTextResponse(
        f"The blade log {what}; nothing was saved. "
        "The office can run `sawplan check` (and `sawplan restore`).",
        status_code=503,
    )


async def healthz(request: Request) -> Response:
    return PlainTextResponse("ok")


async def key_page(request: Request) -> Response:
    """Type the key once; the browser then carries a signed cookie (never the key)."""
    if request.method == "GET":
        return render(request, "key.html", {"error": None})
    form = await request.form()
    key = str(form.get("key", ""))
    role, error = await run_in_threadpool(key_form_answer, request, key)  # scrypt: ~50 ms
    if role is None:
        return render(request, "key.html", {"error": error}, status=403)
    response = RedirectResponse("/", 303)
    sign_in(response, request.app.state.access, role, request.scope)
    return response
