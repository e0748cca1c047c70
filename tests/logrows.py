"""Reading a blade log's rows straight through the engine's own driver (never through sawplan).

``snapshot(db)`` takes what ``--db`` takes (a file path or a ``postgresql://``
URL) and returns every table's rows in id order, so a test can say "nothing
changed" or "these rows arrived" without trusting the code under test.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path
from typing import Any

SKIP = ("sqlite_sequence", "sqlite_stat1")


def is_server(db: str | Path) -> bool:
    return str(db).startswith(("postgresql://", "postgres://"))


def snapshot(db: str | Path) -> dict[str, list[tuple[Any, ...]]]:
    """Every table's rows (``id`` order when the table has one); {} for a missing file."""
    if is_server(db):
        import psycopg

        with psycopg.connect(str(db)) as conn:
            tables = [
                r[0]
                for r in conn.execute(
                    "SELECT table_name FROM information_schema.tables "
                    "WHERE table_schema = current_schema() ORDER BY table_name"
                )
            ]
            return {t: _rows(conn, t) for t in tables}
    path = Path(db)
    if not path.exists():
        return {}
    conn = sqlite3.connect(path)
    try:
        tables = [
            r[0]
            for r in conn.execute(
                "SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name"
            )
            if r[0] not in SKIP
        ]
        return {t: _rows(conn, t) for t in tables}
    finally:
        conn.close()


def _rows(conn: Any, table: str) -> list[tuple[Any, ...]]:
    cursor = conn.execute(f'SELECT * FROM "{table}"')
    names = [d[0] for d in cursor.description]
    rows = [tuple(r) for r in cursor.fetchall()]
    return sorted(rows, key=lambda r: r[names.index("id")]) if "id" in names else sorted(rows)


def count(db: str | Path, table: str) -> int:
    return len(snapshot(db).get(table, []))


def execute(db: str | Path, sql: str) -> None:
    """Run one statement straight through the driver (to plant a fault)."""
    if is_server(db):
        import psycopg

        with psycopg.connect(str(db), autocommit=True) as conn:
            conn.execute(sql)
        return
    conn = sqlite3.connect(db)
    try:
        conn.execute(sql)
        conn.commit()
    finally:
        conn.close()


def column(db: str | Path, table: str, name: str) -> list[Any]:
    """One column of a table, in id order."""
    sql = f'SELECT "{name}" FROM "{table}" ORDER BY id'
    if is_server(db):
        import psycopg

        with psycopg.connect(str(db)) as conn:
            return [r[0] for r in conn.execute(sql)]
    conn = sqlite3.connect(db)
    try:
        return [r[0] for r in conn.execute(sql)]
    finally:
        conn.close()
