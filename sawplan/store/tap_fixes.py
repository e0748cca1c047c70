"""Correcting a "cut done" tap: its time or its number of cuts changed, or the cut taken back.

A "cut done" tap keeps the cut entry it logged (``taps.cut_id``).  A
correction rewrites that entry and the queue rows it marked, in one write
step, under the same field rules as the tap; the correction itself is a tap
(kind ``fix`` or ``undo``, written by ``station_rows.once`` with the
correction's ``Saved``): it keeps the tap it corrected (``corrects``) and
what it changed (``change``, JSON: each column's old and new value, or the
whole cut taken back).  Nothing is lost: a cut taken back stays in its undo
tap's ``change``.

Which taps may be corrected is the caller's rule: the station allows the last
cut of its saw for a short while (``last_cut_tap``), the office any cut of a
day (``day_cut_taps``).
"""

from __future__ import annotations

import datetime as dt
import json
import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan import fields
from sawplan.errors import BadDataError, ConflictError, NotFoundError, UsageError
from sawplan.store.db import run_write

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database

CORRECTABLE = "done"  # the kind of tap a correction changes
CLOSERS = ("done", "blade-off", "blade-on")  # a later tap of these kinds ends the station's window
# the cut entry's columns a correction may change (the rest stays as logged)
CHANGED = ("time_min", "count", "pieces", "area_mm2", "predicted_time_min", "heat")


@dataclass(frozen=True)
class Correction:
    """What a correction did to the cut entry of tap ``tap_id``.

    ``before``/``after``: the changed columns' values (``after`` None: the cut
    was taken back, and ``before`` is its whole row); ``queue``: the queue
    rows whose mark changed.
    """

    tap_id: int
    cut_id: int
    saw: str | None
    tapped_at: str
    before: dict[str, Any]
    after: dict[str, Any] | None
    queue: tuple[int, ...] = ()
    cuts: tuple[int, int] = (0, 0)  # queued cuts the entry held before and after

    def change(self) -> str:
        """The audit text kept in the correction's tap row."""
        if self.after is None:
            body: dict[str, Any] = {"taken_back": self.before}
        else:
            body = {k: [self.before[k], self.after[k]] for k in self.after}
        if self.queue:
            body["queue"] = list(self.queue)
        return json.dumps(body, sort_keys=True, separators=(",", ":"))


def last_cut_tap(
    db: Database, saw_name: str, *, now: dt.datetime, window_min: float
) -> dict[str, Any] | None:
    """The tap of the saw's last cut while the station may still correct it, with its cut.

    That is the newest "cut done" tap of the saw, while no later "cut done" or
    blade change was tapped there, within ``window_min`` minutes of it, and its
    cut still stands.  None otherwise.
    """
    found = db.query(
        "SELECT t.* FROM taps t JOIN saws s ON s.id = t.saw_id WHERE lower(s.name) = lower(:saw) "
        "AND t.kind IN (:k0, :k1, :k2) ORDER BY t.id DESC LIMIT 1",
        {"saw": saw_name.strip(), **{f"k{i}": k for i, k in enumerate(CLOSERS)}},
    )
    if not found or found[0]["kind"] != CORRECTABLE or found[0]["cut_id"] is None:
        return None
    tap = found[0]
    age_min = (now - dt.datetime.fromisoformat(tap["tapped_at"])).total_seconds() / 60.0
    if not 0 <= age_min <= window_min:
        return None
    return _with_cut(db, tap)


def cut_tap(db: Database, tap_id: int) -> dict[str, Any] | None:
    """One "cut done" tap with its saw's name and its cut (None: no such tap)."""
    taps = db.query(
        "SELECT t.*, s.name AS saw FROM taps t LEFT JOIN saws s ON s.id = t.saw_id "
        "WHERE t.id = :id AND t.kind = :kind",
        {"id": int(tap_id), "kind": CORRECTABLE},
    )
    return _with_cut(db, taps[0]) if taps else None


def day_cut_taps(db: Database, day: str) -> list[dict[str, Any]]:
    """Every "cut done" tap of a day (the station's local date), oldest first, with its cut
    (``cut`` None when it was taken back)."""
    taps = db.query(
        "SELECT t.*, s.name AS saw FROM taps t LEFT JOIN saws s ON s.id = t.saw_id "
        "WHERE t.kind = :kind AND substr(t.tapped_at, 1, 10) = :day ORDER BY t.id",
        {"kind": CORRECTABLE, "day": day},
    )
    return [_with_cut(db, t) for t in taps]


def _with_cut(db: Database, tap: dict[str, Any]) -> dict[str, Any]:
    cut = None
    if tap["cut_id"] is not None:
        rows = db.query("SELECT * FROM cuts WHERE id = :id", {"id": tap["cut_id"]})
        cut = rows[0] if rows else None
    return {**tap, "cut": cut}


def correct_cut(
    db: Database, tap_id: int, *, time_min: float | None = None, cuts: int | None = None
) -> Correction:
    """Give the cut of tap ``tap_id`` another time and/or another number of queued cuts.

    Fewer cuts give the last ones back to the queue; more take the next ones
    still to do at that saw (of the same material and section).  Area, pieces
    or count, the model's time and the heat number follow the rows.
    """
    if time_min is None and cuts is None:
        raise UsageError("type the right time or the right number of cuts", field="time")
    if time_min is not None:
        fields.check("time", time_min)
    if cuts is not None:
        fields.check_count("cuts", cuts)

    def step() -> Correction:
        from sawplan.store.dates import check_dates
        from sawplan.store.fields import whole_number

        tap, cut, rows = _standing(db, tap_id)
        after: dict[str, Any] = {}
        moved: list[int] = []
        if cuts is not None and cuts != len(rows):
            chosen = _rows_for(db, cut, rows, cuts)
            moved = [r["id"] for r in rows[cuts:]] + [r["id"] for r in chosen[len(rows) :]]
            after.update(_counted(cut, rows, chosen))
            db.execute("UPDATE queue SET cut_id = NULL WHERE cut_id = :cut", {"cut": cut["id"]})
            for row in chosen:
                db.execute(
                    "UPDATE queue SET cut_id = :cut WHERE id = :id AND cut_id IS NULL",
                    {"cut": cut["id"], "id": row["id"]},
                )
        if time_min is not None:
            after["time_min"] = float(time_min)
        after = {k: v for k, v in after.items() if v != cut[k]}
        if not after and not moved:
            raise UsageError("that is what the cut already says; nothing to correct", field="time")
        for column in ("count", "pieces"):
            if column in after:
                whole_number(after[column], f"cuts.{column}")
        if after:
            db.update("cuts", cut["id"], after)
        check_dates(db, "cuts", row_id=cut["id"])
        before = {k: cut[k] for k in after}
        held = (len(rows), len(rows) if cuts is None else cuts)
        return Correction(
            tap_id, cut["id"], tap["saw"], tap["tapped_at"], before, after, tuple(moved), held
        )

    return run_write(db, step)


def take_back_cut(db: Database, tap_id: int) -> Correction:
    """Undo the cut of tap ``tap_id``: its queue rows are to cut again and the entry is gone
    (kept whole in the ``Correction``, which the undo tap stores)."""

    def step() -> Correction:
        tap, cut, rows = _standing(db, tap_id)
        db.execute("UPDATE queue SET cut_id = NULL WHERE cut_id = :cut", {"cut": cut["id"]})
        # the tap no longer points at a cut that is gone (its id may be given again)
        db.execute("UPDATE taps SET cut_id = NULL WHERE cut_id = :cut", {"cut": cut["id"]})
        db.execute("DELETE FROM cuts WHERE id = :cut", {"cut": cut["id"]})
        kept = {k: v for k, v in cut.items() if k != "id"}
        queued = tuple(r["id"] for r in rows)
        return Correction(
            tap_id, cut["id"], tap["saw"], tap["tapped_at"], kept, None, queued, (len(rows), 0)
        )

    return run_write(db, step)


def _standing(db: Database, tap_id: int) -> tuple[dict, dict, list[dict]]:
    """The tap, its cut entry and the queue rows it marked, in cut-sheet order."""
    tap = cut_tap(db, tap_id)
    if tap is None:
        raise NotFoundError("no such cut done tap", field="cut")
    cut = tap.pop("cut")
    if cut is None:
        raise ConflictError("that cut was taken back already; nothing to correct", field="cut")
    rows = db.query(
        "SELECT q.* FROM queue q WHERE q.cut_id = :cut ORDER BY q.job_id, q.seq",
        {"cut": cut["id"]},
    )
    return tap, cut, rows


def _rows_for(db: Database, cut: dict, rows: list[dict], wanted: int) -> list[dict]:
    """The queue rows the cut holds after the correction: its first ``wanted``, or all of
    them and the next ones still to cut on that saw."""
    from sawplan.store.station_rows import queue_from

    if not rows:
        raise BadDataError("this cut was not logged from the queue; its count stays", field="cuts")
    if wanted <= len(rows):
        return rows[:wanted]
    saw = db.scalar("SELECT name FROM saws WHERE id = :id", {"id": cut["saw_id"]})
    more = queue_from(db, str(saw), rows[-1]["id"], wanted - len(rows))
    same = [r for r in more if (r["material"], r["section"]) == (cut["material"], cut["section"])]
    if len(same) < wanted - len(rows) or len(same) < len(more):
        left = len(rows) + len(same)
        raise BadDataError(
            f"only {left} cut{'s' if left != 1 else ''} of this material and section "
            "can be in this tap (the queue goes on with others or ends)",
            field="cuts",
        )
    return rows + more


def _counted(cut: dict, old: list[dict], new: list[dict]) -> dict[str, Any]:
    """The cut entry's columns that follow its queue rows."""
    bundle = cut["pieces"] > 1  # a bundle is one cut through several pieces
    n = len(new)
    heats = {r["heat"] for r in new}
    predicted = cut["predicted_time_min"]
    return {
        "area_mm2": math.fsum(float(r["area_mm2"]) for r in new),
        "pieces": n if bundle else 1,
        "count": 1 if bundle else n,
        "predicted_time_min": None if predicted is None else predicted * n / len(old),
        "heat": heats.pop() if len(heats) == 1 else None,
    }
