"""Every command in both unit systems: no stray metric unit under ``--units us``,
no stray US unit under ``--units metric``, and no scientific notation anywhere.

The commands run against the demo shop's log (``demo/make_history.py``); write
commands run on a copy of it.  The patterns look for a number followed by a unit
of the other system (``184 mm``, ``250mm``, ``12 in``, ``7"``).
"""

from __future__ import annotations

import re
import shutil

import pytest

# A number, then a unit of the metric system (squares, cubes and per-time forms too).
METRIC_UNIT = re.compile(
    r"\d\s?(?:mm|cm|km|m|kg|g|kN|N|GPa|MPa|kW|W|µm|J)(?:²|³|2|3)?"
    r"(?:/(?:min|m|mm³|cm³|m³|h))?(?![A-Za-z0-9·])"
)
US_UNIT = re.compile(
    r"\d\s?(?:in|ft|lb|lbs|lbf|hp|ksi|psi)(?:²|³)?(?:/(?:min|ft|in³))?(?![A-Za-z0-9])"
    r"(?!\s(?:the|a|an)\b|\s[A-Z])"  # "24 in the wall", "0.2 in Kalpakjian" are no inches
    r"|\d[\"″]"
)
SCIENTIFIC = re.compile(r"\d[eE][+-]?\d")

# Commands that only read (the demo log is shared by all of them).
READ = [
    pytest.param("cut 4140 round 7-1/4in", id="cut-round"),
    pytest.param("cut 304 round 250mm --saw column-bay --db {db}", id="cut-calibrated"),
    pytest.param("cut 304 round 250mm --saw column-bay --blade-tpi 4/6 --db {db}", id="cut-given"),
    pytest.param("cut A36 ibeam 8in 5.25in 0.23in 0.4in", id="cut-ibeam"),
    pytest.param("cut 6061-T6 tube 3in 0.12in --bundle 2x3", id="cut-tube-bundle"),
    pytest.param("cut 1018 flat 4in 0.5in --saw small-horizontal --chart", id="cut-chart"),
    pytest.param("cut 304 tube 2in 0.065in --blade-tpi 3/4", id="cut-thin-wall"),
    pytest.param(
        "cut 304 round 250mm --saw column-bay --economics --shop-rate 75 --chart --db {db}",
        id="cut-economics",
    ),
    pytest.param("weigh 304 round 250mm --length 110mm", id="weigh-slice"),
    pytest.param("weigh A36 flat 4in 1in --length 20ft --count 6", id="weigh-long-flat"),
    pytest.param("weigh A36 ibeam 8in 5.25in 0.23in 0.4in --length 10ft", id="weigh-ibeam"),
    pytest.param("weigh 6061-T6 tube 3in 0.12in --length 6m", id="weigh-tube"),
    pytest.param("materials", id="materials"),
    pytest.param("materials 304", id="materials-one"),
    pytest.param("saw list --db {db}", id="saw-list"),
    pytest.param("blade list --db {db}", id="blade-list"),
    pytest.param("blade show C-003 --db {db}", id="blade-show"),
    pytest.param("log list --db {db}", id="log-list"),
    pytest.param("life --db {db}", id="life"),
    pytest.param("life --group-by blade-type --db {db}", id="life-by-type"),
    pytest.param("forecast --area 2m2 --material 304 --db {db}", id="forecast"),
    pytest.param("chart weibull --chart-height 12 --db {db}", id="chart-weibull"),
    pytest.param("chart wear C-003 --db {db}", id="chart-wear"),
    pytest.param("chart cost --db {db}", id="chart-cost"),
    pytest.param("plan {jobs}/billet-slices.toml --db {db}", id="plan-billet"),
    pytest.param("plan {jobs}/pump-blanks.toml --db {db}", id="plan-blanks"),
    pytest.param("plan {jobs}/frame-kit.toml --db {db}", id="plan-frame"),
    pytest.param("plan {jobs}/rail-posts.toml --db {db}", id="plan-rails"),
    pytest.param("plan {jobs}/billet-slices.toml --run cost --db {db}", id="plan-run-cost"),
]

# The cut card's own sentences, each with a word that shows the case was reached: a
# bundle against single cuts, a better way to lay the work, a cut that will not
# progress, a down-feed set by the operator (constant and gravity heads), band speeds
# over and under the recommendation, walls too thin for the pitch given.
CUT_CASES = [
    pytest.param("cut 1018 tube 60mm 3mm --bundle 3x4", "Bundle      bundling", id="bundle-faster"),
    pytest.param(
        "cut 1018 flat 100mm 10mm --saw small-horizontal --bundle 1x3",
        "one at a time is faster",
        id="bundle-slower",
    ),
    pytest.param(
        "cut 1018 square 40mm --bundle 2x2 --saw small-horizontal",
        "about the same",
        id="bundle-same",
    ),
    pytest.param("cut A36 ibeam 8in 5.25in 0.23in 0.4in", "Orient      laid", id="orientation"),
    pytest.param(
        "cut 17-4PH round 7in --saw small-horizontal --pitch 14 --chart",
        "will not cut",
        id="stalled",
    ),
    pytest.param("cut 4140 round 7in --feed 3in/min", "overfill the gullets", id="feed-over"),
    pytest.param(
        "cut 1018 flat 4in 0.5in --saw small-horizontal --feed 40mm/min",
        "head's force cannot push",
        id="feed-gravity",
    ),
    pytest.param(
        "cut 4140 round 7in --pitch 2/3 --band-speed 300ft/min", "the teeth last", id="over-speed"
    ),
    pytest.param(
        "cut A36 channel 6in 2in 0.2in 0.32in --band-speed 40m/min", "% under", id="under-speed"
    ),
    pytest.param(
        "cut 304 tube 2in 0.065in --pitch 3/4", "a finer pitch such as", id="too-few-teeth"
    ),
]


@pytest.mark.parametrize("units", ["us", "metric"])
@pytest.mark.parametrize(("template", "marker"), CUT_CASES)
def test_cut_sentences_speak_one_unit_system(template, marker, units, cli):
    result = cli(*template.split(), "--units", units)
    assert result.code == 0, result.err
    assert marker in result.out  # the case under test was reached
    _check(result.out, units)


# Commands that write, in order, on a copy of the log: a new blade's life so far.
WRITE = (
    "blade add X-1 --pitch 4/6 --blade-width 27mm --blade-thickness 0.9mm --blade-length 3660mm --db {db}",
    "blade fit X-1 --saw auto-bay --db {db}",
    "log cut 4140 round 40mm --blade X-1 --cuts 5 --time 6min --db {db}",
    "saw add bay-9 --like mid-production --wheel 450mm --db {db}",
    "blade show X-1 --db {db}",
    "blade retire X-1 --failure dull --db {db}",
)


def _run(cli, template: str, root, units: str):
    db = root / "demo" / "out" / "demo-log.sqlite"
    args = template.format(db=db, jobs=root / "demo" / "jobs").split()
    result = cli(*args, "--units", units)
    assert result.code == 0, result.err
    return result.out


SOURCE = re.compile(r"\[[^\]]*\]")  # a cited source quotes its table in its own units


def _check(out: str, units: str) -> None:
    out = SOURCE.sub("", out)
    wrong = METRIC_UNIT if units == "us" else US_UNIT
    stray = sorted({m.group(0) for m in wrong.finditer(out)})
    lines = [line for line in out.splitlines() if wrong.search(line)]
    assert not stray, f"{units} output shows {stray}:\n" + "\n".join(lines[:8])
    assert not SCIENTIFIC.search(out), SCIENTIFIC.search(out).group(0)


@pytest.mark.parametrize("units", ["us", "metric"])
@pytest.mark.parametrize("template", READ)
def test_read_commands_speak_one_unit_system(template, units, demo_tree, cli):
    _check(_run(cli, template, demo_tree, units), units)


@pytest.mark.parametrize("units", ["us", "metric"])
def test_write_commands_speak_one_unit_system(units, demo_tree, cli, tmp_path):
    root = tmp_path / "copy"
    (root / "demo" / "out").mkdir(parents=True)
    shutil.copy2(demo_tree / "demo" / "out" / "demo-log.sqlite", root / "demo" / "out")
    for template in WRITE:
        if template.startswith("blade fit"):  # fit takes no --units: it prints no quantity
            db = root / "demo" / "out" / "demo-log.sqlite"
            assert cli(*template.format(db=db).split()).code == 0
            continue
        _check(_run(cli, template, root, units), units)


@pytest.mark.parametrize("units", ["us", "metric"])
@pytest.mark.parametrize("suffix", [".html", ".md"])
def test_printable_sheets_speak_one_unit_system(suffix, units, demo_tree, cli, tmp_path):
    db = demo_tree / "demo" / "out" / "demo-log.sqlite"
    sheet = tmp_path / f"sheet{suffix}"
    job = demo_tree / "demo" / "jobs" / "rail-posts.toml"
    result = cli("plan", str(job), "--db", str(db), "--sheet", str(sheet), "--units", units)
    assert result.code == 0, result.err
    text = re.sub(r"<style>.*?</style>", "", sheet.read_text(encoding="utf-8"), flags=re.S)
    _check(re.sub(r"<[^>]+>", " ", text), units)  # the page's words, not its CSS or markup
