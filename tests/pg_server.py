"""A PostgreSQL server for the tests: the machine's own when one listens, else a private one.

``SAWPLAN_TEST_PG`` names the server to try (default: the project machines'
trust-auth server, ``postgresql://postgres@127.0.0.1:5432/test``).  When
nothing answers there, a private server is made from Debian's ``postgresql``
binaries (``/usr/lib/postgresql/*/bin``: ``initdb``, ``pg_ctl``) in a
temporary folder, on a free port, with trust auth and no fsync, and stopped
and removed afterwards.  ``initdb`` refuses to run as root, so under root the
folder is handed to the ``postgres`` user (or ``nobody``) and the binaries run
as that user through ``runuser``.

Every test run makes its own database with a unique name and drops it at
the end; each test gets its own schema inside it (a URL whose ``options``
set the ``search_path``), so test runs at the same time never meet.
"""

from __future__ import annotations

import contextlib
import glob
import os
import pwd
import shutil
import socket
import subprocess
import tempfile
import time
import uuid
from collections.abc import Iterator
from pathlib import Path
from urllib.parse import quote, urlsplit, urlunsplit

ENV_VAR = "SAWPLAN_TEST_PG"
DEFAULT_URL = "postgresql://postgres@127.0.0.1:5432/test"


def reachable(url: str) -> bool:
    import psycopg

    try:
        psycopg.connect(url, connect_timeout=3, autocommit=True).close()
        return True
    except psycopg.Error:
        return False


def with_database(url: str, name: str) -> str:
    parts = urlsplit(url)
    return urlunsplit((parts.scheme, parts.netloc, f"/{name}", parts.query, ""))


def with_schema(url: str, schema: str) -> str:
    """The URL of ``schema`` inside the URL's database (through libpq's ``options``)."""
    parts = urlsplit(url)
    option = "options=" + quote(f"-csearch_path={schema}", safe="")
    query = f"{parts.query}&{option}" if parts.query else option
    return urlunsplit((parts.scheme, parts.netloc, parts.path, query, ""))


def free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def binaries() -> Path | None:
    """The newest Debian PostgreSQL bin folder holding initdb and pg_ctl."""
    found = sorted(
        glob.glob("/usr/lib/postgresql/*/bin/initdb"),
        key=lambda p: (
            int(Path(p).parent.parent.name) if Path(p).parent.parent.name.isdigit() else 0
        ),
    )
    return Path(found[-1]).parent if found else None


def _runner() -> tuple[list[str], int | None, int | None]:
    """The command prefix that runs the server's tools as a user initdb accepts."""
    if os.geteuid() != 0:
        return [], None, None
    for name in ("postgres", "nobody"):
        with contextlib.suppress(KeyError):
            user = pwd.getpwnam(name)
            if shutil.which("runuser"):
                return ["runuser", "-u", name, "--"], user.pw_uid, user.pw_gid
            return (
                ["setpriv", f"--reuid={user.pw_uid}", f"--regid={user.pw_gid}", "--clear-groups"],
                user.pw_uid,
                user.pw_gid,
            )
    raise RuntimeError("running as root with no postgres or nobody user for initdb")


@contextlib.contextmanager
def private_server() -> Iterator[str]:
    """Start a throw-away server; yields its admin URL; stops and removes it afterwards."""
    bindir = binaries()
    if bindir is None:
        raise RuntimeError("no PostgreSQL server answers and no postgresql binaries are installed")
    prefix, uid, gid = _runner()
    folder = Path(tempfile.mkdtemp(prefix="sawplan-pg-"))
    data = folder / "data"
    if uid is not None:
        os.chown(folder, uid, gid)
    port = free_port()
    env = {**os.environ, "LC_ALL": "C.UTF-8", "LANG": "C.UTF-8"}
    run = lambda *args: subprocess.run(  # noqa: E731
        [*prefix, *args], check=True, capture_output=True, env=env, cwd=folder, timeout=120
    )
    try:
        run(str(bindir / "initdb"), "-D", str(data), "-A", "trust", "-U", "postgres",
            "-E", "UTF8", "--no-sync")  # fmt: skip
        options = f"-p {port} -k {folder} -c listen_addresses=127.0.0.1 -c fsync=off"
        run(str(bindir / "pg_ctl"), "-D", str(data), "-o", options, "-l", str(folder / "log"),
            "-w", "-t", "60", "start")  # fmt: skip
        url = f"postgresql://postgres@127.0.0.1:{port}/postgres"
        deadline = time.monotonic() + 30
        while not reachable(url) and time.monotonic() < deadline:
            time.sleep(0.2)
        yield url
    finally:
        with contextlib.suppress(Exception):
            run(str(bindir / "pg_ctl"), "-D", str(data), "-m", "immediate", "-w", "stop")
        shutil.rmtree(folder, ignore_errors=True)


@contextlib.contextmanager
def server() -> Iterator[str]:
    """The admin URL of a server to test on: the configured one if it answers, else our own."""
    url = os.environ.get(ENV_VAR) or DEFAULT_URL
    if reachable(url):
        yield url
        return
    with private_server() as own:
        yield own


@contextlib.contextmanager
def _scratch(url: str, kind: str, name: str) -> Iterator[None]:
    """CREATE ``kind`` ``name`` through ``url``; DROP it afterwards, whatever happened."""
    import psycopg

    drop = "WITH (FORCE)" if kind == "DATABASE" else "CASCADE"
    with psycopg.connect(url, autocommit=True) as conn:
        conn.execute(f'CREATE {kind} "{name}"')
    try:
        yield
    finally:
        with psycopg.connect(url, autocommit=True) as conn:
            conn.execute(f'DROP {kind} IF EXISTS "{name}" {drop}')


@contextlib.contextmanager
def scratch_database(admin_url: str) -> Iterator[str]:
    """A database with a unique name for this run, dropped at the end."""
    name = f"sawplan_test_{os.getpid()}_{uuid.uuid4().hex[:8]}"
    with _scratch(admin_url, "DATABASE", name):
        yield with_database(admin_url, name)


@contextlib.contextmanager
def scratch_schema(database_url: str) -> Iterator[str]:
    """A schema of its own inside the run's database: the URL of an empty sawplan log."""
    name = f"t_{uuid.uuid4().hex[:12]}"
    with _scratch(database_url, "SCHEMA", name):
        yield with_schema(database_url, name)
