"""Ways to damage a copy of a blade log, for the damage tests and bench/damage_pass.py.

Every damage is made on the bytes of the file, as a failing disk, a bad copy
or another program would make it, never through SQLite.  The page layout read
here is SQLite's documented file format (https://www.sqlite.org/fileformat2.html):
the 100-byte header on page 1, a b-tree page's header (type byte, cell count
at offset 3, the cell pointer array after an 8- or 12-byte header), cells of
an index leaf (payload size varint, then the record: header size varint,
serial types, values).
"""

from __future__ import annotations

import shutil
import sqlite3
import struct
from pathlib import Path

INDEX_LEAF, TABLE_LEAF, INDEX_INTERIOR = 10, 13, 2
_WIDTH = {0: 0, 1: 1, 2: 2, 3: 3, 4: 4, 5: 6, 6: 8, 7: 8, 8: 0, 9: 0}


def settle(path: Path) -> None:
    """Fold the -wal into the file, so the bytes on disk are the whole log."""
    conn = sqlite3.connect(path)
    try:
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        conn.execute("PRAGMA journal_mode = DELETE")
    finally:
        conn.close()
    conn = sqlite3.connect(path)
    try:
        conn.execute("PRAGMA journal_mode = WAL")  # as sawplan leaves it
    finally:
        conn.close()


def copy_log(source: Path, target: Path) -> Path:
    target.parent.mkdir(parents=True, exist_ok=True)
    shutil.copy(source, target)
    settle(target)
    return target


def outside_check(path: Path) -> str:
    """SQLite's full check of the file from outside sawplan: "ok" or what it found."""
    try:
        conn = sqlite3.connect(f"file:{path}?mode=ro", uri=True)
        try:
            return str(conn.execute("PRAGMA integrity_check").fetchone()[0])
        finally:
            conn.close()
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:  # a message quoting garbage
        return str(err)


def page_size(path: Path) -> int:
    return struct.unpack(">H", path.read_bytes()[16:18])[0]


def overwrite(path: Path, offset: int, data: bytes) -> None:
    with path.open("r+b") as handle:
        handle.seek(offset)
        handle.write(data)


def root_page(path: Path, name: str) -> int:
    conn = sqlite3.connect(path)
    try:
        return int(conn.execute("SELECT rootpage FROM sqlite_master WHERE name = ?", (name,))
                   .fetchone()[0])  # fmt: skip
    finally:
        conn.close()


def pages_of(path: Path, kind: int) -> list[int]:
    """Page numbers (from 2) whose b-tree type byte is ``kind``."""
    data = path.read_bytes()
    size = page_size(path)
    return [n for n in range(2, len(data) // size + 1) if data[(n - 1) * size] == kind]


def _varint(data: bytes, at: int) -> tuple[int, int]:
    value = 0
    for k in range(9):
        byte = data[at + k]
        if k == 8:
            return (value << 8) | byte, at + 9
        value = (value << 7) | (byte & 0x7F)
        if byte < 0x80:
            return value, at + k + 1
    raise AssertionError("unreachable")  # pragma: no cover


def index_cells(path: Path, page: int) -> list[list[tuple[int, int, int]]]:
    """The records of an index leaf page: for each cell, (offset, serial type, value) per column."""
    data = path.read_bytes()
    size = page_size(path)
    base = (page - 1) * size
    assert data[base] == INDEX_LEAF, f"page {page} is not an index leaf"
    count = struct.unpack(">H", data[base + 3 : base + 5])[0]
    cells = []
    for c in range(count):
        at = base + struct.unpack(">H", data[base + 8 + 2 * c : base + 10 + 2 * c])[0]
        _payload, at = _varint(data, at)
        header, start = _varint(data, at)
        types, k = [], start
        while k < at + header:
            t, k = _varint(data, k)
            types.append(t)
        values, k = [], at + header
        for t in types:
            width = _WIDTH.get(t, (t - 12) // 2 if t >= 12 else 0)
            value = int.from_bytes(data[k : k + width], "big") if t in (1, 2, 3, 4) else -1
            values.append((k, t, value))
            k += width
        cells.append(values)
    return cells


def move_index_row(path: Path, index: str = "idx_cuts_blade_id") -> tuple[int, int]:
    """Change one index row's key to the next key (a blade's cut filed under the next
    blade): the table and its pages stay well formed, so ``quick_check`` passes while
    ``integrity_check`` finds the row missing from the index, and a read that uses the
    index counts the cut on the wrong blade (the first such row is taken).
    Returns (old key, new key)."""
    pages = _pages_of_index(path, index)
    original = path.read_bytes()
    for page in sorted(pages & set(pages_of(path, INDEX_LEAF))):
        cells = index_cells(path, page)
        for here, after in zip(cells[1:-1], cells[2:], strict=False):
            (at, kind, key), (_a, next_kind, next_key) = here[0], after[0]
            if not (kind == 1 == next_kind and next_key == key + 1):
                continue
            overwrite(path, at, bytes([key + 1]))
            if _read_wrong(path, key + 1):
                return key, key + 1
            path.write_bytes(original)
    raise AssertionError(f"no row of {index} to move")


def _read_wrong(path: Path, key: int) -> bool:
    """quick_check passes, and the index counts one cut more for ``key`` than the table."""
    conn = sqlite3.connect(f"file:{path}?mode=ro", uri=True)
    try:
        if conn.execute("PRAGMA quick_check").fetchall() != [("ok",)]:
            return False
        by_index = conn.execute(
            "SELECT COUNT(*) FROM cuts INDEXED BY idx_cuts_blade_id WHERE blade_id = ?", (key,)
        )
        by_table = conn.execute("SELECT COUNT(*) FROM cuts NOT INDEXED WHERE blade_id = ?", (key,))
        return by_index.fetchone()[0] == by_table.fetchone()[0] + 1
    finally:
        conn.close()


def _pages_of_index(path: Path, index: str) -> set[int]:
    """The pages of one index's b-tree (root and below), read from its interior pages."""
    data = path.read_bytes()
    size = page_size(path)
    found, todo = set(), [root_page(path, index)]
    while todo:
        page = todo.pop()
        found.add(page)
        base = (page - 1) * size
        if data[base] != INDEX_INTERIOR:
            continue
        count = struct.unpack(">H", data[base + 3 : base + 5])[0]
        todo.append(struct.unpack(">I", data[base + 8 : base + 12])[0])  # the right-most child
        for c in range(count):
            at = base + struct.unpack(">H", data[base + 12 + 2 * c : base + 14 + 2 * c])[0]
            todo.append(struct.unpack(">I", data[at : at + 4])[0])
    return found


def break_table_page(path: Path, table: str = "cuts", length: int = 20) -> int:
    """Overwrite ``length`` bytes at the start of one of ``table``'s leaf pages (its header and
    cell pointers).  Returns the page."""
    size = page_size(path)
    leaves = [p for p in pages_of(path, TABLE_LEAF) if p > root_page(path, table)]
    page = leaves[len(leaves) // 2]
    overwrite(path, (page - 1) * size, bytes((i * 37 + 11) % 256 for i in range(length)))
    return page


def break_header(path: Path, what: str) -> None:
    """Damage page 1's 100-byte header: the magic text, the page size or the application id."""
    offset, data = {
        "magic": (0, b"SQLite formut 3\x00"),
        "page size": (16, b"\x03\x07"),
        "application id": (68, b"\x00\x00\x12\x34"),
    }[what]
    overwrite(path, offset, data)


def break_schema(path: Path, table: str = "cuts") -> None:
    """Make the stored CREATE statement of ``table`` unreadable (same length, so the
    record stays well formed): SQLite then refuses the whole schema."""
    data = path.read_bytes()
    needle = f"CREATE TABLE {table} (".encode()
    at = data.find(needle)
    assert at > 0, f"no CREATE TABLE {table} in the file"
    overwrite(path, at, f"CREATE TABLE {table} )".encode())


def garble_schema(path: Path, table: str = "queue") -> None:
    """Put a byte that is not UTF-8 into a column type of ``table``'s stored CREATE
    statement: SQLite's complaint then quotes it, and its driver cannot decode the message."""
    data = path.read_bytes()
    at = data.find(b"INTEGER NOT NULL", data.find(f"CREATE TABLE {table} (".encode()))
    assert at > 0
    overwrite(path, at + 1, b"\xae")
