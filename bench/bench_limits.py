"""Time and peak memory of the largest jobs ``sawplan`` accepts, and reads that must not hang.

Run:  python bench/bench_limits.py [--time-limit SECONDS] [--short SECONDS]

Each job runs end to end (job file read, plan, text sheet) in its own process
through the real CLI, so the peak resident memory (``ru_maxrss`` of that child,
from ``os.wait4``) and the wall time are the command's own.  Jobs (fictional):
- 500 distinct parts × 20 pieces (10,000 pieces) on 20 stock lines of one section;
- 500 distinct parts × 100 pieces (50,000 pieces) on 6 m and 4 m bars;
- 50 parts × 1,000 pieces (50,000 pieces) on 6 m bars;
- the most parts accepted: 1,000 distinct parts × 50 pieces on 10 stock lines;
- the most pieces accepted: 3 parts × 33,333 pieces (about 100,000).
Each runs with ``--time-limit`` (default 10 s) and again with a short one
(default 5 s: the first plan and the sheet of 50,000 pieces take about 2 s).
Goals (issue): every job within its limit (honoured within 10 %, after
Python's start-up) and under 1 GB of memory.

Then the reads and the forecasts that once ran away:
- a job whose ``stock_file`` is a FIFO, and one naming ``/dev/zero`` with
  ``--allow``: refused at once (goal < 2 s, exit 3);
- ``forecast`` for 1,000 m² at 100 cm² a blade (100,000 blades), and the core
  forecast of a Weibull life whose runs need 2,000 blades (simulated, the
  largest) and 100,000 blades (the normal sum): goal < 2 s and < 300 MB each.
"""

from __future__ import annotations

import argparse
import os
import random
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
GOAL_MB = 1024
QUICK_S = 2.0
QUICK_MB = 300
HANG_S = 120  # a child still running after this is killed (exit -9 in the table)


def job_text(
    parts: list[tuple[str, int]], stock: list[tuple[str, float]], stock_file: str = ""
) -> str:
    head = '[job]\nname = "limits"\nkerf = "1.6mm"\ntrim = "5mm"\ngrip = "30mm"\n'
    if stock_file:
        head += f'stock_file = "{stock_file}"\n'
    lines = [head]
    for length, price in stock:
        lines.append(
            f'[[stock]]\nmaterial = "1018"\nsection = "round 30mm"\nlength = "{length}"\n'
            f"price = {price}\n"
        )
    for i, (length, count) in enumerate(parts):
        lines.append(
            f'[[part]]\nname = "p{i}"\nmaterial = "1018"\nsection = "round 30mm"\n'
            f'length = "{length}"\ncount = {count}\n'
        )
    return "\n".join(lines)


def jobs() -> list[tuple[str, str]]:
    rng = random.Random(3)
    tenths = [f"{n / 10:.1f}mm" for n in rng.sample(range(1500, 25000), 500)]
    twenty = [(f"{3000 + 250 * i}mm", 30.0 + 3.1 * i) for i in range(20)]
    fifty = [(f"{n}mm", 1000) for n in rng.sample(range(150, 2500), 50)]
    most = [(f"{n / 10:.1f}mm", 50) for n in rng.sample(range(1500, 60000), 1000)]
    ten = [(f"{9000 + 300 * i}mm", 30.0 + 3.1 * i) for i in range(10)]
    largest = [("95mm", 33_333), ("140mm", 33_333), ("210mm", 33_333)]
    return [
        ("500 parts x 20, 20 stock", job_text([(t, 20) for t in tenths], twenty)),
        ("500 parts x 100", job_text([(t, 100) for t in tenths], [("6m", 60.0), ("4m", 42.0)])),
        ("50 parts x 1000", job_text(fifty, [("6m", 60.0)])),
        ("1000 parts, 10 stock", job_text(most, ten)),
        ("3 parts x 33333", job_text(largest, [("6m", 60.0)])),
    ]


def run(argv: list[str]) -> tuple[float, float, int, str, float]:
    """(wall s, peak MB, exit code, last stderr line, CPU s) of one child process.

    The CPU seconds (user + system) are the steadier figure on a shared machine."""
    import threading

    started = time.perf_counter()
    child = subprocess.Popen(argv, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    stop = threading.Timer(HANG_S, child.kill)  # a hang is a miss, not a stuck bench
    stop.start()
    assert child.stderr is not None
    err = child.stderr.read().decode("utf-8", "replace").strip().splitlines()
    _, status, usage = os.wait4(child.pid, 0)
    stop.cancel()
    seconds = time.perf_counter() - started
    code = os.waitstatus_to_exitcode(status)
    cpu = usage.ru_utime + usage.ru_stime
    return seconds, usage.ru_maxrss / 1024, code, (err or [""])[-1], cpu


def sawplan(*args: str) -> list[str]:
    return [sys.executable, "-m", "sawplan", *args]


FORECAST = """
from sawplan.life.forecast import forecast_blades
from sawplan.life.weibull import WeibullFit
fit = WeibullFit(shape=1.5, scale_cm2={scale}, n=10, failures=10, censored=0,
                 shape_ci=(1.5, 1.5), scale_ci_cm2=({scale}, {scale}), confidence=0.9,
                 log_likelihood=0.0, b10_ci_cm2=(0.0, 0.0), shape_se=0.0, scale_se_cm2=0.0)
fc = forecast_blades({area}, fit)
assert fc.method == "{method}", fc.method
"""


def plans(limit: float, short: float, startup: float) -> bool:
    ok = True
    print(f"{'job':<26} {'limit s':>7} {'wall s':>7} {'CPU s':>6} {'peak MB':>8} {'exit':>4}  goal")
    with tempfile.TemporaryDirectory() as tmp:
        for name, text in jobs():
            path = Path(tmp) / "job.toml"
            path.write_text(text, encoding="utf-8")
            for seconds_given in (limit, short):
                argv = sawplan("plan", str(path), "--saw", "mid-production")
                seconds, peak, code, _, cpu = run([*argv, "--time-limit", str(seconds_given)])
                within = seconds - startup <= 1.1 * seconds_given and peak < GOAL_MB
                ok &= within and code == 0
                print(
                    f"{name:<26} {seconds_given:>7.1f} {seconds:>7.2f} {cpu:>6.2f} {peak:>8.0f} "
                    f"{code:>4}  "
                    f"{'met' if within else 'MISSED'} "
                    f"(≤ {1.1 * seconds_given:.1f} s after start-up, < {GOAL_MB} MB)"
                )
    return ok


def quick_ones() -> bool:
    ok = True
    print(
        f"\n{'refusal or forecast':<40} {'wall s':>7} {'CPU s':>6} {'peak MB':>8} {'exit':>4}  goal"
    )
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        os.mkfifo(folder / "stock.csv")
        (folder / "fifo.toml").write_text(job_text([("100mm", 5)], [], "stock.csv"), "utf-8")
        (folder / "zero.toml").write_text(job_text([("100mm", 5)], [], "/dev/zero"), "utf-8")
        db = str(folder / "log.db")
        cases = [
            ("plan: stock_file a FIFO", sawplan("plan", str(folder / "fifo.toml")), 3),
            (
                "plan --allow: stock_file /dev/zero",
                sawplan("plan", str(folder / "zero.toml"), "--allow"),
                3,
            ),
            (
                "forecast --area 1000m2 --life 100cm2",
                sawplan("forecast", "--area", "1000m2", "--life", "100cm2", "--db", db),
                0,
            ),
            (
                "core forecast, 2,000 blades a run",
                [
                    sys.executable,
                    "-c",
                    FORECAST.format(scale=1e4, area=1.8e7, method="weibull-simulation"),
                ],
                0,
            ),
            (
                "core forecast, 100,000 blades a run",
                [
                    sys.executable,
                    "-c",
                    FORECAST.format(scale=1e2, area=9e6, method="weibull-normal"),
                ],
                0,
            ),
        ]
        for name, argv, want in cases:
            seconds, peak, code, last, cpu = run(argv)
            within = seconds < QUICK_S and peak < QUICK_MB and code == want
            ok &= within
            print(
                f"{name:<40} {seconds:>7.2f} {cpu:>6.2f} {peak:>8.0f} {code:>4}  "
                f"{'met' if within else 'MISSED'} (< {QUICK_S:g} s, < {QUICK_MB} MB, exit {want})"
            )
            if code != want:
                print(f"    {last}")
    return ok


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--time-limit", type=float, default=10.0)
    parser.add_argument("--short", type=float, default=5.0)
    args = parser.parse_args()
    started = time.perf_counter()
    subprocess.run([sys.executable, "-c", "import sawplan.cli.app"], cwd=ROOT, check=True)
    startup = time.perf_counter() - started
    print(f"python start-up and CLI import: {startup:.2f} s (not part of the limit)")
    ok = plans(args.time_limit, args.short, startup)
    ok &= quick_ones()
    return 0 if ok else 1


if __name__ == "__main__":
    raise SystemExit(main())
