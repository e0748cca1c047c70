"""Where the blade log lives: one SQLite file, or a PostgreSQL database named by a URL.

``--db`` wins, then ``SAWPLAN_DB``, then the config file's ``db``, then the
per-user file.  A value with ``://`` is a URL (``postgresql://`` or
``postgres://``); anything else is a file path.  The URL's password never
appears in text sawplan writes: ``label`` shows ``***`` in its place, and
``mask`` does the same for any message that might quote it.

Credentials may also come from libpq's own places, which psycopg reads:
``PGPASSWORD``, ``PGPASSFILE`` (default ``~/.pgpass``), ``PGUSER``, ``PGHOST``,
and TLS settings such as ``PGSSLMODE``; URL query options (``sslmode``,
``sslrootcert``, ``connect_timeout``...) are passed through to the server
connection unchanged.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass, field
from pathlib import Path
from urllib.parse import parse_qsl, unquote, urlsplit

from sawplan.errors import UsageError

ENV_VAR = "SAWPLAN_DB"
FILE_NAME = "blade-log.sqlite"
SERVER_SCHEMES = ("postgresql", "postgres", "postgresql+psycopg")
_SECRET_KEYS = ("password", "sslpassword")
_HINT = "give a file path, or postgresql://USER@HOST/DATABASE"


@dataclass(frozen=True)
class LogLocation:
    """A blade log's place: ``kind`` is "sqlite" (a file), "postgresql" or "memory"."""

    kind: str
    path: Path | None = None
    url: str | None = field(default=None, repr=False)  # with its password: never print it

    @property
    def is_server(self) -> bool:
        return self.kind == "postgresql"

    @property
    def label(self) -> str:
        """How messages name the log: the file's path, or the URL without its password."""
        if self.kind == "postgresql":
            return mask(self.url or "")
        if self.kind == "memory":
            return "memory"
        return str(self.path)

    def secrets(self) -> tuple[str, ...]:
        """The passwords this location carries (for scrubbing them out of messages)."""
        if not self.url:
            return ()
        parts = urlsplit(self.url)
        found = [parts.password, unquote(parts.password)] if parts.password else []
        found += [v for k, v in parse_qsl(parts.query) if k in _SECRET_KEYS and v]
        return tuple(sorted(set(found), key=len, reverse=True))

    def __str__(self) -> str:
        return self.label


def default_db_path() -> Path:
    """The per-user blade log: ``user_data_dir() / "blade-log.sqlite"``."""
    from sawplan.paths import user_data_dir

    return user_data_dir() / FILE_NAME


def configured(key: str) -> str | None:
    """A setting from the shop's config file (``db``, ``log_mode``), if one is set.

    The one place the store reads the config file, so the store does not
    care how that file is found or parsed.
    """
    try:
        from sawplan import config  # the config file's reader
    except ImportError:
        return None
    value = config.get(key)
    return str(value) if value not in (None, "") else None


def resolve_db(db: str | os.PathLike[str] | LogLocation | None = None) -> LogLocation:
    """``--db`` wins, then env ``SAWPLAN_DB``, then the config file, then the per-user file."""
    if isinstance(db, LogLocation):
        return db
    if db is not None and not os.fspath(db).strip():
        raise UsageError(
            "expected a file or a postgresql:// URL, got nothing", field="db", hint=_HINT
        )
    for value in (db, os.environ.get(ENV_VAR), configured("db")):
        if value is not None and str(value) != "":
            return parse_location(value)
    return LogLocation("sqlite", default_db_path())


def parse_location(value: str | os.PathLike[str]) -> LogLocation:
    """A file path or a server URL; another scheme is a usage error naming what it got."""
    text = os.fspath(value)
    if text == ":memory:":
        return LogLocation("memory")
    if "://" not in text:
        return LogLocation("sqlite", _not_special(Path(text).expanduser()))
    scheme = text.split("://", 1)[0].lower()
    if scheme == "sqlite":
        rest = text.split("://", 1)[1]
        if not rest.startswith("/") or rest == "/":
            raise UsageError(f"expected sqlite:///FILE, got {mask(text)!r}", field="db", hint=_HINT)
        return LogLocation("sqlite", _not_special(Path(rest[1:]).expanduser()))
    if scheme not in SERVER_SCHEMES:
        raise UsageError(
            f"a blade log is a file or a PostgreSQL database; {scheme}:// is not supported",
            field="db",
            hint=_HINT,
        )
    parts = urlsplit(text)
    if not parts.path.strip("/"):
        raise UsageError(
            f"{mask(text)} names no database",
            field="db",
            hint="add the database name: postgresql://USER@HOST/DATABASE",
        )
    return LogLocation("postgresql", url=text)


def _not_special(path: Path) -> Path:
    """A log file is a file: a pipe or a device named as the log is refused before SQLite
    opens it (it would block, or fail with "disk I/O error")."""
    import stat

    try:
        mode = os.stat(path).st_mode  # stat never opens: a FIFO does not block here
    except OSError:
        return path  # not there yet (a new log), or a folder problem said where it is opened
    if stat.S_ISREG(mode) or stat.S_ISDIR(mode):
        return path  # a folder is refused where the log is opened, in its own words
    from sawplan.user_files import file_kind

    raise UsageError(f"{path} is {file_kind(mode)}, not a log file", field="db", hint=_HINT)


_NETLOC_PASSWORD = re.compile(
    r"(?P<scheme>[A-Za-z][A-Za-z0-9+.-]*://)(?P<user>[^:@/?#\s]*):(?P<pw>[^/?#\s]*)@"
)
_QUERY_SECRET = re.compile(r"(?i)([?&](?:ssl)?password=)[^&]*")


def mask(text: str) -> str:
    """``text`` with any URL password shown as ``***``."""
    out = _NETLOC_PASSWORD.sub(lambda m: f"{m['scheme']}{m['user']}:***@", text)
    return _QUERY_SECRET.sub(r"\1***", out)


def scrub(text: str, location: LogLocation | None) -> str:
    """A message with every secret of ``location`` (and any URL password) masked."""
    out = mask(text)
    for secret in location.secrets() if location is not None else ():
        out = out.replace(secret, "***")
    return out
