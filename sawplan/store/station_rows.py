"""The station's rows: jobs sent to a saw, their queue of cuts, remnants, notes, taps.

A planned job is sent to one saw (``sawplan plan JOB --send``): one ``jobs``
row and one ``queue`` row per pass of the blade in cut-sheet order.  A queue
row is done when ``cut_id`` points at the cut entry that logged it; logging the
cut and marking the rows done is one write step, so a cut is never logged
without its rows marked, nor the other way round.

Every station form carries a key of its own (``taps``): ``once`` runs the
form's write step and records the key in the same transaction, so the same
form sent twice writes once and answers with what the first one saved.
"""

from __future__ import annotations

import dataclasses
import re
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan import fields
from sawplan.errors import BadDataError, ConflictError, NotFoundError, UsageError
from sawplan.store.db import run_write

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.cut_rows import CutEntry, CutTarget
    from sawplan.store.db import Log as Database

QUEUE_COLUMNS = (
    "seq", "bar", "step", "position_mm", "mark", "part", "heat", "stock", "location",
    "material", "material_group", "section", "area_mm2", "predicted_time_min",
    "band_speed_m_min", "feed_mm_min", "pitch",
)  # fmt: skip
STEPS = ("trim", "part")
TAP_KEY = re.compile(r"^[0-9a-f]{32}$")
# every kind of tap a station saves (``sawplan.station.forms.FORMS``; a test keeps them equal)
TAP_KINDS = ("start", "done", "blade-off", "blade-on", "remnant", "note", "fix", "undo")
MAX_QUEUE = 200_000  # a job file holds at most 100,000 pieces (jobfile/types.py): one pass each


# --- jobs and their queue ----------------------------------------------------------------------


@dataclass(frozen=True)
class SentJob:
    id: int
    name: str
    saw: str
    cuts: int
    sent_on: str


def send_job(
    db: Database,
    *,
    name: str,
    saw_name: str,
    profile: Saw | None,
    cuts: Sequence[Mapping[str, Any]],
    on: str,
    file: str | None = None,
    customer: str | None = None,
    due: str | None = None,
) -> SentJob:
    """Queue a planned job's cuts on a saw; refused while a job of that name is still open there."""
    from sawplan.store.saw_rows import saw_row_id

    values = job_values(name, file, customer)
    job = values["name"]
    if not cuts:
        raise BadDataError("the plan has no cuts to send", field="job")
    if len(cuts) > MAX_QUEUE:
        raise BadDataError(f"a job sends at most {MAX_QUEUE:,} cuts", field="job")
    rows = [queue_row(c) for c in cuts]

    def step() -> SentJob:
        saw_id, saw_label = saw_row_id(db, saw_name, profile, on=on)
        if has_open_job(db, saw_id, job):
            raise ConflictError(
                f"job {job!r} is already in the queue of {saw_label} with cuts to do",
                field="job",
                hint="finish it, or withdraw it in the office pages, before sending it again",
            )
        job_id = db.insert("jobs", {**values, "saw_id": saw_id, "sent_on": on, "due": due or None})
        db.insert_many("queue", [{**row, "job_id": job_id} for row in rows])
        return SentJob(job_id, job, saw_label, len(rows), on)

    return run_write(db, step)


def has_open_job(db: Database, saw_id: int, name: str) -> bool:
    """Does the saw hold a job of this name (any case) not withdrawn, with cuts still to do?"""
    return bool(
        db.scalar(
            "SELECT COUNT(*) FROM jobs j WHERE j.saw_id = :saw AND lower(j.name) = lower(:name) "
            "AND j.withdrawn_on IS NULL AND EXISTS "
            "(SELECT 1 FROM queue q WHERE q.job_id = j.id AND q.cut_id IS NULL)",
            {"saw": saw_id, "name": name},
        )
    )


def job_values(name: str, file: str | None, customer: str | None) -> dict[str, Any]:
    """A job's name, file and customer as the field table allows them (send and import)."""
    job = fields.check_text("job", name)
    if not job:
        raise UsageError("a job sent to a saw needs a name", field="job", hint="name = in [job]")
    return {
        "name": job,
        "file": fields.check_text("file", file) if file else None,
        "customer": fields.check_text("note", customer) if customer else None,
    }


def queue_row(cut: Mapping[str, Any]) -> dict[str, Any]:
    """One pass of the blade as the queue keeps it, checked by the field table."""
    row = {k: cut.get(k) for k in QUEUE_COLUMNS}
    if row["step"] not in STEPS:
        raise BadDataError(f"must be {' or '.join(STEPS)}, got {row['step']!r}", field="step")
    fields.check("area", row["area_mm2"])
    fields.check_text("heat", row["heat"])
    for key in ("mark", "part", "stock", "location", "pitch"):
        if row[key] is not None:
            row[key] = str(row[key])
    return row


_QUEUE_SELECT = (
    "SELECT q.*, j.name AS job, s.name AS saw FROM queue q JOIN jobs j ON j.id = q.job_id "
    "JOIN saws s ON s.id = j.saw_id "
)


def saw_queue(db: Database, saw_name: str, *, limit: int | None = None) -> list[dict[str, Any]]:
    """The cuts still to do on a saw: the oldest job first, each in cut-sheet order."""
    sql = (
        _QUEUE_SELECT + "WHERE lower(s.name) = lower(:saw) AND q.cut_id IS NULL "
        "AND j.withdrawn_on IS NULL ORDER BY j.id, q.seq"
    )
    params: dict[str, Any] = {"saw": saw_name.strip()}
    if limit is not None:
        sql += " LIMIT :limit"
        params["limit"] = int(limit)
    return db.query(sql, params)


def queue_from(db: Database, saw_name: str, first_id: int, count: int) -> list[dict[str, Any]]:
    """``count`` cuts still to do on a saw, from queue row ``first_id`` on, in queue order."""
    first = db.query("SELECT job_id, seq FROM queue WHERE id = :id", {"id": int(first_id)})
    if not first:
        raise NotFoundError(f"that cut is not in the queue of {saw_name}", field="cut")
    return db.query(
        _QUEUE_SELECT + "WHERE lower(s.name) = lower(:saw) AND q.cut_id IS NULL "
        "AND j.withdrawn_on IS NULL AND (q.job_id > :job OR (q.job_id = :job AND q.seq >= :seq)) "
        "ORDER BY j.id, q.seq LIMIT :count",
        {"saw": saw_name.strip(), "job": first[0]["job_id"], "seq": first[0]["seq"],
         "count": int(count)},
    )  # fmt: skip


def job_progress(db: Database, saw_name: str | None = None) -> list[dict[str, Any]]:
    """Every job sent (or those of one saw): cuts in its queue and cuts done, oldest first."""
    sql = (
        "SELECT j.*, s.name AS saw, COUNT(q.id) AS cuts, COUNT(q.cut_id) AS done "
        "FROM jobs j JOIN saws s ON s.id = j.saw_id LEFT JOIN queue q ON q.job_id = j.id "
    )
    params: dict[str, Any] = {}
    if saw_name is not None:
        sql += "WHERE lower(s.name) = lower(:saw) "
        params["saw"] = saw_name.strip()
    sql += "GROUP BY j.id, s.name ORDER BY j.id"
    return db.query(sql, params)


def job_cuts(db: Database, job_id: int) -> list[dict[str, Any]]:
    """A job's whole queue in cut-sheet order, with the cut entry that logged each (if any)."""
    return db.query(_QUEUE_SELECT + "WHERE q.job_id = :job ORDER BY q.seq", {"job": int(job_id)})


def _open_rows(db: Database, saw_name: str, ids: Sequence[int]) -> list[dict[str, Any]]:
    """The queue rows ``ids`` of a saw's live jobs, still to cut, in cut-sheet order."""
    if not ids:
        raise UsageError("no cut chosen", field="cut")
    wanted = {int(i) for i in ids}
    rows = [
        r
        for r in db.query(
            _QUEUE_SELECT + "WHERE lower(s.name) = lower(:saw) AND j.withdrawn_on IS NULL "
            "AND q.id >= :low AND q.id <= :high ORDER BY j.id, q.seq",
            {"saw": saw_name.strip(), "low": min(wanted), "high": max(wanted)},
        )
        if r["id"] in wanted
    ]
    if len(rows) != len(wanted):
        raise NotFoundError(f"that cut is not in the queue of {saw_name}", field="cut")
    done = [r for r in rows if r["cut_id"] is not None]
    if done:
        raise ConflictError(
            f"bar {done[0]['bar']} cut {done[0]['seq']} of job {done[0]['job']} is already logged",
            field="cut",
        )
    return rows


def start_cut(db: Database, saw_name: str, queue_id: int, *, at: str) -> dict[str, Any]:
    """Mark when the saw started a queued cut (the time of "cut done" is measured from it)."""

    def step() -> dict[str, Any]:
        (row,) = _open_rows(db, saw_name, [queue_id])
        db.update("queue", row["id"], {"started_at": at})
        return {**row, "started_at": at}

    return run_write(db, step)


def finish_cuts(
    db: Database,
    saw_name: str,
    queue_ids: Sequence[int],
    make_entry: Callable[[CutTarget, list[dict[str, Any]]], CutEntry],
    *,
    on: str,
    profile_of: Callable[[str], Saw | None] | None = None,
) -> tuple[int, CutEntry, list[dict[str, Any]]]:
    """Log queued cuts as one cut entry on the saw's fitted blade and mark them done.

    ``make_entry(target, rows)`` builds the entry for the blade found and the queue
    rows (all of one material and section).  One write step: the cut and the marks.
    """
    from sawplan.store.cut_rows import record_cut

    def step() -> tuple[int, CutEntry, list[dict[str, Any]]]:
        rows = _open_rows(db, saw_name, queue_ids)
        kinds = {(r["material"], r["section"]) for r in rows}
        if len(kinds) > 1:
            raise BadDataError(
                "the cuts of one tap must be of one material and section", field="cuts"
            )
        cut_id, entry, _blade = record_cut(
            db, None, saw_name, lambda target: make_entry(target, rows), on=on,
            profile_of=profile_of,
        )  # fmt: skip
        for row in rows:
            marked = db.execute(
                "UPDATE queue SET cut_id = :cut WHERE id = :id AND cut_id IS NULL",
                {"cut": cut_id, "id": row["id"]},
            )
            if marked.rowcount != 1:
                raise ConflictError("that cut was logged meanwhile", field="cut")
        return cut_id, entry, rows

    return run_write(db, step)


# --- remnants and notes --------------------------------------------------------------------------


@dataclass(frozen=True)
class RemnantEntry:
    """An off-cut put back on the rack: its length, heat and place."""

    length_mm: float
    racked_on: str
    saw: str | None = None
    job_id: int | None = None
    bar: int | None = None
    material: str | None = None
    section: str | None = None
    heat: str | None = None
    rack: str | None = None
    note: str | None = None


def rack_remnant(db: Database, entry: RemnantEntry) -> int:
    """Record a remnant racked; returns its row id."""
    row = remnant_row(entry)

    def step() -> int:
        saw_id = _saw_id(db, entry.saw) if entry.saw else None
        return db.insert("remnants", {**row, "saw_id": saw_id})

    return run_write(db, step)


def remnant_row(entry: RemnantEntry) -> dict[str, Any]:
    """A remnant's row (its saw aside), checked by the field table (station and import)."""
    fields.check("remnant_length", entry.length_mm)
    return {
        "length_mm": float(entry.length_mm),
        "racked_on": entry.racked_on,
        "job_id": entry.job_id,
        "bar": None if entry.bar is None else fields.check_count("count", entry.bar),
        "material": fields.check_text("material", entry.material) or None,
        "section": fields.check_text("section", entry.section) or None,
        "heat": fields.check_text("heat", entry.heat) or None,
        "rack": fields.check_text("rack", entry.rack) or None,
        "note": fields.check_text("note", entry.note) or None,
    }


def remnants(db: Database, *, saw_name: str | None = None) -> list[dict[str, Any]]:
    """Remnants racked, newest first (or those racked at one saw)."""
    sql = "SELECT r.*, s.name AS saw FROM remnants r LEFT JOIN saws s ON s.id = r.saw_id "
    params: dict[str, Any] = {}
    if saw_name is not None:
        sql += "WHERE lower(s.name) = lower(:saw) "
        params["saw"] = saw_name.strip()
    return db.query(sql + "ORDER BY r.racked_on DESC, r.id DESC", params)


def add_note(db: Database, saw_name: str, note: str, *, on: str, job_id: int | None = None) -> int:
    """A note from the saw (the coolant is low, bar 3 was bent...)."""
    text = note_text(note)
    return run_write(
        db,
        lambda: db.insert(
            "saw_notes",
            {"saw_id": _saw_id(db, saw_name), "job_id": job_id, "noted_on": on, "note": text},
        ),
    )


def note_text(note: str | None) -> str:
    """A saw's note as the field table allows it: not empty (station and import)."""
    text = fields.check_text("note", note)
    if not text:
        raise UsageError("expected a note, got nothing", field="note")
    return text


def saw_notes(db: Database, saw_name: str | None = None, *, limit: int = 50) -> list[dict]:
    """Notes from the saws, newest first."""
    sql = "SELECT n.*, s.name AS saw FROM saw_notes n JOIN saws s ON s.id = n.saw_id "
    params: dict[str, Any] = {"limit": int(limit)}
    if saw_name is not None:
        sql += "WHERE lower(s.name) = lower(:saw) "
        params["saw"] = saw_name.strip()
    return db.query(sql + "ORDER BY n.id DESC LIMIT :limit", params)


def _saw_id(db: Database, saw_name: str) -> int:
    found = db.scalar("SELECT id FROM saws WHERE lower(name) = lower(:n)", {"n": saw_name.strip()})
    if found is None:
        raise NotFoundError(f"no saw {saw_name!r} in the log", field="saw")
    return int(found)


# --- taps: each form once ------------------------------------------------------------------------


@dataclass(frozen=True)
class Saved:
    """What a tap's step saved: its words, and what the taps row keeps besides them
    (the cut a "cut done" logged; for a correction the tap corrected and the change)."""

    said: str
    cut_id: int | None = None
    corrects: int | None = None
    change: str | None = None


def once(
    db: Database,
    tap: str,
    kind: str,
    step: Callable[[], str | Saved],
    *,
    at: str,
    saw_name: str | None = None,
) -> tuple[str, bool]:
    """Run a form's write ``step`` once per ``tap`` key: (what it saved, was it a repeat).

    The step and the key are written in one transaction: a refused step leaves
    no key (the form can be sent again); a key seen before runs nothing and
    answers with the words the first run saved.
    """
    if not TAP_KEY.match(tap or ""):
        raise UsageError("this form has no tap key; open the page again", field="tap")

    def whole() -> tuple[str, bool]:
        seen = db.scalar("SELECT said FROM taps WHERE tap = :tap", {"tap": tap})
        if seen is not None:
            return str(seen), True
        done = step()
        saved = done if isinstance(done, Saved) else Saved(done)
        limit = fields.field("tap_said").high or 0
        if len(saved.said) > limit:  # a bundle of very many cuts: the words are only words
            saved = dataclasses.replace(saved, said=saved.said[: limit - 3] + "...")
        saw_id = _saw_id(db, saw_name) if saw_name else None
        db.insert(
            "taps",
            {"tap": tap, "saw_id": saw_id, "kind": kind, "tapped_at": at, "said": saved.said,
             "cut_id": saved.cut_id, "corrects": saved.corrects, "change": saved.change},
        )  # fmt: skip
        return saved.said, False

    try:
        return run_write(db, whole)
    except Exception as err:
        if not _is_unique_violation(err):
            raise
        seen = db.scalar("SELECT said FROM taps WHERE tap = :tap", {"tap": tap})
        if seen is None:
            raise
        return str(seen), True


def _is_unique_violation(err: BaseException) -> bool:
    """Another request saved the same tap between our read and our write."""
    import sqlite3

    from sawplan.store.engine import sqlstate

    orig = getattr(err, "orig", None) or err
    if isinstance(orig, sqlite3.IntegrityError):
        return "unique" in str(orig).lower()
    return sqlstate(err) == "23505"


def tap_said(db: Database, tap: str) -> str | None:
    """What the tap with this key saved (None: no such tap)."""
    if not TAP_KEY.match(tap or ""):
        return None
    found = db.scalar("SELECT said FROM taps WHERE tap = :tap", {"tap": tap})
    return None if found is None else str(found)


def recent_taps(db: Database, saw_name: str, *, limit: int = 5) -> list[dict[str, Any]]:
    """The latest taps saved at a saw, newest first: what the station says it saved."""
    return db.query(
        "SELECT t.kind, t.tapped_at, t.said FROM taps t JOIN saws s ON s.id = t.saw_id "
        "WHERE lower(s.name) = lower(:saw) ORDER BY t.id DESC LIMIT :limit",
        {"saw": saw_name.strip(), "limit": int(limit)},
    )


def tap_count(db: Database, kind: str | None = None) -> int:
    if kind is None:
        return int(db.scalar("SELECT COUNT(*) FROM taps"))
    return int(db.scalar("SELECT COUNT(*) FROM taps WHERE kind = :k", {"k": kind}))
