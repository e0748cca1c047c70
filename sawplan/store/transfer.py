"""``sawplan db copy``: a whole log from one place to another, verified table by table.

Either side may be a SQLite file or a PostgreSQL database.  The target must
be a new file or an empty database (``replace`` empties it first, inside the
same transaction, for ``sawplan restore --force``).  Rows keep their ids, so
every reference and every export stays the same; PostgreSQL's id sequences
are moved past the copied rows.  The whole copy is one transaction on the
target: all of it or none.

Afterwards each table is read back from the target and compared with what
was read from the source: the row count and a SHA-256 checksum over every
row in id order (each value in a canonical text: integers as digits, floats
by their shortest exact repr, text as it is, NULL as null).
"""

from __future__ import annotations

import hashlib
import json
import os
from collections.abc import Iterator
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan.errors import ConflictError, NotFoundError, StorageError, UsageError
from sawplan.store.db import connect, read_snapshot, refresh_statistics, resolve_db, run_write
from sawplan.store.location import LogLocation
from sawplan.store.schema import ALL_TABLES, ident, metadata

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log

PAGE = 5000


@dataclass(frozen=True)
class TableCopy:
    table: str
    rows: int
    checksum: str  # SHA-256 of the table's rows, hex


@dataclass(frozen=True)
class CopyResult:
    source: str
    target: str
    tables: tuple[TableCopy, ...]


def columns_of(table: str) -> list[str]:
    return [c.name for c in metadata().tables[table].columns]


def pages(db: Log, table: str) -> Iterator[list[dict[str, Any]]]:
    """A table's rows in id order, a page at a time (the same on both engines)."""
    sql = (
        f"SELECT {', '.join(ident(c) for c in columns_of(table))} FROM {ident(table)} "
        "WHERE id > :after ORDER BY id LIMIT :n"
    )
    after = 0
    while True:
        rows = db.query(sql, {"after": after, "n": PAGE})
        if not rows:
            return
        yield rows
        after = rows[-1]["id"]


class Digest:
    """Count and SHA-256 of rows fed in order."""

    def __init__(self, table: str) -> None:
        self.table = table
        self.columns = columns_of(table)
        self.rows = 0
        self._hash = hashlib.sha256()

    def feed(self, rows: list[dict[str, Any]]) -> None:
        for row in rows:
            values = [row[c] for c in self.columns]
            self._hash.update(json.dumps(values, ensure_ascii=False).encode("utf-8") + b"\n")
        self.rows += len(rows)

    def result(self) -> TableCopy:
        return TableCopy(self.table, self.rows, self._hash.hexdigest())


def table_digests(db: Log) -> tuple[TableCopy, ...]:
    """Count and checksum of every table, read in one snapshot."""
    out = []
    with read_snapshot(db):
        for table in ALL_TABLES:
            digest = Digest(table)
            for rows in pages(db, table):
                digest.feed(rows)
            out.append(digest.result())
    return tuple(out)


def row_total(db: Log) -> int:
    return sum(int(db.scalar(f"SELECT COUNT(*) FROM {ident(t)}")) for t in ALL_TABLES)


def copy_log(
    source: str | os.PathLike[str] | LogLocation,
    target: str | os.PathLike[str] | LogLocation,
    *,
    replace: bool = False,
) -> CopyResult:
    """Copy every row of ``source`` into the empty log ``target``; verify counts and checksums."""
    src, dst = resolve_db(source), resolve_db(target)
    if src.kind == "sqlite" and src.path is not None and not src.path.is_file():
        raise NotFoundError(f"no blade log at {src.label}", field="from")
    if _same(src, dst):
        raise UsageError("--from and --to name the same log", field="to")
    with connect(src, create=False) as reader, connect(dst) as writer:
        if not replace and row_total(writer) > 0:
            raise ConflictError(
                f"{dst.label} already holds a log",
                field="to",
                hint="copy into a new file or an empty database",
            )
        with read_snapshot(reader):
            read = run_write(writer, lambda: _copy_rows(reader, writer, replace=replace))
        refresh_statistics(writer, {copied.table: copied.rows for copied in read})
        landed = table_digests(writer)
    for expected, got in zip(read, landed, strict=True):
        if expected != got:
            raise StorageError(
                f"the copy of {expected.table} in {dst.label} differs from {src.label} "
                f"({got.rows} rows, {expected.rows} expected)",
                field="to",
                hint="the target kept what it got; check it, then copy into an empty log again",
            )
    return CopyResult(src.label, dst.label, landed)


def _copy_rows(reader: Log, writer: Log, *, replace: bool) -> tuple[TableCopy, ...]:
    if replace:
        for table in reversed(ALL_TABLES):
            writer.execute(f"DELETE FROM {ident(table)}")
    digests = []
    for table in ALL_TABLES:
        digest = Digest(table)
        for rows in pages(reader, table):
            writer.insert_many(table, rows)
            digest.feed(rows)
        digests.append(digest.result())
    if writer.dialect == "postgresql":
        for table in ALL_TABLES:  # new rows continue after the copied ids
            writer.execute(
                f"SELECT setval(pg_get_serial_sequence(:t, 'id'), "
                f"COALESCE((SELECT MAX(id) FROM {ident(table)}), 0) + 1, false)",
                {"t": table},
            )
    return tuple(digests)


def _same(a: LogLocation, b: LogLocation) -> bool:
    if a.kind == "sqlite" and b.kind == "sqlite" and a.path and b.path:
        return a.path.expanduser().resolve() == b.path.expanduser().resolve()
    return a.kind == b.kind == "postgresql" and a.url == b.url
