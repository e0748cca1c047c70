"""Bounded work: the plan under a clock that has fired, the pricing table's budget, job limits.

Feasibility is recomputed from the model's own definitions (``check_plan`` of
test_optimise: every piece exactly once, every bar within its length with trim,
kerfs and grip).  No assertion here is on time: speed lives in
bench/bench_limits.py.
"""

from __future__ import annotations

import random
import time
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.cutlist.optimise import knapsack
from sawplan.cutlist.optimise.solve import Allowances, Demand, StockType, optimise
from sawplan.cutlist.plan.job import output_reserve_s
from tests.test_optimise import check_plan

ALLOW = Allowances(kerf=16, trim=50, grip=300, min_remnant=3000)  # 0.1 mm: 1.6, 5, 30, 300 mm


def order(parts: int, seed: int) -> list[Demand]:
    rng = random.Random(seed)
    return [Demand(f"p{i}", rng.randrange(1500, 25000), rng.randrange(1, 30)) for i in range(parts)]


TWO_STOCKS = [StockType("6m", 60_000, None, 60.0), StockType("4m", 40_000, None, 42.0)]


@pytest.mark.parametrize("parts", [3, 60, 300])
def test_a_fired_clock_still_gives_a_whole_feasible_plan(parts):
    demand = order(parts, seed=parts)
    plan = optimise(TWO_STOCKS, demand, ALLOW, deadline=time.perf_counter() - 1.0)
    check_plan(plan, TWO_STOCKS, demand, ALLOW)
    assert plan.stopped_by_time_limit
    assert plan.method == "first-fit-decreasing"  # the first plan is the answer
    assert plan.objective_bound <= plan.objective_value + 1e-9  # with its bound and gap
    assert plan.gap >= 0


def test_a_pricing_table_over_budget_leaves_the_first_plan(monkeypatch):
    # the table's budget stops column generation; the first-fit plan and its length bound stay
    monkeypatch.setattr(knapsack, "MAX_TABLE_BITS", 1_000)
    demand = order(40, seed=7)
    plan = optimise(TWO_STOCKS, demand, ALLOW, time_limit_s=60)
    check_plan(plan, TWO_STOCKS, demand, ALLOW)
    assert plan.method == "first-fit-decreasing"
    assert not plan.stopped_by_time_limit


def test_the_table_budget_is_refused_before_any_memory_is_taken():
    with pytest.raises(knapsack.TableTooLarge):
        knapsack.solve_bounded_knapsack([1], [1.0], [10], knapsack.MAX_TABLE_BITS)


@given(
    left=st.floats(min_value=0.0, max_value=600.0), pieces=st.integers(min_value=0, max_value=10**5)
)
def test_output_reserve_leaves_the_search_at_least_half(left, pieces):
    reserve = output_reserve_s(left, pieces)
    assert 0.0 <= reserve <= 0.5 * left + 1e-12
    assert reserve >= min(0.1 * left, 0.5 * left) - 1e-12


JOB_HEAD = '[job]\nname = "limits"\nkerf = "1.6mm"\n'


def job_file(tmp_path: Path, lengths: list[str], stock: list[str]) -> Path:
    text = [JOB_HEAD]
    for length in stock:
        text.append(f'[[stock]]\nmaterial = "1018"\nsection = "round 30mm"\nlength = "{length}"\n')
    for i, length in enumerate(lengths):
        text.append(
            f'[[part]]\nname = "p{i}"\nmaterial = "1018"\nsection = "round 30mm"\n'
            f'length = "{length}"\ncount = 1\n'
        )
    path = tmp_path / "job.toml"
    path.write_text("\n".join(text), encoding="utf-8")
    return path


def test_more_than_a_thousand_parts_is_refused(cli, tmp_path):
    job = job_file(tmp_path, [f"{100 + i}mm" for i in range(1_001)], ["6m"])
    r = cli("plan", str(job))
    assert r.code == 3
    assert "has 1,001 [[part]] entries, at most 1,000 in one job" in r.err


def test_lengths_times_stock_lines_of_a_section_are_bounded(cli, tmp_path):
    # 501 distinct lengths on 20 stock lines: 10,020 pairs, over the 10,000 of one section
    stock = [f"{3000 + 100 * i}mm" for i in range(20)]
    job = job_file(tmp_path, [f"{1000 + i}mm" for i in range(501)], stock)
    r = cli("plan", str(job))
    assert r.code == 3
    assert "501 piece lengths and 20 stock lines (10,020 pairs), at most 10,000" in r.err
    assert len(r.err.strip().splitlines()) == 1
    # 500 of them (10,000 pairs) are planned
    job = job_file(tmp_path, [f"{1000 + i}mm" for i in range(500)], stock)
    r = cli("plan", str(job), "--time-limit", "2")
    assert r.code == 0, r.err


@given(
    counts=st.lists(st.integers(min_value=0, max_value=4), min_size=1, max_size=6),
    demand=st.lists(st.integers(min_value=0, max_value=40), min_size=6, max_size=6),
    copies=st.integers(min_value=0, max_value=12),
    limit=st.one_of(st.none(), st.integers(min_value=0, max_value=12)),
)
def test_whole_copies_cut_at_once_match_one_at_a_time(counts, demand, copies, limit):
    # rounding down cuts the copies whose pieces are all wanted in one step: the same
    # bars, demand and stock left as cutting them one by one
    from sawplan.cutlist.optimise.rounding import _cut, _cut_whole, _State, _whole_copies

    n = len(counts)
    if not any(counts):
        counts[0] = 1

    class OnePool:  # the two things _cut asks of a pool
        stock = [0]

        @staticmethod
        def counts(column):
            return tuple(counts)

    one = _State([], list(demand[:n]), [limit])
    for _ in range(copies):
        _cut(OnePool, 0, one)
    batch = _State([], list(demand[:n]), [limit])
    whole = _whole_copies(OnePool, 0, batch, copies)
    if whole:
        _cut_whole(OnePool, 0, batch, whole)
    for _ in range(copies - whole):
        _cut(OnePool, 0, batch)
    assert (batch.fixed, batch.demand, batch.limits) == (one.fixed, one.demand, one.limits)


@given(counts=st.lists(st.integers(min_value=0, max_value=9), min_size=1, max_size=8))
def test_a_filling_size_is_the_same_however_it_is_asked(counts):
    # (pieces, total length) by definition: Σn and Σ n·length; remembered by the tuple's
    # id, so an equal tuple, the same tuple again and a list must all agree
    from sawplan.cutlist.optimise.problem import Problem

    lengths = tuple(range(100 * len(counts), 0, -100))
    problem = Problem(lengths, (1,) * len(counts), (10_000,), (None,), (1.0,), (1.0,), 0, 0, 0, 0)
    want = (sum(counts), sum(n * length for n, length in zip(counts, lengths, strict=True)))
    first = tuple(counts)
    assert problem.size(first) == want
    assert problem.size(first) == want
    assert problem.size(tuple(list(counts))) == want
    assert problem.size(list(counts)) == want
