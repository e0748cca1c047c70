"""Cut and event rows: what each blade cut, and what happened to it."""

from __future__ import annotations

import dataclasses
import difflib
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan.errors import ConflictError, NotFoundError, UsageError
from sawplan.store.blade_rows import Blade, existing_blade_row, get_blade, retire_blade
from sawplan.store.dates import check_dates
from sawplan.store.db import run_write
from sawplan.store.fields import (
    EVENT_KINDS,
    check_failure_mode,
    check_row,
    clean_text,
    modes_hint,
    whole_number,
)

if TYPE_CHECKING:  # pragma: no cover
    from collections.abc import Callable

    from sawplan.saws import Saw
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
        row[key] = clean_text(row[key], field=f"cuts.{key}")
    return row


@dataclass(frozen=True)
class CutTarget:
    """The blade a cut was made with, the saw's row id, and the saw's profile (if known)."""

    blade: Blade
    saw_id: int | None
    saw: Saw | None


def cut_target(
    db: Database,
    tag: str | None,
    saw: str | None,
    *,
    on: str,
    profile_of: Callable[[str], Saw | None] | None = None,
    preferred_saw: str | None = None,
) -> CutTarget:
    """The blade a cut goes on: ``tag``, or the one fitted on ``saw`` (or the only fitted one).

    ``preferred_saw`` (the shop's configured saw) chooses only when no blade or saw
    is named and several saws carry blades.  The blade comes without its totals
    (area and cuts 0): a write step reads no cuts.

    A saw used for the first time is copied into the log from ``profile_of(name)``
    (the packaged saws and the user's saws file; asked only then).
    """
    from sawplan.store.records import ensure_saw, find_saw, fitted_blade, fitted_on_saws

    if tag is None and saw is None and preferred_saw is not None:
        fitted = fitted_on_saws(db)
        if len(fitted) > 1 and preferred_saw.strip().lower() in fitted:
            saw = preferred_saw
    if tag is None:
        blade, saw_name = fitted_blade(db, saw, totals=False)
    else:
        blade = get_blade(db, tag, totals=False)
        if blade.status == "retired":
            raise ConflictError(
                f"blade {blade.tag} was retired on {blade.retired_on}; "
                "no more cuts can be logged on it",
                field="blade",
            )
        if saw is not None and blade.saw is not None and blade.saw.lower() != saw.strip().lower():
            raise ConflictError(
                f"blade {blade.tag} is fitted on {blade.saw}, not {saw}", field="saw"
            )
        saw_name = blade.saw or saw
    if saw_name is None:
        return CutTarget(blade, None, None)
    profile = find_saw(db, saw_name) or (profile_of(saw_name) if profile_of else None)
    saw_id, _ = ensure_saw(db, saw_name, profile, on=on)
    return CutTarget(blade, saw_id, find_saw(db, saw_name))


def record_cut(
    db: Database,
    tag: str | None,
    saw: str | None,
    make_entry: Callable[[CutTarget], CutEntry],
    *,
    on: str,
    profile_of: Callable[[str], Saw | None] | None = None,
    preferred_saw: str | None = None,
) -> tuple[int, CutEntry, Blade]:
    """Log a cut on the blade fitted now, in one transaction with the look-up.

    Finding the fitted blade and writing the cut on it is one read-then-write
    step: another station refitting or retiring that blade meanwhile either
    comes first (and this step sees it) or waits.  ``make_entry`` builds the
    entry for the blade found (it may run again if the step is retried).
    Returns the entry's id, the entry and the blade after the cut.
    """

    def step() -> tuple[int, CutEntry]:
        target = cut_target(db, tag, saw, on=on, profile_of=profile_of, preferred_saw=preferred_saw)
        entry = make_entry(target)
        return _insert_cut(db, entry), entry

    entry_id, entry = run_write(db, step)
    return entry_id, entry, get_blade(db, get_blade_tag(db, entry.blade_id))


def get_blade_tag(db: Database, blade_id: int) -> str:
    return str(db.scalar("SELECT tag FROM blades WHERE id = :id", {"id": blade_id}))


def log_cut(db: Database, entry: CutEntry) -> int:
    """Write one cut entry; refused on a retired blade. Returns the row id."""
    return run_write(db, lambda: _insert_cut(db, entry))


def _insert_cut(db: Database, entry: CutEntry) -> int:
    """Check and write one cut entry inside the caller's write transaction."""
    row = {c: v for c, v in cut_row(entry).items() if c in _CUT_COLUMNS}
    check_row("cuts", row)  # before the blade is read: a bad value is named first
    status = db.execute(
        "SELECT status, tag FROM blades WHERE id = :id", {"id": entry.blade_id}
    ).fetchone()
    if status is None:
        raise NotFoundError(f"no blade with id {entry.blade_id}", field="blade")
    if status[0] == "retired":
        raise ConflictError(f"blade {status[1]} is retired; no more cuts can be logged on it")
    cut_id = db.insert("cuts", row)
    check_dates(db, "cuts", row_id=cut_id)
    return cut_id


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
        whole_number(entry.teeth, "events.teeth")
    teeth = entry.teeth if entry.teeth is not None else (1 if kind == "teeth-lost" else None)
    location = clean_text(entry.location, field="events.location")
    note = clean_text(entry.note, field="events.note")

    def step() -> None:
        blade = existing_blade_row(db, entry.blade_tag)
        if blade["status"] == "retired":
            raise ConflictError(f"blade {blade['tag']} was retired on {blade['retired_on']}")
        event_id = db.insert(
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
        check_dates(db, "events", row_id=event_id)

    run_write(db, step)
    return get_blade(db, entry.blade_tag)


def events_of(db: Database, blade_id: int) -> list[dict[str, Any]]:
    return db.query(
        "SELECT * FROM events WHERE blade_id = :blade_id ORDER BY happened_on, id",
        {"blade_id": blade_id},
    )
