"""What the damage check costs each opening of the blade log (sawplan/store/safety.py).

    python bench/bench_write_check.py

Builds the demo shop's log (about 350 kB), and copies grown to about 4 MB and
30 MB by repeating its cut entries, then times on each:

- SQLite's ``quick_check`` and ``integrity_check`` alone;
- opening the log for a write and logging one cut entry (``store.connect`` and
  ``Log.insert`` as ``sawplan log cut`` does), with the check as a new process
  makes it (its memory of checked file states cleared) and with the check
  switched off: the difference is the check's cost per write;
- a second opening for reading that finds the file as it last checked it
  (the station between writes, a command that opens the log twice): the check
  is skipped, so it costs what an unchecked opening costs.

Medians of 15 runs; on a busy machine run it twice.

Goals: at most 10 ms per write on the demo log, 40 ms at 4 MB (every opening
checked in full), 80 ms at 30 MB (quick_check; the full check one opening in 25).
"""

from __future__ import annotations

import shutil
import sqlite3
import statistics
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "demo"))

GOALS_MS = {"demo": 10.0, "4 MB": 40.0, "30 MB": 80.0}


def grow(source: Path, target: Path, times: int) -> Path:
    shutil.copy(source, target)
    conn = sqlite3.connect(target)
    cols = [r[1] for r in conn.execute("PRAGMA table_info(cuts)") if r[1] != "id"]
    names = ", ".join(cols)
    top = conn.execute("SELECT MAX(id) FROM cuts").fetchone()[0]
    for _ in range(times):
        conn.execute(f"INSERT INTO cuts ({names}) SELECT {names} FROM cuts WHERE id <= {top}")
    conn.commit()
    conn.execute("VACUUM")
    conn.close()
    return target


def one_write(path: Path) -> float:
    from sawplan.store import connect
    from sawplan.store.db import run_write

    started = time.perf_counter()
    with connect(path) as db:
        blade = db.scalar("SELECT id FROM blades ORDER BY id LIMIT 1")
        row = {"blade_id": blade, "cut_on": "2026-11-27", "material": "304",
               "material_group": "austenitic-stainless", "section": "round 60mm",
               "area_mm2": 2827.4, "pieces": 1, "count": 1, "coolant": 1}  # fmt: skip
        run_write(db, lambda: db.insert("cuts", row))
    return time.perf_counter() - started


def one_read(path: Path) -> float:
    from sawplan.store import connect

    started = time.perf_counter()
    with connect(path, create=False) as db:
        db.scalar("SELECT COUNT(*) FROM blades")
    return time.perf_counter() - started


def timed(path: Path, *, check: bool, fresh: bool, runs: int, step=None) -> float:
    from sawplan.store import safety

    real = safety.open_check
    if not check:
        safety.open_check = lambda conn, p: None  # type: ignore[assignment]
    try:
        times = []
        for _ in range(runs):
            if fresh:
                safety._CHECKED.clear()
            times.append((step or one_write)(path))
        return statistics.median(times)
    finally:
        safety.open_check = real


def pragma_ms(path: Path, pragma: str) -> float:
    conn = sqlite3.connect(path)
    try:
        conn.execute(pragma).fetchall()  # warm the page cache, as a second opening finds it
        started = time.perf_counter()
        conn.execute(pragma).fetchall()
        return (time.perf_counter() - started) * 1000
    finally:
        conn.close()


def main() -> None:
    import make_history

    from sawplan.store import safety

    with tempfile.TemporaryDirectory(prefix="sawplan-bench-check-") as tmp:
        folder = Path(tmp)
        demo = folder / "demo.sqlite"
        make_history.build(demo)
        logs = {"demo": demo, "4 MB": grow(demo, folder / "four.sqlite", 16),
                "30 MB": grow(demo, folder / "thirty.sqlite", 128)}  # fmt: skip
        print(f"{'log':6} {'size':>9} {'quick':>8} {'full':>8} {'check':>6} "
              f"{'write':>8} {'unchecked':>9} {'cost':>7} {'again':>7}  goal")  # fmt: skip
        for name, path in logs.items():
            size = path.stat().st_size
            quick = pragma_ms(path, "PRAGMA quick_check")
            full = pragma_ms(path, "PRAGMA integrity_check")
            due = safety.check_due(size) if size <= safety.FULL_CHECK_MAX_BYTES else "quick"
            runs = 15
            with_check = timed(path, check=True, fresh=True, runs=runs) * 1000
            without = timed(path, check=False, fresh=True, runs=runs) * 1000
            one_read(path)  # this state checked once
            again = (timed(path, check=True, fresh=False, runs=runs, step=one_read)
                     - timed(path, check=False, fresh=False, runs=runs, step=one_read)) * 1000  # fmt: skip
            cost = with_check - without
            goal = GOALS_MS[name]
            verdict = "ok" if cost <= goal else "MISSED"
            print(f"{name:6} {size / 1e6:7.2f}MB {quick:6.1f}ms {full:6.1f}ms {due:>6} "
                  f"{with_check:6.1f}ms {without:7.1f}ms {cost:5.1f}ms {again:5.1f}ms  "
                  f"<= {goal:.0f} ms {verdict}")  # fmt: skip
        print(
            "(size over 4 MB: quick_check at each opening, the full check one in "
            f"{safety.ROUTINE_CHECK_ONE_IN}; 'again': the file as last checked, check skipped)"
        )


if __name__ == "__main__":
    main()
