"""The office pages of the station: blade life, calibration, jobs, the shelf, office actions.

- ``views``: what each page shows, as frozen dataclasses built from the store's reports;
- ``charts``: those views drawn as inline SVG (matplotlib) and as CSV rows;
- ``pages``: the read-only pages and the chart CSV, ``queue_pages``: jobs, job sheets
  and the shelf, ``actions``: the office forms; ``routes()`` gathers them for ``/office``.

Importing this package costs nothing: Starlette, Jinja2 and matplotlib load when
the routes are built or a page is drawn.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from starlette.routing import BaseRoute


def routes() -> list[BaseRoute]:
    """The office pages and actions, to mount under ``/office``."""
    from sawplan.station.office.pages import office_routes

    return office_routes()
