"""Moving the log in and out: CSV export and import, and a one-file backup.

Export writes one CSV per table (saws, blades, fittings, cuts, events, and the
station's jobs, queue, remnants, saw_notes, taps: ``exchange_station``) with
natural keys (blade tag, saw name) in place of row ids, so a folder of CSVs can
be read into any log.  Text a spreadsheet would run as a formula (= + - @) is
neutralised by ``sawplan.render.to_csv`` with a leading apostrophe; text that
already starts with an apostrophe gets one more, so import strips exactly one
and every value comes back as it was.

Import checks every row of every file before writing anything, then writes
all rows in one transaction: all rows or none, and each error names its file,
row and column.  On a SQLite file the whole log is checked (``PRAGMA
integrity_check``) before the import commits.  A folder or a ``.zip`` of the
CSV files (what ``sawplan backup`` writes for a server log) is read alike.
"""

from __future__ import annotations

import csv
import math
import os
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from sawplan.errors import (
    BadDataError,
    NotFoundError,
    SawplanError,
    UsageError,
)
from sawplan.store.db import read_snapshot, refresh_statistics, run_write
from sawplan.store.exchange_station import COLUMNS as STATION_COLUMNS
from sawplan.store.fields import StoredValueError, check_row
from sawplan.store.records import BLADE_STATUSES, EVENT_KINDS, WELDED
from sawplan.store.schema import SAW_PROFILE_COLUMNS

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database

# column kinds: text, real, int, flag (0/1), day (ISO date); "!" marks a required column
_SAW_KINDS = {
    c: ("real" if t is float else "int" if t is int else "text")
    for c, t in SAW_PROFILE_COLUMNS.items()
}
_SAW_KINDS["coolant"] = "flag"
TABLES: dict[str, dict[str, str]] = {
    "saws": {"name": "text!", **_SAW_KINDS, "source": "text", "added_on": "day"},
    "blades": {
        "tag": "text!",
        "blade_material": "text!",
        "grade": "text",
        "width_mm": "real!",
        "thickness_mm": "real!",
        "length_mm": "real",
        "tpi_coarse": "real!",
        "tpi_fine": "real!",
        "tooth_form": "text",
        "tooth_set": "text",
        "supplier": "text",
        "lot": "text",
        "price": "real",
        "bought_on": "day",
        "welded": "text",
        "status": "text!",
        "retired_on": "day",
        "retire_cause": "text",
        "notes": "text",
        "added_on": "day",
    },
    "fittings": {
        "blade": "text!",
        "saw": "text!",
        "fitted_on": "day!",
        "removed_on": "day",
        "tension_mpa": "real",
        "break_in": "flag",
        "break_in_how": "text",
    },
    "cuts": {
        "blade": "text!",
        "saw": "text",
        "cut_on": "day!",
        "material": "text!",
        "material_group": "text",
        "section": "text!",
        "area_mm2": "real!",
        "pieces": "int!",
        "count": "int!",
        "band_speed_m_min": "real",
        "feed_mm_min": "real",
        "feed_setting": "text",
        "time_min": "real",
        "predicted_time_min": "real",
        "coolant": "flag",
        "job": "text",
        "heat": "text",
        "note": "text",
    },
    "events": {
        "blade": "text!",
        "happened_on": "day!",
        "kind": "text!",
        "mode": "text",
        "location": "text",
        "teeth": "int",
        "note": "text",
    },
    **STATION_COLUMNS,
}
LOG_TABLES = ("saws", "blades", "fittings", "cuts", "events")

_EXPORT_SQL = {
    "saws": "SELECT * FROM saws ORDER BY id",
    "blades": "SELECT * FROM blades ORDER BY id",
    "fittings": "SELECT f.*, b.tag AS blade, s.name AS saw FROM fittings f "
    "JOIN blades b ON b.id = f.blade_id JOIN saws s ON s.id = f.saw_id ORDER BY f.id",
    "cuts": "SELECT c.*, b.tag AS blade, s.name AS saw FROM cuts c "
    "JOIN blades b ON b.id = c.blade_id LEFT JOIN saws s ON s.id = c.saw_id ORDER BY c.id",
    "events": "SELECT e.*, b.tag AS blade FROM events e "
    "JOIN blades b ON b.id = e.blade_id ORDER BY e.id",
}


@dataclass(frozen=True)
class TransferResult:
    """Rows written per table (export or import) and where."""

    folder: str
    rows: dict[str, int]


# --- export ------------------------------------------------------------------------------


def export_csv(
    db: Database, folder: str | os.PathLike[str], *, overwrite: bool = False
) -> TransferResult:
    """Write one CSV per table of ``TABLES`` (``saws.csv``, ... ``taps.csv``)."""
    from sawplan.outputs import Target, check_targets, run_inputs, write_files
    from sawplan.render import to_csv
    from sawplan.store.exchange_station import export_rows, row_numbers
    from sawplan.store.perms import file_mode, make_folder

    out = Path(folder)
    if out.exists() and not out.is_dir():
        raise UsageError(f"{out} is a file; give a folder", field="folder")
    targets = [Target(out / f"{t}.csv", "export DIR") for t in TABLES]
    inputs = run_inputs(db.location)
    check_targets(targets, inputs, force=overwrite)
    counts: dict[str, int] = {}
    texts: dict[str, str] = {}
    with read_snapshot(db):  # one consistent moment of every table
        numbers = row_numbers(db)
        for table, columns in TABLES.items():
            found = (
                db.query(_EXPORT_SQL[table])
                if table in LOG_TABLES
                else export_rows(db, table, numbers)
            )
            rows = [[_export_cell(row.get(c), columns[c]) for c in columns] for row in found]
            counts[table] = len(rows)
            texts[table] = to_csv(list(columns), rows)
    check_targets(targets, inputs, force=overwrite)  # again: the reading took a while
    make_folder(out)  # 0700 when sawplan creates it, as the log's folder (log_mode)
    for leftover in out.glob("*.csv.tmp"):  # left by a killed export of an older version
        leftover.unlink(missing_ok=True)
    write_files({out / f"{t}.csv": text for t, text in texts.items()}, mode=file_mode())
    return TransferResult(str(out), counts)


def _export_cell(value: Any, kind: str) -> Any:
    if value is None:
        return ""
    if kind.startswith("text") and isinstance(value, str) and value.startswith("'"):
        return "'" + value  # import strips one apostrophe from any text cell
    return value


# --- import ------------------------------------------------------------------------------


def import_csv(db: Database, folder: str | os.PathLike[str]) -> TransferResult:
    """Read a folder (or zip) written by ``export_csv`` into the log: all rows or none."""
    import tempfile

    src = Path(folder)
    if src.is_file() and zipfile_like(src):
        with tempfile.TemporaryDirectory(prefix="sawplan-import-") as tmp:
            unpack_export(src, Path(tmp))
            result = import_csv(db, tmp)
        return TransferResult(str(src), result.rows)
    if not src.is_dir():
        raise NotFoundError(f"no folder {src}", field="folder")
    # a pipe or device under a table's name is refused when read, never skipped
    present = [t for t in TABLES if os.path.lexists(src / f"{t}.csv")]
    if not present:
        raise NotFoundError(
            f"{src} holds none of {', '.join(f'{t}.csv' for t in TABLES)}", field="folder"
        )
    parsed = {t: _read_table(src / f"{t}.csv", t) if t in present else [] for t in TABLES}

    def step() -> dict[str, int]:
        counts = _write_all(db, parsed)
        _check_before_commit(db)
        return counts

    counts = run_write(db, step)
    refresh_statistics(db, counts)
    return TransferResult(str(src), counts)


def _check_before_commit(db: Database) -> None:
    """The full integrity check of a SQLite file, inside the import's transaction."""
    if db.dialect != "sqlite" or db.path is None:
        return
    from sawplan.store.safety import check_integrity

    check_integrity(db.conn.connection.dbapi_connection, db.path, full=True)


EXPORT_MEMBERS = tuple(f"{t}.csv" for t in TABLES)
MAX_MEMBER_BYTES = 2_000_000_000  # one CSV of an import, in a folder or a zip; far above any log


def zipfile_like(path: Path) -> bool:
    try:
        with path.open("rb") as handle:
            return handle.read(4) == b"PK\x03\x04"
    except OSError:
        return False


def unpack_export(archive: Path, into: Path) -> None:
    """The export CSVs of a zip, and nothing else (no paths, no other names, size-capped)."""
    import zipfile

    from sawplan.user_files import copy_member, over_cap

    try:
        with zipfile.ZipFile(archive) as zf:
            for info in zf.infolist():
                if info.filename not in EXPORT_MEMBERS:
                    continue
                if info.file_size > MAX_MEMBER_BYTES:
                    raise over_cap(info.filename, MAX_MEMBER_BYTES, archive.name)
                # the header's size may lie: the cap is applied again while unpacking
                copy_member(zf, info, into / info.filename, MAX_MEMBER_BYTES, archive.name)
    except zipfile.BadZipFile as err:
        raise BadDataError(f"is not a readable zip ({err})", field=archive.name) from None


Row = tuple[int, dict[str, Any]]  # (data row number, values)


def _read_table(path: Path, table: str) -> list[Row]:
    from sawplan.user_files import open_text_limited

    columns = TABLES[table]
    try:
        with open_text_limited(path, MAX_MEMBER_BYTES, path.name) as handle:
            reader = csv.DictReader(handle)
            header = [h.strip() for h in (reader.fieldnames or [])]
            missing = [c for c in columns if c not in header]
            if missing:
                raise BadDataError(
                    f"missing columns {', '.join(missing)}",
                    field=path.name,
                    hint=f"expected {', '.join(columns)}",
                )
            unknown = [h for h in header if h not in columns]
            if unknown:
                raise BadDataError(
                    f"unknown columns {', '.join(unknown)}",
                    field=path.name,
                    hint="was it written by a newer sawplan?",
                )
            reader.fieldnames = header
            rows = []
            for number, raw in enumerate(reader, start=1):
                if None in raw:
                    raise _row_error(path.name, number, "row", "has more cells than the header")
                rows.append((number, _convert_row(path.name, number, raw, columns)))
    except UnicodeDecodeError:
        raise BadDataError("is not UTF-8 text", field=path.name) from None
    except csv.Error as err:
        raise BadDataError(f"is not readable CSV ({err})", field=path.name) from None
    return rows


def _convert_row(
    name: str, number: int, raw: dict[str, str | None], columns: dict[str, str]
) -> dict[str, Any]:
    from sawplan.store.dates import check_stored_day
    from sawplan.store.exchange_station import check_stamp

    table = name.rsplit(".", 1)[0]  # "cuts.csv" -> cuts
    out: dict[str, Any] = {}
    for column, kind in columns.items():
        cell = raw.get(column)
        text = "" if cell is None else cell
        required = kind.endswith("!")
        kind = kind.rstrip("!")
        try:
            if kind == "text":
                value: Any = text[1:] if text.startswith("'") else text
                value = value if value.strip() else None
            elif text.strip() == "":
                value = None
            elif kind == "real":
                value = _number(text, float)
            elif kind == "int":
                value = _number(text, int)
            elif kind == "flag":
                value = _flag(text)
            elif kind == "stamp":
                value = check_stamp(text)
            else:
                value = check_stored_day(text, field=column)
        except SawplanError as err:
            raise _row_error(name, number, column, err.message) from None
        if value is None and required:
            raise _row_error(name, number, column, "is required")
        out[column] = value
    try:  # the rules every row of the log obeys, whoever writes it (sawplan.fields)
        check_row(table, out)
    except StoredValueError as err:
        said = err.one_line()  # the user's words for the column, e.g. 'remnant length: ...'
        if err.field in (None, err.column):  # ...unless they are the column's own name
            said = f"{err.message} ({err.hint})" if err.hint else err.message
        raise _row_error(name, number, err.column, said) from None
    return out


def _number(text: str, kind: type) -> float | int:
    try:
        value = float(text) if kind is float else int(text)
    except ValueError:
        what = "a number" if kind is float else "a whole number"
        raise BadDataError(f"expected {what}, got {text!r}") from None
    if isinstance(value, float) and not math.isfinite(value):
        raise BadDataError(f"expected a finite number, got {text!r}")
    return value


def _flag(text: str) -> int:
    key = text.strip().lower()
    if key in ("1", "yes", "true", "y"):
        return 1
    if key in ("0", "no", "false", "n"):
        return 0
    raise BadDataError(f"expected 1 or 0, got {text!r}")


def _row_error(name: str, number: int, column: str, message: str) -> BadDataError:
    return BadDataError(f"{name} row {number} (line {number + 1}): {column}: {message}")


def _required_saw_fields() -> list[str]:
    """The Saw profile fields without a default: a saws row must give them all."""
    import dataclasses

    from sawplan.saws import Saw

    return [
        f.name
        for f in dataclasses.fields(Saw)
        if f.default is dataclasses.MISSING and f.default_factory is dataclasses.MISSING
    ]


def _write_all(db: Database, parsed: dict[str, list[Row]]) -> dict[str, int]:
    """Check references and rules against the log, then insert; any error rolls all back."""
    from sqlalchemy.exc import IntegrityError

    from sawplan.store.dates import check_dates, last_row_id
    from sawplan.store.exchange_station import new_ids, write_station
    from sawplan.store.records import check_failure_mode, row_to_saw

    newer_than = {t: last_row_id(db, t) for t in ("blades", "fittings", "cuts", "events")}
    saw_ids = {r["name"].lower(): (r["id"], r) for r in db.query("SELECT * FROM saws")}
    blade_ids = {r[1].lower(): r[0] for r in db.execute("SELECT id, tag FROM blades")}
    counts = dict.fromkeys(TABLES, 0)

    for number, row in parsed["saws"]:
        key = row["name"].lower()
        if key in saw_ids:
            old = saw_ids[key][1]
            if any(old.get(c) != row.get(c) for c in SAW_PROFILE_COLUMNS):
                raise _row_error(
                    "saws.csv",
                    number,
                    "name",
                    f"saw {row['name']} is in the log with another profile",
                )
            continue
        row["source"] = row["source"] or "blade log"
        missing = [c for c in _required_saw_fields() if row.get(c) is None]
        if missing:
            raise _row_error("saws.csv", number, missing[0], "is required for a saw profile")
        try:
            row_to_saw(row)  # the profile must make a valid saw for `sawplan cut`
        except SawplanError as err:
            raise _row_error("saws.csv", number, err.field or "profile", err.message) from None
        saw_ids[key] = (db.insert("saws", row), row)
        counts["saws"] += 1

    for number, row in parsed["blades"]:
        where = ("blades.csv", number)
        if row["tag"].lower() in blade_ids:
            raise _row_error(*where, "tag", f"blade {row['tag']} is already in the log")
        _one_of(where, "status", row["status"], BLADE_STATUSES)
        if row["welded"] is not None:
            _one_of(where, "welded", row["welded"], WELDED)
        if row["status"] == "retired":
            try:
                row["retire_cause"] = check_failure_mode(row["retire_cause"], field="retire_cause")
            except SawplanError as err:
                raise _row_error(*where, "retire_cause", err.message) from None
        blade_ids[row["tag"].lower()] = db.insert("blades", row)
        counts["blades"] += 1

    open_blades: set[int] = set()
    open_saws: set[int] = set()
    for blade_id, saw_id in db.execute(
        "SELECT blade_id, saw_id FROM fittings WHERE removed_on IS NULL"
    ):
        open_blades.add(blade_id)
        open_saws.add(saw_id)
    fittings = []
    for number, row in parsed["fittings"]:
        where = ("fittings.csv", number)
        values = _resolve(where, row, blade_ids, saw_ids, saw_required=True)
        if row["removed_on"] is None:
            if values["blade_id"] in open_blades or values["saw_id"] in open_saws:
                raise _row_error(
                    *where, "removed_on", "a blade or saw would have two open fittings"
                )
            open_blades.add(values["blade_id"])
            open_saws.add(values["saw_id"])
        fittings.append(values)

    cuts = [_resolve(("cuts.csv", n), r, blade_ids, saw_ids) for n, r in parsed["cuts"]]

    events = []
    for number, row in parsed["events"]:
        where = ("events.csv", number)
        _one_of(where, "kind", row["kind"], EVENT_KINDS)
        if row["mode"] is not None:
            try:
                row["mode"] = check_failure_mode(row["mode"], field="mode")
            except SawplanError as err:
                raise _row_error(*where, "mode", err.message) from None
        events.append(_resolve(where, row, blade_ids, saw_ids))

    try:
        for table, rows in (("fittings", fittings), ("cuts", cuts), ("events", events)):
            counts[table] = db.insert_many(table, rows)
        cut_ids = new_ids(db, "cuts", newer_than["cuts"])
        counts.update(write_station(db, parsed, saw_ids, cut_ids))
    except IntegrityError as err:
        rule = " ".join(str(err.orig).split())[:120]
        raise BadDataError(f"the rows break a rule of the log ({rule})", field="import") from None
    for table, after in newer_than.items():  # the order of each blade's dates
        check_dates(db, table, after_id=after)
    return counts


def _resolve(
    where: tuple[str, int],
    row: dict[str, Any],
    blades: dict,
    saws: dict,
    *,
    saw_required: bool = False,
) -> dict[str, Any]:
    values = dict(row)
    tag = values.pop("blade")
    if tag.lower() not in blades:
        raise _row_error(*where, "blade", f"no blade {tag!r} in the log or in blades.csv")
    values["blade_id"] = blades[tag.lower()]
    if "saw" in values:
        name = values.pop("saw")
        if name is None:
            if saw_required:
                raise _row_error(*where, "saw", "is required")
            values["saw_id"] = None
        elif name.lower() not in saws:
            raise _row_error(*where, "saw", f"no saw {name!r} in the log or in saws.csv")
        else:
            values["saw_id"] = saws[name.lower()][0]
    return values


def _one_of(where: tuple[str, int], column: str, value: str, allowed: tuple[str, ...]) -> None:
    if value not in allowed:
        raise _row_error(*where, column, f"must be one of {', '.join(allowed)}, got {value!r}")
