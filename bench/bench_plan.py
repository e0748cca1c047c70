"""Time of ``sawplan plan``: the demo jobs as a user runs them, and a mid-size job in-process.

1. The demo jobs (``demo/jobs/``) on the demo shop's log, each ``sawplan plan
   JOB --db LOG`` in a fresh process, as a user types it: wall time and CPU
   time (the steadier figure on a shared machine), median of ``BENCH_ROUNDS``
   runs after one warm-up, beside the bare ``python -c "import typer, pint"``.
   Goal: each demo job plans in under 1 s end to end.  Bytecode is written
   (``PYTHONDONTWRITEBYTECODE`` is cleared for the runs), as in an installed
   package; otherwise every run compiles sawplan afresh.
2. A mid-size fictional job in-process: three material/section groups, 14 part
   lengths, about 600 pieces, bars of two lengths plus rack remnants.  Goal:
   the whole plan (load, optimise, time, blades, cost) under 2 s and every
   sheet (text, HTML, Markdown, CSV) under 0.2 s.

Run: python bench/bench_plan.py (``--demo`` or ``--job`` for one part).
"""

from __future__ import annotations

import os
import random
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

GOAL_PLAN_S = 2.0
GOAL_SHEETS_S = 0.2
GOAL_DEMO_S = 1.0
ROUNDS = int(os.environ.get("BENCH_ROUNDS", "5"))
REPO = Path(__file__).resolve().parent.parent
DEMO_JOBS = ("frame-kit", "pump-blanks", "billet-slices", "rail-posts")


def job_text(seed: int = 7) -> str:
    rng = random.Random(seed)
    lines = ['[job]\nname = "bench job"\nkerf = "1.6mm"\ntrim = "5mm"\ngrip = "20mm"']
    lines.append("shop_rate = 60\nblade_price = 85\n")
    groups = [("4140", "round 60mm"), ("304", "round 40mm"), ("6061-T6", "flat 80mm 20mm")]
    for material, section in groups:
        for length, count, price in (("6m", None, 200), ("3m", 10, 100)):
            count_line = f"\ncount = {count}" if count else ""
            lines.append(
                f'[[stock]]\nmaterial = "{material}"\nsection = "{section}"\n'
                f'length = "{length}"{count_line}\nprice = {price}\n'
            )
        for _ in range(2):
            lines.append(
                f'[[stock]]\nmaterial = "{material}"\nsection = "{section}"\n'
                f'length = "{rng.randint(400, 1500)}mm"\ncount = 1\nremnant = true\n'
            )
    n = 0
    for material, section in groups:
        for _ in range(rng.randint(4, 6)):
            n += 1
            lines.append(
                f'[[part]]\nname = "part {n}"\nmaterial = "{material}"\nsection = "{section}"\n'
                f'length = "{rng.randint(300, 24000) / 10}mm"\ncount = {rng.randint(10, 60)}\n'
            )
    return "\n".join(lines)


def run_once(cmd: list[str], env: dict[str, str], cwd: Path) -> tuple[float, float]:
    """(wall, CPU) seconds of one process, CPU = its user + system time."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, env=env, cwd=cwd)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def medians(cmd: list[str], env: dict[str, str], cwd: Path) -> tuple[float, float]:
    run_once(cmd, env, cwd)  # warm the disk cache, the bytecode and pint's registry cache
    runs = [run_once(cmd, env, cwd) for _ in range(ROUNDS)]
    return statistics.median(w for w, _ in runs), statistics.median(c for _, c in runs)


def demo_jobs() -> bool:
    """Each demo job as a separate process on the demo log; True when every one meets the goal."""
    sys.path.insert(0, str(REPO / "demo"))
    import make_history

    with tempfile.TemporaryDirectory(prefix="sawplan-bench-plan-") as tmp:
        log = Path(tmp) / "demo-log.sqlite"
        make_history.build(log)
        env = {**os.environ, "SAWPLAN_HOME": tmp, "SAWPLAN_NO_PROGRESS": "1"}
        for key in ("PYTHONDONTWRITEBYTECODE", "SAWPLAN_DB", "SAWPLAN_SAWS", "SAWPLAN_MATERIALS"):
            env.pop(key, None)
        base_wall, base_cpu = medians([sys.executable, "-c", "import typer, pint"], env, REPO)
        print(f"demo jobs, one process each, median of {ROUNDS} (wall / CPU seconds)")
        baseline = 'python -c "import typer, pint"'
        print(f"  {baseline:34s} {base_wall:6.3f}  {base_cpu:6.3f}")
        ok = True
        for job in DEMO_JOBS:
            cmd = [sys.executable, "-m", "sawplan", "plan", str(REPO / "demo" / "jobs" / f"{job}.toml"),
                   "--db", str(log)]  # fmt: skip
            wall, cpu = medians(cmd, env, REPO)
            ok &= wall < GOAL_DEMO_S
            flag = "ok" if wall < GOAL_DEMO_S else "OVER"
            print(
                f"  {'plan ' + job:34s} {wall:6.3f}  {cpu:6.3f}   {wall / base_wall:4.1f}× and "
                f"{cpu / base_cpu:4.1f}× the import   goal < {GOAL_DEMO_S:g} s wall  {flag}"
            )
    return ok


def mid_size_job() -> bool:
    """The mid-size job in-process; True when the plan and the sheets meet their goals."""
    from sawplan.cli.cmd_plan import plan_csv
    from sawplan.cutlist.jobfile.load import load_job
    from sawplan.cutlist.plan.job import plan_job
    from sawplan.cutlist.sheets.html import render_html
    from sawplan.cutlist.sheets.markdown import render_markdown
    from sawplan.cutlist.sheets.text import render_plan
    from sawplan.materials import load_catalogue
    from sawplan.saws import get_saw

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "job.toml"
        path.write_text(job_text(), encoding="utf-8")
        catalogue = load_catalogue()
        saw = get_saw("mid-production")
        plan_job(load_job(path, catalogue), saw)  # warm imports and caches
        start = time.perf_counter()
        plan = plan_job(load_job(path, catalogue), saw)
        plan_s = time.perf_counter() - start
    start = time.perf_counter()
    render_plan(plan)
    render_html(plan)
    render_markdown(plan)
    plan_csv(plan)
    sheets_s = time.perf_counter() - start
    print(
        f"plan: {plan.pieces} pieces on {plan.bars_used} bars "
        f"(LP bound {plan.lp_bound_bars}, gap {plan.gap_bars}) in {plan_s:.3f} s "
        f"(goal < {GOAL_PLAN_S} s)"
    )
    for s in plan.sections:
        print(f"  {s.group}: {s.bars_used} bars, {s.method}, {s.solve_seconds:.3f} s")
    print(f"sheets: text + HTML + Markdown + CSV in {sheets_s:.3f} s (goal < {GOAL_SHEETS_S} s)")
    return plan_s < GOAL_PLAN_S and sheets_s < GOAL_SHEETS_S


def main(argv: list[str]) -> int:
    ok = True
    if "--job" not in argv:
        ok &= demo_jobs()
    if "--demo" not in argv:
        ok &= mid_size_job()
    return 0 if ok else 1


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
