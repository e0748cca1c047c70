"""Saw-side stations logging cuts while the office reads statistics, all at once.

Each process runs real ``sawplan`` commands (in-process, through the error
boundary) against one log for a few seconds: four writers on a SQLite file,
eight on a PostgreSQL database, all on the same fitted blade (every write reads
the blade's state, then adds a row: the read-then-write step under test), and
one reader listing the cuts and computing the life statistics.  External
checks: the rows the engine holds afterwards, read with its own driver
(``sqlite3`` / ``psycopg``), are exactly the entries the writers were told were
logged (nothing lost, nothing doubled), the integrity check passes, and no
command answered with anything but success — in particular no "database is
locked" and no serialization failure reached a user.  The 30 s version with
numbers is ``bench/bench_soak.py``.
"""

from __future__ import annotations

import contextlib
import io
import json
import multiprocessing
import sqlite3
import time

import pytest
from logrows import column, is_server

# (writers, seconds) per engine: short, so the suite stays quick; the soak is in bench/
LOAD = {"sqlite": (4, 5.0), "postgresql": (8, 3.0)}


def _invoke(args: list[str]) -> tuple[int, str, str]:
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, args)
    return code, out.getvalue(), err.getvalue()


def _writer(path: str, tag: str, start, deadline: float, results) -> None:
    start.wait()
    logged, errors = [], []
    i = 0
    while time.time() < deadline:
        note = f"{tag}-{i}"
        code, _out, err = _invoke(
            ["log", "cut", "304", "round", "60mm", "--blade", "B-1", "--note", note, "--db", path]
        )
        if code == 0:
            logged.append(note)
        else:
            errors.append(err.strip())
        i += 1
    results.put(("writer", tag, logged, errors))


def _reader(path: str, start, deadline: float, results) -> None:
    start.wait()
    seen, errors = [], []
    while time.time() < deadline:
        for args in (["log", "list", "--limit", "0", "--json"], ["life", "--json"]):
            code, out, err = _invoke([*args, "--db", path])
            if code != 0:
                errors.append(err.strip())
            elif args[0] == "log":
                seen.append(len(json.loads(out)["items"]))
    results.put(("reader", "office", seen, errors))


@pytest.fixture
def log(cli, log_db):
    path = log_db
    for args in (
        ("saw", "add", "bay 2", "--like", "mid-production"),
        (
            "blade",
            "add",
            "B-1",
            "--pitch",
            "3/4",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        ),
        ("blade", "fit", "B-1", "--saw", "bay 2"),
    ):
        result = cli(*args, "--db", str(path))
        assert result.code == 0, result.err
    return path


def test_writers_and_a_reader_lose_nothing(log, cli):
    writers, duration = LOAD["postgresql" if is_server(log) else "sqlite"]
    ctx = multiprocessing.get_context("fork")
    start = ctx.Event()
    results = ctx.Queue()
    deadline = time.time() + 0.5 + duration  # the processes start inside the half second
    procs = [
        ctx.Process(target=_writer, args=(str(log), f"W{k}", start, deadline, results))
        for k in range(writers)
    ]
    procs.append(ctx.Process(target=_reader, args=(str(log), start, deadline, results)))
    for p in procs:
        p.start()
    start.set()
    reports = [results.get(timeout=120) for _ in procs]
    for p in procs:
        p.join(30)
    assert [p.exitcode for p in procs] == [0] * len(procs)

    errors = [e for _kind, _who, _rows, errs in reports for e in errs]
    assert errors == []  # not one "database is locked" or serialization failure, nor else
    logged = [n for kind, _who, rows, _errs in reports if kind == "writer" for n in rows]
    assert len(logged) >= writers  # every writer got work done
    notes = column(log, "cuts", "note")
    assert sorted(notes) == sorted(logged)  # nothing lost, nothing written twice
    if not is_server(log):
        conn = sqlite3.connect(log)
        try:
            assert [r[0] for r in conn.execute("PRAGMA integrity_check")] == ["ok"]
        finally:
            conn.close()
    checked = cli("check", "--db", str(log))
    assert checked.code == 0, checked.out + checked.err
    seen = next(rows for kind, _who, rows, _errs in reports if kind == "reader")
    assert seen and seen == sorted(seen)  # the office saw the log only grow
