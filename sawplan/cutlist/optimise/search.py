"""The search as a whole: FFD seed, column generation, rounding, closing step, polish.

1. First-fit decreasing gives a plan at once (and the master's first columns):
   a seed, and the answer only if nothing better is found.
2. Column generation solves the LP and gives the lower bound.
3. Rounding and dives (``rounding``) look for a plan meeting the bound.
4. If the plan is still above the bound, the closing step (``repair``) takes
   a few bars at a time apart and re-packs them exactly (arc-flow); on a small
   order the whole order goes to arc-flow first.
5. Spare length is gathered into keepable remnants (``polish``).
6. The bound is reported in the terms of the objective (``report``): bars with
   one stock type; material cost (or new-stock length when nothing is priced)
   with several, from the LP of that cost with the remnants on hand in it.
Every stage keeps the best plan found so far; the work of each is budgeted
(``budget.Effort``), and the wall clock only stops the search in an emergency.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from math import ceil

from sawplan.cutlist.optimise.arcflow import solve_arc_flow
from sawplan.cutlist.optimise.budget import AFTER_SEARCH_PER_FFD, Clock, Effort
from sawplan.cutlist.optimise.build import Instance
from sawplan.cutlist.optimise.colgen import LpFailure, solve_master_lp
from sawplan.cutlist.optimise.ffd import pack_first_fit_decreasing
from sawplan.cutlist.optimise.polish import gather_remnants
from sawplan.cutlist.optimise.pool import ColumnPool
from sawplan.cutlist.optimise.problem import Bar, Problem
from sawplan.cutlist.optimise.repair import price_step, repair_plan
from sawplan.cutlist.optimise.report import Bounds, material_bounds, objective_of, report_costs
from sawplan.cutlist.optimise.rounding import (
    Incumbent,
    close_enough,
    reaches_bound,
    round_and_repair,
    same_bar_cost,
)

_TINY = 1e-6
_SMALL_ORDER_ARCS = 6_000  # the whole order goes to arc-flow when its graph is this small


@dataclass(frozen=True)
class SearchOutcome:
    bars: tuple[Bar, ...]
    unplaced: tuple[int, ...]
    bounds: Bounds
    method: str
    proven_optimal: bool
    stopped_by_time_limit: bool


def search_plan(instance: Instance, *, clock: Clock, effort: Effort = Effort()) -> SearchOutcome:
    """Best plan within the work budget (or until ``clock`` fires) with its lower bounds."""
    problem = instance.problem
    started = time.perf_counter()
    first_bars, first_unplaced = pack_first_fit_decreasing(problem)
    clock.keep_back(AFTER_SEARCH_PER_FFD * (time.perf_counter() - started))
    best = Incumbent(tuple(first_bars), tuple(first_unplaced))
    method = "first-fit-decreasing"
    bounds = material_bounds(instance)
    bar_cost = same_bar_cost(problem)
    proven = False
    if not any(best.unplaced) and _meets_report_bound(problem, best.bars, bounds):
        # FFD already meets the length bound: nothing can be better, no LP needed
        bars = tuple(
            gather_remnants(problem, best.bars, clock=clock, max_donors=effort.polish_donors)
        )
        return SearchOutcome(bars, best.unplaced, bounds, method, True, clock.fired)
    if clock.expired():  # the first plan took all the time there was: it is the answer
        return SearchOutcome(best.bars, best.unplaced, bounds, method, False, True)
    try:
        pool = _seeded_pool(problem, first_bars, clock)
        if clock.expired():  # seeding a large order took the time: keep the first plan
            return SearchOutcome(best.bars, best.unplaced, bounds, method, False, True)
        lp = solve_master_lp(
            pool,
            problem.demand,
            problem.limits,
            problem.costs,
            clock=clock,
            bar_cost=bar_cost,
            max_iterations=effort.lp_iterations,
        )
        objective_bound = max(lp.bound, bounds.objective)
        stock_short = lp.shortfall > _TINY
        bounds = Bounds(bounds.bars, objective_bound, bounds.cost)
        if bar_cost is not None and not stock_short:
            bounds = Bounds(max(lp.bound / bar_cost, bounds.bars), objective_bound, bounds.cost)
        rounded = round_and_repair(
            pool, lp, best, bound=objective_bound, bar_cost=bar_cost, clock=clock, effort=effort
        )
        if rounded.key(problem) < best.key(problem):
            best, method = rounded, "column-generation"
        proven = reaches_bound(problem, best, objective_bound, bar_cost)
        near = close_enough(problem, best, objective_bound, bar_cost, effort)
        if not proven and not near and not stock_short and not clock.expired():
            best, method, proven = _close(problem, best, method, objective_bound, clock, effort)
        if not stock_short and not clock.expired():
            bounds = _report_bound(problem, pool, bounds, clock, effort)
    except LpFailure:
        pass
    bars = best.bars
    if not any(best.unplaced) and not clock.expired():  # polish only with time left
        bars = tuple(gather_remnants(problem, bars, clock=clock, max_donors=effort.polish_donors))
    if not proven and not any(best.unplaced):
        proven = _meets_report_bound(problem, bars, bounds)
    return SearchOutcome(bars, best.unplaced, bounds, method, proven, clock.fired)


def _close(
    problem: Problem,
    best: Incumbent,
    method: str,
    bound: float,
    clock: Clock,
    effort: Effort,
) -> tuple[Incumbent, str, bool]:
    """The exact steps: arc-flow on a small order, then repair rounds on the plan."""
    bar_cost = same_bar_cost(problem)
    proven = False
    exact = solve_arc_flow(
        problem,
        clock=clock,
        max_arcs=_SMALL_ORDER_ARCS,
        max_nodes=effort.exact_nodes,
        cost_cap=_cap(problem, best),
    )
    if exact is not None and not exact.none_under_cap:
        candidate = Incumbent(exact.bars, (0,) * len(problem.lengths))
        if candidate.key(problem) < best.key(problem):
            best, method = candidate, "arc-flow"
    # Proof: an optimal plan under the cap is optimal outright; "none under the cap"
    # proves it only when every bar costs the same (then the cap is one bar less).
    if exact is not None and exact.proven_optimal and (exact.bars or bar_cost is not None):
        return best, method, True
    if reaches_bound(problem, best, bound, bar_cost):
        return best, method, True
    if exact is not None and exact.none_under_cap:
        return best, method, False  # the whole order was searched: no saving of a step

    def good_enough(bars: object) -> bool:
        return reaches_bound(problem, Incumbent(tuple(bars), best.unplaced), bound, bar_cost)

    repaired = repair_plan(problem, best.bars, clock=clock, effort=effort, good_enough=good_enough)
    candidate = Incumbent(tuple(repaired), best.unplaced)
    if candidate.key(problem) < best.key(problem):
        best, method = candidate, "column-generation + exact repair"
    proven = reaches_bound(problem, best, bound, bar_cost)
    return best, method, proven


def _seeded_pool(problem: Problem, first_bars: list[Bar], clock: Clock) -> ColumnPool:
    """Columns to start from: one length per bar (as many as fit) and the FFD bars.

    Stops early when the clock fires (the caller then keeps the first plan)."""
    pool = ColumnPool(problem)
    weights = problem.weights
    for s in range(len(problem.stock_lengths)):
        if clock.expired():
            return pool
        capacity = problem.capacity(s)
        for j, w in enumerate(weights):
            if w <= capacity:
                pool.add_one(s, j, min(problem.demand[j], capacity // w))
    for n, (s, counts) in enumerate(first_bars):
        if n % 1024 == 0 and clock.expired():
            return pool
        pool.add(s, counts)
    return pool


def _report_bound(
    problem: Problem, pool: ColumnPool, bounds: Bounds, clock: Clock, effort: Effort
) -> Bounds:
    """Several stock types: the LP of the reported objective and the LP of the bar count.

    The reported objective is the material cost as priced (rack remnants at the
    price given, usually nothing) or, with nothing priced, the length of new
    stock; its LP, remnants on hand included, bounds the plan's figure.
    """
    if same_bar_cost(problem) is not None:
        return bounds
    try:
        cost = solve_master_lp(
            pool,
            problem.demand,
            problem.limits,
            report_costs(problem),
            clock=clock,
            max_iterations=effort.lp_iterations,
        )
        bars = solve_master_lp(
            pool,
            problem.demand,
            problem.limits,
            (1.0,) * len(problem.stock_lengths),
            clock=clock,
            bar_cost=1.0,
            max_iterations=effort.lp_iterations,
        )
    except LpFailure:
        return bounds
    return Bounds(max(bounds.bars, bars.bound), bounds.objective, max(bounds.cost, cost.bound))


def _meets_report_bound(problem: Problem, bars: tuple[Bar, ...], bounds: Bounds) -> bool:
    """The plan's reported figure equals its bound (bars: ⌈LP⌉; cost or length: the LP)."""
    if objective_of(problem) == "bars":
        return len(bars) <= ceil(bounds.bars - _TINY)
    costs = report_costs(problem)
    value = sum(costs[s] for s, _ in bars)
    return value <= bounds.cost + 1e-9 * max(abs(bounds.cost), 1.0)


def _cap(problem: Problem, best: Incumbent) -> float | None:
    """Most a plan may cost to beat ``best`` by a real step: the smallest difference
    two bars' prices can make (one bar less when all bars cost the same).  Tie-break
    tokens (a remnant instead of nothing) are not worth an exact search."""
    if any(best.unplaced):
        return None
    cost = sum(problem.costs[s] for s, _ in best.bars)
    step = price_step(problem)
    return cost - step + 1e-6 * step
