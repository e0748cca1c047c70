"""Keeping years of shop records safe: integrity checks and rolling backups.

- A routine ``PRAGMA quick_check`` runs on about one opening for writing in
  ``ROUTINE_CHECK_ONE_IN`` (chosen at random, so no counter has to be written
  to the log), always before a schema upgrade, on every backup copy, and
  whenever SQLite itself reports corruption.  A damaged log is refused before
  anything is written to it, and the message names the newest backup.
- Before each schema upgrade the log is copied with SQLite's online backup
  into ``backups/`` beside it, as ``<name>-schema<N>-<time>.sqlite``; the
  newest ``BACKUPS_KEPT`` copies of each log are kept.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import os
import random
import sqlite3
from pathlib import Path

from sawplan.errors import DamagedFileError, StorageError

ROUTINE_CHECK_ONE_IN = 25  # quick_check reads the whole file: a few ms per MB
BACKUPS_KEPT = 3
BACKUP_FOLDER = "backups"
_PROBLEMS_SHOWN = 3


def routine_check_due() -> bool:
    """True on about one call in ``ROUTINE_CHECK_ONE_IN`` (1: every time)."""
    return ROUTINE_CHECK_ONE_IN <= 1 or random.randrange(ROUTINE_CHECK_ONE_IN) == 0


def integrity_problems(conn: sqlite3.Connection) -> list[str]:
    """What ``PRAGMA quick_check`` finds (empty: the file is sound)."""
    try:
        rows = conn.execute(f"PRAGMA quick_check({_PROBLEMS_SHOWN})").fetchall()
    except sqlite3.DatabaseError as err:
        if "locked" in str(err).lower() or "busy" in str(err).lower():
            raise
        return [" ".join(str(err).split())]
    found = [line.strip() for r in rows for line in str(r[0]).splitlines() if line.strip()]
    if found == ["ok"]:
        return []
    return [f for f in found if not f.startswith("***")] or found  # "*** in database main ***"


def check_integrity(conn: sqlite3.Connection, path: Path) -> None:
    """Refuse a damaged log before anything is written to it."""
    problems = integrity_problems(conn)
    if problems:
        raise DamagedFileError(
            f"{path} is damaged (SQLite's check: {problems[0][:80]}); nothing was written",
            field="db",
            hint=restore_hint(path),
        )


def backups_dir(log: Path) -> Path:
    """The folder of automatic backups: ``backups/`` beside the log."""
    return log.parent / BACKUP_FOLDER


def backups_of(log: Path) -> list[Path]:
    """This log's automatic backups, oldest first (their names sort by time)."""
    folder = backups_dir(log)
    try:
        found = [p for p in folder.glob(f"{log.stem}-schema*.sqlite") if p.is_file()]
    except OSError:
        return []
    return sorted(found, key=lambda p: p.name)


def newest_backup(log: Path) -> Path | None:
    found = backups_of(log)
    return found[-1] if found else None


def restore_hint(log: Path | None) -> str:
    """What to do about a damaged log, naming the newest backup when there is one."""
    if log is None:
        return "restore a backup made with `sawplan backup`"
    newest = newest_backup(log)
    if newest is not None:
        return (
            f"restore the newest backup: copy {newest} over {log.name} "
            "(or a newer copy made with `sawplan backup`)"
        )
    return (
        f"restore your newest copy made with `sawplan backup` over {log.name} "
        f"(no automatic backups in {backups_dir(log)})"
    )


def backup_before_upgrade(log: Path, *, from_version: int) -> Path:
    """Copy the log into ``backups/`` before its schema changes; keep the newest few.

    Called with the write lock held, so the copy (read through a second
    connection, as WAL allows) is exactly the log being upgraded.  Any failure
    is a ``StorageError`` and the upgrade does not happen.
    """
    folder = backups_dir(log)
    stamp = dt.datetime.now().strftime("%Y%m%d-%H%M%S-%f")
    target = folder / f"{log.stem}-schema{from_version}-{stamp}.sqlite"
    try:
        folder.mkdir(parents=True, exist_ok=True)
        copy_verified(log, target)
    except (OSError, sqlite3.Error) as err:
        raise StorageError(
            f"could not back up {log} into {folder} before upgrading it "
            f"({' '.join(str(err).split())}); nothing was changed",
            field="db",
            hint="free some space or make the folder writable, then try again",
        ) from None
    for old in backups_of(log)[:-BACKUPS_KEPT]:
        with contextlib.suppress(OSError):
            old.unlink()
    return target


def copy_verified(source: Path, target: Path) -> int:
    """A consistent one-file copy of ``source``, checked, then renamed into place.

    Uses SQLite's online backup (other programs may keep writing); the copy
    is written beside ``target`` and renamed only when complete and sound.
    Returns its size in bytes.
    """
    tmp = target.with_name(target.name + ".partial")
    tmp.unlink(missing_ok=True)
    src = sqlite3.connect(source, timeout=30.0)
    try:
        out = sqlite3.connect(tmp)
        try:
            src.backup(out)
            out.execute("PRAGMA journal_mode = DELETE")  # one file, no -wal beside it
            problems = integrity_problems(out)
        finally:
            out.close()
        if problems:
            raise DamagedFileError(
                f"{source} is damaged (SQLite's check of its copy: {problems[0][:80]}); "
                "no backup was written",
                field="db",
                hint=restore_hint(source),
            )
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    finally:
        src.close()
    return target.stat().st_size
