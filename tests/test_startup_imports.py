"""What everyday commands import: the heavy libraries stay out where they are not needed.

Each command runs in a fresh Python process (as a user runs it) on the demo
shop; the process lists the top-level packages it loaded.  Planning a demo job
on the demo log needs numpy (the blade forecast, the optimiser) and may need
HiGHS, but not scipy (the Weibull fit has its own root finder), SQLAlchemy (an
up-to-date log file is read through sqlite3) or pydantic (plain option values
are converted without it).  How long they take is measured in
``bench/bench_plan.py``, never here.
"""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

PROBE = """
import runpy, sys
sys.argv = ["sawplan", *sys.argv[1:]]
code = 0
try:
    runpy.run_module("sawplan", run_name="__main__")
except SystemExit as stop:
    code = stop.code
print("LOADED", " ".join(sorted({name.split(".")[0] for name in sys.modules})), file=sys.stderr)
sys.exit(code)
"""

NOT_FOR_PLANS = {"scipy", "sqlalchemy", "pydantic", "pandas", "alembic", "matplotlib"}
JOBS = ("frame-kit", "pump-blanks", "billet-slices", "rail-posts")


def loaded(args: list[str], cwd, tmp_path) -> set[str]:
    env = {
        **os.environ,
        "SAWPLAN_HOME": str(tmp_path),
        "SAWPLAN_NO_PROGRESS": "1",
    }
    for key in ("SAWPLAN_DB", "SAWPLAN_SAWS", "SAWPLAN_MATERIALS", "SAWPLAN_CONFIG"):
        env.pop(key, None)
    done = subprocess.run(
        [sys.executable, "-c", PROBE, *args],
        cwd=cwd,
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert done.returncode == 0, done.stderr
    (line,) = [x for x in done.stderr.splitlines() if x.startswith("LOADED ")]
    return set(line.split()[1:])


@pytest.mark.parametrize("job", JOBS)
def test_a_demo_plan_loads_no_scipy_sqlalchemy_or_pydantic(job, demo_tree, tmp_path):
    args = ["plan", f"demo/jobs/{job}.toml", "--db", "demo/out/demo-log.sqlite"]
    modules = loaded(args, demo_tree, tmp_path)
    assert "sawplan" in modules and "numpy" in modules  # the probe saw the plan run
    assert not modules & NOT_FOR_PLANS


def test_life_on_a_log_file_loads_no_scipy_sqlalchemy_or_pydantic(demo_tree, tmp_path):
    modules = loaded(["life", "--db", "demo/out/demo-log.sqlite"], demo_tree, tmp_path)
    assert not modules & NOT_FOR_PLANS
