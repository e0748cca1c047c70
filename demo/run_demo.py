"""``make demo``: the demo shop's main job, end to end, through the real sawplan CLI.

1. Rebuild the demo blade log from scratch (``demo/make_history.py``: an
   invented year of blades, cuts and failures of a fictional shop).
2. Plan the shop's jobs, each with its printable sheet in ``demo/out/``: the
   main one, a machine-base frame in structural steel and tube; several
   hundred small blanks from alloy and carbon bar; heavy stainless billet
   slices; and aluminium and stainless handrail parts.  The sheets of the
   last run are removed first: ``plan`` replaces a file only with ``--force``.
3. Choose the blade for an I-beam cut, show what a blade left on the saw does
   to a billet cut, and weigh a 6 m channel (a lift for two or the crane).
4. Blade life from the log, with its Weibull plot.

Everything goes to ``demo/out/``: the blade log is ``demo/out/demo-log.sqlite``
(passed to every command with ``--db``) and ``SAWPLAN_HOME`` points there, so
the user's own blade log is never touched.  The commands run in-process
through sawplan's error boundary (``sawplan.cli.boundary.run_guarded``),
exactly as the ``sawplan`` command runs them.  Exit status: 0 when every step
worked, else the exit code of the first step that failed.
"""

from __future__ import annotations

import contextlib
import os
import shlex
import sys
import time
from collections.abc import Iterator, Sequence
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "demo"
DEFAULT_OUT = DEMO / "out"
DB_NAME = "demo-log.sqlite"
MAIN_JOB = "frame-kit"
JOBS = (
    (MAIN_JOB, "Plan the main job: a machine-base frame, structural steel and tube"),
    ("pump-blanks", "Plan several hundred blanks from alloy and carbon bar"),
    ("billet-slices", "Plan the heavy job: stainless billet slices (weights and lifting matter)"),
    ("rail-posts", "Plan handrail parts: aluminium pipe and flat, stainless tube, 6 m bars"),
)

if str(DEMO) not in sys.path:  # make_history sits beside this file
    sys.path.insert(0, str(DEMO))


def steps(out: Path, trial_blade: str | None = None) -> list[tuple[str, list[str]]]:
    """The demo's commands after the log is built: (heading, sawplan arguments)."""
    db = shlex.quote(_show(out / DB_NAME))
    jobs = shlex.quote(_show(DEMO / "jobs"))
    listed = [("The demo shop's saws (kept in the demo blade log)", f"saw list --db {db}")]
    for job, heading in JOBS:
        sheet = shlex.quote(_show(out / f"{job}.html"))
        listed.append((heading, f"plan {jobs}/{job}.toml --sheet {sheet} --db {db}"))
    listed += [
        (
            "One I-beam cut on the production saw: the blade to fit",
            f"cut A36 ibeam 200mm 100mm 5.6mm 8.5mm --saw auto-bay --db {db}",
        ),
        (
            "A billet cut on the column saw with the 4/6 blade from the bar work left on it",
            f"cut 304 round 250mm --saw column-bay --pitch 4/6 --db {db}",
        ),
        (
            "A 6 m channel from the rack: its weight and how to lift it",
            "weigh A36 channel 150mm 75mm 5.5mm 9mm --length 6m",
        ),
        (
            "Blade life from the log, by blade type, with the Weibull plot",
            f"life --group-by blade-type --chart --db {db}",
        ),
    ]
    if trial_blade:
        listed.append(
            (
                "A stripped blade of the trial lot: how it was fitted and how it ended",
                f"blade show {shlex.quote(trial_blade)} --db {db}",
            )
        )
    return [(heading, shlex.split(command)) for heading, command in listed]


def main(argv: Sequence[str] | None = None, *, out_dir: Path | None = None) -> int:
    """Run the demo; ``out_dir`` (default ``demo/out``) receives the log and the sheets."""
    del argv  # no options: `make demo` runs it as it is
    out = Path(out_dir) if out_dir is not None else DEFAULT_OUT
    started = time.perf_counter()
    with _demo_environment(out):
        _heading("Build the demo blade log (an invented year of a fictional shop)")
        import make_history

        try:
            summary = make_history.build(out / DB_NAME)
        except Exception as err:  # the demo's own data failed: say so in one line
            print(f"\ndemo stopped: building the demo log failed: {err!r}", file=sys.stderr)
            return 1
        print(
            f"{_show(summary.db_path)}: {summary.saws} saws, {summary.blades} blades "
            f"({summary.retired} retired), {summary.cut_entries:,} cut entries "
            f"({summary.cuts:,} cuts) from {summary.first_day} to {summary.last_day}"
        )
        trial_blade = summary.trial_stripped[0] if summary.trial_stripped else None
        for job, _heading_text in JOBS:  # the last run's sheets: plan replaces none unasked
            (out / f"{job}.html").unlink(missing_ok=True)
        for heading, args in steps(out, trial_blade):
            _heading(heading)
            print("$ sawplan " + shlex.join(args))
            print(flush=True)
            code = _run(args)
            if code != 0:
                print(f"\ndemo stopped: `sawplan {args[0]}` exited with {code}", file=sys.stderr)
                return code
        _heading("What the statistics found in the log")
        code = _early_failures(out / DB_NAME)
        if code != 0:
            return code
    elapsed = time.perf_counter() - started
    _heading("Done")
    sheets = ", ".join(_show(out / f"{job}.html") for job, _ in JOBS)
    print(f"printable sheets: {sheets} (open them in a browser and print)")
    print(f"demo blade log:   {_show(out / DB_NAME)} (try: sawplan blade list --db ...)")
    print(f"finished in {elapsed:.1f} s")
    return 0


def _early_failures(db: Path) -> int:
    """Each blade type whose Weibull shape is below 1, from `sawplan life --json`."""
    import io
    import json

    args = ["life", "--group-by", "blade-type", "--json", "--db", _show(db)]
    print("$ sawplan " + shlex.join(args) + "   (blade types with early failures)\n")
    buffer = io.StringIO()
    with contextlib.redirect_stdout(buffer):
        code = _run(args)
    if code != 0:
        print(f"\ndemo stopped: `sawplan life --json` exited with {code}", file=sys.stderr)
        return code
    report = json.loads(buffer.getvalue())
    flagged = [g for g in report["groups"] if g.get("early_failure")]
    if not flagged:
        print("no blade type fails early: every fitted shape is 1 or more")
    for group in flagged:
        warning = group["early_failure"]
        print(f"{group['key']}: {warning['message']}")
        if warning.get("causes"):
            print(f"  usual causes of {warning['mode_name']} (common practice): "
                  + "; ".join(warning["causes"]))  # fmt: skip
        print("  check: " + "; ".join(warning["setup_checks"]))
        print("  " + warning["caution"])
    return 0


def _run(args: list[str]) -> int:
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    code = run_guarded(run, args)
    sys.stdout.flush()
    return code


@contextlib.contextmanager
def _demo_environment(out: Path) -> Iterator[None]:
    """SAWPLAN_HOME in the demo folder, no stray SAWPLAN_* settings; restored afterwards."""
    out.mkdir(parents=True, exist_ok=True)
    saved = {k: os.environ.get(k) for k in ("SAWPLAN_HOME", "SAWPLAN_DB", "SAWPLAN_SAWS",
                                            "SAWPLAN_MATERIALS")}  # fmt: skip
    os.environ["SAWPLAN_HOME"] = str(out.resolve())
    for key in ("SAWPLAN_DB", "SAWPLAN_SAWS", "SAWPLAN_MATERIALS"):
        os.environ.pop(key, None)
    try:
        with contextlib.chdir(REPO):
            yield
    finally:
        for key, value in saved.items():
            if value is None:
                os.environ.pop(key, None)
            else:
                os.environ[key] = value


def _show(path: Path) -> str:
    """A path as the user would type it: relative to the repository when inside it."""
    try:
        return str(Path(path).resolve().relative_to(REPO))
    except ValueError:
        return str(path)


def _heading(text: str) -> None:
    print(f"\n=== {text} " + "=" * max(3, 72 - len(text)), flush=True)


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
