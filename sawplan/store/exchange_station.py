"""The station's tables in the CSV export: jobs, queue, remnants, saw notes, taps.

Saws are named as in the log's own files.  A row that points at another row
of the export (a queued cut at its job and at the cut entry that logged it, a
correction at the tap it corrected) names that row by its number in the other
file: ``job_row`` is the data row of ``jobs.csv`` (1 = the first row under the
header), ``cut_row`` of ``cuts.csv``, ``corrects_row`` of ``taps.csv``.  Rows
are written in the order the log holds them, so an export read into an empty
log and exported again gives the same files.

Import reads these rows through the same field rules as the station's writes
(``station_rows.job_values``, ``queue_row``, ``remnant_row``, ``note_text``,
the tap key and kinds) and refuses a second open job of one name at one saw,
as ``plan --send`` does.
"""

from __future__ import annotations

import datetime as dt
import json
from typing import TYPE_CHECKING, Any

from sawplan.errors import BadDataError, SawplanError

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database

# column kinds as in ``exchange.TABLES``; "stamp" is a date and time with its offset
COLUMNS: dict[str, dict[str, str]] = {
    "jobs": {
        "saw": "text!",
        "name": "text!",
        "sent_on": "day!",
        "file": "text",
        "customer": "text",
        "due": "day",
        "withdrawn_on": "day",
    },
    "queue": {
        "job_row": "int!",
        "seq": "int!",
        "bar": "int!",
        "step": "text!",
        "position_mm": "real",
        "mark": "text",
        "part": "text",
        "heat": "text",
        "stock": "text",
        "location": "text",
        "material": "text!",
        "material_group": "text",
        "section": "text!",
        "area_mm2": "real!",
        "predicted_time_min": "real",
        "band_speed_m_min": "real",
        "feed_mm_min": "real",
        "pitch": "text",
        "started_at": "stamp",
        "cut_row": "int",
    },
    "remnants": {
        "saw": "text",
        "job_row": "int",
        "bar": "int",
        "material": "text",
        "section": "text",
        "length_mm": "real!",
        "heat": "text",
        "rack": "text",
        "racked_on": "day!",
        "note": "text",
    },
    "saw_notes": {"saw": "text!", "job_row": "int", "noted_on": "day!", "note": "text!"},
    "taps": {
        "tap": "text!",
        "saw": "text",
        "kind": "text!",
        "tapped_at": "stamp!",
        "said": "text",
        "cut_row": "int",
        "corrects_row": "int",
        "change": "text",
    },
}
# a reference column of the files -> (its id column in the log, the table it points into)
REFS = {"job_row": ("job_id", "jobs"), "cut_row": ("cut_id", "cuts"),
        "corrects_row": ("corrects", "taps")}  # fmt: skip

_SAW = "LEFT JOIN saws s ON s.id = x.saw_id"
EXPORT_SQL = {
    "jobs": f"SELECT x.*, s.name AS saw FROM jobs x {_SAW} ORDER BY x.id",
    "queue": "SELECT x.* FROM queue x ORDER BY x.id",
    "remnants": f"SELECT x.*, s.name AS saw FROM remnants x {_SAW} ORDER BY x.id",
    "saw_notes": f"SELECT x.*, s.name AS saw FROM saw_notes x {_SAW} ORDER BY x.id",
    "taps": f"SELECT x.*, s.name AS saw FROM taps x {_SAW} ORDER BY x.id",
}


# --- export --------------------------------------------------------------------------------------


def row_numbers(db: Database) -> dict[str, dict[int, int]]:
    """Each referenced table's row ids -> their row number in its file (1 = the first)."""
    sql = {"jobs": "SELECT id FROM jobs ORDER BY id", "cuts": "SELECT id FROM cuts ORDER BY id",
           "taps": "SELECT id FROM taps ORDER BY id"}  # fmt: skip
    return {t: {r[0]: n for n, r in enumerate(db.execute(q), start=1)} for t, q in sql.items()}


def export_rows(db: Database, table: str, numbers: dict[str, dict[int, int]]) -> list[dict]:
    """The rows of one station table with row numbers in place of row ids."""
    rows = db.query(EXPORT_SQL[table])
    for row in rows:
        for column, (id_column, target) in REFS.items():
            if column in COLUMNS[table]:
                found = row.get(id_column)
                row[column] = None if found is None else numbers[target][found]
    return rows


# --- import --------------------------------------------------------------------------------------


def check_stamp(text: str) -> str:
    """A date and time as the station writes them (ISO 8601), kept as typed."""
    try:
        dt.datetime.fromisoformat(text.strip())
    except ValueError:
        raise BadDataError(f"expected a date and time (ISO 8601), got {text!r}") from None
    return text.strip()


Row = tuple[int, dict[str, Any]]


def write_station(
    db: Database, parsed: dict[str, list[Row]], saws: dict, cut_ids: list[int]
) -> dict[str, int]:
    """Insert the station's rows of an import (inside its transaction); rows per table.

    ``saws``: lower-case saw name -> (row id, row); ``cut_ids``: the ids the
    import's cut rows were given, in the order of ``cuts.csv``.
    """
    from sawplan.store.dates import last_row_id

    counts: dict[str, int] = {}

    def insert(table: str, values_of, saw: bool | None, refs: dict) -> list[int]:
        """Check and insert one file's rows; the ids they were given, in file order.
        ``saw``: None, no saw column; else whether it is required."""
        after = last_row_id(db, table)
        rows = []
        for number, row in parsed[table]:
            where = (f"{table}.csv", number)
            values = _checked(where, values_of, row)
            if saw is not None:
                values["saw_id"] = _saw(where, row["saw"], saws, required=saw)
            for column, (ids, required) in refs.items():
                values[REFS[column][0]] = _ref(where, column, row, ids, required=required)
            rows.append(values)
        counts[table] = db.insert_many(table, rows)
        return new_ids(db, table, after)

    job_ids = insert("jobs", _values_of_job, True, {})
    insert(
        "queue", _values_of_queue, None, {"job_row": (job_ids, True), "cut_row": (cut_ids, False)}
    )
    insert("remnants", _values_of_remnant, False, {"job_row": (job_ids, False)})
    insert("saw_notes", _values_of_note, True, {"job_row": (job_ids, False)})
    seen = {r[0] for r in db.execute("SELECT tap FROM taps")}
    for number, row in parsed["taps"]:
        if row["tap"] in seen:
            raise _error(("taps.csv", number), "tap", f"tap {row['tap']} is already in the log")
        seen.add(row["tap"])
    tap_ids = insert("taps", _values_of_tap, False, {"cut_row": (cut_ids, False)})
    for (number, row), own in zip(parsed["taps"], tap_ids, strict=True):
        corrects = _ref(("taps.csv", number), "corrects_row", row, tap_ids)
        if corrects is not None:
            db.update("taps", own, {"corrects": corrects})
    _one_open_job_of_a_name(db)
    return counts


def new_ids(db: Database, table: str, after: int) -> list[int]:
    """The ids of the rows an import added to ``table`` (all above ``after``), in order."""
    from sawplan.store.schema import ident

    sql = f"SELECT id FROM {ident(table)} WHERE id > :after ORDER BY id"
    return [r[0] for r in db.execute(sql, {"after": after})]


def _values_of_job(row: dict[str, Any]) -> dict[str, Any]:
    from sawplan.store.station_rows import job_values

    keep = ("sent_on", "due", "withdrawn_on")
    return {**job_values(row["name"], row["file"], row["customer"]), **{k: row[k] for k in keep}}


def _values_of_queue(row: dict[str, Any]) -> dict[str, Any]:
    from sawplan.store.station_rows import queue_row

    return {**queue_row(row), "started_at": row["started_at"]}


def _values_of_remnant(row: dict[str, Any]) -> dict[str, Any]:
    from sawplan.store.station_rows import RemnantEntry, remnant_row

    keep = ("bar", "material", "section", "heat", "rack", "note")
    entry = RemnantEntry(length_mm=row["length_mm"], racked_on=row["racked_on"],
                         **{k: row[k] for k in keep})  # fmt: skip
    return remnant_row(entry)


def _values_of_note(row: dict[str, Any]) -> dict[str, Any]:
    from sawplan.store.station_rows import note_text

    return {"noted_on": row["noted_on"], "note": note_text(row["note"])}


def _values_of_tap(row: dict[str, Any]) -> dict[str, Any]:
    from sawplan.errors import UsageError
    from sawplan.store.station_rows import TAP_KEY, TAP_KINDS

    if not TAP_KEY.match(row["tap"]):
        raise UsageError("must be 32 hexadecimal digits (a tap key)", field="tap")
    if row["kind"] not in TAP_KINDS:
        raise UsageError(f"must be one of {', '.join(TAP_KINDS)}", field="kind")
    if row["change"] is not None:
        try:
            json.loads(row["change"])
        except ValueError:
            raise BadDataError("must be JSON text", field="change") from None
    keep = ("tap", "kind", "tapped_at", "said", "change")
    return {k: row[k] for k in keep}


def _checked(where: tuple[str, int], values_of, row: dict[str, Any]) -> dict[str, Any]:
    """The row's values through the station's own rules; a refusal names file, row, column."""
    try:
        return values_of(row)
    except SawplanError as err:
        raise _error(where, err.field or "row", err.message) from None


def _saw(where: tuple[str, int], name: str | None, saws: dict, *, required: bool = False):
    if name is None:
        if required:
            raise _error(where, "saw", "is required")
        return None
    if name.lower() not in saws:
        raise _error(where, "saw", f"no saw {name!r} in the log or in saws.csv")
    return saws[name.lower()][0]


def _ref(
    where: tuple[str, int], column: str, row: dict, ids: list[int], *, required: bool = False
) -> int | None:
    """The new row id a row number of another file stands for."""
    number = row[column]
    if number is None:
        if required:
            raise _error(where, column, "is required")
        return None
    if not 1 <= number <= len(ids):
        target = REFS[column][1]
        raise _error(where, column, f"there is no row {number} in {target}.csv")
    return ids[number - 1]


def _one_open_job_of_a_name(db: Database) -> None:
    """As ``plan --send``: one open job of a name at a saw (the import's and the log's)."""
    twice = db.query(
        "SELECT s.name AS saw, MIN(j.name) AS name FROM jobs j JOIN saws s ON s.id = j.saw_id "
        "WHERE j.withdrawn_on IS NULL AND EXISTS "
        "(SELECT 1 FROM queue q WHERE q.job_id = j.id AND q.cut_id IS NULL) "
        "GROUP BY s.name, lower(j.name) HAVING COUNT(*) > 1 LIMIT 1"
    )
    if twice:
        raise BadDataError(
            f"job {twice[0]['name']!r} would be open twice in the queue of {twice[0]['saw']}",
            field="jobs.csv",
        )


def _error(where: tuple[str, int], column: str, message: str) -> BadDataError:
    from sawplan.store.exchange import _row_error

    return _row_error(*where, column, message)
