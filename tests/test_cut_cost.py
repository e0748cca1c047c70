"""Gilbert's optimum tool lives and the cost of a cut.

Sources: Gilbert's formulas on the machining-economics worked example of
Groover, *Fundamentals of Modern Manufacturing* (the example "Determining
cutting speeds in machining economics", Example 24.3 in the 4th edition;
from memory, so the arithmetic is shown beside each value); the cost per cut
worked by hand (derived); and scipy's minimiser as the reference that Gilbert's
speeds are the optima of the cost and time formulas.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.cutting import gilbert, tool_life
from sawplan.cutting.cut_cost import (
    CostInputs,
    LifeRelation,
    Sourced,
    SpeedTime,
    cost_curve,
    cost_per_cut,
    cut_economics,
    speed_time_of,
)
from sawplan.errors import BadDataError

# --- Gilbert on a textbook example -----------------------------------------------------------
# Groover, Fundamentals of Modern Manufacturing, machining-economics example (from memory):
# HSS tool on mild steel, Taylor n = 0.125, C = 70 m/min; tool change time 2.0 min;
# machine and operator $30.00/hr = $0.50/min; tooling cost $3.00 per cutting edge.
#   (a) maximum production: T = (1/0.125 − 1)·2.0 = 7 × 2 = 14 min,
#       v = 70/14^0.125 = 70/1.391 = 50 m/min (printed 50 m/min)
#   (b) minimum cost: T = 7 × (2.0 + 3.00/0.50) = 7 × 8 = 56 min,
#       v = 70/56^0.125 = 70/1.654 = 42 m/min (printed 42 m/min)
GROOVER = {"n": 0.125, "c": 70.0, "change_min": 2.0, "rate_per_min": 30.0 / 60.0, "price": 3.0}


def test_gilbert_maximum_production_textbook_example():
    g = GROOVER
    life = gilbert.optimum_life_production_min(g["n"], g["change_min"])
    assert life == pytest.approx(14.0)  # printed: 14 min
    assert round(tool_life.speed_for_life(life, g["c"], g["n"])) == 50  # printed: 50 m/min


def test_gilbert_minimum_cost_textbook_example():
    g = GROOVER
    life = gilbert.optimum_life_cost_min(g["n"], g["change_min"], g["price"], g["rate_per_min"])
    assert life == pytest.approx(56.0)  # printed: 56 min
    assert round(tool_life.speed_for_life(life, g["c"], g["n"])) == 42  # printed: 42 m/min


def test_time_constant_reproduces_blade_minutes():
    # derived, worked by hand: C_A = 500 m/min (for 1 cm²), n_A = 0.25, cut of 50 cm² taking
    # 2.5 min at 50 m/min (K = 125). At 50 m/min L = (500/50)^4 = 10 000 cm², 200 cuts per blade,
    # T = 200 × 2.5 = 500 min; so C_T = 50 × 500^0.2 = 173.3 m/min.
    c_t = gilbert.time_constant(500.0, 0.25, 125.0, 50.0)
    assert c_t == pytest.approx(50.0 * 500.0**0.2, rel=1e-12)
    assert c_t == pytest.approx(173.3, abs=0.05)


@pytest.mark.parametrize(
    ("call", "field"),
    [
        pytest.param(
            lambda: gilbert.optimum_life_cost_min(0.2, 5.0, 80.0, 0.0), "rate", id="rate 0"
        ),
        pytest.param(lambda: gilbert.optimum_life_cost_min(1.2, 5.0, 80.0, 1.0), "n", id="n>=1"),
        pytest.param(
            lambda: gilbert.optimum_life_production_min(0.2, -1.0),
            "change-time",
            id="negative change time",
        ),  # fmt: skip
    ],
)
def test_gilbert_refuses_impossible_inputs(call, field):
    with pytest.raises(BadDataError) as err:
        call()
    assert err.value.field == field


# --- cost per cut, worked by hand -------------------------------------------------------------


def inputs(rate=60.0, handling=0.5, price=80.0, change=12.0) -> CostInputs:
    return CostInputs(
        rate_per_h=Sourced(rate, "given"),
        handling_min=Sourced(handling, "default"),
        blade_price=Sourced(price, "blade log"),
        change_min=Sourced(change, "config"),
    )


LIFE = LifeRelation(n=0.25, c_m_min=500.0, source="invented for the test", fitted=False)


def test_cost_per_cut_worked_by_hand():
    # derived by hand: a 100 × 50 mm flat (5 000 mm² = 50 cm²) cut in 2.5 min at 50 m/min;
    # rate 60/h = 1.00/min, handling 0.5 min, blade 80, change 12 min;
    # life (500/50)^(1/0.25) = 10^4 cm² → share of a blade per cut 50/10 000 = 0.005
    #   machine = 1.00 × (2.5 + 0.5)   = 3.00
    #   blade   = 80 × 0.005           = 0.40
    #   change  = 12 × 1.00 × 0.005    = 0.06
    #   total                          = 3.46;  per m²: 3.46 / 0.005 m² = 692
    #   time    = 2.5 + 0.5 + 12 × 0.005 = 3.06 min; 200 cuts and 500 min of cutting per blade
    c = cost_per_cut(5_000.0, 2.5, 50.0, LIFE, inputs())
    assert c.blade_life_cm2 == pytest.approx(10_000.0)
    assert c.machine == pytest.approx(3.00)
    assert c.blade == pytest.approx(0.40)
    assert c.change == pytest.approx(0.06)
    assert c.total == pytest.approx(3.46)
    assert c.cost_per_m2 == pytest.approx(692.0)
    assert c.time_per_cut_min == pytest.approx(3.06)
    assert c.cuts_per_blade == pytest.approx(200.0)
    assert c.blade_life_min == pytest.approx(500.0)


def test_economics_speeds_worked_by_hand():
    # derived, the cut above: n_T = 0.25/1.25 = 0.2, C_T = 173.3 m/min (see above)
    #   T_cost = (1/0.2 − 1)(12 + 80/1.00) = 4 × 92 = 368 min → V = 173.3/368^0.2 = 53.2 m/min
    #   T_prod = 4 × 12 = 48 min → V = 173.3/48^0.2 = 79.9 m/min
    econ = cut_economics(5_000.0, 50.0, SpeedTime(125.0, None), LIFE, inputs(), (15.0, 120.0))
    cost, prod = econ.run("cost"), econ.run("production")
    assert cost.optimum_life_min == pytest.approx(368.0)
    assert prod.optimum_life_min == pytest.approx(48.0)
    assert cost.band_speed_m_min == pytest.approx(53.2, abs=0.05)
    assert prod.band_speed_m_min == pytest.approx(79.9, abs=0.05)
    assert cost.held_by is None and prod.held_by is None
    # at Gilbert's T the blade indeed lasts T minutes of cutting on this cut
    assert cost.cost.blade_life_min == pytest.approx(368.0, rel=1e-9)
    assert econ.run("recommended").cost.total == pytest.approx(3.46)


def test_optima_held_by_saw_range_and_feed_limit():
    # the same cut on a saw that runs 15-60 m/min and whose motor holds the feed from 45 m/min
    econ = cut_economics(5_000.0, 50.0, SpeedTime(125.0, 45.0), LIFE, inputs(), (15.0, 60.0))
    assert econ.run("cost").band_speed_m_min == pytest.approx(45.0)
    assert econ.run("cost").held_by == "feed-limit"
    assert econ.run("production").held_by == "feed-limit"
    slow = cut_economics(5_000.0, 50.0, SpeedTime(125.0, None), LIFE, inputs(), (60.0, 90.0))
    assert slow.run("cost").band_speed_m_min == pytest.approx(60.0)
    assert slow.run("cost").held_by == "saw-min"
    assert slow.run("production").held_by is None


@settings(deadline=None, max_examples=60)  # the first example imports scipy
@given(
    n=st.floats(0.05, 0.6),
    c=st.floats(100.0, 5_000.0),
    rate=st.floats(10.0, 300.0),
    price=st.floats(5.0, 2_000.0),
    change=st.floats(1.0, 60.0),
    k=st.floats(10.0, 1_000.0),
    area_mm2=st.floats(100.0, 200_000.0),
)
def test_gilbert_speeds_are_the_minima_of_cost_and_time(n, c, rate, price, change, k, area_mm2):
    # reference: scipy's bounded scalar minimiser on the cost and time per cut
    from scipy.optimize import minimize_scalar

    life = LifeRelation(n=n, c_m_min=c, source="test", fitted=False)
    ins = inputs(rate=rate, price=price, change=change)
    times = SpeedTime(k, None)
    econ = cut_economics(area_mm2, 50.0, times, life, ins, (1e-3, 1e9))
    for run, what in (("cost", "total"), ("production", "time_per_cut_min")):
        v = econ.run(run).band_speed_m_min

        def f(log_v, what=what):
            speed = math.exp(log_v)
            return getattr(cost_per_cut(area_mm2, times.time_min(speed), speed, life, ins), what)

        ref = minimize_scalar(f, bracket=(math.log(v) - 1, math.log(v) + 1), tol=1e-10)
        assert v == pytest.approx(math.exp(ref.x), rel=1e-3)


def test_cost_curve_spans_the_saw_and_has_its_minimum_near_gilbert():
    curve = cost_curve(5_000.0, SpeedTime(125.0, None), LIFE, inputs(), (15.0, 120.0), points=106)
    assert curve[0].band_speed_m_min == pytest.approx(15.0)
    assert curve[-1].band_speed_m_min == pytest.approx(120.0)
    cheapest = min(curve, key=lambda p: p.total)
    assert cheapest.band_speed_m_min == pytest.approx(53.0, abs=1.0)  # Gilbert: 53.2 m/min
    for p in curve:
        assert p.total == pytest.approx(p.machine + p.blade + p.change)


@pytest.mark.parametrize(
    ("kw", "field"),
    [
        pytest.param({"rate": 0.0}, "shop rate", id="zero rate"),
        pytest.param({"rate": -50.0}, "shop rate", id="negative rate"),
        pytest.param({"price": 0.0}, "blade price", id="zero price"),
        pytest.param({"price": -1.0}, "blade price", id="negative price"),
        pytest.param({"change": 0.0}, "blade change time", id="zero change time"),
        pytest.param({"change": -3.0}, "blade change time", id="negative change time"),
        pytest.param({"handling": -0.1}, "handling time per cut", id="negative handling"),
        pytest.param({"rate": math.inf}, "shop rate", id="infinite rate"),
    ],
)
def test_bad_money_and_times_are_refused(kw, field):
    with pytest.raises(BadDataError) as err:
        inputs(**kw)
    assert err.value.field == field


def test_speed_time_finds_where_the_feed_stops_keeping_up():
    # derived: a model whose time is 125/V below 45 m/min and 125/45 above it
    def model(v):
        return 125.0 / min(v, 45.0)

    times = speed_time_of(model, (15.0, 120.0))
    assert times.k_min_m_min == pytest.approx(125.0)
    assert times.feed_limit_m_min == pytest.approx(45.0, rel=0.03)
    free = speed_time_of(lambda v: 125.0 / v, (15.0, 120.0))
    assert free.feed_limit_m_min is None


def test_life_relation_falls_back_to_the_published_exponent():
    # Groover's n = 0.125 for HSS (tool_life.PUBLISHED) → for area life 0.125/0.875 = 0.142857
    # (derived); C anchored so that the mean life at 60 m/min is 30 000 cm²
    from sawplan.cutting.life_basis import life_relation
    from sawplan.life.speed_life import fit_speed_life

    no_fit = fit_speed_life([0], [100.0], [60.0], [True])
    rel = life_relation(no_fit, blade_material="bi-metal", anchor_life_cm2=30_000.0,
                        anchor_speed_m_min=60.0, anchor_source="the default life")  # fmt: skip
    assert not rel.fitted
    assert rel.n == pytest.approx(0.125 / 0.875)
    assert rel.mean_life_cm2(60.0) == pytest.approx(30_000.0)
    assert "Groover" in rel.source
    assert "retired blade" in rel.note
