"""From the LP to whole bars: round down, re-solve the rest, repeat, finish with FFD.

First the whole part of every LP value is cut (``floor(x_p)`` bars of filling p,
pieces already covered dropped) and column generation runs again on what is
left, until nothing rounds down.  Then dives: cut once the filling the LP uses
most (and any other used at least half a bar whose pieces are all still
wanted), re-solve, repeat.  A dive stops when the bars cut plus the residual
bound cannot beat the best plan; the search then backs up one step and tries
the next-ranked filling there (depth first, a few branches per step, a budget
of LP re-solves, and a stop after many re-solves without a better plan).
After every step the pieces left are packed by first-fit decreasing into a
complete plan, and the first time they are few, exactly by arc-flow
(``arcflow``) if its graph is small.  The search ends at the lower bound,
when the dives run out (a budget of re-solves, ``budget.Effort``), or when
the safety clock fires.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from math import ceil, floor

from sawplan.cutlist.optimise.arcflow import solve_arc_flow
from sawplan.cutlist.optimise.budget import Clock, Effort
from sawplan.cutlist.optimise.colgen import LpFailure, LpOutcome, solve_master_lp
from sawplan.cutlist.optimise.ffd import pack_first_fit_decreasing
from sawplan.cutlist.optimise.pool import ColumnPool
from sawplan.cutlist.optimise.problem import Bar, Problem, downsize, score

_ROUND_EPS = 1e-6


@dataclass(frozen=True)
class Incumbent:
    """The best plan found so far (possibly short of pieces when stock is limited)."""

    bars: tuple[Bar, ...]
    unplaced: tuple[int, ...]

    def key(self, problem: Problem) -> tuple[int, float, int, int]:
        return score(problem, self.bars, sum(self.unplaced)).key()


def reaches_bound(problem: Problem, plan: Incumbent, bound: float, bar_cost: float | None) -> bool:
    """True when no plan can cost less than ``plan`` (it meets the LP bound)."""
    if any(plan.unplaced):
        return False
    if bar_cost is not None:
        return len(plan.bars) <= ceil(bound / bar_cost - _ROUND_EPS)
    cost = sum(problem.costs[s] for s, _ in plan.bars)
    return cost <= bound + 1e-9 * max(abs(bound), 1.0)


def round_and_repair(
    pool: ColumnPool,
    first_lp: LpOutcome,
    incumbent: Incumbent,
    *,
    bound: float,
    bar_cost: float | None,
    clock: Clock,
    effort: Effort = Effort(),
) -> Incumbent:
    """Best plan from rounding the LP, diving on the residual and packing the rest."""
    search = _Search(pool, incumbent, bound, bar_cost, clock, effort)
    start = _State([], list(pool.problem.demand), list(pool.problem.limits))
    lp = first_lp
    # Round down the first LP (at least once, even when the clock has fired: it
    # costs one first-fit pass); every dive starts from what is left.
    while lp.columns:
        if not search.round_down(start, lp):
            break
        search.complete(start)
        if not any(start.demand) or search.done():
            return search.best
        lp = search.resolve(start)
        if lp.shortfall > _ROUND_EPS:
            return search.best
    search.dive(start, lp)
    return search.best


def close_enough(
    problem: Problem, plan: Incumbent, bound: float, bar_cost: float | None, effort: Effort
) -> bool:
    """Several stock types: the plan's cost within ``effort.good_gap`` of the LP bound,
    where a whole-bar search would chase hundredths of a percent."""
    if bar_cost is not None or any(plan.unplaced) or bound <= 0:
        return False
    cost = sum(problem.costs[s] for s, _ in plan.bars)
    return cost - bound <= effort.good_gap * cost


@dataclass
class _State:
    fixed: list[Bar]
    demand: list[int]
    limits: list[int | None]

    def copy(self) -> _State:
        return _State(list(self.fixed), list(self.demand), list(self.limits))


class _Search:
    """The best plan so far and the moves of the rounding search."""

    def __init__(
        self,
        pool: ColumnPool,
        incumbent: Incumbent,
        bound: float,
        bar_cost: float | None,
        clock: Clock,
        effort: Effort,
    ) -> None:
        self.pool = pool
        self.problem = pool.problem
        self.best = incumbent
        self.best_key = incumbent.key(self.problem)
        self.bound = bound
        self.bar_cost = bar_cost
        self.clock = clock
        self.effort = effort
        self.exact_tried = False
        self.resolves_left = effort.max_resolves
        self.stalled = 0  # LP re-solves since the best plan last improved

    def done(self) -> bool:
        return (
            self.clock.expired()
            or reaches_bound(self.problem, self.best, self.bound, self.bar_cost)
            or close_enough(self.problem, self.best, self.bound, self.bar_cost, self.effort)
        )

    def round_down(self, state: _State, lp: LpOutcome) -> bool:
        """Cut floor(x_p) bars of every filling p; False if nothing rounds down."""
        took = False
        for column, value in zip(lp.columns, lp.values, strict=True):
            copies = floor(value + _ROUND_EPS)
            # the copies that are cut whole go in at once (one pass over the items)
            whole = _whole_copies(self.pool, column, state, copies)
            if whole:
                _cut_whole(self.pool, column, state, whole)
                took = True
            for _copy in range(copies - whole):
                took |= _cut(self.pool, column, state)
        return took

    def hopeless(self, state: _State, lp: LpOutcome) -> bool:
        """True when bars cut so far plus the residual bound cannot beat the best plan."""
        if any(self.best.unplaced):
            return False
        fixed_cost = sum(self.problem.costs[s] for s, _ in state.fixed)
        best_cost = sum(self.problem.costs[s] for s, _ in self.best.bars)
        if self.bar_cost is not None:
            residual = ceil(lp.bound / self.bar_cost - _ROUND_EPS)
            return len(state.fixed) + residual >= len(self.best.bars)
        return fixed_cost + lp.bound >= best_cost - 1e-9 * max(best_cost, 1.0)

    def dive(self, state: _State, lp: LpOutcome) -> None:
        """Depth-first dives with backtracking from the point where a dive fails.

        At each step the filling the LP uses most is cut (with any other used at
        least half a bar whose pieces are all still wanted); when that path cannot
        beat the best plan, the next-ranked fillings (up to ``effort.branches``) are tried.
        """
        if self.done() or self.hopeless(state, lp) or not lp.columns:
            return
        self.resolves_left -= 1
        self.stalled += 1
        if self.resolves_left < 0 or self.stalled > self.effort.stall_limit:
            return
        ranked = sorted(zip(lp.values, lp.columns, strict=True), reverse=True)
        for rank in range(min(self.effort.branches, len(ranked))):
            child = state.copy()
            if not self.round_down(child, lp):
                if not self._dive_step(child, ranked, rank):
                    continue
            elif rank > 0:
                return  # rounding down is not a choice: no alternatives
            self.complete(child)
            if not any(child.demand) or self.done():
                return
            child_lp = self.resolve(child)
            if child_lp.shortfall > _ROUND_EPS:
                continue
            self.dive(child, child_lp)
            if self.done() or self.resolves_left < 0 or self.stalled > self.effort.stall_limit:
                return

    def _dive_step(self, state: _State, ranked: list[tuple[float, int]], rank: int) -> bool:
        if not _cut(self.pool, ranked[rank][1], state):
            return False
        if rank == 0:
            # Besides the top filling, cut those used at least half a bar whose
            # pieces are all still wanted: fewer re-solves, little harm.
            for value, column in ranked[1:]:
                if value < 0.5:
                    break
                counts = self.pool.counts(column)
                if all(n <= d for n, d in zip(counts, state.demand, strict=True)):
                    _cut(self.pool, column, state)
        return True

    def resolve(self, state: _State) -> LpOutcome:
        """The LP of the pieces left, solved to within a few hundredths of a bar.

        If HiGHS fails here, the search keeps its best plan and stops diving.
        """
        near = 0.02 * min(self.problem.costs)
        try:
            return solve_master_lp(
                self.pool,
                state.demand,
                state.limits,
                self.problem.costs,
                clock=self.clock,
                near=near,
                max_iterations=self.effort.lp_iterations,
            )
        except LpFailure:
            return LpOutcome((), (), float("inf"), float("inf"), False, 0.0, 0)

    def complete(self, state: _State) -> None:
        """Finish the plan from ``state`` by FFD (and arc-flow once, when few pieces are left)."""
        problem = self.problem
        rest, unplaced = pack_first_fit_decreasing(problem, state.demand, state.limits)
        self.consider(Incumbent(tuple(downsize(problem, state.fixed + rest)), tuple(unplaced)))
        if self.exact_tried or sum(state.demand) > self.effort.exact_pieces or self.done():
            return
        self.exact_tried = True
        exact = solve_arc_flow(
            problem,
            demand=state.demand,
            limits=state.limits,
            clock=self.clock,
            max_arcs=self.effort.exact_arcs,
            max_nodes=self.effort.exact_nodes,
            cost_cap=self.cost_cap(state),
        )
        if exact is not None and not exact.none_under_cap:
            bars = tuple(downsize(problem, state.fixed + list(exact.bars)))
            self.consider(Incumbent(bars, (0,) * len(state.demand)))

    def cost_cap(self, state: _State) -> float | None:
        """Most the pieces left may cost for the plan to beat the best one."""
        if any(self.best.unplaced):
            return None
        costs = self.problem.costs
        left = sum(costs[s] for s, _ in self.best.bars) - sum(costs[s] for s, _ in state.fixed)
        step = self.bar_cost if self.bar_cost is not None else 1e-6 * max(left, 1.0)
        return left - step + 1e-6 * step

    def consider(self, plan: Incumbent) -> None:
        unplaced = sum(plan.unplaced)
        if unplaced == self.best_key[0]:  # cheap test first: the cost
            cost = round(sum(self.problem.costs[s] for s, _ in plan.bars), 9)
            if cost > self.best_key[1]:
                return
        key = plan.key(self.problem)
        if key < self.best_key:
            self.best, self.best_key = plan, key
            self.stalled = 0


def _cut(pool: ColumnPool, column: int, state: _State) -> bool:
    """Cut one bar of a pool filling, keeping only pieces still wanted."""
    demand, limits, fixed = state.demand, state.limits, state.fixed
    s = pool.stock[column]
    if limits[s] is not None and limits[s] <= 0:
        return False
    counts = tuple(map(min, pool.counts(column), demand))
    if not any(counts):
        return False
    if limits[s] is not None:
        limits[s] -= 1
    for j, n in enumerate(counts):
        demand[j] -= n
    fixed.append((s, counts))
    return True


def _whole_copies(pool: ColumnPool, column: int, state: _State, most: int) -> int:
    """How many copies of a filling (up to ``most``) can be cut with every piece still wanted."""
    s = pool.stock[column]
    if most <= 0:
        return 0
    limit = state.limits[s]
    if limit is not None:
        most = min(most, limit)
    for n, d in zip(pool.counts(column), state.demand, strict=True):
        if n and d // n < most:
            most = d // n
            if most <= 0:
                return 0
    return most


def _cut_whole(pool: ColumnPool, column: int, state: _State, copies: int) -> None:
    """Cut ``copies`` bars of a filling whose pieces are all still wanted (the same bar)."""
    s = pool.stock[column]
    counts = pool.counts(column)
    if state.limits[s] is not None:
        state.limits[s] -= copies
    demand = state.demand
    for j, n in enumerate(counts):
        if n:
            demand[j] -= n * copies
    state.fixed.extend([(s, counts)] * copies)


def same_bar_cost(problem: Problem, limits: Sequence[int | None] | None = None) -> float | None:
    """The common cost of a bar when every stock type costs the same, else None."""
    limits = problem.limits if limits is None else limits
    costs = {problem.costs[s] for s, left in enumerate(limits) if left is None or left > 0}
    return costs.pop() if len(costs) == 1 else None
