"""Start-up cost of everyday commands against the bare import of typer and pint.

Goal (issues 2, 3, 5): each command at most 1.3× the wall time of
`python -c "import typer, pint"` (the log command against `import typer, pint,
sqlite_utils`), measured side by side on this machine.  Run: python bench/bench_startup.py
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

PY = sys.executable
ROUNDS = int(os.environ.get("BENCH_ROUNDS", "15"))


def wall(cmd: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env)
    return time.perf_counter() - start


def median_time(cmd: list[str], env: dict[str, str]) -> float:
    wall(cmd, env)  # warm the disk cache and pint's registry cache
    return statistics.median(wall(cmd, env) for _ in range(ROUNDS))


def main() -> int:
    tmp = Path(tempfile.mkdtemp(prefix="sawplan-bench-"))
    env = {**os.environ, "SAWPLAN_HOME": str(tmp), "SAWPLAN_DB": str(tmp / "log.sqlite")}
    sawplan = [PY, "-m", "sawplan"]
    base = median_time([PY, "-c", "import typer, pint"], env)
    base_log = median_time([PY, "-c", "import typer, pint, sqlite_utils"], env)
    # a log with a fitted blade, so `log cut` has somewhere to write
    for setup in (
        ["blade", "add", "B1", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm",
         "--blade-length", "3505mm"],
        ["blade", "fit", "B1", "--saw", "mid-production"],
    ):  # fmt: skip
        subprocess.run(sawplan + setup, check=True, env=env, stdout=subprocess.DEVNULL)
    cases = [
        ("sawplan --help", sawplan + ["--help"], base),
        (
            "sawplan weigh A36 channel 150mm 75mm 5.5mm 9mm --length 6m",
            sawplan
            + ["weigh", "A36", "channel", "150mm", "75mm", "5.5mm", "9mm", "--length", "6m"],
            base,
        ),
        (
            "sawplan cut 1045 round 180mm",
            sawplan + ["cut", "1045", "round", "180mm"],
            base,
        ),
        (
            "sawplan cut 1018 tube 60mm 3mm --bundle 3x4",
            sawplan + ["cut", "1018", "tube", "60mm", "3mm", "--bundle", "3x4"],
            base,
        ),
        (
            "sawplan log cut 4140 round 60mm --time 1min",
            sawplan + ["log", "cut", "4140", "round", "60mm", "--time", "1min"],
            base_log,
        ),
    ]
    print(f"baseline  import typer, pint                 {base * 1000:7.1f} ms")
    print(f"baseline  import typer, pint, sqlite_utils   {base_log * 1000:7.1f} ms")
    worst = 0.0
    for label, cmd, ref in cases:
        try:
            t = median_time(cmd, env)
        except subprocess.CalledProcessError:
            print(f"{label:45s}  FAILED to run")
            continue
        ratio = t / ref
        worst = max(worst, ratio)
        flag = "ok" if ratio <= 1.3 else "SLOW"
        print(f"{label:45s} {t * 1000:7.1f} ms  {ratio:4.2f}x  {flag}")
    print(f"worst ratio {worst:.2f} (goal <= 1.30)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
