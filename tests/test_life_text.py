"""Text output of blade life: each group's early-failure warning, and the life line of a
blade that is off the saw.

Outside checks: whether a group's blades fail early (Weibull shape β < 1, the usual
reliability reading) is decided here by scipy's own maximum-likelihood fit
(``scipy.stats.weibull_min.fit``), not by sawplan's; the break-in area is 300-650 cm²
(common practice), and a blade failed during break-in when its last cut began inside it,
worked out here from the cut areas (closed-form πd²/4 for round bar); the usual causes
of stripped teeth include a skipped break-in (common practice, band-saw troubleshooting).
"""

from __future__ import annotations

import importlib.util
import json
import math
import sqlite3
import sys
from pathlib import Path

import pytest

from sawplan.saws import load_saws
from sawplan.store import connect
from sawplan.store.records import (
    BladeSpec,
    CutEntry,
    add_blade,
    fit_blade,
    log_cut,
    remove_blade,
    retire_blade,
)

REPO = Path(__file__).resolve().parent.parent
BREAK_IN_CM2 = 650.0  # upper end of 300-650 cm² (common practice)
ROUND_60_CM2 = math.pi * 6.0**2 / 4.0  # closed form πd²/4, d = 6 cm: 28.27 cm²


def weibull_lives(shape: float, scale: float, n: int) -> list[float]:
    """Lives at Benard's plotting positions of a Weibull(shape, scale): x = η(−ln(1−p))^(1/β)."""
    return [scale * (-math.log(1 - (i - 0.3) / (n + 0.4))) ** (1 / shape) for i in range(1, n + 1)]


def scipy_shape(lives: list[float]) -> float:
    """Shape β of scipy's maximum-likelihood Weibull fit (all failures, location 0)."""
    from scipy import stats

    shape, _loc, _scale = stats.weibull_min.fit(lives, floc=0)
    return shape


# two blade types: a trial batch dying young of stripped teeth, a batch wearing out
EARLY = weibull_lives(0.5, 5000.0, 8)  # cm²
WEAR_OUT = weibull_lives(4.0, 20000.0, 8)  # cm²
EARLY_SPEC = dict(grade="M51", width_mm=41.0, thickness_mm=1.3, tpi_coarse=1.4, tpi_fine=2.0)
WEAR_SPEC = dict(grade="M42", width_mm=27.0, thickness_mm=0.9, tpi_coarse=4.0, tpi_fine=6.0)
EARLY_TYPE = "bi-metal M51 41×1.3 1.4/2"
WEAR_TYPE = "bi-metal M42 27×0.9 4/6"


def _spec(tag: str, kind: dict) -> BladeSpec:
    return BladeSpec(tag=tag, price=100.0, **kind)


def _cut(blade_id: int, area_cm2: float, *, count: int = 1, time: float | None = None) -> CutEntry:
    return CutEntry(
        blade_id=blade_id,
        cut_on="2024-03-04",
        material="1018",
        material_group="carbon-steel",
        section="round 60mm",
        area_mm2=area_cm2 * 100.0,  # 1 cm² = 100 mm²
        count=count,
        time_min=time,
    )


def _blade(db, tag: str, kind: dict, cuts_cm2: list[float], *, break_in: bool | None) -> int:
    blade = add_blade(db, _spec(tag, kind), added_on="2024-03-01")
    fit_blade(
        db,
        tag,
        "mid-production",
        on="2024-03-02",
        saw_profile=load_saws()["mid-production"],
        break_in=break_in,
    )
    for area in cuts_cm2:
        log_cut(db, _cut(blade.id, area))
    return blade.id


@pytest.fixture
def grouped_log(tmp_path) -> Path:
    path = tmp_path / "log.sqlite"
    with connect(path) as db:
        for i, life in enumerate(EARLY):
            _blade(db, f"E-{i}", EARLY_SPEC, [life], break_in=False)
            retire_blade(db, f"E-{i}", "stripped", on="2024-03-05")
        for i, life in enumerate(WEAR_OUT):
            _blade(db, f"W-{i}", WEAR_SPEC, [life], break_in=True)
            retire_blade(db, f"W-{i}", "dull", on="2024-03-05")
    return path


def _warning_lines(text: str) -> list[str]:
    return [line for line in text.split("\n") if line.startswith("WARNING")]


def test_each_early_failing_group_gets_its_warning_in_text(grouped_log, cli):
    # the premise, from scipy's fit: one type fails early, the other wears out
    assert scipy_shape(EARLY) < 1.0 < scipy_shape(WEAR_OUT)
    text = cli("life", "--group-by", "blade-type", "--db", str(grouped_log))
    assert text.code == 0, text.err
    warnings = _warning_lines(text.out)
    named = [w for w in warnings if w.startswith(f"WARNING for blade-type {EARLY_TYPE}:")]
    assert len(named) == 1, warnings
    assert "most frequent early failure: teeth stripped" in named[0]
    assert not any(WEAR_TYPE in w for w in warnings)
    # that warning's usual causes follow it: stripped teeth include a skipped break-in
    lines = text.out.split("\n")
    causes = lines[lines.index(named[0]) + 1]
    assert causes.startswith("  usual causes of teeth stripped (common practice):")
    assert "not broken in" in causes
    # the set-up checks and the caution are said once, however many warnings there are
    assert sum(line.startswith("  check: ") for line in lines) == 1
    assert sum("saw stopped and isolated" in line for line in lines) == 1


def test_text_warnings_say_what_json_says(grouped_log, cli):
    report = json.loads(
        cli("life", "--group-by", "blade-type", "--json", "--db", str(grouped_log)).out
    )
    text = cli("life", "--group-by", "blade-type", "--db", str(grouped_log)).out
    warnings = _warning_lines(text)
    expected = [g for g in report["groups"] if g["early_failure"] is not None]
    assert [g["key"] for g in expected] == [EARLY_TYPE]
    for g in expected:
        assert f"WARNING for blade-type {g['key']}: {g['early_failure']['message']}" in warnings
    # all blades together: warned exactly when scipy's fit of every life is below 1
    overall = [w for w in warnings if w.startswith("WARNING for all blades:")]
    assert len(overall) == (1 if scipy_shape(EARLY + WEAR_OUT) < 1.0 else 0)
    assert (report["early_failure"] is not None) == bool(overall)


def test_without_groups_the_overall_warning_keeps_its_plain_label(tmp_path, cli):
    path = tmp_path / "log.sqlite"
    with connect(path) as db:
        for i, life in enumerate(EARLY):
            _blade(db, f"E-{i}", EARLY_SPEC, [life], break_in=False)
            retire_blade(db, f"E-{i}", "stripped", on="2024-03-05")
    assert scipy_shape(EARLY) < 1.0
    warnings = _warning_lines(cli("life", "--db", str(path)).out)
    assert len(warnings) == 1 and warnings[0].startswith("WARNING: Weibull shape")


# --- the life line of one blade ------------------------------------------------------------


def _wear_line(cli, path: Path, tag: str) -> str:
    result = cli("blade", "show", tag, "--db", str(path))
    assert result.code == 0, result.err
    return next(line for line in result.out.split("\n") if line.startswith("wear: "))


@pytest.fixture
def one_blade_log(tmp_path):
    path = tmp_path / "log.sqlite"
    with connect(path) as db:
        yield path, db


def test_retired_within_break_in_says_it_failed_during_break_in(one_blade_log, cli):
    path, db = one_blade_log
    _blade(db, "B-1", EARLY_SPEC, [ROUND_60_CM2], break_in=False)  # one cut, 28.3 cm²
    retire_blade(db, "B-1", "stripped", on="2024-03-05")
    line = _wear_line(cli, path, "B-1")
    assert "breaking in" not in line
    assert line.startswith("wear: retired after 28.3 cm² (teeth stripped)")  # πd²/4, 3 s.f.
    assert "failed during break-in" in line
    assert "fitted without break-in" in line  # common practice: a usual cause of stripped teeth


def test_a_last_cut_begun_inside_break_in_counts_as_during_break_in(one_blade_log, cli):
    path, db = one_blade_log
    cuts = [500.0, 300.0]  # the second cut begins at 500 < 650 cm² and ends at 800 cm²
    assert cuts[0] < BREAK_IN_CM2 < sum(cuts)
    _blade(db, "B-1", EARLY_SPEC, cuts, break_in=None)
    retire_blade(db, "B-1", "stripped", on="2024-03-05")
    line = _wear_line(cli, path, "B-1")
    assert line.startswith("wear: retired after 800 cm² (teeth stripped)")
    assert "failed during break-in" in line
    assert "no break-in recorded" in line


def test_a_batch_counts_as_equal_cuts_for_break_in(one_blade_log, cli):
    path, db = one_blade_log
    blade = add_blade(db, _spec("B-1", EARLY_SPEC), added_on="2024-03-01")
    fit_blade(db, "B-1", "mid-production", on="2024-03-02", break_in=True,
              saw_profile=load_saws()["mid-production"])  # fmt: skip
    # 4 cuts of 200 cm² logged as one batch: the last begins at 600 < 650 cm²
    log_cut(db, _cut(blade.id, 4 * 200.0, count=4))
    retire_blade(db, "B-1", "weld", on="2024-03-05")
    line = _wear_line(cli, path, "B-1")
    assert line.startswith("wear: retired after 800 cm² (weld break): failed during break-in")
    assert "without break-in" not in line and "no break-in recorded" not in line


def test_retired_after_break_in_with_break_in_done_has_no_break_in_hint(one_blade_log, cli):
    path, db = one_blade_log
    cuts = [400.0] * 5  # the last cut begins at 1,600 cm², past 650
    _blade(db, "B-1", WEAR_SPEC, cuts, break_in=True)
    retire_blade(db, "B-1", "dull", on="2024-03-05")
    line = _wear_line(cli, path, "B-1")
    assert line.startswith("wear: retired after 2,000 cm² (teeth dulled early), past break-in")
    assert "during break-in" not in line and "without break-in" not in line


def test_removed_blade_is_a_censored_life(one_blade_log, cli):
    path, db = one_blade_log
    _blade(db, "B-1", WEAR_SPEC, [ROUND_60_CM2] * 3, break_in=True)
    remove_blade(db, "B-1", on="2024-03-05")
    line = _wear_line(cli, path, "B-1")
    # life-data definition: removed unworn = right-censored, a life of at least its area so far
    assert line.startswith("wear: removed unworn after 84.8 cm²")  # 3 × πd²/4, 3 s.f.
    assert "at least" in line and "censored" in line


def test_fitted_blade_still_reports_its_break_in(one_blade_log, cli):
    path, db = one_blade_log
    blade_id = _blade(db, "B-1", WEAR_SPEC, [], break_in=True)
    log_cut(db, _cut(blade_id, 100.0, time=5.0))
    log_cut(db, _cut(blade_id, 200.0, time=9.0))
    # 300 of the 650 cm² break-in cut (common practice)
    assert _wear_line(cli, path, "B-1").startswith("wear: breaking in: 300 of 650 cm² cut")


def test_fitted_blade_past_break_in_area_is_not_still_breaking_in(one_blade_log, cli):
    path, db = one_blade_log
    blade_id = _blade(db, "B-1", WEAR_SPEC, [], break_in=True)
    log_cut(db, _cut(blade_id, 500.0, time=25.0))
    log_cut(db, _cut(blade_id, 300.0, time=14.0))  # begins at 500 cm², ends at 800 > 650
    line = _wear_line(cli, path, "B-1")
    assert "breaking in" not in line
    assert line.startswith("wear: past break-in, too few timed cuts")


# --- the demo log --------------------------------------------------------------------------


def _demo_history():
    spec = importlib.util.spec_from_file_location(
        "demo_make_history_life_text", REPO / "demo" / "make_history.py"
    )
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def demo_log(tmp_path_factory) -> tuple[Path, object]:
    history = _demo_history()
    path = tmp_path_factory.mktemp("demo-log") / "demo-log.sqlite"
    history.build(path)
    return path, history


def test_demo_trial_lot_is_named_in_the_text_warning(demo_log, cli):
    from scipy import stats

    path, history = demo_log
    sql = (
        "SELECT b.status, (SELECT SUM(area_mm2) FROM cuts c WHERE c.blade_id = b.id) / 100.0, "
        "b.grade, b.width_mm, b.thickness_mm, b.tpi_coarse, b.tpi_fine "
        "FROM blades b WHERE b.lot = ?"
    )
    with sqlite3.connect(path) as db:
        rows = db.execute(sql, [history.TRIAL_LOT]).fetchall()
    failed = [a for status, a, *_ in rows if status == "retired" and a]
    censored = [a for status, a, *_ in rows if status != "retired" and a]
    shape, _loc, _scale = stats.weibull_min.fit(
        stats.CensoredData(uncensored=failed, right=censored), floc=0
    )
    assert shape < 1.0  # scipy: the trial lot fails early
    grade, width, thick, coarse, fine = rows[0][2:]
    key = f"bi-metal {grade} {width:g}×{thick:g} {coarse:g}/{fine:g}"
    out = cli("life", "--group-by", "blade-type", "--db", str(path)).out
    named = [w for w in _warning_lines(out) if w.startswith(f"WARNING for blade-type {key}:")]
    assert len(named) == 1, _warning_lines(out)
    assert "teeth stripped" in named[0]
    lines = out.split("\n")
    assert "not broken in" in lines[lines.index(named[0]) + 1]


def test_demo_stripped_blade_of_the_trial_lot_failed_during_break_in(demo_log, cli):
    path, history = demo_log
    sql = (
        "SELECT b.tag, c.area_mm2 / 100.0, c.count FROM blades b JOIN cuts c ON c.blade_id = b.id "
        "WHERE b.lot = ? AND b.retire_cause = 'stripped' ORDER BY b.id, c.cut_on, c.id"
    )
    with sqlite3.connect(path) as db:
        rows = db.execute(sql, [history.TRIAL_LOT]).fetchall()
    cuts: dict[str, list[tuple[float, int]]] = {}
    for tag, area, count in rows:
        cuts.setdefault(tag, []).append((area, count))

    def last_cut_begins_cm2(entries: list[tuple[float, int]]) -> float:
        area, count = entries[-1]
        return sum(a for a, _ in entries) - area / count

    early = [t for t, e in cuts.items() if last_cut_begins_cm2(e) < BREAK_IN_CM2]
    later = [t for t, e in cuts.items() if last_cut_begins_cm2(e) >= BREAK_IN_CM2]
    assert early, "the demo's trial lot has a blade stripped within break-in"
    for tag in early:
        line = _wear_line(cli, path, tag)
        assert "breaking in" not in line
        assert "(teeth stripped): failed during break-in" in line, line
        assert "fitted without break-in" in line  # the trial lot had none (demo history)
    for tag in later:
        assert "during break-in" not in _wear_line(cli, path, tag)
