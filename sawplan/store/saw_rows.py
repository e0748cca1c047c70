"""Saw rows of the blade log: profiles kept beside the packaged ones."""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any

from sawplan.errors import ConflictError, NotFoundError, UsageError
from sawplan.store.db import run_write
from sawplan.store.fields import clean_text
from sawplan.store.schema import SAW_PROFILE_COLUMNS

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.db import Log as Database


def saw_to_row(saw: Saw) -> dict[str, Any]:
    row: dict[str, Any] = {"name": saw.name}
    for column in SAW_PROFILE_COLUMNS:
        value = getattr(saw, column, None)
        row[column] = int(value) if isinstance(value, bool) else value
    row["source"] = saw.source or "blade log"
    return row


def row_to_saw(row: dict[str, Any]) -> Saw:
    """A ``sawplan.saws.Saw`` from a saws row (fields the row lacks keep their defaults)."""
    from sawplan.saws import Saw

    names = {f.name for f in dataclasses.fields(Saw)}
    values = {k: row[k] for k in names if k in row and row[k] is not None}
    if "coolant" in values:
        values["coolant"] = bool(values["coolant"])
    origin = row.get("source") or "blade log"
    values["source"] = origin if origin == "blade log" else f"blade log ({origin})"
    return Saw(**values)


def add_saw(db: Database, saw: Saw, *, added_on: str, replace: bool = False) -> None:
    """Keep a saw profile in the log; ``replace`` updates one of the same name."""
    name = clean_text(saw.name, field="saws.name")
    if name is None:
        raise UsageError("a saw needs a name", field="name")
    row = saw_to_row(saw) | {"name": name, "added_on": added_on}
    row["notes"] = clean_text(row.get("notes"), field="saws.notes")
    row["source"] = clean_text(row.get("source"), field="saws.source") or "blade log"

    def step() -> None:
        existing = _find_saw_row(db, name)
        if existing is not None and not replace:
            raise ConflictError(
                f"saw {existing['name']} is already in the log",
                field="name",
                hint="add --replace to update its profile",
            )
        if existing is not None:
            db.update("saws", existing["id"], {k: v for k, v in row.items() if k != "added_on"})
        else:
            db.insert("saws", row)

    run_write(db, step)


def logged_saws(db: Database) -> list[Saw]:
    return [row_to_saw(r) for r in db.query("SELECT * FROM saws ORDER BY id")]


def find_saw(db: Database, name: str) -> Saw | None:
    row = _find_saw_row(db, name)
    return None if row is None else row_to_saw(row)


def _find_saw_row(db: Database, name: str) -> dict[str, Any] | None:
    rows = db.query("SELECT * FROM saws WHERE lower(name) = lower(:name)", {"name": name.strip()})
    return rows[0] if rows else None


def ensure_saw(db: Database, name: str, profile: Saw | None, *, on: str) -> tuple[int, str]:
    """Row id and name of a saw, recording ``profile`` the first time the saw is used."""
    row = _find_saw_row(db, name)
    if row is not None:  # the common case: no write, no lock
        return int(row["id"]), str(row["name"])
    return run_write(db, lambda: saw_row_id(db, name, profile, on=on))


def saw_row_id(db: Database, name: str, profile: Saw | None, *, on: str) -> tuple[int, str]:
    """The saw's row id, copying ``profile`` into the log the first time it is used."""
    row = _find_saw_row(db, name)
    if row is not None:
        return int(row["id"]), str(row["name"])
    if profile is None:
        raise NotFoundError(
            f"no saw {name!r}",
            field="saw",
            hint="see `sawplan saw list` or add it: sawplan saw add",
        )
    new = saw_to_row(profile) | {"added_on": on}
    return db.insert("saws", new), profile.name
