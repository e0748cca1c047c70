"""Time and peak memory of ``sawplan plan`` on the largest jobs it accepts.

Run:  python bench/bench_limits.py [--time-limit SECONDS]

Each job runs end to end (job file read, plan, text sheet) in its own process
through the real CLI, so the peak resident memory (ru_maxrss of that process)
and the wall time are the command's own.  Jobs (fictional):
- 500 distinct parts, 20 pieces each (10,000 pieces), 6 m and 4 m bars;
- 50 parts × 1,000 pieces (50,000 pieces), 6 m bars;
- the largest accepted: 3 parts × 33,333 pieces (about 100,000, the job limit).
Goals (issue): every job within its --time-limit (honoured within 10 %, after
Python's start-up) and under 1 GB of memory.
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


def job_text(parts: list[tuple[str, int]], stock: list[tuple[str, float]]) -> str:
    lines = ['[job]\nname = "limits"\nkerf = "1.6mm"\ntrim = "5mm"\ngrip = "30mm"\n']
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
    many = [(f"{n / 10:.1f}mm", 20) for n in rng.sample(range(1500, 25000), 500)]
    fifty = [(f"{n}mm", 1000) for n in rng.sample(range(150, 2500), 50)]
    largest = [("95mm", 33_333), ("140mm", 33_333), ("210mm", 33_333)]
    return [
        ("500 parts x 20", job_text(many, [("6m", 60.0), ("4m", 42.0)])),
        ("50 parts x 1000", job_text(fifty, [("6m", 60.0)])),
        ("3 parts x 33333", job_text(largest, [("6m", 60.0)])),
    ]


def run(path: Path, limit: float) -> tuple[float, float, int]:
    """(wall seconds, peak MB, exit code) of one `sawplan plan` in a child process."""
    argv = [sys.executable, "-m", "sawplan", "plan", str(path), "--saw", "mid-production"]
    argv += ["--time-limit", str(limit)]
    started = time.perf_counter()
    child = subprocess.Popen(argv, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(child.pid, 0)
    seconds = time.perf_counter() - started
    return seconds, usage.ru_maxrss / 1024, os.waitstatus_to_exitcode(status)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--time-limit", type=float, default=10.0)
    args = parser.parse_args()
    start_argv = [sys.executable, "-c", "import sawplan.cli.app"]
    started = time.perf_counter()
    subprocess.run(start_argv, cwd=ROOT, check=True)
    startup = time.perf_counter() - started
    print(f"python start-up and CLI import: {startup:.2f} s (not part of the limit)")
    print(f"{'job':<18} {'limit s':>7} {'wall s':>7} {'peak MB':>8} {'exit':>4}  goal")
    ok = True
    with tempfile.TemporaryDirectory() as tmp:
        for name, text in jobs():
            path = Path(tmp) / "job.toml"
            path.write_text(text, encoding="utf-8")
            seconds, peak, code = run(path, args.time_limit)
            within = seconds - startup <= 1.1 * args.time_limit and peak < GOAL_MB
            ok &= within and code == 0
            print(
                f"{name:<18} {args.time_limit:>7.1f} {seconds:>7.2f} {peak:>8.0f} {code:>4}  "
                f"{'met' if within else 'MISSED'} (≤ {1.1 * args.time_limit:.1f} s, < {GOAL_MB} MB)"
            )
    return 0 if ok else 1


if __name__ == "__main__":
    raise SystemExit(main())
