"""Who may read the blade log: its owner only, unless the shop shares it.

On POSIX systems a log folder sawplan creates is made 0700, and the log
file, its backups and the copies ``sawplan backup`` writes 0600, whatever the
umask says; SQLite gives the ``-wal``, ``-shm`` and journal files the mode of
the log itself.  A shop that shares one log file between several user
accounts sets ``log_mode`` in the config file (or ``SAWPLAN_LOG_MODE``), e.g.
``0660`` for the owner and the group; folders then get the matching search
bits (``0770``).  Existing files are never loosened or tightened behind the
user's back: ``sawplan check`` reports a log readable by others.
"""

from __future__ import annotations

import contextlib
import os
import stat
from pathlib import Path

from sawplan.errors import BadDataError, StorageError

ENV_VAR = "SAWPLAN_LOG_MODE"
PRIVATE = 0o600
WORDS = {"private": 0o600, "group": 0o660, "everyone": 0o666}
POSIX = os.name == "posix"


def file_mode() -> int:
    """The mode for new log files: 0600, or the shop's ``log_mode`` (a word or octal)."""
    try:
        from sawplan import config  # the config file knows log_mode (env, file, default)
    except ImportError:
        return _mode_from(os.environ.get(ENV_VAR))
    return int(config.log_file_mode())


def _mode_from(text: str | None) -> int:
    if text is None or not text.strip():
        return PRIVATE
    word = text.strip().lower()
    if word in WORDS:
        return WORDS[word]
    if len(word) in (3, 4) and all(c in "01234567" for c in word):
        mode = int(word, 8)
        if mode & 0o600 == 0o600 and not mode & ~0o666:
            return mode
    raise BadDataError(
        f"expected private, group, everyone or an octal file mode such as 0640 (the owner "
        f"must read and write; no execute bits), got {text!r}",
        field=f"env {ENV_VAR} (log_mode)",
    )


def folder_mode(mode: int | None = None) -> int:
    """The folder mode that goes with a file mode: each read bit gets its search bit."""
    mode = file_mode() if mode is None else mode
    return mode | ((mode & 0o444) >> 2)


def make_folder(folder: Path) -> None:
    """Create ``folder`` and any missing parents with the log's folder mode."""
    missing = []
    here = folder
    while not here.exists():
        missing.append(here)
        if here.parent == here:
            break
        here = here.parent
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise StorageError(
            f"cannot create the folder {folder}: {err.strerror or err}", field="db"
        ) from None
    if POSIX:
        for created in reversed(missing):
            with contextlib.suppress(OSError):
                created.chmod(folder_mode())


def create_log_file(path: Path) -> None:
    """Create an empty log file with the log's mode (a file made meanwhile is left alone)."""
    make_folder(path.parent)
    try:
        handle = os.open(path, os.O_CREAT | os.O_EXCL | os.O_WRONLY, file_mode())
    except FileExistsError:
        return
    except OSError as err:
        raise StorageError(f"cannot create {path}: {err.strerror or err}", field="db") from None
    try:
        if POSIX:
            os.fchmod(handle, file_mode())
    finally:
        os.close(handle)


def secure(path: Path) -> None:
    """Give a file sawplan wrote (a backup, a copy) the log's mode."""
    if POSIX:
        with contextlib.suppress(OSError):
            path.chmod(file_mode())


def too_open(path: Path) -> str | None:
    """Why a log file or folder is readable by more people than ``log_mode`` allows."""
    if not POSIX or not path.exists():
        return None
    allowed = folder_mode() if path.is_dir() else file_mode()
    mode = stat.S_IMODE(path.stat().st_mode)
    extra = mode & ~allowed & 0o077
    if not extra:
        return None
    return f"{path} has mode {mode:04o}; others than allowed may read it (fix: chmod {allowed:04o})"
