"""Rows of the blade log, read and written: one import for saws, blades, cuts, events.

The work is done in ``saw_rows``, ``blade_rows`` and ``cut_rows``; value rules
live in ``fields``.  Rows come back as frozen dataclasses or plain dicts.
"""

from __future__ import annotations

from sawplan.store.blade_rows import (
    Blade,
    BladeSpec,
    FitOutcome,
    add_blade,
    fit_blade,
    fitted_blade,
    fitted_on_saws,
    fittings_of,
    get_blade,
    list_blades,
    remove_blade,
    retire_blade,
)
from sawplan.store.cut_rows import (
    CutEntry,
    CutTarget,
    EventEntry,
    cut_row,
    cut_target,
    cuts_of,
    events_of,
    list_cuts,
    log_cut,
    log_event,
    record_cut,
)
from sawplan.store.fields import (
    BLADE_STATUSES,
    EVENT_KINDS,
    WELDED,
    check_failure_mode,
    clean_text,
    fmt_num,
    pitch_label,
)
from sawplan.store.saw_rows import (
    add_saw,
    ensure_saw,
    find_saw,
    logged_saws,
    row_to_saw,
    saw_to_row,
)

__all__ = [
    "BLADE_STATUSES",
    "EVENT_KINDS",
    "WELDED",
    "Blade",
    "BladeSpec",
    "CutEntry",
    "CutTarget",
    "EventEntry",
    "FitOutcome",
    "add_blade",
    "add_saw",
    "check_failure_mode",
    "clean_text",
    "cut_row",
    "cut_target",
    "cuts_of",
    "ensure_saw",
    "events_of",
    "find_saw",
    "fit_blade",
    "fitted_blade",
    "fitted_on_saws",
    "fittings_of",
    "fmt_num",
    "get_blade",
    "list_blades",
    "list_cuts",
    "log_cut",
    "log_event",
    "logged_saws",
    "pitch_label",
    "record_cut",
    "remove_blade",
    "retire_blade",
    "row_to_saw",
    "saw_to_row",
]
