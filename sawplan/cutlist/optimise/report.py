"""Turn the optimiser's bars back into the caller's terms: part keys, remnants, totals."""

from __future__ import annotations

import time
from collections.abc import Sequence
from dataclasses import dataclass
from math import ceil

from sawplan.cutlist.optimise.build import Instance
from sawplan.cutlist.optimise.problem import Bar
from sawplan.cutlist.optimise.types import BarPattern, CutPlan


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
    cost = need * min(p / cap for p, cap in zip(problem.prices, capacities, strict=True))
    return Bounds(bars, objective, cost)


def build_plan(
    instance: Instance,
    bars: Sequence[Bar],
    bounds: Bounds,
    *,
    method: str,
    started: float,
    proven_optimal: bool,
) -> CutPlan:
    """The CutPlan of ``bars``: identical bars side by side, pieces longest first."""
    problem = instance.problem
    queues = _keys_by_length(instance)
    ordered = sorted(bars, key=lambda bar: (bar[0], tuple(-n for n in bar[1])))
    patterns: list[BarPattern] = []
    for s, counts in ordered:
        pieces: list[str] = []
        for j, n in enumerate(counts):
            for _ in range(n):
                pieces.append(_next_key(queues[j]))
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
    )


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
