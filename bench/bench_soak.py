"""Soak: eight saw-side stations log cuts while the office reads statistics, for 30 s,
on a SQLite file and then on a PostgreSQL database.

Each process runs real ``sawplan`` commands in-process (through the error
boundary) against one log:
- 8 writers: ``sawplan log cut 304 round 60mm --blade B-<k> --note W<k>-<i>`` in a
  loop, each on its own blade fitted on its own saw, as stations at separate saws;
- 1 reader: ``sawplan log list --limit 0 --json`` and ``sawplan life --json`` in turn.

Prints, per engine, rows written (as the writers were told), rows read back
afterwards with the engine's own driver, the largest count the reader saw,
cuts logged per second, the slowest write, and every error seen.  Goals: 0
errors, rows read back == rows written (nothing lost, nothing doubled), the
integrity check ok (SQLite's integrity_check; ``sawplan check`` on both), no
write slower than the 30 s busy timeout.

Run: python bench/bench_soak.py  (BENCH_SOAK_S=60 for longer, BENCH_WRITERS=4 for fewer,
BENCH_KEEP=1 keeps the SQLite log)
"""

from __future__ import annotations

import contextlib
import io
import json
import multiprocessing
import os
import shutil
import sqlite3
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

DURATION_S = float(os.environ.get("BENCH_SOAK_S", "30"))
WRITERS = int(os.environ.get("BENCH_WRITERS", "8"))


def invoke(args: list[str]) -> tuple[int, str, str]:
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, args)
    return code, out.getvalue(), err.getvalue()


def writer(path: str, tag: str, start, deadline: float, results) -> None:
    start.wait()
    logged, errors, slowest = [], [], 0.0
    i = 0
    blade = f"B-{tag[1:]}"
    while time.time() < deadline:
        note = f"{tag}-{i}"
        began = time.perf_counter()
        code, _out, err = invoke(
            ["log", "cut", "304", "round", "60mm", "--blade", blade, "--note", note, "--db", path]
        )
        slowest = max(slowest, time.perf_counter() - began)
        (logged if code == 0 else errors).append(note if code == 0 else err.strip())
        i += 1
    results.put({"who": tag, "logged": logged, "errors": errors, "slowest_s": slowest})


def reader(path: str, start, deadline: float, results) -> None:
    start.wait()
    seen, errors, calls = [], [], 0
    while time.time() < deadline:
        for args in (["log", "list", "--limit", "0", "--json"], ["life", "--json"]):
            code, out, err = invoke([*args, "--db", path])
            calls += 1
            if code != 0:
                errors.append(err.strip())
            elif args[0] == "log":
                seen.append(len(json.loads(out)["items"]))
    results.put({"who": "office", "seen": seen, "errors": errors, "calls": calls})


def setup(db: str) -> None:
    for k in range(WRITERS):
        for args in (
            ["saw", "add", f"bay {k}", "--like", "mid-production"],
            [
                "blade",
                "add",
                f"B-{k}",
                "--pitch",
                "3/4",
                "--blade-width",
                "27mm",
                "--blade-thickness",
                "0.9mm",
            ],  # fmt: skip
            ["blade", "fit", f"B-{k}", "--saw", f"bay {k}"],
        ):
            code, _out, err = invoke([*args, "--db", db])
            if code != 0:
                raise SystemExit(f"setup failed: {err}")


def notes_and_integrity(db: str) -> tuple[list[str], str]:
    """The cut notes and the integrity verdict, read with the engine's own driver/command."""
    if db.startswith("postgresql://"):
        import psycopg

        with psycopg.connect(db) as conn:
            notes = sorted(r[0] for r in conn.execute("SELECT note FROM cuts"))
        code, out, err = invoke(["check", "--db", db])
        return notes, "ok" if code == 0 else (err.strip() or out.strip())
    conn = sqlite3.connect(db)
    try:
        notes = sorted(r[0] for r in conn.execute("SELECT note FROM cuts"))
        integrity = [r[0] for r in conn.execute("PRAGMA integrity_check")]
    finally:
        conn.close()
    return notes, integrity[0]


def soak(db: str, label: str) -> bool:
    setup(db)
    ctx = multiprocessing.get_context("fork")
    start, results = ctx.Event(), ctx.Queue()
    deadline = time.time() + 1.0 + DURATION_S
    procs = [
        ctx.Process(target=writer, args=(db, f"W{k}", start, deadline, results))
        for k in range(WRITERS)
    ]
    procs.append(ctx.Process(target=reader, args=(db, start, deadline, results)))
    for p in procs:
        p.start()
    start.set()
    reports = [results.get(timeout=DURATION_S + 300) for _ in procs]
    for p in procs:
        p.join(60)

    writers = [r for r in reports if "logged" in r]
    office = next(r for r in reports if r["who"] == "office")
    written = sorted(n for r in writers for n in r["logged"])
    errors = [e for r in reports for e in r["errors"]]
    read_back, integrity = notes_and_integrity(db)
    slowest = max(r["slowest_s"] for r in writers)

    print(f"soak on {label}: {WRITERS} writers + 1 reader for {DURATION_S:.0f} s")
    for r in sorted(writers, key=lambda r: r["who"]):
        print(f"  writer {r['who']}: {len(r['logged']):,} cuts logged, {len(r['errors'])} errors")
    print(
        f"  reader: {office['calls']:,} commands, largest list {max(office['seen'], default=0):,} "
        f"rows, {len(office['errors'])} errors"
    )
    print(f"rows written       {len(written):>8,}")
    print(f"rows read back     {len(read_back):>8,}   goal: == rows written")
    print(f"lost or doubled    {len(set(written) ^ set(read_back)):>8,}   goal: 0")
    print(f"errors seen        {len(errors):>8,}   goal: 0")
    print(f"cuts per second    {len(written) / DURATION_S:>8.1f}")
    print(f"slowest write      {slowest:>8.3f} s   goal: < 30 s (the busy timeout)")
    print(f"integrity check    {integrity:>8}   goal: ok")
    for text, n in Counter(errors).most_common(5):
        print(f"  {n} × {text}")
    return written == read_back and not errors and integrity == "ok" and slowest < 30


def main() -> int:
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))
    import pg_server

    folder = Path(tempfile.mkdtemp(prefix="sawplan-soak-"))
    good = soak(str(folder / "blade-log.sqlite"), "a SQLite file")
    with pg_server.server() as admin, pg_server.scratch_database(admin) as url:
        good &= soak(url, "PostgreSQL")
    if os.environ.get("BENCH_KEEP"):
        print(f"kept {folder}")
    else:
        shutil.rmtree(folder, ignore_errors=True)
    print("PASS" if good else "FAIL")
    return 0 if good else 1


if __name__ == "__main__":
    sys.exit(main())
