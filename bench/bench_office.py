"""The office pages' server time on the demo log, with the demo jobs sent to their saws.

The demo shop's year of blade history (``demo/make_history.py``: 52 blades,
1,513 cut entries) and the four demo jobs queued (``bench_station.shop``);
each office page and chart CSV answered in-process (Starlette's TestClient: no
network, the server's own work) ``N`` times after two warm-up requests.
Goal (sawplan's own): every page's median under 1 s, every chart CSV's under
0.5 s, on this 2-core machine.  The life page fits the whole log, works out
the Weibull band and draws three charts on every request (no cache: a failure
logged a moment ago must show).

Run: python bench/bench_office.py  (BENCH_OFFICE_N=5 for a shorter run)
"""

from __future__ import annotations

import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "bench"))
N = int(os.environ.get("BENCH_OFFICE_N", "10"))
PAGE_GOAL_MS = 1000.0
CSV_GOAL_MS = 500.0
PAGES = ("/office/life", "/office/calibration", "/office/jobs", "/office/shelf",
         "/office/blades", "/office/saws", "/office/jobs/1")  # fmt: skip
CSVS = ("/office/life/weibull/chart.csv", "/office/life/modes/chart.csv",
        "/office/life/cost/chart.csv", "/office/calibration/trend/chart.csv",
        "/office/shelf/balance/chart.csv")  # fmt: skip


def main() -> None:
    from bench_station import shop
    from starlette.testclient import TestClient

    from sawplan.station.app import create_app

    spec = ROOT / "demo" / "make_history.py"
    import importlib.util

    loader = importlib.util.spec_from_file_location("demo_make_history", spec)
    history = importlib.util.module_from_spec(loader)
    sys.modules[loader.name] = history
    loader.loader.exec_module(history)
    with tempfile.TemporaryDirectory() as folder:
        db = str(Path(folder) / "demo-log.sqlite")
        history.build(db)
        shop(db)
        app = create_app(db, units="metric")
        worst = {"page": 0.0, "csv": 0.0}
        with TestClient(app, client=("127.0.0.1", 5000), base_url="http://127.0.0.1") as client:
            print(f"office pages on the demo log, median of {N} (ms):")
            for kind, paths in (("page", PAGES), ("csv", CSVS)):
                for path in paths:
                    for _ in range(2):
                        assert client.get(path).status_code == 200, path
                    times = []
                    for _ in range(N):
                        began = time.perf_counter()
                        answer = client.get(path)
                        times.append((time.perf_counter() - began) * 1000.0)
                        assert answer.status_code == 200
                    median = statistics.median(times)
                    worst[kind] = max(worst[kind], median)
                    print(
                        f"  {path:40s} {median:8.1f}   (max {max(times):.1f}, {len(answer.content):,} bytes)"
                    )
    for kind, goal in (("page", PAGE_GOAL_MS), ("csv", CSV_GOAL_MS)):
        verdict = "met" if worst[kind] < goal else "MISSED"
        print(f"slowest {kind} median {worst[kind]:.1f} ms; goal < {goal:.0f} ms: {verdict}")


if __name__ == "__main__":
    main()
