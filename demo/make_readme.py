"""Write the README tour: real sawplan commands on the demo shop and their real output.

Rebuilds the demo blade log (``demo/make_history.py``), runs every tour
command in-process through sawplan's error boundary, exactly as the
``sawplan`` command runs them, and replaces the text between
``<!-- tour:begin -->`` and ``<!-- tour:end -->`` in README.md.

    .venv/bin/python demo/make_readme.py          # rewrite README.md
    .venv/bin/python demo/make_readme.py --check  # exit 1 when README.md is out of date

``tests/test_readme.py`` runs the commands again and fails when the README
shows anything else, so the tour cannot drift from the program.  Tour
commands must be deterministic (fixed demo log, fixed dates, no clock) and
quick (each well under 3 s).
"""

from __future__ import annotations

import os

# The same terminal settings as the test suite (tests/conftest.py), set before typer loads.
os.environ["TYPER_USE_RICH"] = "0"
os.environ["_TYPER_FORCE_DISABLE_TERMINAL"] = "1"
os.environ["COLUMNS"] = "100"

import contextlib  # noqa: E402
import io  # noqa: E402
import shlex  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

REPO = Path(__file__).resolve().parent.parent
README = REPO / "README.md"
DB = "demo/out/demo-log.sqlite"
BEGIN, END = "<!-- tour:begin -->", "<!-- tour:end -->"
SLOW_S = 3.0

if str(REPO / "demo") not in sys.path:
    sys.path.insert(0, str(REPO / "demo"))


def tour(trial_blade: str) -> list[tuple[str, str]]:
    """(text before the command, the command) for each step of the tour."""
    return [
        (
            "The demo shop is building the base frame of a conveyor: I-beams, channels, "
            "angles and rectangular tube, cut on its semi-automatic saw. Which blade for the "
            "I-beam, how fast, how hard to feed, how long per cut (`--db` adds the shop's "
            "calibration from its blade log):",
            f"sawplan cut A36 ibeam 200mm 100mm 5.6mm 8.5mm --saw auto-bay --db {DB}",
        ),
        (
            "On the twin-column saw a 250 mm billet of 304 stainless waits, and the 4/6 "
            "blade from the bar work is still on the saw. What it would do, and why:",
            f"sawplan cut 304 round 250mm --saw column-bay --pitch 4/6 --db {DB}",
        ),
        (
            "A 6 m channel from the rack: its weight and how to move it (revised NIOSH "
            "lifting equation, and what the piece is: it tips, it is long, its ends cut; "
            "`--reach`, `--lift-from` and `--travel` describe the lift):",
            "sawplan weigh A36 channel 150mm 75mm 5.5mm 9mm --length 6m",
        ),
        (
            "A handrail post of aluminium pipe in US units, inches to the nearest 1/32 "
            "(every command takes `--units us`, and `--fractions` for a tape measure):",
            "sawplan weigh 6061-T6 tube 48.3mm 3.2mm --length 1100mm --units us --fractions",
        ),
        (
            "The whole frame, `demo/jobs/frame-kit.toml`: the bars to fetch, every cut from "
            "the head end, remnants to mark with their heat number, weights and lifting, "
            "blade and time per section, blades to have on hand and the quote. "
            "`--sheet job.html` writes the printable sheet with every bar drawn to scale; "
            "`--csv-dir DIR` and `--json` give the same plan as data:",
            f"sawplan plan demo/jobs/frame-kit.toml --db {DB}",
        ),
        (
            "A year of the shop's blade log (invented by `demo/make_history.py`). Life "
            "is the area a blade cut; blades still running count as censored. A blade "
            "retired worn out (or dull) within its type's expected life ended normally: "
            "a failure of wear in the fit, never in the failure table. A Weibull "
            "shape β below 1 means blades die early, which points to set-up rather than "
            "wear — here the M51 trial lot that was fitted without a break-in, named "
            "with its supplier and purchase date; the calibration counts timed entries "
            "and the cuts they hold:",
            f"sawplan life --group-by blade-type --db {DB}",
        ),
        (
            "One blade of that lot: fitted with no break-in, teeth stripped within days:",
            f"sawplan blade show {trial_blade} --db {DB}",
        ),
        (
            "The Weibull plot of every blade in the log (median ranks, censored blades counted):",
            f"sawplan chart weibull --chart-height 16 --db {DB}",
        ),
        (
            "Blades to have on the shelf for 2 m² of 304, at 90 % confidence, from the "
            "log's own fit — where the trial lot holds nearly half of the blades:",
            f"sawplan forecast --area 2m2 --material 304 --db {DB}",
        ),
        (
            "The lot is no longer bought, so leave it out (`--lot` and `--supplier` "
            "choose blades the same way, in `forecast` and in `plan`):",
            f"sawplan forecast --area 2m2 --material 304 --without-lot T-3309 --db {DB}",
        ),
    ]


def run_command(command: str) -> tuple[int, str, str, float]:
    """Run ``sawplan ...`` in-process; (exit code, stdout, stderr, seconds)."""
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    words = shlex.split(command)
    assert words[0] == "sawplan", command
    out, err = io.StringIO(), io.StringIO()
    started = time.perf_counter()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, words[1:])
    return code, out.getvalue(), err.getvalue(), time.perf_counter() - started


def normalise(text: str) -> str:
    """Output as the README keeps it: no trailing spaces, no trailing blank lines."""
    return "\n".join(line.rstrip() for line in text.splitlines()).strip("\n")


def build_tour() -> str:
    """Rebuild the demo log, run the tour and return the Markdown between the markers."""
    import make_history

    with tempfile.TemporaryDirectory() as home, contextlib.chdir(REPO):
        saved = os.environ.get("SAWPLAN_HOME")
        os.environ["SAWPLAN_HOME"] = home
        for key in ("SAWPLAN_DB", "SAWPLAN_SAWS", "SAWPLAN_MATERIALS"):
            os.environ.pop(key, None)
        try:
            summary = make_history.build(REPO / DB)
            trial_blade = summary.trial_stripped[0]
            parts = []
            for text, command in tour(trial_blade):
                code, out, err, seconds = run_command(command)
                if code != 0 or err.strip():
                    raise SystemExit(f"`{command}` failed ({code}): {err.strip()}")
                if seconds > SLOW_S:
                    print(f"warning: `{command}` took {seconds:.1f} s", file=sys.stderr)
                parts.append(f"{text}\n\n```console\n$ {command}\n{normalise(out)}\n```")
        finally:
            if saved is None:
                os.environ.pop("SAWPLAN_HOME", None)
            else:
                os.environ["SAWPLAN_HOME"] = saved
    return "\n\n".join(parts)


def replace_tour(readme: str, tour_text: str) -> str:
    start, end = readme.index(BEGIN) + len(BEGIN), readme.index(END)
    return readme[:start] + "\n" + tour_text + "\n" + readme[end:]


def main(argv: list[str] | None = None) -> int:
    args = sys.argv[1:] if argv is None else argv
    old = README.read_text(encoding="utf-8")
    new = replace_tour(old, build_tour())
    if "--check" in args:
        if new != old:
            print("README.md tour is out of date: run demo/make_readme.py", file=sys.stderr)
            return 1
        print("README.md tour is up to date")
        return 0
    if new != old:
        README.write_text(new, encoding="utf-8")
        print("README.md tour rewritten")
    else:
        print("README.md tour unchanged")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
