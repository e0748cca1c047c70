"""Blade and fitting rows: what a blade is, which saw carries it, how it ended.

Every write is one step run by ``run_write`` (``BEGIN IMMEDIATE`` on SQLite,
SERIALIZABLE and run again after a conflict on PostgreSQL), so a check ("is
this blade retired?") and the write it guards cannot be split by another
process or station.
"""

from __future__ import annotations

import dataclasses
import difflib
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan.display import Q, join, say
from sawplan.errors import BadDataError, ConflictError, NotFoundError, UsageError
from sawplan.store.dates import check_dates
from sawplan.store.db import run_write
from sawplan.store.fields import (
    BLADE_STATUSES,
    check_failure_mode,
    check_row,
    clean_text,
    fmt_num,
    pitch_label,
)
from sawplan.store.saw_rows import saw_row_id

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.db import Log as Database


@dataclass(frozen=True)
class BladeSpec:
    """What is known about a blade when it is bought (``sawplan blade add``)."""

    tag: str
    width_mm: float
    thickness_mm: float
    tpi_coarse: float
    tpi_fine: float
    length_mm: float | None = None
    blade_material: str = "bi-metal"
    grade: str | None = None
    tooth_form: str | None = None
    tooth_set: str | None = None
    supplier: str | None = None
    lot: str | None = None
    price: float | None = None
    bought_on: str | None = None
    welded: str = "bought"
    notes: str | None = None


@dataclass(frozen=True)
class Blade:
    """A blade row with what it has done: current saw, area cut, number of cuts."""

    id: int
    tag: str
    blade_material: str
    grade: str | None
    width_mm: float
    thickness_mm: float
    length_mm: float | None
    tpi_coarse: float
    tpi_fine: float
    tooth_form: str | None
    tooth_set: str | None
    supplier: str | None
    lot: str | None
    price: float | None
    bought_on: str | None
    welded: str | None
    status: str
    retired_on: str | None
    retire_cause: str | None
    notes: str | None
    saw: str | None
    area_mm2: float
    cuts: int

    @property
    def pitch(self) -> str:
        return pitch_label(self.tpi_coarse, self.tpi_fine)

    @property
    def size(self) -> str:
        """Width × thickness in mm, e.g. ``27×0.9`` (shown in inches under ``--units us``)."""
        return say("{}×{}", Q("size", self.width_mm), Q("size", self.thickness_mm))

    @property
    def blade_type(self) -> str:
        """What makes two blades interchangeable for statistics: material, grade, size, pitch."""
        parts = [self.blade_material, self.grade or "", self.size, self.pitch]
        return join(" ", [p for p in parts if p])

    @property
    def area_cm2(self) -> float:
        return self.area_mm2 / 100.0

    def json_extra(self) -> dict[str, Any]:
        return {"pitch": self.pitch, "blade_type": self.blade_type, "area_cm2": self.area_cm2}


# Totals by correlated subqueries: each reads one blade's cuts through the
# blade_id index, so looking up one blade costs the same in a log of any size.
_BLADE_QUERY = """
SELECT b.*, s.name AS saw,
  COALESCE((SELECT SUM(c.area_mm2) FROM cuts c WHERE c.blade_id = b.id), 0.0) AS area_mm2,
  COALESCE((SELECT SUM(c.count) FROM cuts c WHERE c.blade_id = b.id), 0) AS cuts
FROM blades b
LEFT JOIN fittings f ON f.blade_id = b.id AND f.removed_on IS NULL
LEFT JOIN saws s ON s.id = f.saw_id
"""
# Without the totals: what a write step needs (it must not read the blade's cuts, or two
# stations logging on one blade would conflict on PostgreSQL for nothing).
_BLADE_ONLY_QUERY = """
SELECT b.*, s.name AS saw, 0.0 AS area_mm2, 0 AS cuts
FROM blades b
LEFT JOIN fittings f ON f.blade_id = b.id AND f.removed_on IS NULL
LEFT JOIN saws s ON s.id = f.saw_id
"""
_BLADE_FIELDS = tuple(f.name for f in dataclasses.fields(Blade))


def _blade(row: dict[str, Any]) -> Blade:
    return Blade(**{k: row.get(k) for k in _BLADE_FIELDS})


def add_blade(db: Database, spec: BladeSpec, *, added_on: str) -> Blade:
    """Record a new blade; ``ConflictError`` when the tag is taken."""
    tag = clean_text(spec.tag, field="blades.tag")
    if tag is None:
        raise UsageError("a blade needs a tag", field="blade tag", hint="e.g. B-017")
    row = dataclasses.asdict(spec)
    for key in ("grade", "tooth_form", "tooth_set", "supplier", "lot", "notes", "blade_material"):
        row[key] = clean_text(row[key], field=f"blades.{key}")
    row.update(tag=tag, status="new", added_on=added_on)
    row["blade_material"] = row["blade_material"] or "bi-metal"
    for key in ("width_mm", "thickness_mm", "tpi_coarse", "tpi_fine"):
        if row[key] is None:
            raise BadDataError("is required", field=key)
    check_row("blades", row)  # every value against the field table, before any rule between them
    if spec.thickness_mm >= spec.width_mm:
        raise BadDataError(
            f"thickness {fmt_num(spec.thickness_mm)} mm must be less than the width "
            f"{fmt_num(spec.width_mm)} mm",
            field="blade thickness",
        )

    def step() -> None:
        if _find_blade_row(db, tag) is not None:
            raise ConflictError(f"blade {tag} is already in the log", field="tag")
        db.insert("blades", row)

    run_write(db, step)
    return get_blade(db, tag)


def get_blade(db: Database, tag: str, *, totals: bool = True) -> Blade:
    """One blade by tag (case-insensitive); unknown tags get a suggestion.

    ``totals=False`` leaves the area and number of cuts at 0 (no read of its cuts).
    """
    sql = _BLADE_QUERY if totals else _BLADE_ONLY_QUERY
    rows = db.query(sql + " WHERE lower(b.tag) = lower(:tag)", {"tag": tag.strip()})
    if rows:
        return _blade(rows[0])
    tags = [r["tag"] for r in db.query("SELECT tag FROM blades")]
    close = difflib.get_close_matches(tag, tags, n=1)
    hint = f"did you mean {close[0]}?" if close else "see `sawplan blade list`"
    raise NotFoundError(f"no blade {tag!r} in the log", field="blade", hint=hint)


def list_blades(db: Database, *, status: str | None = None) -> list[Blade]:
    """All blades (or those of one status), in the order they were added."""
    if status is not None and status not in BLADE_STATUSES:
        raise UsageError(f"must be one of {', '.join(BLADE_STATUSES)}", field="status")
    where, params = (
        ("", {}) if status is None else (" WHERE b.status = :status", {"status": status})
    )
    return [_blade(r) for r in db.query(_BLADE_QUERY + where + " ORDER BY b.id", params)]


def _find_blade_row(db: Database, tag: str) -> dict[str, Any] | None:
    rows = db.query("SELECT * FROM blades WHERE lower(tag) = lower(:tag)", {"tag": tag.strip()})
    return rows[0] if rows else None


# --- fittings -------------------------------------------------------------------------


@dataclass(frozen=True)
class FitOutcome:
    """What ``fit_blade`` did: the blade it took off that saw, the saw it moved from."""

    blade: str
    saw: str
    fitted_on: str
    displaced: str | None
    moved_from: str | None


def fit_blade(
    db: Database,
    tag: str,
    saw_name: str,
    *,
    on: str,
    saw_profile: Saw | None = None,
    tension_mpa: float | None = None,
    break_in: bool | None = None,
    break_in_how: str | None = None,
) -> FitOutcome:
    """Fit a blade to a saw, taking off whatever blade that saw carried."""
    how = clean_text(break_in_how, field="fittings.break_in_how")
    check_row("fittings", {"tension_mpa": tension_mpa, "fitted_on": on})

    def step() -> FitOutcome:
        blade = existing_blade_row(db, tag)
        if blade["status"] == "retired":
            raise ConflictError(f"blade {blade['tag']} was retired on {blade['retired_on']}")
        saw_id, saw_label = saw_row_id(db, saw_name, saw_profile, on=on)
        mine = _open_fitting(db, blade_id=blade["id"])
        if mine is not None and mine["saw_id"] == saw_id:
            raise ConflictError(f"blade {blade['tag']} is already fitted on {saw_label}")
        moved_from = None
        if mine is not None:
            moved_from = _close_fitting(db, mine, on)["saw"]
        displaced = None
        other = _open_fitting(db, saw_id=saw_id)
        if other is not None:
            displaced = _close_fitting(db, other, on)["tag"]
        first = not db.scalar(
            "SELECT COUNT(*) FROM fittings WHERE blade_id = :id", {"id": blade["id"]}
        )
        fitting_id = db.insert(
            "fittings",
            {
                "blade_id": blade["id"],
                "saw_id": saw_id,
                "fitted_on": on,
                "tension_mpa": tension_mpa,
                "break_in": None if break_in is None else int(break_in),
                "break_in_how": how,
            },
        )
        check_dates(db, "fittings", row_id=fitting_id)
        if first:  # cuts or events logged before on an unfitted blade must not predate it
            for table in ("cuts", "events"):
                check_dates(db, table, blade_id=blade["id"], against=("first fitting",))
        db.update("blades", blade["id"], {"status": "fitted"})
        return FitOutcome(blade["tag"], saw_label, on, displaced, moved_from)

    return run_write(db, step)


def remove_blade(db: Database, tag: str, *, on: str) -> str:
    """Take a fitted blade off its saw (unworn: it stays a censored life). Returns the saw."""

    def step() -> str:
        blade = existing_blade_row(db, tag)
        fitting = _open_fitting(db, blade_id=blade["id"])
        if fitting is None:
            raise ConflictError(f"blade {blade['tag']} is not fitted (it is {blade['status']})")
        return str(_close_fitting(db, fitting, on)["saw"])

    return run_write(db, step)


def retire_blade(
    db: Database,
    tag: str,
    cause: str,
    *,
    on: str,
    location: str | None = None,
    note: str | None = None,
) -> Blade:
    """End a blade's life with a failure mode; records a ``failure`` event."""
    code = check_failure_mode(cause, field="cause")
    where = clean_text(location, field="events.location")
    text = clean_text(note, field="events.note")

    def step() -> None:
        blade = existing_blade_row(db, tag)
        if blade["status"] == "retired":
            raise ConflictError(
                f"blade {blade['tag']} was already retired on {blade['retired_on']}"
            )
        fitting = _open_fitting(db, blade_id=blade["id"])
        if fitting is not None:
            _close_fitting(db, fitting, on)
        db.update(
            "blades", blade["id"], {"status": "retired", "retired_on": on, "retire_cause": code}
        )
        event_id = db.insert(
            "events",
            {
                "blade_id": blade["id"],
                "happened_on": on,
                "kind": "failure",
                "mode": code,
                "location": where,
                "note": text,
            },
        )
        check_dates(db, "blades", row_id=blade["id"])
        check_dates(db, "events", row_id=event_id)
        for table in ("cuts", "events"):  # nothing of its life may come after its end
            check_dates(db, table, blade_id=blade["id"], against=("retired",))

    run_write(db, step)
    return get_blade(db, tag)


def fitted_blade(
    db: Database, saw_name: str | None = None, *, totals: bool = True
) -> tuple[Blade, str]:
    """The blade on ``saw_name``, or the only fitted blade when no saw is named."""
    sql = (
        "SELECT b.tag, s.name AS saw FROM fittings f JOIN blades b ON b.id = f.blade_id "
        "JOIN saws s ON s.id = f.saw_id WHERE f.removed_on IS NULL"
    )
    rows = sorted(db.query(sql), key=lambda r: r["saw"])  # the same order on every engine
    if saw_name is not None:
        rows = [r for r in rows if r["saw"].lower() == saw_name.strip().lower()]
        if not rows:
            raise UsageError(
                f"no blade is fitted on saw {saw_name!r}",
                field="blade",
                hint=f"give --blade TAG, or fit one: sawplan blade fit TAG --saw {saw_name}",
            )
    if not rows:
        raise UsageError(
            "no blade is fitted on any saw",
            field="blade",
            hint="give --blade TAG, or fit one: sawplan blade fit TAG --saw NAME",
        )
    if len(rows) > 1:
        saws = ", ".join(r["saw"] for r in rows)
        raise UsageError(
            f"blades are fitted on {len(rows)} saws ({saws})",
            field="blade",
            hint="give --saw NAME or --blade TAG",
        )
    return get_blade(db, rows[0]["tag"], totals=totals), rows[0]["saw"]


def fitted_on_saws(db: Database) -> dict[str, str]:
    """Lower-case saw name → tag of the blade fitted on it now."""
    sql = (
        "SELECT s.name, b.tag FROM fittings f JOIN blades b ON b.id = f.blade_id "
        "JOIN saws s ON s.id = f.saw_id WHERE f.removed_on IS NULL"
    )
    return {name.lower(): tag for name, tag in db.execute(sql)}


def fittings_of(db: Database, blade_id: int) -> list[dict[str, Any]]:
    return db.query(
        "SELECT f.*, s.name AS saw FROM fittings f JOIN saws s ON s.id = f.saw_id "
        "WHERE f.blade_id = :blade_id ORDER BY f.id",
        {"blade_id": blade_id},
    )


def existing_blade_row(db: Database, tag: str) -> dict[str, Any]:
    row = _find_blade_row(db, tag)
    if row is None:
        get_blade(db, tag)  # raises NotFoundError with a suggestion
    assert row is not None
    return row


def _open_fitting(
    db: Database, *, blade_id: int | None = None, saw_id: int | None = None
) -> dict[str, Any] | None:
    if blade_id is not None:
        rows = db.query(_OPEN_FITTING + " AND f.blade_id = :id", {"id": blade_id})
    else:
        rows = db.query(_OPEN_FITTING + " AND f.saw_id = :id", {"id": saw_id})
    return rows[0] if rows else None


_OPEN_FITTING = (
    "SELECT f.*, b.tag, s.name AS saw FROM fittings f JOIN blades b ON b.id = f.blade_id "
    "JOIN saws s ON s.id = f.saw_id WHERE f.removed_on IS NULL"
)


def _close_fitting(db: Database, fitting: dict[str, Any], on: str) -> dict[str, Any]:
    db.update("fittings", fitting["id"], {"removed_on": on})
    check_dates(db, "fittings", row_id=fitting["id"], against=("fitted",))
    db.execute(
        "UPDATE blades SET status = 'removed' WHERE id = :id AND status = 'fitted'",
        {"id": fitting["blade_id"]},
    )
    return fitting
