"""Closing step: take a few bars of the best plan apart and re-pack their pieces exactly.

A large-neighbourhood search with an exact repair.  Each round takes the bars
with the most spare length plus a few others (chosen by a fixed rotation, so
the same plan gives the same rounds) and asks the arc-flow integer program
(``arcflow``) to re-pack their pieces so that the roomiest bar gets roomier:
the same number of bars, one of them shortened by one unit more than the
roomiest bar's spare length.  Gathering the spare length this way is what
closes the last bar of hard orders (bars filled exactly by three pieces):
once the spare length of the whole plan sits in one bar, that bar empties and
is dropped.  With several stock types a round asks for a cheaper re-packing
instead.  Every round is budgeted by work (rounds, bars per round,
branch-and-bound nodes); a round only ever replaces its bars by a better
re-packing, so the plan never gets worse.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import replace

from sawplan.cutlist.optimise.arcflow import solve_arc_flow
from sawplan.cutlist.optimise.budget import Clock, Effort
from sawplan.cutlist.optimise.problem import Bar, Problem, score


def repair_plan(
    problem: Problem,
    bars: Sequence[Bar],
    *,
    clock: Clock,
    effort: Effort,
    good_enough: Callable[[Sequence[Bar]], bool],
) -> list[Bar]:
    """``bars`` improved round by round until ``good_enough``, the budget or the clock."""
    plan = [bar for bar in bars if any(bar[1])]
    if len(plan) < 2:
        return plan
    failures = 0
    for round_no in range(effort.repair_rounds):
        if good_enough(plan) or clock.expired() or failures > effort.repair_rounds // 4:
            break
        group = _group(problem, plan, round_no, effort.repair_bars)
        if len(group) < 2 or (round_no > 0 and len(group) == len(plan) and failures):
            break  # too few bars, or the whole plan again after it failed once
        chosen = [plan[b] for b in group]
        if len(problem.stock_lengths) == 1:
            better = _gather(problem, chosen, clock, effort)
        else:
            better = _cheaper(problem, plan, chosen, clock, effort)
        candidate = [bar for b, bar in enumerate(plan) if b not in set(group)]
        candidate += [bar for bar in better or () if any(bar[1])]
        if better is not None and _key(problem, candidate) < _key(problem, plan):
            plan, failures = candidate, 0
        else:
            failures += 1
    return plan


def _key(problem: Problem, bars: Sequence[Bar]) -> tuple:
    """Cost, then bars, then the roomiest bar's spare length (more is better), then the rest."""
    base = score(problem, bars).key()
    most = max((problem.capacity(s) - problem.load(counts) for s, counts in bars), default=0)
    return (base[1], len(bars), -most, base[2], base[3])


def _group(problem: Problem, plan: Sequence[Bar], round_no: int, size: int) -> list[int]:
    """Indices of the bars to take apart: the roomiest half, the rest by a fixed rotation."""
    room = [problem.capacity(s) - problem.load(counts) for s, counts in plan]
    by_room = sorted(range(len(plan)), key=lambda b: (-room[b], b))
    roomy = [b for b in by_room if room[b] > 0][: max(size // 2, 1)]
    if not roomy:
        return []
    chosen = set(roomy)
    others = [b for b in range(len(plan)) if b not in chosen]
    take = min(size - len(roomy), len(others))
    if take > 0:
        stride = max(len(others) // take, 1)
        offset = (round_no * 7919) % len(others)
        for k in range(take):
            chosen.add(others[(offset + k * stride) % len(others)])
    return sorted(chosen)


def _demand_of(problem: Problem, chosen: Sequence[Bar]) -> list[int]:
    demand = [0] * len(problem.lengths)
    for _, counts in chosen:
        for j, n in enumerate(counts):
            demand[j] += n
    return demand


def _gather(
    problem: Problem, chosen: Sequence[Bar], clock: Clock, effort: Effort
) -> list[Bar] | None:
    """One stock type: re-pack so that the roomiest bar gains room, or a bar empties.

    Asks first for all the group's spare length in one bar, then for the two
    roomiest bars' spare together, then for one unit more than the roomiest.
    """
    capacity = problem.capacity(0)
    spare = sorted((capacity - problem.load(counts) for _, counts in chosen), reverse=True)
    ladder = sorted({min(sum(spare), capacity), spare[0] + spare[1], spare[0] + 1}, reverse=True)
    demand = _demand_of(problem, chosen)
    k = len(chosen)
    for want in ladder:
        if want <= spare[0]:
            continue
        if want >= capacity:
            virtual = replace(problem, limits=(k - 1,))
        else:  # a second stock type: the same bar, ``want`` shorter (one of it)
            virtual = replace(
                problem,
                stock_lengths=(*problem.stock_lengths, problem.stock_lengths[0] - want),
                limits=(k - 1, 1),
                costs=(*problem.costs, problem.costs[0]),
                prices=(*problem.prices, problem.prices[0]),
                remnants=(),
            )
        result = solve_arc_flow(
            virtual,
            clock=clock,
            demand=demand,
            max_arcs=effort.exact_arcs,
            max_nodes=effort.exact_nodes,
        )
        if result is not None and not result.none_under_cap and result.bars:
            return [(0, counts) for _, counts in result.bars]
    return None


def _cheaper(
    problem: Problem, plan: Sequence[Bar], chosen: Sequence[Bar], clock: Clock, effort: Effort
) -> list[Bar] | None:
    """Several stock types: the chosen bars' pieces re-packed into cheaper stock, or None."""
    used = [0] * len(problem.stock_lengths)
    for s, _ in plan:
        used[s] += 1
    limits: list[int | None] = []
    for s, limit in enumerate(problem.limits):
        mine = sum(1 for t, _ in chosen if t == s)
        limits.append(None if limit is None else limit - used[s] + mine)
    cost = sum(problem.costs[s] for s, _ in chosen)
    step = price_step(problem)
    result = solve_arc_flow(
        problem,
        clock=clock,
        demand=_demand_of(problem, chosen),
        limits=limits,
        max_arcs=effort.exact_arcs,
        max_nodes=effort.exact_nodes,
        cost_cap=cost - step + 1e-6 * step,
    )
    if result is None or result.none_under_cap or not result.bars:
        return None
    return list(result.bars)


def price_step(problem: Problem) -> float:
    """The smallest saving worth an exact search: a whole bar when every bar costs the
    same, else a hundredth of the cheapest bar's price (tie-break tokens, such as a
    rack remnant used or not, are smaller and not worth it)."""
    costs = set(problem.costs)
    if len(costs) == 1:
        return costs.pop()
    positive = [c for c in costs if c > 1e-2 * max(costs)]
    return 1e-2 * min(positive)
