"""Time of ``sawplan plan`` on a mid-size fictional job, end to end in-process.

Job: three material/section groups, 14 part lengths, about 600 pieces, bars of
two lengths plus rack remnants.  Goal: the whole plan (load, optimise, time,
blades, cost) under 2 s and every sheet (text, HTML, Markdown, CSV) under
0.2 s.  Run: python bench/bench_plan.py
"""

from __future__ import annotations

import random
import tempfile
import time
from pathlib import Path

GOAL_PLAN_S = 2.0
GOAL_SHEETS_S = 0.2


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


def main() -> int:
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
    return 0 if plan_s < GOAL_PLAN_S and sheets_s < GOAL_SHEETS_S else 1


if __name__ == "__main__":
    raise SystemExit(main())
