"""Every file sawplan writes for the user goes through here, so none clobbers another.

Cut sheets and plan CSVs (``plan --sheet``, ``--csv-dir``), ``export`` and
``backup`` name their targets with :class:`Target`, then:

1. :func:`check_targets` looks at all of them before a byte is written: a
   target that is one of the run's inputs (the job file, its stock file, the
   materials and saws files, the config file, the blade log and its
   ``-wal``/``-shm``/``-journal``; compared by path and by inode, so hard links
   and symlinks count) is refused even with ``--force``; a folder, a device, a
   FIFO or a socket where a file is expected is refused (a rename would
   replace a device node); an existing file needs ``--force``; two options
   naming one file are refused.
2. :func:`staged` (one file) and :func:`write_files` (texts) write each target
   as ``NAME.partial`` beside it, created exclusively and locked while it is
   written, and rename it into place only when complete.  A ``NAME.partial``
   left by a killed run (no one holds its lock) is removed by the next run
   writing that target, with SQLite's journals beside it; one still locked
   belongs to a run in progress and is refused as a conflict.

Files holding the log (exports, backups) pass ``mode=perms.file_mode()``
(``log_mode``, 0600 by default) whatever the umask; sheets and plan CSVs are
documents and get the usual umask mode.
"""

from __future__ import annotations

import contextlib
import os
import stat
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path

from sawplan.errors import ConflictError, StorageError, UsageError

PARTIAL = ".partial"
SIDECARS = ("-journal", "-wal", "-shm")  # SQLite's helper files beside a log (or a partial)
POSIX = os.name == "posix"
STATION_KEYS = "station-keys.json"  # station/access.py KEYS_FILE, beside the config file


@dataclass(frozen=True)
class Target:
    """A file a command is about to write, and the option (or argument) that named it."""

    path: Path
    option: str  # "--sheet", "--csv-dir", "FILE", "DIR": how the user named it


@dataclass(frozen=True)
class Input:
    """A file the run reads, never to be written over."""

    path: Path
    what: str  # "the job file", "the blade log's -wal file"


# --- the run's inputs ------------------------------------------------------------------------


def run_inputs(db: object = None, files: Iterable[tuple[str, Path | None]] = ()) -> list[Input]:
    """The files of a run: ``files`` (what, path) plus the config file, the station's keys,
    the configured materials and saws files, and the blade log ``db`` with its SQLite
    helper files."""
    found = [Input(Path(p), what) for what, p in files if p is not None]
    found += _config_inputs()
    found += log_inputs(db)
    return found


def log_inputs(db: object) -> list[Input]:
    """The blade log file and the ``-wal``, ``-shm`` and ``-journal`` files beside it."""
    from sawplan.errors import SawplanError
    from sawplan.store.location import LogLocation, resolve_db

    try:
        location = db if isinstance(db, LogLocation) else resolve_db(db)  # type: ignore[arg-type]
    except SawplanError:
        return []  # a bad --db is the command's own error to report
    if location.kind != "sqlite" or location.path is None:
        return []
    log = location.path
    return [Input(log, "the blade log")] + [
        Input(Path(f"{log}{s}"), f"the blade log's {s} file") for s in SIDECARS
    ]


def _config_inputs() -> list[Input]:
    from sawplan import config
    from sawplan.errors import SawplanError

    path = config.config_path()
    found = [
        Input(path, "the config file"),
        Input(path.with_name(STATION_KEYS), "the station's keys file"),
    ]
    for key, what in (("materials_file", "the materials file"), ("saws_file", "the saws file")):
        try:
            value = config.get(key)
        except SawplanError:
            continue  # a bad setting is reported by the command that reads it
        if value:
            found.append(Input(Path(value), what))
    return found


# --- checks before anything is written -------------------------------------------------------


def check_targets(targets: Sequence[Target], inputs: Sequence[Input], *, force: bool) -> None:
    """Refuse the whole run, writing nothing, if any target may not be written."""
    seen: dict[Path, Target] = {}
    for target in targets:
        if target.path.name in ("", ".", ".."):
            raise UsageError(f"{target.option}: {str(target.path)!r} is not a file name")
        key = _resolved(target.path)
        if key in seen:
            raise UsageError(
                f"{seen[key].option} and {target.option} both name {target.path}; "
                "choose another name"
            )
        seen[key] = target
        _refuse_input(target, target.path, inputs)
        exists = _existing_file(target)
        _refuse_input(target, partial_of(target.path), inputs)  # the partial is written too
        _check_partial(target)
        if exists and not force:
            raise ConflictError(
                f"{target.option}: {target.path} exists", hint="add --force to replace it"
            )


def _refuse_input(target: Target, path: Path, inputs: Sequence[Input]) -> None:
    clash = _input_named(path, inputs)
    if clash is not None:
        raise UsageError(
            f"{target.option} would overwrite {clash.what} {path}; choose another name"
        )


def _check_partial(target: Target) -> None:
    """``NAME.partial`` must be absent or a plain file (a killed run's, or one being written)."""
    partial = partial_of(target.path)
    try:
        st = os.lstat(partial)
    except OSError:
        return
    if not stat.S_ISREG(st.st_mode):
        raise UsageError(
            f"{target.option}: {partial} is in the way ({_kind(st.st_mode)}); remove it first"
        )


def _existing_file(target: Target) -> bool:
    """Whether the target exists (a file, or a link); refuse anything else in its place."""
    path = target.path
    parent = path.parent
    if parent.exists() and not parent.is_dir():
        raise UsageError(f"{target.option}: {parent} is not a folder; choose another place")
    try:
        st = os.lstat(path)
    except FileNotFoundError:
        return False
    except NotADirectoryError:
        raise UsageError(
            f"{target.option}: a part of {path} is a file, not a folder; choose another place"
        ) from None
    except OSError as err:
        raise UsageError(
            f"{target.option}: cannot use {path} ({err.strerror or err}); choose another name"
        ) from None
    if stat.S_ISLNK(st.st_mode):
        with contextlib.suppress(OSError):
            st = os.stat(path)  # what the link leads to; a dangling link is replaced itself
    if not stat.S_ISREG(st.st_mode) and not stat.S_ISLNK(st.st_mode):
        raise UsageError(
            f"{target.option}: {path} is {_kind(st.st_mode)}, not a file; give a file name"
        )
    return True


def _kind(mode: int) -> str:
    from sawplan.user_files import file_kind

    return file_kind(mode, pipe="a FIFO (named pipe)")


def _input_named(path: Path, inputs: Sequence[Input]) -> Input | None:
    """The input ``path`` would overwrite: the same resolved path, or the same file."""
    here = _resolved(path)
    try:
        st = os.stat(path)
        ident: tuple[int, int] | None = (st.st_dev, st.st_ino)
    except OSError:
        ident = None
    for candidate in inputs:
        if _resolved(candidate.path) == here:
            return candidate
        if ident is not None:
            try:
                other = os.stat(candidate.path)
            except OSError:
                continue
            if (other.st_dev, other.st_ino) == ident:
                return candidate
    return None


def _resolved(path: Path) -> Path:
    try:
        return Path(os.path.realpath(path.expanduser()))
    except (OSError, ValueError):
        return Path(os.path.abspath(path))


# --- writing ---------------------------------------------------------------------------------


def partial_of(target: Path) -> Path:
    """Where ``target`` is written before it is renamed into place."""
    return target.with_name(target.name + PARTIAL)


def write_files(files: dict[Path, str | bytes], *, mode: int | None = None) -> list[Path]:
    """Write every file to its ``.partial`` first, then rename them all into place.

    Check the targets with :func:`check_targets` first.  ``mode``: the
    permission bits whatever the umask (``None``: the umask's).
    """
    path = None
    try:
        with contextlib.ExitStack() as stack:
            for path, body in files.items():
                path.parent.mkdir(parents=True, exist_ok=True)
                partial = stack.enter_context(staged(path, mode=mode))
                data = body.encode("utf-8") if isinstance(body, str) else body
                with open(partial, "r+b") as handle:
                    handle.write(data)
                    handle.flush()
                    os.fsync(handle.fileno())
    except OSError as err:
        if isinstance(err, StorageError) or path is None:
            raise
        raise _storage(err, path) from None
    return list(files)


@contextlib.contextmanager
def staged(target: Path, *, mode: int | None = None) -> Iterator[Path]:
    """A new, empty ``target.partial``, ours alone, renamed over ``target`` on success.

    On any error (or Ctrl-C) the partial file and SQLite's journals beside it
    are removed and ``target`` is left as it was.
    """
    partial = partial_of(target)
    fd = _claim(partial, target, mode)
    try:
        try:
            yield partial
            if mode is not None and POSIX:
                os.chmod(partial, mode)  # whatever the body did to it
            if not POSIX:
                os.close(fd)  # Windows renames only closed files
                fd = -1
            os.replace(partial, target)
        except BaseException:
            _discard(partial)
            raise
    finally:
        if fd >= 0:
            os.close(fd)


def _claim(partial: Path, target: Path, mode: int | None) -> int:
    """Create ``partial`` exclusively and lock it; a stale one of a killed run goes first."""
    clear_stale(partial, target)
    flags = os.O_RDWR | os.O_CREAT | os.O_EXCL | getattr(os, "O_CLOEXEC", 0)
    try:
        fd = os.open(partial, flags, 0o666 if mode is None else mode)
    except FileExistsError:
        raise _busy(target) from None
    except OSError as err:
        raise _storage(err, target) from None
    try:
        if mode is not None and POSIX:
            os.fchmod(fd, mode)
        if not _lock(fd) or not _still_there(fd, partial):
            raise _busy(target)  # another run made or removed it in the same moment
    except BaseException:
        os.close(fd)
        raise
    return fd


def clear_stale(partial: Path, target: Path | None = None) -> bool:
    """Remove ``partial`` (and its journals) if a killed run left it; True if removed.

    A partial whose lock someone holds is being written now: a ``ConflictError``.
    """
    try:
        st = os.lstat(partial)
    except FileNotFoundError:
        _remove_sidecars(partial)  # journals of a partial that is gone are leftovers too
        return False
    except OSError:
        return False
    if not stat.S_ISREG(st.st_mode):  # check_targets said so already; raced here
        raise UsageError(f"{partial} is in the way ({_kind(st.st_mode)}); remove it first")
    try:
        fd = os.open(partial, os.O_RDONLY | getattr(os, "O_CLOEXEC", 0))
    except OSError:
        return False
    try:
        if not _lock(fd):
            raise _busy(target or partial)
        _discard(partial)  # its writer is gone: we hold the lock it would hold
    finally:
        os.close(fd)
    return True


def clear_stale_partials(folder: Path, pattern: str) -> list[Path]:
    """Remove ``folder/PATTERN.partial`` files killed runs left (ones being written stay)."""
    gone = []
    with contextlib.suppress(OSError):
        for partial in folder.glob(f"{pattern}{PARTIAL}"):
            with contextlib.suppress(ConflictError, UsageError):
                if clear_stale(partial):
                    gone.append(partial)
    return gone


def _lock(fd: int) -> bool:
    """Take the exclusive lock on an open file without waiting (no locks off POSIX)."""
    if not POSIX:
        return True
    import fcntl

    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except BlockingIOError:
        return False
    except OSError:
        return True  # a file system without flock: O_EXCL alone guards the name
    return True


def _still_there(fd: int, partial: Path) -> bool:
    try:
        mine, there = os.fstat(fd), os.stat(partial)
    except OSError:
        return False
    return (mine.st_dev, mine.st_ino) == (there.st_dev, there.st_ino)


def _discard(partial: Path) -> None:
    with contextlib.suppress(OSError):
        partial.unlink()
    _remove_sidecars(partial)


def _remove_sidecars(partial: Path) -> None:
    for suffix in SIDECARS:
        with contextlib.suppress(OSError):
            Path(f"{partial}{suffix}").unlink()


def _busy(target: Path) -> ConflictError:
    return ConflictError(
        f"another sawplan is writing {target} now",
        hint="wait until it finishes, or choose another name",
    )


def _storage(err: OSError, target: Path) -> StorageError:
    import errno

    if err.errno == errno.ENOSPC:
        what = "the disk is full"
    elif err.errno == errno.EROFS:
        what = "the disk is read-only"
    else:
        what = err.strerror or str(err)
    return StorageError(f"cannot write {target}: {what}; nothing was written")
