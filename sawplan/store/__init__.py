"""The blade log: saws, blades, fittings, cuts and events, in SQLite or PostgreSQL.

- ``location``: where the log lives (``--db`` file or ``postgresql://`` URL,
  ``SAWPLAN_DB``, the config file, the per-user default); passwords masked.
- ``engine`` / ``db``: connections, opening, transactions with retries.
- ``schema`` / ``upgrade`` / ``migrations/``: the tables and their one
  migration history (Alembic), for both engines.
- ``records``: rows read and written.
- ``stats`` / ``reports`` / ``life_report`` / ``calibration``: lives, the life
  report, forecasts and cut-time calibration for ``sawplan.life``;
  ``life_ends``: how each retired blade's life ended; ``blade_groups``: group
  keys and the blades a life rests on; ``dates``: every date rule of the log.
- ``exchange``: CSV export/import; ``backup``: one portable file;
  ``transfer``: ``db copy`` with per-table checksums; ``health``: ``check`` and
  ``restore``; ``safety``: damage checks, rolling backups, leftovers;
  ``perms``: file modes.

A command (or the station) opens the log with ``connect(db)`` and passes the
open ``Log`` to the row functions (``records``): every write runs as one step
through ``run_write``, e.g. ``record_cut`` looks up the fitted blade and writes
the cut in one transaction.

What other commands use (every function takes ``--db``'s value, ``None`` for the default)::

    saws_from_db(db_path) -> list[Saw]                     # for load_saws(extra=...)
    calibration_factor(db_path, saw_name, material_group)  # -> (factor, entries, cuts) | None
    life_for(db_path, material_group, choice=BladeChoice)  # -> LifeBasis(fit | None, default, ...)
    forecast_job(db_path, {material_group: area_cm2})      # -> JobForecast

SQLAlchemy is imported only when a log is opened (``sawplan cut`` reads an
up-to-date SQLite log through ``sqlite3`` alone), Alembic only to change a schema.
"""

from __future__ import annotations

import os
from typing import TYPE_CHECKING, Any

from sawplan.store.db import (
    connect,
    default_db_path,
    open_log,
    read_snapshot,
    resolve_db,
    resolve_db_path,
    run_write,
    write_transaction,
)

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.calibration import calibration_factor
    from sawplan.store.reports import LifeBasis, default_life, forecast_job, life_for

# the planning hooks live in ``reports`` and ``calibration``; loaded on first use to keep
# `log cut` quick
_LAZY = {
    "LifeBasis": "reports",
    "calibration_factor": "calibration",
    "default_life": "reports",
    "forecast_job": "reports",
    "life_for": "reports",
}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        import importlib

        return getattr(importlib.import_module(f"sawplan.store.{_LAZY[name]}"), name)
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
    "read_snapshot",
    "resolve_db",
    "resolve_db_path",
    "run_write",
    "saws_from_db",
    "write_transaction",
]
