"""What every page of the station shares: templates, the open log, numbers shown, errors.

Routes (the floor's and the office's) use:

- ``render(request, "name.html", {...}, status=200)``: a page from
  ``templates/`` (Jinja2, autoescaped), with ``request``, ``role``,
  ``csrf_field(request)``, ``d`` (the ``Display`` of the shop's units) and
  ``static(path)`` available in every template;
- ``with log_of(request) as db:``: the blade log (a ``sawplan.store.db.Log``)
  kept open for this worker thread; hand it to the store functions;
- ``display_of(request)``: the ``Display`` every number goes through.
"""

from __future__ import annotations

import contextlib
import queue
from collections.abc import Iterator
from functools import lru_cache
from pathlib import Path
from typing import TYPE_CHECKING, Any

from starlette.requests import Request
from starlette.responses import HTMLResponse, Response

from sawplan.station.access import csrf_field

if TYPE_CHECKING:  # pragma: no cover
    from jinja2 import Environment
    from starlette.types import Scope

    from sawplan.display import Display
    from sawplan.store.db import Log

HERE = Path(__file__).resolve().parent
TEMPLATES = HERE / "templates"
STATIC = HERE / "static"


@lru_cache(maxsize=1)
def environment() -> Environment:
    """The one Jinja2 environment of the station (autoescaped HTML)."""
    import jinja2

    from sawplan.display import fmt_count

    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(TEMPLATES),
        autoescape=jinja2.select_autoescape(("html",), default=True),
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )
    env.globals["csrf_field"] = csrf_field
    env.globals["static"] = lambda name: f"/static/{name}"
    env.globals["count"] = fmt_count
    return env


def render(
    request: Request, name: str, context: dict[str, Any] | None = None, *, status: int = 200
) -> HTMLResponse:
    """A page from ``templates/``; every template sees request, role and d."""
    values = {
        "request": request,
        "role": getattr(request.state, "role", None),
        "d": display_of(request),
        **(context or {}),
    }
    html = environment().get_template(name).render(values)
    return HTMLResponse(html, status_code=status)


def display_of(request: Request) -> Display:
    return request.app.state.display


# --- the log, one connection per worker thread ------------------------------------------------


class LogPool:
    """Open logs lent to one request at a time (opened as needed, kept for the next).

    At most as many stay open as requests run at once (``app.WORKER_THREADS``).
    A connection that failed below the store (a lost server, a damaged file)
    is closed, and the next request opens a new one.
    """

    def __init__(self, db: str | None) -> None:
        self.db = db
        self._idle: queue.LifoQueue[Log] = queue.LifoQueue()
        self._closed = False

    @contextlib.contextmanager
    def borrow(self) -> Iterator[Log]:
        from sawplan.errors import SawplanError
        from sawplan.store.db import open_log, translate

        try:
            log = self._idle.get_nowait()
        except queue.Empty:
            log = open_log(self.db)
        else:
            from sawplan.store.db import check_again

            try:
                check_again(log)  # the file may have changed since: damage is refused
            except BaseException:
                log.close()
                raise
        try:
            yield log
        except SawplanError:
            self._give_back(log)
            raise
        except BaseException as err:
            log.close()
            mapped = translate(err, log.location) if isinstance(err, Exception) else None
            if mapped is None:
                raise
            raise mapped from None
        else:
            self._give_back(log)

    def _give_back(self, log: Log) -> None:
        try:
            if log.conn.in_transaction():
                log.conn.rollback()
        except Exception:
            log.close()
            return
        if self._closed:
            log.close()
        else:
            self._idle.put(log)

    def close(self) -> None:
        self._closed = True
        while True:
            try:
                self._idle.get_nowait().close()
            except queue.Empty:
                return


def log_of(request: Request) -> contextlib.AbstractContextManager[Log]:
    """``with log_of(request) as db:`` the blade log the server was started on."""
    return request.app.state.logs.borrow()


# --- answers that are not pages --------------------------------------------------------------


def stale_form(scope: Scope) -> Response:
    """A form whose token is missing or old: nothing saved, say so plainly."""
    request = Request(scope)
    path = request.url.path
    back = path.split("/tap/", 1)[0] if "/tap/" in path else "/"
    html = (
        environment()
        .get_template("stale.html")
        .render(request=request, role=None, back=back, d=None)
    )
    return HTMLResponse(html, status_code=403)
