"""The search as a whole: FFD plan, column generation, rounding, exact step, polish.

1. First-fit decreasing gives a plan at once (and the master's first columns).
2. Column generation solves the LP and gives the lower bound.
3. Rounding and repair (``rounding``) look for a plan meeting the bound.
4. If none is found and the instance is small, the arc-flow integer program.
5. Spare length is gathered into keepable remnants (``polish``).
6. With several stock types, a second LP with every bar costing 1 bounds the bar count.
If the LP fails or time runs out, the best plan so far (at worst FFD) stands.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

from sawplan.cutlist.optimise.arcflow import solve_arc_flow
from sawplan.cutlist.optimise.build import Instance
from sawplan.cutlist.optimise.colgen import ColumnPool, LpFailure, LpOutcome, solve_master_lp
from sawplan.cutlist.optimise.ffd import pack_first_fit_decreasing
from sawplan.cutlist.optimise.polish import gather_remnants
from sawplan.cutlist.optimise.problem import Bar, Problem
from sawplan.cutlist.optimise.report import Bounds, material_bounds
from sawplan.cutlist.optimise.rounding import (
    Incumbent,
    reaches_bound,
    round_and_repair,
    same_bar_cost,
)

_TINY = 1e-6


@dataclass(frozen=True)
class SearchOutcome:
    bars: tuple[Bar, ...]
    unplaced: tuple[int, ...]
    bounds: Bounds
    method: str
    proven_optimal: bool


def search_plan(instance: Instance, *, deadline: float) -> SearchOutcome:
    """Best plan found before ``deadline`` with its lower bounds."""
    problem = instance.problem
    first_bars, first_unplaced = pack_first_fit_decreasing(problem)
    ffd = Incumbent(tuple(first_bars), tuple(first_unplaced))
    best, method = ffd, "first-fit-decreasing"
    bounds = material_bounds(instance)
    bar_cost = same_bar_cost(problem)
    proven = False
    try:
        pool = _seeded_pool(problem, first_bars)
        lp = solve_master_lp(
            pool,
            problem.demand,
            problem.limits,
            problem.costs,
            deadline=deadline,
            bar_cost=bar_cost,
        )
        objective_bound = max(lp.bound, bounds.objective)
        bounds = _lp_bounds(problem, pool, lp, bounds, bar_cost)
        best = round_and_repair(
            pool, lp, ffd, bound=objective_bound, bar_cost=bar_cost, deadline=deadline
        )
        if best is not ffd:
            method = "column-generation"
        proven = reaches_bound(problem, best, objective_bound, bar_cost)
        stock_short = lp.shortfall > _TINY
        if not proven and not stock_short and time.perf_counter() < deadline:
            exact = solve_arc_flow(problem, deadline=deadline, cost_cap=_cap(problem, best))
            if exact is not None and not exact.none_under_cap:
                candidate = Incumbent(exact.bars, (0,) * len(problem.lengths))
                if candidate.key(problem) < best.key(problem):
                    best, method = candidate, "arc-flow"
            if exact is not None:
                proven = exact.proven_optimal and not any(best.unplaced)
        if bar_cost is None and not any(best.unplaced):
            bounds = _bar_count_bound(problem, pool, bounds, deadline)
    except LpFailure:
        pass
    bars = best.bars
    if not any(best.unplaced):
        bars = tuple(gather_remnants(problem, bars, deadline=time.perf_counter() + 0.25))
    return SearchOutcome(bars, best.unplaced, bounds, method, proven)


def _seeded_pool(problem: Problem, first_bars: list[Bar]) -> ColumnPool:
    """Columns to start from: one length per bar (as many as fit) and the FFD bars."""
    pool = ColumnPool(problem)
    weights = problem.weights
    for s in range(len(problem.stock_lengths)):
        capacity = problem.capacity(s)
        for j, w in enumerate(weights):
            if w <= capacity:
                counts = [0] * len(weights)
                counts[j] = min(problem.demand[j], capacity // w)
                pool.add(s, counts)
    for s, counts in first_bars:
        pool.add(s, counts)
    return pool


def _lp_bounds(
    problem: Problem, pool: ColumnPool, lp: LpOutcome, fallback: Bounds, bar_cost: float | None
) -> Bounds:
    """Bounds from the first LP; the bar bound only when all bars cost the same.

    The cost is that of the master's solution, scaled by bound / value when column
    generation stopped before the LP optimum (exact for one stock type).
    """
    cost = sum(
        problem.prices[pool.stock[c]] * x for c, x in zip(lp.columns, lp.values, strict=True)
    )
    if lp.value > 0:
        cost *= min(lp.bound / lp.value, 1.0)
    bars = lp.bound / bar_cost if bar_cost else fallback.bars
    return Bounds(
        max(bars, fallback.bars), max(lp.bound, fallback.objective), max(cost, fallback.cost)
    )


def _bar_count_bound(problem: Problem, pool: ColumnPool, bounds: Bounds, deadline: float) -> Bounds:
    """Several stock types: the LP with every bar costing 1 bounds the number of bars."""
    ones = (1.0,) * len(problem.stock_lengths)
    try:
        lp = solve_master_lp(
            pool, problem.demand, problem.limits, ones, deadline=deadline, bar_cost=1.0
        )
    except LpFailure:
        return bounds
    return Bounds(max(bounds.bars, lp.bound), bounds.objective, bounds.cost)


def _cap(problem: Problem, best: Incumbent) -> float | None:
    """Most a plan may cost to beat ``best`` (one bar less when all bars cost the same)."""
    if any(best.unplaced):
        return None
    cost = sum(problem.costs[s] for s, _ in best.bars)
    step = same_bar_cost(problem) or 1e-6 * max(cost, 1.0)
    return cost - step + 1e-6 * step
