"""The station's speed on the demo log: the station page's server time, and taps per second.

1. Station page: the demo shop's year of blade history (``demo/make_history.py``)
   with the demo jobs sent to their saws; ``GET /saw/NAME`` answered in-process
   (Starlette's TestClient: no network, the server's own work) 200 times.
   Goal: median under 50 ms.
2. Taps: four stations, one per saw, tap at once for 30 s against uvicorn on
   127.0.0.1 (Start and Cut done down the queue, then notes; each tap is a POST
   and the page it leads to, every fifth tap sent twice as after a dropped
   connection).  Goal: 50 taps per second sustained, nothing lost (every
   accepted tap in the log once), nothing doubled.  On the SQLite file, then on
   PostgreSQL when a server or Debian's binaries are there (``tests/pg_server.py``).

Run: python bench/bench_station.py  (BENCH_STATION_S=10 for a shorter tap run)
"""

from __future__ import annotations

import contextlib
import io
import os
import statistics
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))
DURATION_S = float(os.environ.get("BENCH_STATION_S", "30"))
PAGE_GOAL_MS = 50.0
TAPS_GOAL = 50.0
JOBS = (
    ("billet-slices", "column-bay"),
    ("frame-kit", "auto-bay"),
    ("rail-posts", "pivot-bay"),
    ("pump-blanks", "spare-bay"),
)


def invoke(*args: str) -> None:
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, list(args))
    if code not in (0, 8):  # 8: a plan with stock short still sends what it planned
        raise SystemExit(f"sawplan {' '.join(args)} exited {code}: {err.getvalue()}")


def shop(db: str) -> None:
    """The demo jobs sent to their saws; a fourth saw with a blade of its own."""
    saws = str(ROOT / "demo" / "saws.toml")
    invoke("saw", "add", "spare-bay", "--like", "auto-bay", "--saws", saws, "--db", db)
    invoke("blade", "add", "SP-1", "--pitch", "5/8", "--blade-width", "27mm",
           "--blade-thickness", "0.9mm", "--db", db)  # fmt: skip
    invoke("blade", "fit", "SP-1", "--saw", "spare-bay", "--db", db)
    for job, saw in JOBS:
        path = ROOT / "demo" / "jobs" / f"{job}.toml"
        invoke("plan", str(path), "--saw", saw, "--saws", saws, "--send", "--db", db)


def page_times(db: str, saw: str, n: int = 200) -> list[float]:
    from starlette.testclient import TestClient

    from sawplan.station.app import create_app

    app = create_app(db, units="metric")
    with TestClient(app, client=("127.0.0.1", 5000), base_url="http://127.0.0.1") as client:
        for _ in range(5):  # warm: templates compiled, the catalogue and the life fit cached
            assert client.get(f"/saw/{saw}").status_code == 200
        times = []
        for _ in range(n):
            began = time.perf_counter()
            answer = client.get(f"/saw/{saw}")
            times.append((time.perf_counter() - began) * 1000.0)
            assert answer.status_code == 200
    return times


def tap_run(db: str, label: str) -> bool:
    from logrows import snapshot
    from station_server import run_stations, serving

    from sawplan.station.app import create_app

    saws = [saw for _job, saw in JOBS]
    with serving(create_app(db, units="metric")) as url:
        began = time.monotonic()
        runs = run_stations(url, saws, DURATION_S)
        took = time.monotonic() - began
    accepted = {k: kind for r in runs for k, kind in r.accepted.items()}
    kinds = Counter(accepted.values())
    log = snapshot(db)
    keys = Counter(row[1] for row in log["taps"])
    lost = [k for k in accepted if keys[k] == 0]
    doubled = [k for k, n in keys.items() if n > 1]
    strangers = [k for k in keys if k not in accepted]
    refused = [x for r in runs for x in r.refused]
    repeats = sum(r.repeats for r in runs)
    answered = sum(r.repeats_answered for r in runs)
    rate = len(accepted) / took
    slowest = max(r.slowest_s for r in runs)
    ok = not lost and not doubled and not strangers and not refused and rate >= TAPS_GOAL
    print(f"  {label}: {len(accepted)} taps in {took:.1f} s = {rate:.1f} taps/s "
          f"(goal {TAPS_GOAL:.0f}/s): {kinds['start']} start, {kinds['done']} cut done, "
          f"{kinds['note']} notes; slowest POST {slowest * 1000:.0f} ms")  # fmt: skip
    print(f"    lost {len(lost)}, doubled {len(doubled)}, in the log but never accepted "
          f"{len(strangers)}, refused {len(refused)}; sent twice {repeats}, answered as "
          f"saved {answered}; cut entries {len(log['cuts']) - CUTS_BEFORE[label]} for "
          f"{kinds['done']} cut done  {'ok' if ok else 'MISSED'}")  # fmt: skip
    return ok


CUTS_BEFORE: dict[str, int] = {}


def main() -> int:
    import importlib.util

    from logrows import snapshot

    spec = importlib.util.spec_from_file_location("make_history", ROOT / "demo" / "make_history.py")
    history = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = history
    spec.loader.exec_module(history)
    ok = True
    with tempfile.TemporaryDirectory() as folder:
        os.environ["SAWPLAN_HOME"] = folder
        db = str(Path(folder) / "demo-log.sqlite")
        summary = history.build(db)
        shop(db)
        print(f"demo log: {summary.blades} blades, {summary.cut_entries} cut entries, "
              f"{summary.cuts} cuts; {len(JOBS)} jobs sent")  # fmt: skip
        times = page_times(db, "column-bay")
        median = statistics.median(times)
        p95 = statistics.quantiles(times, n=20)[-1]
        good = median < PAGE_GOAL_MS
        ok &= good
        print(f"station page (column-bay, {len(times)} requests in-process): median "
              f"{median:.1f} ms, 95th percentile {p95:.1f} ms, slowest {max(times):.1f} ms "
              f"(goal median < {PAGE_GOAL_MS:.0f} ms)  {'ok' if good else 'MISSED'}")  # fmt: skip
        print(f"taps, {len(JOBS)} stations at once for {DURATION_S:.0f} s against 127.0.0.1:")
        CUTS_BEFORE["SQLite"] = len(snapshot(db)["cuts"])
        ok &= tap_run(db, "SQLite")
        ok &= postgres_run(db)
    return 0 if ok else 1


def postgres_run(sqlite_db: str) -> bool:
    """The same taps on a PostgreSQL copy of the demo log (skipped without a server)."""
    import pg_server
    from logrows import snapshot

    from sawplan.store.transfer import copy_log

    try:
        with pg_server.server() as admin, pg_server.scratch_database(admin) as url:
            fresh = str(Path(sqlite_db).with_name("fresh.sqlite"))
            history = sys.modules["make_history"]
            history.build(fresh)
            copy_log(fresh, url)
            shop(url)
            CUTS_BEFORE["PostgreSQL"] = len(snapshot(url)["cuts"])
            return tap_run(url, "PostgreSQL")
    except RuntimeError as err:
        if "no postgresql binaries" not in str(err).lower():
            raise
        print(f"  PostgreSQL: skipped ({err})")
        return True


if __name__ == "__main__":
    sys.exit(main())
