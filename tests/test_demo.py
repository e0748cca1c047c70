"""The demo shop: its invented history holds a batch of early failures that the
statistics must find, and ``make demo`` shows the plan, the quote and blade life.

The early-failure batch is an M51 trial lot fitted without break-in
(``demo/make_history.py``).  Its Weibull shape is checked two ways: sawplan's
censored fit must put it below 1 with ``stripped`` as the mode and "new blade
not broken in" among the usual causes (common practice), and
the shape must agree with scipy's own censored maximum-likelihood fit of the
same lives (``scipy.stats.weibull_min.fit`` on ``CensoredData``), an
implementation outside the project.
"""

from __future__ import annotations

import datetime as dt
import importlib.util
import json
import os
import sqlite3
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parent.parent


def load_demo_module(name: str):
    spec = importlib.util.spec_from_file_location(f"demo_{name}", REPO / "demo" / f"{name}.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    return module


history = load_demo_module("make_history")


@pytest.fixture(scope="module")
def demo_log(tmp_path_factory) -> tuple[Path, object]:
    path = tmp_path_factory.mktemp("demo-log") / "demo-log.sqlite"
    return path, history.build(path)


def lives(path: Path, where: str, params: tuple = ()) -> tuple[list[float], list[float]]:
    """(failed lives, censored lives) in cm² of the blades matching ``where``."""
    sql = (
        "SELECT b.status, COALESCE((SELECT SUM(area_mm2) FROM cuts c WHERE c.blade_id = b.id), 0) "
        f"/ 100.0 FROM blades b WHERE {where}"
    )
    with sqlite3.connect(path) as db:
        rows = db.execute(sql, params).fetchall()
    failed = [a for status, a in rows if status == "retired" and a > 0]
    censored = [a for status, a in rows if status != "retired" and a > 0]
    return failed, censored


def test_history_is_a_year_of_at_least_40_blades_before_today(demo_log):
    path, summary = demo_log
    assert summary.blades >= 40
    assert summary.saws >= 2
    with sqlite3.connect(path) as db:
        days = [
            d
            for (d,) in db.execute(
                "SELECT cut_on FROM cuts UNION SELECT fitted_on FROM fittings "
                "UNION SELECT happened_on FROM events UNION SELECT added_on FROM blades"
            )
        ]
    first, last = min(days), max(days)
    assert first >= "2025-01-01" and last < "2026-12-02"  # fixed dates before 2026-12-02
    span = dt.date.fromisoformat(last) - dt.date.fromisoformat(first)
    assert span.days >= 330


def test_history_is_the_same_every_run(demo_log, tmp_path):
    path, _ = demo_log
    again = tmp_path / "again.sqlite"
    history.build(again)
    query = (
        "SELECT b.tag, c.cut_on, c.material, c.section, c.count, c.area_mm2, c.time_min "
        "FROM cuts c JOIN blades b ON b.id = c.blade_id ORDER BY c.id"
    )
    with sqlite3.connect(path) as one, sqlite3.connect(again) as two:
        assert one.execute(query).fetchall() == two.execute(query).fetchall()


def test_trial_lot_was_fitted_without_break_in(demo_log):
    path, _ = demo_log
    with sqlite3.connect(path) as db:
        flags = db.execute(
            "SELECT f.break_in FROM fittings f JOIN blades b ON b.id = f.blade_id WHERE b.lot = ?",
            [history.TRIAL_LOT],
        ).fetchall()
        others = db.execute(
            "SELECT DISTINCT f.break_in FROM fittings f JOIN blades b ON b.id = f.blade_id "
            "WHERE b.lot != ?",
            [history.TRIAL_LOT],
        ).fetchall()
    assert flags and all(f == 0 for (f,) in flags)
    assert others == [(1,)]


def test_statistics_find_the_early_failures_of_the_trial_lot(demo_log, cli):
    path, _ = demo_log
    result = cli("life", "--group-by", "blade-type", "--json", "--db", str(path))
    assert result.code == 0, result.err
    groups = {g["key"]: g for g in json.loads(result.out)["groups"]}
    trial = [g for key, g in groups.items() if " M51 " in f" {key} "]
    assert len(trial) == 1, list(groups)
    group = trial[0]
    assert group["weibull_shape"] < 1.0
    warning = group["early_failure"]
    assert warning is not None and warning["mode"] == "stripped"
    # data/failure_modes.csv (common practice): no break-in strips new teeth
    assert any("not broken in" in cause for cause in warning["causes"])
    # the blades fitted with a break-in wear out instead (shape above 1)
    for key, g in groups.items():
        if g is not group:
            assert g["weibull_shape"] > 1.0, key
            assert g["early_failure"] is None, key


def test_trial_lot_shape_agrees_with_scipy(demo_log, cli):
    """sawplan's censored Weibull MLE against scipy's (an outside implementation)."""
    from scipy import stats

    path, _ = demo_log
    failed, censored = lives(path, "b.lot = ?", (history.TRIAL_LOT,))
    data = stats.CensoredData(uncensored=failed, right=censored)
    shape, _loc, scale = stats.weibull_min.fit(data, floc=0)
    result = cli("life", "--group-by", "blade-type", "--json", "--db", str(path))
    group = next(g for g in json.loads(result.out)["groups"] if " M51 " in f" {g['key']} ")
    assert shape < 1.0
    assert group["weibull_shape"] == pytest.approx(shape, rel=0.02)
    assert group["weibull_scale_cm2"] == pytest.approx(scale, rel=0.02)


def test_make_demo_shows_the_plan_the_quote_and_blade_life(tmp_path, capsys, monkeypatch):
    home = tmp_path / "home"  # the user's data folder: the demo must leave it alone
    home.mkdir()
    monkeypatch.setenv("SAWPLAN_HOME", str(home))
    out_dir = tmp_path / "out"
    out_dir.mkdir()
    for sheet in ("frame-kit.html", "rail-posts.html"):  # left by an earlier `make demo`
        (out_dir / sheet).write_text("the last run's sheet", encoding="utf-8")
    run_demo = load_demo_module("run_demo")
    code = run_demo.main([], out_dir=out_dir)
    out = capsys.readouterr().out
    assert code == 0
    for heading in ("CUT SHEET", "BARS TO SCALE", "SECTIONS", "BLADES", "QUOTE", "CAUTIONS"):
        assert heading in out, heading
    assert "quoted total" in out and "have on hand" in out
    for job in ("conveyor base frame", "pump blanks", "valve body slices", "walkway handrail"):
        assert job in out, job
    assert "the time of 1.4/2" in out  # the blade-choice comparison on the billet
    assert "lifting beam and two slings" in out  # a 6 m channel of 112 kg on the crane
    assert "blade life (area cut)" in out and "Weibull probability plot" in out
    assert "teeth stripped" in out and "not broken in" in out
    for sheet in ("frame-kit.html", "pump-blanks.html", "billet-slices.html", "rail-posts.html"):
        assert (out_dir / sheet).stat().st_size > 1000
    assert (out_dir / "demo-log.sqlite").is_file()
    assert list(home.iterdir()) == []
    assert os.environ["SAWPLAN_HOME"] == str(home)  # restored after the demo


def test_the_trial_lot_is_named_and_the_forecast_says_it_weighs_on_the_life(demo_log, cli):
    """The demo shows the bad lot named with its supplier and purchase date (issue 13)."""
    path, _ = demo_log
    life = json.loads(cli("life", "--json", "--db", str(path)).out)
    named = {lot["lot"]: lot for lot in life["suspect_lots"]}
    assert set(named) == {history.TRIAL_LOT}  # the monthly lots that wear out are not named
    trial = named[history.TRIAL_LOT]
    bought = (history.TRIAL[0] - dt.timedelta(days=7)).isoformat()  # make_history buys it then
    assert (trial["supplier"], trial["bought_on"]) == ("west depot", bought)
    assert trial["shape_ci"][1] < 1.0
    forecast = json.loads(
        cli("forecast", "--area", "2m2", "--material", "304", "--json", "--db", str(path)).out
    )
    assert forecast["lot_named"] == history.TRIAL_LOT
    assert forecast["blades_needed_without_lot"] < forecast["blades_needed"]
