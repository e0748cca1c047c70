"""Turn the optimiser's bars back into the caller's terms: part keys, remnants, totals."""

from __future__ import annotations

import time
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass
from itertools import compress
from math import ceil
from operator import neg

from sawplan.cutlist.optimise.build import Instance
from sawplan.cutlist.optimise.problem import Bar, Problem
from sawplan.cutlist.optimise.types import BarPattern, CutPlan

OBJECTIVES = {
    "bars": "bars (one stock length)",
    "cost": "material cost as priced (rack remnants at the price given)",
    "length": "length of new stock (nothing priced; rack remnants free)",
}


def objective_of(problem: Problem) -> str:
    """What the plan's gap is measured in: bars, material cost, or new-stock length."""
    if len(problem.stock_lengths) <= 1:
        return "bars"
    return "cost" if any(p > 0 for p in problem.prices) else "length"


def report_costs(problem: Problem) -> tuple[float, ...]:
    """Cost per bar of the reported objective (``objective_of``)."""
    if objective_of(problem) == "length" or not any(p > 0 for p in problem.prices):
        remnants = problem.remnants or (False,) * len(problem.stock_lengths)
        return tuple(
            0.0 if remnant else float(length)
            for length, remnant in zip(problem.stock_lengths, remnants, strict=True)
        )
    return tuple(float(p) for p in problem.prices)


@dataclass(frozen=True)
class Bounds:
    """Lower bounds: on the bar count, on the objective, and the LP optimum's material cost."""

    bars: float
    objective: float
    cost: float


def material_bounds(instance: Instance) -> Bounds:
    """Bounds from length alone: every piece with its kerf, laid end to end in the best stock."""
    problem = instance.problem
    need = sum(w * d for w, d in zip(problem.weights, problem.demand, strict=True))
    capacities = problem.capacities
    if not need:
        return Bounds(0.0, 0.0, 0.0)
    bars = need / max(capacities)
    objective = need * min(c / cap for c, cap in zip(problem.costs, capacities, strict=True))
    costs = problem.prices if objective_of(problem) == "bars" else report_costs(problem)
    return Bounds(bars, objective, _length_bound(problem, need, costs))


def _length_bound(problem: Problem, need: int, costs: tuple[float, ...]) -> float:
    """Cost of ``need`` capacity: the limited stock filled cheapest per length first."""
    by_rate = sorted(
        range(len(costs)), key=lambda s: (costs[s] / problem.capacity(s), problem.limits[s] is None)
    )
    total = 0.0
    for s in by_rate:
        cap = problem.capacity(s)
        take = need if problem.limits[s] is None else min(need, cap * problem.limits[s])
        total += take * costs[s] / cap
        need -= take
        if need <= 0:
            break
    return total


def build_plan(
    instance: Instance,
    bars: Sequence[Bar],
    bounds: Bounds,
    *,
    method: str,
    started: float,
    proven_optimal: bool,
    unplaced: tuple[int, ...] = (),
    stopped_by_time_limit: bool = False,
) -> CutPlan:
    """The CutPlan of ``bars``: identical bars side by side, pieces longest first.

    ``unplaced``: pieces per item that no bar holds (stock on hand too short).
    """
    problem = instance.problem
    queues = _keys_by_length(instance)
    # bars cut alike are sorted once: the order of the distinct ones, each repeated
    alike = Counter(bars)
    distinct = sorted(alike, key=lambda bar: (bar[0], tuple(map(neg, bar[1]))))
    ordered = [bar for bar in distinct for _ in range(alike[bar])]
    patterns: list[BarPattern] = []
    for s, counts in ordered:
        pieces: list[str] = []
        for j in compress(range(len(counts)), counts):  # the items this bar holds
            pieces.extend(_next_key(queues[j]) for _ in range(counts[j]))
        remnant = problem.remnant(s, counts)
        patterns.append(
            BarPattern(
                stock_key=instance.stock[s].key,
                stock_length=problem.stock_lengths[s],
                pieces=tuple(pieces),
                remnant=remnant,
                remnant_kept=problem.remnant_kept(s, counts),
                cuts=problem.cuts(s, counts),
                waste=problem.waste(s, counts),
            )
        )
    lower = ceil(bounds.bars - 1e-6) if bounds.bars > 0 else 0
    objective = objective_of(problem)
    if objective == "bars":
        value, bound = float(len(patterns)), float(lower)
    else:
        costs = report_costs(problem)
        value = sum(costs[s] for s, _ in bars)
        bound = min(bounds.cost, value)
    short = tuple((key, n) for j, left in enumerate(unplaced) for key, n in _take(queues[j], left))
    return CutPlan(
        bars=tuple(patterns),
        lp_bound_bars=bounds.bars,
        lp_bound_cost=bounds.cost,
        method=method,
        gap_bars=len(patterns) - lower,
        material_cost=sum(problem.prices[s] for s, _ in bars),
        waste=sum(p.waste for p in patterns),
        solve_seconds=time.perf_counter() - started,
        cuts=sum(p.cuts for p in patterns),
        kept_remnant_length=sum(p.remnant for p in patterns if p.remnant_kept),
        proven_optimal=proven_optimal,
        objective=objective,
        objective_value=value,
        objective_bound=bound,
        unplaced=short,
        stopped_by_time_limit=stopped_by_time_limit,
    )


def _take(queue: list[list], count: int) -> list[tuple[str, int]]:
    """The last ``count`` pieces of an item's queue, by part key (these were not placed)."""
    out: list[tuple[str, int]] = []
    for entry in reversed(queue):
        if count <= 0:
            break
        n = min(entry[1], count)
        if n:
            out.append((entry[0], n))
            entry[1] -= n
            count -= n
    return out[::-1]


def _keys_by_length(instance: Instance) -> list[list[list]]:
    """For each item (length), the part keys of that length with their counts, order kept."""
    index = {length: j for j, length in enumerate(instance.problem.lengths)}
    queues: list[list[list]] = [[] for _ in instance.problem.lengths]
    for d in instance.demand:
        queues[index[d.length]].append([d.key, d.count])
    return queues


def _next_key(queue: list[list]) -> str:
    while queue and queue[0][1] == 0:
        queue.pop(0)
    entry = queue[0]
    entry[1] -= 1
    return entry[0]
