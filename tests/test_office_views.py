"""The office pages' data (``sawplan.station.office.views``) on both engines, and their charts.

External checks: the calibration trend's block medians and quartiles against
numpy (``median``, ``percentile`` with linear interpolation, which is
``statistics.quantiles(method="inclusive")``), and the Weibull fit of the
fixture against scipy's censored maximum-likelihood fit.  The fixture is
invented (``tests/office_log.py``).
"""

from __future__ import annotations

import csv
import io

import numpy as np
import pytest
from office_log import BLADES, RATIOS, ROUND_50_MM2, build, send

from sawplan.display import Display, UnitSystem
from sawplan.render import to_csv
from sawplan.station.office import charts, views
from sawplan.store import connect


def test_views_on_both_engines(log_db):
    """Life and calibration views of one log; then a new failure shows at once."""
    build(log_db)
    with connect(log_db, create=False) as db:
        life = views.life_view(db)
        cal = views.calibration_view(db)
    check_weibull(life)
    check_recent(life)
    check_trend(cal)
    check_jobs_and_shelf(log_db)

    from sawplan.store.records import retire_blade

    with connect(log_db) as db:
        retire_blade(db, "B-07", "stripped", on="2024-06-01")
        after = views.life_view(db)
    assert after.recent[0].tag == "B-07" and after.recent[0].kind == "failure"
    assert after.recent[0].counted_as == "teeth stripped"
    counts = {m.code: m.count for m in after.report.failure_modes.modes}
    before = {m.code: m.count for m in life.report.failure_modes.modes}
    assert counts["stripped"] == before["stripped"] + 1
    assert len(after.weibull.plot.points) == len(life.weibull.plot.points) + 1


def check_jobs_and_shelf(db_path: str) -> None:
    """A job of four cuts on bay 2: its progress, what the queue needs, the shelf; then the
    office withdraws one job and moves the other."""
    from sawplan.errors import ConflictError
    from sawplan.store.job_rows import move_job, withdraw_job

    first = send(db_path, "bay 2", "shafts", cuts=4)
    second = send(db_path, "bay 2", "collars", cuts=2, pitch="3/4")
    with connect(db_path, create=False) as db:
        jobs = views.jobs_view(db)
        shelf = views.shelf_view(db)
    line = next(j for j in jobs.jobs if j.id == first)
    assert (line.saw, line.cuts, line.done, line.state) == ("bay 2", 4, 0, "open")
    assert line.area_left_cm2 == pytest.approx(4 * ROUND_50_MM2 / 100.0)
    assert line.time_left_min == pytest.approx(8.0)
    needs = {(n.saw, n.pitch): n for n in jobs.needs}
    assert set(needs) == {("bay 2", "4/6"), ("bay 2", "3/4")}
    assert (
        needs[("bay 2", "4/6")].cuts_left == 4
        and needs[("bay 2", "4/6")].forecast.blades_needed >= 1
    )
    # B-08 was taken off unworn: 27×0.9 4/6, the size and pitch bay 2's first job needs
    assert [b.tag for b in shelf.shelf] == ["B-08"]
    balance = {b.pitch: b for b in shelf.balance}
    assert balance["4/6"].on_shelf == ("B-08",) and balance["3/4"].on_shelf == ()
    with connect(db_path) as db:
        assert withdraw_job(db, second, on="2024-06-02") == "collars"
        with pytest.raises(ConflictError):
            withdraw_job(db, second, on="2024-06-02")
        assert move_job(db, first, "bay 1", None, on="2024-06-02") == ("shafts", "bay 1")
        after = views.jobs_view(db)
    states = {j.id: (j.saw, j.state) for j in after.jobs}
    assert states == {first: ("bay 1", "open"), second: ("bay 2", "withdrawn")}
    assert [(n.saw, n.pitch) for n in after.needs] == [("bay 1", "4/6")]


def check_weibull(life: views.LifeView) -> None:
    from scipy import stats

    w = life.weibull
    retired = [v for v in BLADES.values() if v[2] is not None]
    assert w.plot.n == len(BLADES) and len(w.plot.points) == len(retired)
    data = stats.CensoredData(
        uncensored=[v[1] for v in retired], right=[v[1] for v in BLADES.values() if v[2] is None]
    )
    shape, _loc, scale = stats.weibull_min.fit(data, floc=0)
    assert w.shape == pytest.approx(shape, rel=0.01)
    assert w.scale_cm2 == pytest.approx(scale, rel=0.01)
    assert w.bands, "a fitted log has an interval band"
    for b in w.bands:
        assert b.low_cm2 < b.life_cm2 < b.high_cm2
    b10 = next(b for b in w.bands if b.failed_fraction == 0.1)
    assert (b10.low_cm2, b10.high_cm2) == pytest.approx(life.report.overall.b10_ci_cm2, rel=1e-6)


def check_recent(life: views.LifeView) -> None:
    tags = [r.tag for r in life.recent]
    ended = sorted((v[3], t) for t, v in BLADES.items() if v[3] is not None)
    assert tags == [t for _, t in reversed(ended)]  # newest first, every retired blade
    first = life.recent[0]
    assert (first.tag, first.recorded, first.kind) == ("B-06", "stripped", "failure")
    assert first.area_cm2 == pytest.approx(BLADES["B-06"][1])


def check_trend(cal: views.CalibrationView) -> None:
    assert [(r.saw, r.material_group, r.entries) for r in cal.rows] == [
        ("bay 1", "carbon-steel", len(RATIOS))
    ]
    blocks = [RATIOS[i : i + 3] for i in range(0, len(RATIOS), 3)]
    assert [p.entries for p in cal.trend] == [3, 3, 3]
    for point, block in zip(cal.trend, blocks, strict=True):
        assert point.factor == pytest.approx(float(np.median(block)))
        low, high = np.percentile(block, [25, 75])
        assert (point.low, point.high) == pytest.approx((low, high))
    assert [(p.first_on, p.last_on) for p in cal.trend] == [
        ("2024-02-01", "2024-02-03"),
        ("2024-02-04", "2024-02-06"),
        ("2024-02-07", "2024-02-09"),
    ]


def test_trend_keeps_the_newest_block_full():
    """Ten entries in blocks of three: the oldest single entry is left out, never the newest."""
    from sawplan.store.stats import TimedCut

    entries = [TimedCut("bay 1", "carbon-steel", 1.0 + i / 10, 1.0, 1, f"2024-03-{i + 1:02d}")
               for i in range(10)]  # fmt: skip
    trend = views.calibration_trend(entries)
    assert [p.entries for p in trend] == [3, 3, 3]
    assert trend[-1].last_on == "2024-03-10" and trend[0].first_on == "2024-03-02"
    assert trend[-1].factor == pytest.approx(float(np.median([1.7, 1.8, 1.9])))


# --- charts ----------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def office_views(tmp_path_factory):
    path = str(tmp_path_factory.mktemp("office") / "log.sqlite")
    build(path)
    with connect(path, create=False) as db:
        return views.life_view(db), views.calibration_view(db)


def _csv(headers, rows) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(to_csv(headers, rows))))


@pytest.mark.parametrize(
    ("units", "area"), [("metric", "cm²"), ("us", "in²")], ids=["metric", "us"]
)
def test_weibull_chart_has_axes_in_the_shops_units(office_views, units, area):
    life, _ = office_views
    svg = charts.weibull_svg(life.weibull, Display(UnitSystem(units)))
    assert svg.startswith("<svg") and "<title" in svg and "<desc" in svg
    assert "style" not in svg  # the station's Content-Security-Policy allows no inline style
    assert f"life: area cut ({area}, log scale)" in svg
    assert "blades failed (Weibull scale)" in svg and "63.2 %" in svg
    assert ("cm²" in svg) == (units == "metric")  # no unit of the other system
    rows = _csv(*charts.weibull_csv(life.weibull))
    failures = [r for r in rows if r["kind"] == "failure"]
    assert [float(r["life_cm2"]) for r in failures] == pytest.approx(
        [p.life_cm2 for p in life.weibull.plot.points]
    )
    lows = [float(r["life_cm2"]) for r in rows if r["kind"] == "band-low"]
    assert lows == pytest.approx([b.low_cm2 for b in life.weibull.bands])


def test_bar_and_trend_charts_and_their_csv(office_views):
    life, cal = office_views
    d = Display(UnitSystem.US)
    modes = charts.modes_svg(life.report.failure_modes)
    assert "failed blades" in modes and "teeth stripped" in modes
    rows = _csv(*charts.modes_csv(life.report.failure_modes))
    assert {r["mode"]: int(r["count"]) for r in rows} == {
        m.code: m.count for m in life.report.failure_modes.modes
    }
    cost = charts.cost_svg(life.report.costs, d, "EUR")
    assert "blade cost per ft² cut (EUR)" in cost
    (row,) = _csv(*charts.cost_csv(life.report.costs))
    assert float(row["price"]) == 60.0
    assert float(row["cost_per_m2"]) == pytest.approx(life.report.costs[0].cost_per_m2)
    trend = charts.calibration_svg(cal)
    assert "actual ÷ model" in trend and "saw bay 1" in trend and "carbon-steel" in trend
    rows = _csv(*charts.calibration_csv(cal))
    assert [float(r["factor"]) for r in rows] == pytest.approx([p.factor for p in cal.trend])
    ids = [svg.split('id="', 2)[1].split('"')[0] for svg in (modes, cost, trend)]
    assert len(set(ids)) == 3  # each chart's ids are its own, so one page can hold them all
