"""The blade log at shop scale: 100,000 cuts over 2,000 blades, on SQLite and PostgreSQL.

Measures, and prints beside each goal, for each engine:
- building the log with a bulk insert (no goal; says how long a big import takes), then
  ANALYZE on PostgreSQL, as ``sawplan import`` does after a load of that size;
- `sawplan life` on it (goal on SQLite < 2 s wall time; on PostgreSQL within 2× of SQLite);
- logging one cut, `sawplan log cut ...` (goal on SQLite < 1.3 × `python -c "import typer,
  pint, sqlite_utils"`; PostgreSQL's is reported beside it);
- bytes per cut on disk (SQLite), table plus its indexes (goal < 300).

PostgreSQL: the server of ``SAWPLAN_TEST_PG`` (default the local trust server), or a
private one started from Debian's binaries (``tests/pg_server.py``), in a database
made for the run and dropped afterwards.

The data are synthetic and fictional: blade lives drawn from a Weibull
distribution (β 1.6, η 30,000 cm²), most blades retired, the last 300 still
running.  Run: python bench/bench_log.py (BENCH_KEEP=1 keeps the log in /tmp).
"""

from __future__ import annotations

import os
import random
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

PY = sys.executable
ROUNDS = int(os.environ.get("BENCH_ROUNDS", "7"))
BLADES = 2_000
CUTS = 100_000
RUNNING = 300  # blades still fitted or removed unworn (censored)

# Runs the CLI with the blade-log command modules registered, whether or not
# sawplan.cli.app lists them yet.
CLI = (
    "import importlib, sys\n"
    "import sawplan.cli.app as a\n"
    "for m in ('sawplan.cli.cmd_saw', 'sawplan.cli.cmd_blade', 'sawplan.cli.cmd_log',\n"
    "          'sawplan.cli.cmd_life', 'sawplan.cli.cmd_logdata'):\n"
    "    if m not in a.COMMAND_MODULES:\n"
    "        importlib.import_module(m).register(a.app)\n"
    "a.main(sys.argv[1:])\n"
)

SECTIONS = (  # (spec, area mm², material, group)
    ("round 60mm", 2827.4333882308138, "4140", "alloy-steel"),
    ("round 100mm", 7853.981633974483, "1045", "carbon-steel"),
    ("flat 100mm 25mm", 2500.0, "A36", "carbon-steel"),
    ("round 40mm", 1256.6370614359173, "304", "austenitic-stainless"),
)
MODES = ("dull", "stripped", "dull", "weld", "body-crack", "dull", "crooked", "chips-welded")


def build(path: str | Path) -> float:
    """Write the synthetic log; returns the seconds it took."""
    from sawplan.saws import load_saws
    from sawplan.store import connect, write_transaction
    from sawplan.store.db import refresh_statistics
    from sawplan.store.records import saw_to_row

    rng = random.Random(20240611)
    start = time.perf_counter()
    with connect(path) as db, write_transaction(db):
        saws = list(load_saws().values())
        saw_ids = [db.insert("saws", saw_to_row(s) | {"added_on": "2023-01-02"}) for s in saws]
        lives_cm2 = [30_000 * rng.weibullvariate(1.0, 1.6) for _ in range(BLADES)]
        weights = [life / sum(lives_cm2) for life in lives_cm2]
        per_blade = [max(1, round(CUTS * w)) for w in weights]
        per_blade[-1] += CUTS - sum(per_blade)
        blades, cuts, events, fittings = [], [], [], []
        for i in range(BLADES):
            running = i >= BLADES - RUNNING
            tag = f"B-{i + 1:05d}"
            blades.append(  # ids 1, 2, ... in this order
                {
                    "tag": tag,
                    "blade_material": "bi-metal",
                    "grade": ("M42", "M51")[i % 2],
                    "width_mm": 27.0,
                    "thickness_mm": 0.9,
                    "length_mm": 3660.0,
                    "tpi_coarse": (3.0, 4.0, 2.0)[i % 3],
                    "tpi_fine": (4.0, 6.0, 3.0)[i % 3],
                    "price": (58.0, 64.0)[i % 2],
                    "welded": "bought",
                    "status": "fitted"
                    if running and i >= BLADES - len(saws)
                    else "removed"
                    if running
                    else "retired",
                    "retired_on": None if running else "2024-06-01",
                    "retire_cause": None if running else MODES[i % len(MODES)],
                    "added_on": "2023-01-02",
                }
            )
            if not running:
                events.append(
                    {
                        "blade_id": i + 1,
                        "happened_on": "2024-06-01",
                        "kind": "failure",
                        "mode": MODES[i % len(MODES)],
                    }
                )
            if running and i >= BLADES - len(saws):
                fittings.append(
                    {
                        "blade_id": i + 1,
                        "saw_id": saw_ids[BLADES - 1 - i],
                        "fitted_on": "2024-05-01",
                    }
                )
            n = per_blade[i]
            for k in range(n):
                spec, area, material, group = SECTIONS[(i + k) % len(SECTIONS)]
                model = area / 2000.0
                cuts.append(
                    {
                        "blade_id": i + 1,
                        "saw_id": saw_ids[i % len(saw_ids)],
                        "cut_on": f"2024-{1 + k % 12:02d}-{1 + k % 28:02d}",
                        "material": material,
                        "material_group": group,
                        "section": spec,
                        "area_mm2": area,
                        "pieces": 1,
                        "count": 1,
                        "band_speed_m_min": 60.0,
                        "time_min": round(model * rng.uniform(0.9, 1.4), 2),
                        "predicted_time_min": model,
                        "coolant": 1,
                        "job": f"J-{2000 + k % 500}",
                        "heat": f"H{77000 + i % 900}",
                    }
                )
        for table, rows in (("blades", blades), ("fittings", fittings), ("events", events),
                            ("cuts", cuts)):  # fmt: skip
            db.insert_many(table, rows)
    with connect(path) as db:  # as `sawplan import` does after a load of this size
        refresh_statistics(db, {"blades": BLADES, "cuts": CUTS})
    return time.perf_counter() - start


def bytes_per_cut(path: Path) -> tuple[float, int]:
    import sqlite3

    conn = sqlite3.connect(path)
    try:
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        names = [
            r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE tbl_name = 'cuts'")
        ]
        marks = ",".join("?" * len(names))
        total = conn.execute(
            f"SELECT SUM(pgsize) FROM dbstat WHERE name IN ({marks})", names
        ).fetchone()[0]
        count = conn.execute("SELECT COUNT(*) FROM cuts").fetchone()[0]
    finally:
        conn.close()
    return total / count, count


def wall(cmd: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, env=env)
    return time.perf_counter() - start


def median_time(cmd: list[str], env: dict[str, str], rounds: int = ROUNDS) -> float:
    wall(cmd, env)  # warm caches (disk, pint registry, .pyc)
    return statistics.median(wall(cmd, env) for _ in range(rounds))


def main() -> int:
    tmp = Path(tempfile.mkdtemp(prefix="sawplan-bench-log-"))
    try:
        return run(tmp)
    finally:
        if not os.environ.get("BENCH_KEEP"):
            shutil.rmtree(tmp, ignore_errors=True)


def engine_times(db: str, tmp: Path, after_build=lambda: None) -> dict[str, float]:
    """Build the log at ``db``, then time `sawplan life` and one `sawplan log cut` on it."""
    env = {**os.environ, "SAWPLAN_HOME": str(tmp), "SAWPLAN_DB": db}
    built = build(db)
    after_build()
    sawplan = [PY, "-c", CLI]
    life = median_time(sawplan + ["life"], env, rounds=3)
    tag = f"B-{BLADES:05d}"  # fitted on a saw
    one = median_time(
        sawplan + ["log", "cut", "4140", "round", "60mm", "--blade", tag, "--time", "2min"], env
    )
    return {"built": built, "life": life, "one": one}


def run(tmp: Path) -> int:
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))
    import pg_server

    measured: list[tuple[float, int]] = []
    file_db = tmp / "blade-log.sqlite"
    lite = engine_times(
        str(file_db), tmp, after_build=lambda: measured.append(bytes_per_cut(file_db))
    )
    ((per_cut, count),) = measured
    with pg_server.server() as admin, pg_server.scratch_database(admin) as url:
        pg = engine_times(url, tmp)
    base = median_time([PY, "-c", "import typer, pint, sqlite_utils"], {**os.environ})
    ok = True
    print(f"log: {count:,} cuts over {BLADES:,} blades")
    print(f"{'':38s} {'SQLite':>9s} {'PostgreSQL':>11s}")
    print(f"{'bulk insert':38s} {lite['built']:8.2f}s {pg['built']:10.2f}s")
    print(f"{'sawplan life':38s} {lite['life']:8.2f}s {pg['life']:10.2f}s")
    print(f"{'sawplan log cut (one cut)':38s} {lite['one']:8.3f}s {pg['one']:10.3f}s")
    for label, value, goal in (
        ("sawplan life, SQLite (s)", lite["life"], 2.0),
        ("life: PostgreSQL ÷ SQLite", pg["life"] / lite["life"], 2.0),
        ("bytes per cut (table + indexes)", per_cut, 300.0),
        ("log cut ÷ import typer, pint, sqlite_utils", lite["one"] / base, 1.3),
    ):
        flag = "ok" if value < goal else "OVER"
        ok &= value < goal
        print(f"{label:42s} {value:9.2f}   goal < {goal:g}   {flag}")
    print(f"{'(log cut on PostgreSQL ÷ the same import)':42s} {pg['one'] / base:9.2f}")
    return 0 if ok else 1


if __name__ == "__main__":
    raise SystemExit(main())
