"""Cut and event rows: what each blade cut, and what happened to it."""

from __future__ import annotations

import dataclasses
import difflib
import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan.errors import BadDataError, ConflictError, NotFoundError, UsageError
from sawplan.store.blade_rows import Blade, existing_blade_row, get_blade, retire_blade
from sawplan.store.db import run_write
from sawplan.store.fields import (
    EVENT_KINDS,
    check_failure_mode,
    clean_text,
    modes_hint,
    whole_number,
)

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database


@dataclass(frozen=True)
class CutEntry:
    """One logged cut, or a batch of ``count`` identical cuts (area and time are batch totals)."""

    blade_id: int
    cut_on: str
    material: str
    material_group: str | None
    section: str
    area_mm2: float
    pieces: int = 1
    count: int = 1
    saw_id: int | None = None
    band_speed_m_min: float | None = None
    feed_mm_min: float | None = None
    feed_setting: str | None = None
    time_min: float | None = None
    predicted_time_min: float | None = None
    coolant: bool = True
    job: str | None = None
    heat: str | None = None
    note: str | None = None


# the columns are CutEntry's own field names; every value is a bound parameter
_CUT_COLUMNS = tuple(f.name for f in dataclasses.fields(CutEntry))


def cut_row(entry: CutEntry) -> dict[str, Any]:
    """The row written for an entry (free text trimmed, coolant as 0/1)."""
    row = dataclasses.asdict(entry)
    row["coolant"] = int(bool(entry.coolant))
    for key in ("job", "heat", "note", "feed_setting"):
        row[key] = clean_text(row[key], field=key)
    return row


def log_cut(db: Database, entry: CutEntry) -> int:
    """Write one cut entry; refused on a retired blade. Returns the row id."""
    whole_number(entry.count, "count")
    whole_number(entry.pieces, "pieces")
    if not (math.isfinite(entry.area_mm2) and entry.area_mm2 > 0):
        raise BadDataError("a cut needs an area above 0", field="area")
    row = cut_row(entry)

    def step() -> int:
        status = db.execute(
            "SELECT status, tag FROM blades WHERE id = :id", {"id": entry.blade_id}
        ).fetchone()
        if status is None:
            raise NotFoundError(f"no blade with id {entry.blade_id}", field="blade")
        if status[0] == "retired":
            raise ConflictError(f"blade {status[1]} is retired; no more cuts can be logged on it")
        return db.insert("cuts", {c: row[c] for c in _CUT_COLUMNS})

    return run_write(db, step)


def list_cuts(
    db: Database,
    *,
    blade: str | None = None,
    saw: str | None = None,
    job: str | None = None,
    limit: int = 30,
) -> list[dict[str, Any]]:
    """Cut entries, newest first, optionally for one blade, saw or job (limit 0: all)."""
    whole_number(limit, "limit")
    sql = (
        "SELECT c.*, b.tag AS blade, s.name AS saw FROM cuts c JOIN blades b ON b.id = c.blade_id "
        "LEFT JOIN saws s ON s.id = c.saw_id WHERE 1 = 1"
    )
    params: dict[str, Any] = {}
    if blade is not None:
        sql += " AND b.id = :blade_id"
        params["blade_id"] = get_blade(db, blade).id
    if saw is not None:
        sql += " AND lower(s.name) = lower(:saw)"
        params["saw"] = saw.strip()
    if job is not None:
        sql += " AND c.job = :job"
        params["job"] = job.strip()
    sql += " ORDER BY c.cut_on DESC, c.id DESC"
    if limit > 0:
        sql += " LIMIT :limit"
        params["limit"] = limit
    return db.query(sql, params)


def cuts_of(db: Database, blade_id: int) -> list[dict[str, Any]]:
    """A blade's cuts in the order they were made (date, then entry order)."""
    return db.query(
        "SELECT c.*, s.name AS saw FROM cuts c LEFT JOIN saws s ON s.id = c.saw_id "
        "WHERE c.blade_id = :blade_id ORDER BY c.cut_on, c.id",
        {"blade_id": blade_id},
    )


@dataclass(frozen=True)
class EventEntry:
    """Something that happened to a blade: teeth lost, a crooked cut, a stall, a failure."""

    blade_tag: str
    kind: str
    happened_on: str
    mode: str | None = None
    location: str | None = None
    teeth: int | None = None
    note: str | None = None


def log_event(db: Database, entry: EventEntry) -> Blade:
    """Record an event; a ``failure`` also retires the blade (it is the end of its life)."""
    kind = entry.kind.strip().lower()
    if kind not in EVENT_KINDS:
        close = difflib.get_close_matches(kind, EVENT_KINDS, n=1)
        raise UsageError(
            f"must be one of {', '.join(EVENT_KINDS)}, got {entry.kind!r}",
            field="kind",
            hint=f"did you mean {close[0]}?" if close else None,
        )
    if entry.mode is not None and not entry.mode.strip():
        raise UsageError("expected a failure mode, got nothing", field="mode", hint=modes_hint())
    if kind == "failure":
        if not entry.mode:
            raise UsageError("a failure needs --mode", field="mode", hint=modes_hint())
        return retire_blade(
            db,
            entry.blade_tag,
            entry.mode,
            on=entry.happened_on,
            location=entry.location,
            note=entry.note,
        )
    mode = check_failure_mode(entry.mode, field="mode") if entry.mode else None
    if entry.teeth is not None:
        whole_number(entry.teeth, "teeth")
    teeth = entry.teeth if entry.teeth is not None else (1 if kind == "teeth-lost" else None)
    location = clean_text(entry.location, field="location")
    note = clean_text(entry.note, field="note")

    def step() -> None:
        blade = existing_blade_row(db, entry.blade_tag)
        if blade["status"] == "retired":
            raise ConflictError(f"blade {blade['tag']} was retired on {blade['retired_on']}")
        db.insert(
            "events",
            {
                "blade_id": blade["id"],
                "happened_on": entry.happened_on,
                "kind": kind,
                "mode": mode,
                "location": location,
                "teeth": teeth,
                "note": note,
            },
        )

    run_write(db, step)
    return get_blade(db, entry.blade_tag)


def events_of(db: Database, blade_id: int) -> list[dict[str, Any]]:
    return db.query(
        "SELECT * FROM events WHERE blade_id = :blade_id ORDER BY happened_on, id",
        {"blade_id": blade_id},
    )
