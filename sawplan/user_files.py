"""Reading files a user names, bounded: regular files only, never more than a cap.

A name in a job file, an option or an environment variable may lead to a FIFO
(reading it waits for a writer that never comes), a device (``/dev/zero``
never ends, ``/dev/stdin`` waits) or a file far larger than any shop's.  Every
file a user names is opened here: with ``O_NONBLOCK``, so opening a FIFO
returns at once; then ``fstat`` on the open descriptor (no race with a rename)
must say "regular file"; and the size cap is applied to the bytes actually read,
not to what ``stat`` said before, so a file that grows while read is still
refused.

Errors are one line naming the field in the user's words: a missing file is
``NotFoundError`` (exit 4); a pipe, device, folder or socket, a file over its
cap, or text that is not UTF-8 is ``BadDataError`` (exit 3).
"""

from __future__ import annotations

import io
import os
import stat
from pathlib import Path

from sawplan.errors import BadDataError, NotFoundError

KB = 1000
MB = 1000 * KB
GB = 1000 * MB
BLOCK = 1 << 20  # read in blocks of 1 MiB


def size_words(cap: int) -> str:
    """A byte cap as people say it: 64 kB, 5 MB, 2 GB."""
    for unit, size in (("GB", GB), ("MB", MB), ("kB", KB)):
        if cap >= size:
            return f"{cap / size:g} {unit}"
    return f"{cap} bytes"


def file_kind(mode: int, *, pipe: str = "a pipe") -> str:
    """What a file that is not a plain file is, in words ("a folder", "a pipe", "a device")."""
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return pipe
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISLNK(mode):
        return "a symbolic link"
    return "not a plain file"


def open_fd(path: str | os.PathLike[str], field: str, shown: str | None = None) -> int:
    """An open descriptor on the regular file ``path`` (the caller closes it).

    ``shown`` is the file as the user named it (default: the path).
    """
    path = Path(path)
    shown = str(path) if shown is None else shown
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_CLOEXEC", 0)
    try:
        fd = os.open(path, flags)
    except FileNotFoundError:
        raise NotFoundError(f"no such file: {shown}", field=field) from None
    except (OSError, ValueError) as err:  # permission, a NUL byte, a name too long, a loop
        reason = getattr(err, "strerror", None) or err
        raise BadDataError(f"cannot read {shown}: {reason}", field=field) from None
    try:
        mode = os.fstat(fd).st_mode
        if not stat.S_ISREG(mode):
            raise BadDataError(f"{shown} is not a regular file ({file_kind(mode)})", field=field)
        if hasattr(os, "set_blocking"):
            os.set_blocking(fd, True)
    except BaseException:
        os.close(fd)
        raise
    return fd


class _Capped(io.RawIOBase):
    """A raw reader that refuses to hand out more than ``cap`` bytes."""

    def __init__(self, fd: int, cap: int, name: str, field: str, why: str):
        self._file = io.FileIO(fd, "rb", closefd=True)
        self._left = cap
        self._cap, self._name, self._field, self._why = cap, name, field, why

    def readable(self) -> bool:
        return True

    def readinto(self, buffer) -> int:  # type: ignore[override]
        view = memoryview(buffer)
        # ask for one byte past the cap, so reaching it exactly is not yet an error
        n = self._file.readinto(view[: min(len(view), self._left + 1)])
        if n is None:
            return 0
        self._left -= n
        if self._left < 0:
            raise over_cap(self._name, self._cap, self._field, self._why)
        return n

    def close(self) -> None:
        self._file.close()
        super().close()


def over_cap(name: str, cap: int, field: str, why: str = "") -> BadDataError:
    """The one error for a file or member over its size cap."""
    tail = f"; {why}" if why else ""
    return BadDataError(f"{name} is over {size_words(cap)}{tail}", field=field)


def open_limited(
    path: str | os.PathLike[str], cap: int, field: str, *, why: str = "", shown: str | None = None
) -> io.BufferedReader:
    """A binary reader on the regular file ``path`` that fails past ``cap`` bytes."""
    shown = str(path) if shown is None else shown
    fd = open_fd(path, field, shown)
    return io.BufferedReader(_Capped(fd, cap, shown, field, why), BLOCK)


def open_text_limited(
    path: str | os.PathLike[str], cap: int, field: str, *, why: str = "", shown: str | None = None
) -> io.TextIOWrapper:
    """A text reader (UTF-8, a BOM dropped, newlines kept for csv) capped at ``cap`` bytes."""
    raw = open_limited(path, cap, field, why=why, shown=shown)
    return io.TextIOWrapper(raw, encoding="utf-8-sig", newline="")


def read_limited(
    path: str | os.PathLike[str], cap: int, field: str, *, why: str = "", shown: str | None = None
) -> bytes:
    """Every byte of the regular file ``path``, refused past ``cap`` bytes."""
    with open_limited(path, cap, field, why=why, shown=shown) as handle:
        return handle.read()


def read_text_limited(
    path: str | os.PathLike[str],
    cap: int,
    field: str,
    *,
    why: str = "",
    what: str = "the file",
    shown: str | None = None,
) -> str:
    """The file's UTF-8 text (a BOM dropped), refused past ``cap`` bytes."""
    shown = str(path) if shown is None else shown
    raw = read_limited(path, cap, field, why=why, shown=shown)
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise BadDataError(
            f"{shown} is not UTF-8 text (save {what} as UTF-8)", field=field
        ) from None


def copy_member(zf, info, target: Path, cap: int, field: str) -> None:
    """Write a zip member to ``target`` in blocks, refused past ``cap`` bytes."""
    written = 0
    with zf.open(info) as member, target.open("wb") as out:
        while block := member.read(BLOCK):
            written += len(block)
            if written > cap:
                raise over_cap(info.filename, cap, field)
            out.write(block)
