"""Tool-life economics at shop scale: 2,000 blades, 100,000 cuts at logged band speeds.

Measures, and prints beside each goal:
- reading the log as arrays and fitting Taylor's relation (Weibull AFT with band
  speed) for every material group and blade type (goal < 2 s wall time, in process);
- `sawplan cut … --economics` against `sawplan cut …` on that log (goal: within 1.5×),
  with the log's summary kept in the cache folder (``sawplan.cli.log_life``), as
  every run after the first finds it while the log is unchanged; the first run
  after a change (read, fit, keep) is printed beside it.

The data are synthetic and fictional: each blade runs at one of three band
speeds, most cuts at its own speed and one in five at another; its life at
a constant speed is Weibull (β 1.8) with the mean (C/V)^(1/n) of Taylor's
relation (n 0.2; C set for a mean life of 50 cuts at 60 m/min), spent by
Miner's rule; the last 300 blades are still running (50 cuts each).  Run: python bench/bench_economics.py
(BENCH_KEEP=1 keeps the log in /tmp).
"""

from __future__ import annotations

import math
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
ROUNDS = int(os.environ.get("BENCH_ROUNDS", "5"))
BLADES = 2_000
CUTS = 100_000
RUNNING = 300
SPEEDS = (50.0, 60.0, 70.0)
N_TRUE, SHAPE = 0.2, 1.8
CUTS_AT_60 = 50  # mean life at 60 m/min, in cuts of the blade's section
SECTIONS = (  # (spec, area mm², material, group)
    ("round 60mm", 2827.4333882308138, "4140", "alloy-steel"),
    ("round 100mm", 7853.981633974483, "1045", "carbon-steel"),
    ("round 40mm", 1256.6370614359173, "304", "austenitic-stainless"),
)


def build(path: Path) -> int:
    """Write the synthetic log; returns the number of cut entries."""
    import datetime as dt

    from sawplan.store import connect, write_transaction

    rng = random.Random(20250301)
    m = 1.0 / N_TRUE
    blades, cuts = [], []
    day0 = dt.date(2024, 1, 1)
    for i in range(BLADES):
        own = SPEEDS[i % len(SPEEDS)]
        spec, area, material, group = SECTIONS[i % len(SECTIONS)]
        area_cm2 = area / 100.0
        c = 60.0 * (CUTS_AT_60 * area_cm2) ** N_TRUE  # Taylor's C for this group (invented)
        eta = (c / own) ** m / math.gamma(1.0 + 1.0 / SHAPE)
        left = eta * rng.weibullvariate(1.0, SHAPE)  # life in cm² at the blade's own speed
        running = i >= BLADES - RUNNING
        k = 0
        while True:
            v = own if rng.random() < 0.8 else rng.choice(SPEEDS)
            use = area_cm2 * (v / own) ** m
            if running and k >= CUTS_AT_60:
                break
            cuts.append(
                {
                    "blade_id": i + 1,
                    "cut_on": (day0 + dt.timedelta(days=k // 4)).isoformat(),
                    "material": material,
                    "material_group": group,
                    "section": spec,
                    "area_mm2": area,
                    "pieces": 1,
                    "count": 1,
                    "band_speed_m_min": v,
                    "coolant": 1,
                }
            )
            k += 1
            if not running and use >= left:
                break  # worn out during this cut (logged whole, as a shop logs it)
            left -= use
        blades.append(
            {
                "id": i + 1,
                "tag": f"E-{i + 1:05d}",
                "blade_material": "bi-metal",
                "grade": ("M42", "M51")[i % 2],
                "width_mm": 27.0,
                "thickness_mm": 0.9,
                "tpi_coarse": 3.0,
                "tpi_fine": 4.0,
                "price": (58.0, 64.0)[i % 2],
                "status": "removed" if running else "retired",
                "retired_on": None if running else "2024-12-01",
                "retire_cause": None if running else "dull",
                "added_on": "2024-01-02",
            }
        )
    with connect(path) as db, write_transaction(db):
        db.insert_many("blades", blades)
        db.insert_many("cuts", cuts)
    return len(cuts)


def fit_all(path: Path) -> tuple[float, list]:
    """Seconds to read the arrays and fit every (group, blade type), and the fits."""
    from sawplan.life.speed_life import fit_speed_life
    from sawplan.store import connect
    from sawplan.store.speed_rows import speed_life_rows

    start = time.perf_counter()
    with connect(path, create=False) as db:
        rows = speed_life_rows(db)
    fits = []
    for key in sorted(set(zip(rows.material_groups, rows.blade_types, strict=True))):
        part = rows.only(material_group=key[0], blade_type=key[1])
        fits.append((key, fit_speed_life(part.blade, part.area_cm2, part.speed_m_min, part.failed)))
    return time.perf_counter() - start, fits


def cli_seconds(args: list[str], env: dict[str, str], *, cold: bool = False) -> float:
    """Median wall time of the command; ``cold`` empties the cache folder before each run."""
    times = []
    for _ in range(ROUNDS):
        if cold:
            shutil.rmtree(Path(env["SAWPLAN_HOME"]) / "cache", ignore_errors=True)
        start = time.perf_counter()
        subprocess.run([PY, "-m", "sawplan", *args], check=True, env=env, capture_output=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    folder = Path(tempfile.mkdtemp(prefix="sawplan-bench-econ-"))
    path = folder / "log.sqlite"
    try:
        entries = build(path)
        print(f"log: {BLADES:,} blades, {entries:,} cut entries at logged band speeds")
        import sawplan.life.speed_life  # noqa: F401  (imports are not the fit's time)
        import sawplan.store.speed_rows  # noqa: F401

        fit_all(path)  # warm the file cache and scipy's imports
        seconds, fits = fit_all(path)
        goal = "ok" if seconds < 2.0 else "OVER"
        print(f"read + fit every group and blade type: {seconds:.2f} s (goal < 2 s) {goal}")
        for key, fit in fits:
            if fit.fitted:
                print(
                    f"  {key[0]} / {key[1]}: n {fit.n:.3f} ({fit.n_ci[0]:.3f}-{fit.n_ci[1]:.3f}), "
                    f"C {fit.c_m_min:.0f} m/min, {fit.blades} blades (invented truth: n {N_TRUE})"
                )
            else:
                print(f"  {key[0]} / {key[1]}: no fit: {fit.reason}")
        home = folder / "home"  # the cache folder lives here, not in the user's
        env = dict(os.environ, SAWPLAN_DB=str(path), SAWPLAN_HOME=str(home))
        cut = ["cut", "4140", "round", "60mm"]
        plain = cli_seconds(cut, env)
        cold = cli_seconds([*cut, "--economics"], env, cold=True)
        warm = cli_seconds([*cut, "--economics"], env)
        ratio = warm / plain
        goal = "ok" if ratio <= 1.5 else "OVER"
        print(
            f"cut {plain:.2f} s, cut --economics {warm:.2f} s with the log's summary kept: "
            f"{ratio:.2f}x (goal <= 1.5x) {goal}"
        )
        print(
            f"  first run after the log changed (read, fit, keep): {cold:.2f} s, "
            f"{cold / plain:.2f}x (no goal: once per change of the log)"
        )
    finally:
        if os.environ.get("BENCH_KEEP"):
            print(f"log kept at {path}")
        else:
            shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
