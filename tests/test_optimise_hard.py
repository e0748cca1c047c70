"""The optimiser on hard orders, its budget and its time limit.

Triplet orders follow Falkenauer's recipe (Falkenauer 1996, "A hybrid grouping
genetic algorithm for bin packing", from memory): bars of 1000; a first piece
drawn uniformly from [380, 490], a second from [250, (1000 - first) / 2], the
third filling the bar exactly.  Every piece is over a quarter and under half a
bar, so every bar holds exactly three and the optimum is n / 3 by construction.
"""

from __future__ import annotations

import random
import time
from collections import Counter

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sawplan.cutlist.optimise.solve import (
    Allowances,
    Demand,
    StockType,
    first_fit_decreasing,
    optimise,
)
from tests.test_optimise import check_plan


def falkenauer_triplets(bars: int, seed: int) -> list[Demand]:
    rng = random.Random(seed)
    lengths: list[int] = []
    for _ in range(bars):
        first = rng.randint(380, 490)
        second = rng.randint(250, (1000 - first) // 2)
        lengths += [first, second, 1000 - first - second]
    return [Demand(f"T{n}", n, c) for n, c in Counter(lengths).items()]


BAR = [StockType("bar", 1000, None, 1.0)]


@pytest.mark.parametrize(
    ("bars", "seed"),
    [
        pytest.param(20, 0, id="60-pieces-seed-0"),
        pytest.param(20, 1, id="60-pieces-seed-1"),
        pytest.param(20, 2, id="60-pieces-seed-2"),
        pytest.param(20, 4, id="60-pieces-seed-4-closed-by-arc-flow"),
        pytest.param(20, 7, id="60-pieces-seed-7-closed-by-arc-flow"),
        pytest.param(40, 0, id="120-pieces-seed-0"),
        pytest.param(40, 1, id="120-pieces-seed-1"),
    ],
)
def test_triplet_orders_reach_their_optimum(bars: int, seed: int) -> None:
    demand = falkenauer_triplets(bars, seed)
    plan = optimise(BAR, demand, time_limit_s=120)  # the budget ends it, not the clock
    check_plan(plan, BAR, demand, Allowances())
    assert plan.bar_count == bars  # n / 3 by construction
    assert plan.proven_optimal and not plan.stopped_by_time_limit


def test_same_order_gives_the_same_plan() -> None:
    demand = falkenauer_triplets(12, seed=5)
    first = optimise(BAR, demand, time_limit_s=120)
    second = optimise(BAR, demand, time_limit_s=120)
    assert first.bars == second.bars


def test_time_limit_is_honoured_and_the_plan_is_feasible() -> None:
    # A large order under a short limit: the safety stop fires and the best plan so
    # far comes back, feasible, with its bound.  The margin is generous (no speed test).
    rng = random.Random(11)
    demand = [Demand(f"P{i}", rng.randint(150, 2500), rng.randint(5, 40)) for i in range(150)]
    stock = [StockType("6m", 6000, None, 60.0), StockType("4m", 4000, None, 42.0)]
    allow = Allowances(kerf=2, trim=5, grip=40, min_remnant=300)
    started = time.perf_counter()
    plan = optimise(stock, demand, allow, time_limit_s=0.5)
    elapsed = time.perf_counter() - started
    check_plan(plan, stock, demand, allow)
    assert elapsed < 0.5 + 10.0  # honours the limit (generous margin for a busy machine)
    assert plan.objective_value >= plan.objective_bound >= 0


@st.composite
def orders(draw: st.DrawFn) -> tuple[list[StockType], list[Demand], Allowances]:
    allow = Allowances(
        kerf=draw(st.integers(0, 4)),
        trim=draw(st.integers(0, 15)),
        grip=draw(st.integers(0, 60)),
        min_remnant=draw(st.integers(0, 400)),
    )
    bar = draw(st.integers(600, 3000))
    stock = [StockType("bar", bar, None, 1.0)]
    usable = bar - allow.trim - allow.grip
    lengths = draw(st.lists(st.integers(40, usable), min_size=1, max_size=6, unique=True))
    demand = [Demand(f"P{i}", n, draw(st.integers(1, 12))) for i, n in enumerate(lengths)]
    return stock, demand, allow


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(orders())
def test_plans_are_feasible_and_never_worse_than_first_fit_decreasing(case) -> None:
    stock, demand, allow = case
    plan = optimise(stock, demand, allow)
    check_plan(plan, stock, demand, allow)  # every piece once, kerf, trim and grip in the bar
    assert plan.bar_count <= first_fit_decreasing(stock, demand, allow).bar_count


def test_stock_price_beyond_range_is_one_line_error() -> None:
    from sawplan.errors import BadDataError

    with pytest.raises(BadDataError, match="cost must be at most"):
        optimise([StockType("bar", 1000, None, 1e308)], [Demand("P", 100, 2)])


def test_huge_but_accepted_prices_do_not_break_the_lp() -> None:
    # Prices are scaled before the LP: a billion per bar plans like one per bar.
    demand = [Demand("A", 49, 2), Demand("B", 26, 2), Demand("C", 25, 2)]
    cheap = optimise([StockType("bar", 100, None, 1.0)], demand)
    dear = optimise([StockType("bar", 100, None, 1e9)], demand)
    assert dear.bar_count == cheap.bar_count == 2  # 49 + 26 + 25 twice (hand)
