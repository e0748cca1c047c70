"""Four saw-side terminals logging cuts while the office reads statistics, all at once.

Each process runs real ``sawplan`` commands (in-process, through the error
boundary) against one log file for a few seconds.  External checks: the rows
SQLite holds afterwards, read with the standard ``sqlite3`` module, are exactly
the entries the writers were told were logged (nothing lost, nothing doubled),
and no command answered with anything but success — in particular no
"database is locked" reached a user.  The 30 s version with numbers is
``bench/bench_soak.py``.
"""

from __future__ import annotations

import contextlib
import io
import json
import multiprocessing
import sqlite3
import time

import pytest

DURATION_S = 5.0
WRITERS = 4


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
def log(cli, tmp_path):
    path = tmp_path / "blade-log.sqlite"
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


def test_four_writers_and_a_reader_lose_nothing(log):
    ctx = multiprocessing.get_context("fork")
    start = ctx.Event()
    results = ctx.Queue()
    deadline = time.time() + 0.5 + DURATION_S  # the processes start inside the half second
    procs = [
        ctx.Process(target=_writer, args=(str(log), f"W{k}", start, deadline, results))
        for k in range(WRITERS)
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
    assert errors == []  # not one "database is locked", nor anything else
    logged = [n for kind, _who, rows, _errs in reports if kind == "writer" for n in rows]
    assert len(logged) >= WRITERS  # every writer got work done
    conn = sqlite3.connect(log)
    try:
        notes = [r[0] for r in conn.execute("SELECT note FROM cuts")]
        assert [r[0] for r in conn.execute("PRAGMA integrity_check")] == ["ok"]
    finally:
        conn.close()
    assert sorted(notes) == sorted(logged)  # nothing lost, nothing written twice
    seen = next(rows for kind, _who, rows, _errs in reports if kind == "reader")
    assert seen and seen == sorted(seen)  # the office saw the log only grow
