"""The blade log: a local SQLite record of saws, blades, fittings, cuts and events.

- ``db``: where the log lives (``--db``, ``SAWPLAN_DB``, per-user default),
  opening, schema checks, ``BEGIN IMMEDIATE`` transactions.
- ``schema``: sqlite-utils recorded migrations.
- ``records``: rows read and written.
- ``stats`` / ``reports``: lives, calibration and forecasts for ``sawplan.life``.
- ``exchange``: CSV export/import and backup.

What other commands use (every function takes the log's path, ``None`` for the default)::

    saws_from_db(db_path) -> list[Saw]                     # for load_saws(extra=...)
    calibration_factor(db_path, saw_name, material_group)  # -> (factor, cuts) | None
    life_for(db_path, material_group)                      # -> LifeBasis(fit | None, default, ...)
    forecast_job(db_path, {material_group: area_cm2})      # -> JobForecast

sqlite_utils (and with it pandas) is imported only when a log is opened.
"""

from __future__ import annotations

import os
from typing import TYPE_CHECKING, Any

from sawplan.store.db import connect, default_db_path, open_log, resolve_db_path, write_transaction

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.reports import (
        LifeBasis,
        calibration_factor,
        default_life,
        forecast_job,
        life_for,
    )

# the planning hooks live in ``reports``; loaded on first use to keep `log cut` quick
_LAZY = {"LifeBasis", "calibration_factor", "default_life", "forecast_job", "life_for"}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        from sawplan.store import reports

        return getattr(reports, name)
    raise AttributeError(f"module 'sawplan.store' has no attribute {name!r}")


def saws_from_db(db_path: str | os.PathLike[str] | None = None) -> list[Saw]:
    """Saw profiles kept in the log (none when the log does not exist yet)."""
    from sawplan.store.records import logged_saws

    with connect(db_path, create=False, light=True) as db:
        return logged_saws(db)


__all__ = [
    "LifeBasis",
    "calibration_factor",
    "connect",
    "default_db_path",
    "default_life",
    "forecast_job",
    "life_for",
    "open_log",
    "resolve_db_path",
    "saws_from_db",
    "write_transaction",
]
