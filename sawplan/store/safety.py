"""Keeping years of shop records safe: damage checks, rolling backups, leftovers.

- Every opening of a log file, for reading or writing, checks it before any
  row is read or written (``open_check``), once per state of the file per
  process (its size, time and inode, and its ``-wal``'s), so a command that
  opens the log again, or the station on every request, pays once:

  ================  ===========================================================
  log (with -wal)   check at each opening
  ================  ===========================================================
  up to 4 MB        ``PRAGMA integrity_check`` (every page, record and index row
                    against its table; about 4 ms per MB)
  4 to 32 MB        ``PRAGMA quick_check`` (pages and records, not indexes:
                    about 1.5 ms per MB); one opening in 25 the full check
  over 32 MB        one opening in 25 the full check; the others none
  ================  ===========================================================

  A log damage was seen in before is refused by every command but ``check``
  and ``restore`` (the marker ``<log>.damaged``, left by any command that met
  damage, until a backup is restored or ``sawplan check`` finds the file
  sound).  A damaged log is never written to: the command exits 6 and names
  the newest backup that passes the full check.
- What no check can find: SQLite keeps no checksums, so a changed byte inside
  a stored value (a digit of an area, a letter of a note) that leaves the
  record well formed, in an unindexed column, reads back as the changed value.
  Only a backup compared with the log shows it.
- The full check also runs on ``sawplan check``, before every schema upgrade
  and inside every import, before it commits.
- Before each schema upgrade the log is copied with SQLite's online backup
  into ``backups/`` beside it, as ``<name>-schema<N>-<time>.sqlite``; the
  newest ``BACKUPS_KEPT`` copies of each log are kept.  A copy is written as
  ``*.partial`` and renamed when complete and sound; partial files left by a
  killed run are removed by the next one and never count as backups.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import os
import random
import sqlite3
from pathlib import Path

from sawplan.errors import DamagedFileError, StorageError

ROUTINE_CHECK_ONE_IN = 25  # logs over FULL_CHECK_MAX_BYTES: one opening in 25 is checked in full
FULL_CHECK_MAX_BYTES = 4_000_000  # about 30,000 cut entries; integrity_check reads it in ~15 ms
QUICK_CHECK_MAX_BYTES = 32_000_000  # about 250,000 cut entries; quick_check reads it in ~35 ms
BACKUPS_KEPT = 3
BACKUP_FOLDER = "backups"
PARTIAL = ".partial"
DAMAGE_MARK = ".damaged"


def routine_check_due() -> bool:
    """True on about one call in ``ROUTINE_CHECK_ONE_IN`` (1: every time)."""
    return ROUTINE_CHECK_ONE_IN <= 1 or random.randrange(ROUTINE_CHECK_ONE_IN) == 0


def integrity_problems(conn: sqlite3.Connection, *, full: bool = False) -> list[str]:
    """What SQLite's check finds (empty: the file is sound).

    ``full``: ``integrity_check``, which also compares every index with its
    table; otherwise ``quick_check`` (page structure and records only).
    """
    pragma = "PRAGMA integrity_check(3)" if full else "PRAGMA quick_check(3)"  # 3 problems shown
    try:
        rows = conn.execute(pragma).fetchall()
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:
        if "locked" in str(err).lower() or "busy" in str(err).lower():
            raise
        from sawplan.store.engine import sqlite_words

        return [sqlite_words(err)]
    found = [line.strip() for r in rows for line in str(r[0]).splitlines() if line.strip()]
    if found == ["ok"]:
        return []
    return [f for f in found if not f.startswith("***")] or found  # "*** in database main ***"


def check_integrity(conn: sqlite3.Connection, path: Path, *, full: bool = False) -> None:
    """Refuse a damaged log before anything is written to it (and remember the damage)."""
    problems = integrity_problems(conn, full=full)
    if problems:
        mark_damaged(path, problems[0])
        raise damaged(path, f"SQLite's check: {problems[0][:80]}")


def refuse_known_damage(path: Path) -> None:
    """Refuse a log that a command found damaged, until it is restored or checked sound."""
    mark = damage_mark(path)
    if mark.exists():
        raise damaged(path, f"damage was found earlier: {_read_mark(mark)}")


# per log file, the last state this process found sound and the check it passed
_CHECKED: dict[str, tuple[tuple, str]] = {}


def file_state(path: Path) -> tuple:
    """What changes whenever the log or its ``-wal`` is written, by anyone (an empty
    ``-wal``, which every opening makes and the last closing removes, is no change)."""
    parts: list[object] = [str(path)]
    for part in (path, Path(f"{path}-wal")):
        try:
            st = os.stat(part)
        except OSError:
            st = None
        keep = st is not None and (st.st_size > 0 or part == path)
        parts.append((st.st_dev, st.st_ino, st.st_size, st.st_mtime_ns) if keep else None)
    return tuple(parts)


def check_due(size: int) -> str | None:
    """Which check an opening of a log of ``size`` bytes makes: "full", "quick" or None."""
    if size <= FULL_CHECK_MAX_BYTES or routine_check_due():
        return "full"
    return "quick" if size <= QUICK_CHECK_MAX_BYTES else None


def open_check(conn: sqlite3.Connection, path: Path) -> None:
    """The check every opening of a log file makes (see the table above): no known
    damage, then SQLite's check of the file, once per state of the file."""
    refuse_known_damage(path)
    state, due = _due(path)
    if due is not None:
        check_integrity(conn, path, full=due == "full")
        _CHECKED[state[0]] = (state, due)


def check_file_again(path: Path) -> None:
    """``open_check`` for a log kept open (the station): a file changed since its last
    check is checked through a new connection, which reads the file as it is now (a
    connection kept open may hold pages it read before the file changed)."""
    refuse_known_damage(path)
    if _due(path)[1] is None:
        return
    conn = sqlite3.connect(f"file:{path.resolve()}?mode=ro", uri=True, timeout=30.0)
    try:
        open_check(conn, path)
    finally:
        conn.close()


def _due(path: Path) -> tuple[tuple, str | None]:
    """The file's state now, and the check it is due (None: none, or done already)."""
    state = file_state(path)
    seen, done = _CHECKED.get(state[0], ((), ""))
    if seen != state:
        done = ""
    if done == "full":
        return state, None
    size = sum(part[2] for part in state[1:] if part is not None)  # type: ignore[index]
    due = check_due(size)
    return state, None if due == done else due


def damaged(path: Path | None, what: str) -> DamagedFileError:
    return DamagedFileError(
        f"{path} is damaged ({what}); nothing was written",
        field="db",
        hint=restore_hint(path),
    )


def damage_mark(log: Path) -> Path:
    return log.with_name(log.name + DAMAGE_MARK)


def mark_damaged(log: Path | None, what: str) -> None:
    """Remember that ``log`` is damaged, so no later write trusts it until it is restored."""
    if log is None:
        return
    with contextlib.suppress(OSError):
        damage_mark(log).write_text(f"{what[:200]}\n", encoding="utf-8")


def clear_damage_mark(log: Path) -> None:
    with contextlib.suppress(OSError):
        damage_mark(log).unlink()


def _read_mark(mark: Path) -> str:
    try:
        text = " ".join(mark.read_text(encoding="utf-8", errors="replace").split())
    except OSError:
        text = ""
    return text[:80] or "see `sawplan check`"


# --- backups ---------------------------------------------------------------------------


def backups_dir(log: Path) -> Path:
    """The folder of automatic backups: ``backups/`` beside the log."""
    return log.parent / BACKUP_FOLDER


def backups_of(log: Path) -> list[Path]:
    """This log's automatic backups, oldest first (their names sort by time); never partials."""
    folder = backups_dir(log)
    try:
        found = [p for p in folder.glob(f"{log.stem}-schema*.sqlite") if p.is_file()]
    except OSError:
        return []
    return sorted(found, key=lambda p: p.name)


def newest_backup(log: Path) -> Path | None:
    found = backups_of(log)
    return found[-1] if found else None


def newest_good_backup(log: Path) -> Path | None:
    """The newest automatic backup that is a sawplan log and passes SQLite's full check."""
    for candidate in reversed(backups_of(log)):
        if sound_file(candidate):
            return candidate
    return None


def sound_file(path: Path) -> bool:
    """Is ``path`` a sawplan log that passes SQLite's full check (read-only, nothing written)?"""
    from sawplan.store.schema import APPLICATION_ID

    try:
        conn = sqlite3.connect(f"file:{path.resolve()}?mode=ro", uri=True, timeout=5.0)
    except sqlite3.Error:
        return False
    try:
        if conn.execute("PRAGMA application_id").fetchone()[0] != APPLICATION_ID:
            return False
        return not integrity_problems(conn, full=True)
    except (sqlite3.Error, UnicodeDecodeError):
        return False
    finally:
        conn.close()


def restore_hint(log: Path | None) -> str:
    """What to do about a damaged log, naming the newest good backup when there is one."""
    if log is None:
        return "restore a backup made with `sawplan backup`"
    newest = newest_good_backup(log)
    if newest is not None:
        return f"restore the newest good backup {newest}: sawplan restore --force --db {log}"
    return (
        f"restore your newest copy made with `sawplan backup`: sawplan restore FILE --force "
        f"--db {log} (no sound automatic backups beside it)"
    )


def backup_before_upgrade(log: Path, *, from_version: int) -> Path:
    """Copy the log into ``backups/`` before its schema changes; keep the newest few.

    Called with the write lock held, so the copy (read through a second
    connection, as WAL allows) is exactly the log being upgraded, and no
    other upgrade of this log runs: partial copies left in the folder by a
    killed upgrade are removed first.  Any failure is a ``StorageError`` and
    the upgrade does not happen.
    """
    from sawplan.store.perms import make_folder

    folder = backups_dir(log)
    stamp = dt.datetime.now().strftime("%Y%m%d-%H%M%S-%f")
    target = folder / f"{log.stem}-schema{from_version}-{stamp}.sqlite"
    try:
        make_folder(folder)
        remove_partials(folder, f"{log.stem}-schema*")
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


def partial_of(target: Path) -> Path:
    return target.with_name(target.name + PARTIAL)


def remove_partials(folder: Path, pattern: str) -> list[Path]:
    """Delete ``pattern*.partial`` files (and their journals) left by killed runs."""
    gone = []
    with contextlib.suppress(OSError):
        for leftover in folder.glob(f"{pattern}{PARTIAL}*"):
            with contextlib.suppress(OSError):
                leftover.unlink()
                gone.append(leftover)
    return gone


def remove_partial(target: Path) -> None:
    """Delete the partial copy of ``target`` and the journal files SQLite kept beside it."""
    tmp = partial_of(target)
    for suffix in ("", "-journal", "-wal", "-shm"):
        with contextlib.suppress(OSError):
            Path(f"{tmp}{suffix}").unlink()


def copy_verified(source: Path, target: Path) -> int:
    """A consistent one-file copy of ``source``, checked, then renamed into place.

    Uses SQLite's online backup (other programs may keep writing); the copy
    is written beside ``target`` as ``*.partial`` through ``sawplan.outputs.staged``
    (a partial left by a killed run is removed first) and renamed only when
    complete and sound.  Returns its size in bytes.
    """
    from sawplan.outputs import staged
    from sawplan.store.perms import file_mode

    src = sqlite3.connect(source, timeout=30.0)
    try:
        with staged(target, mode=file_mode()) as tmp:  # exclusive, locked; removed on failure
            out = sqlite3.connect(tmp)
            try:
                src.backup(out)
                out.execute("PRAGMA journal_mode = DELETE")  # one file, no -wal beside it
                problems = integrity_problems(out, full=True)
            finally:
                out.close()
            if problems:
                raise DamagedFileError(
                    f"{source} is damaged (SQLite's check of its copy: {problems[0][:80]}); "
                    "no backup was written",
                    field="db",
                    hint=restore_hint(source),
                )
    finally:
        src.close()
    return target.stat().st_size
