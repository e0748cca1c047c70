"""Exact step: the arc-flow model of cutting stock (Valério de Carvalho 1999).

A bar is a path from position 0 to the capacity of its stock along arcs
"cut one piece of length j here" and "leave this much unused".  Pieces enter a
path longest first, which removes most symmetric paths.  The integer program
(minimise the cost of the flow into the end node, demand rows >= pieces
ordered, stock rows <= bars on hand) is solved by HiGHS through
highspy; the flow splits into one path per bar.  Used only when
rounding did not reach the bound and the graph is small (instances where
rounding fails, such as bars filled exactly by three pieces, have small graphs),
and on a few bars at a time by the closing step (``repair``).  HiGHS gets a
node limit, so the answer does not depend on the machine's speed; its time
limit is only the search's safety stop.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from math import gcd
from typing import Any

from sawplan.cutlist.optimise.budget import Clock
from sawplan.cutlist.optimise.problem import Bar, Problem, downsize


@dataclass(frozen=True)
class ArcFlowResult:
    bars: tuple[Bar, ...]
    proven_optimal: bool  # optimal, or (no bars) proven that nothing is under the cap
    none_under_cap: bool = False


def solve_arc_flow(
    problem: Problem,
    *,
    clock: Clock,
    demand: Sequence[int] | None = None,
    limits: Sequence[int | None] | None = None,
    max_arcs: int = 15_000,
    max_nodes: int = 200,
    cost_cap: float | None = None,
) -> ArcFlowResult | None:
    """Optimal plan for ``demand`` (default: the order) from the stock ``limits`` left.

    ``cost_cap``: only plans costing at most this are wanted (prunes the search).
    None when the graph is too large, or no plan is found in time or under the cap.
    """
    import numpy as np

    demand = problem.demand if demand is None else demand
    limits = problem.limits if limits is None else limits
    usable = [s for s, left in enumerate(limits) if left is None or left > 0]
    items = [j for j, d in enumerate(demand) if d > 0]
    if not usable or not items:
        return None
    weights = problem.weights
    unit = 0
    for j in items:
        unit = gcd(unit, weights[j])
    ends = {s: problem.capacity(s) // unit for s in usable}
    top = max(ends.values())
    arcs = _item_arcs(
        [weights[j] // unit for j in items], [demand[j] for j in items], top, max_arcs
    )
    if arcs is None:
        return None
    nodes = sorted({0, *ends.values(), *(head for _, head, _ in arcs)})
    all_arcs: list[tuple[int, int, int]] = [(t, h, items[k]) for t, h, k in arcs]
    all_arcs += [(a, b, -1) for a, b in zip(nodes, nodes[1:], strict=False)]  # unused length
    sink = -1
    all_arcs += [(ends[s], sink, -2 - s) for s in usable]  # bar of stock s ends here
    index = {node: i for i, node in enumerate(nodes)}
    n_arcs = len(all_arcs)
    rows: list[int] = []
    cols: list[int] = []
    vals: list[float] = []
    n_nodes = len(nodes)
    for a, (tail, head, _) in enumerate(all_arcs):
        if tail != 0:
            rows.append(index[tail] - 1)
            cols.append(a)
            vals.append(-1.0)
        if head != sink:
            rows.append(index[head] - 1)
            cols.append(a)
            vals.append(1.0)
    n_flow_rows = n_nodes - 1  # conservation at every node but the start
    row_of_item = {j: n_flow_rows + r for r, j in enumerate(items)}
    cost = np.zeros(n_arcs)
    ub = np.full(n_arcs, np.inf)
    for a, (_, _, kind) in enumerate(all_arcs):
        if kind >= 0:
            rows.append(row_of_item[kind])
            cols.append(a)
            vals.append(1.0)
            ub[a] = demand[kind]
        elif kind <= -2:
            s = -2 - kind
            cost[a] = problem.costs[s]
            if limits[s] is not None:
                ub[a] = limits[s]
    n_rows = n_flow_rows + len(items)
    # Exactly the pieces wanted: a surplus piece can always become unused length.
    wanted = np.array([demand[j] for j in items], dtype=float)
    row_bounds = np.concatenate([np.zeros(n_flow_rows), wanted])
    if cost_cap is not None:  # one more row: the plan's cost
        for a in np.flatnonzero(cost):
            rows.append(n_rows)
            cols.append(int(a))
            vals.append(float(cost[a]))
    remaining = clock.left()
    if remaining <= 0.05:
        clock.expired()
        return None
    # HiGHS checks its time limit only now and then (seen 1 s late): leave a margin.
    status, x = _solve_mip(
        cost,
        (rows, cols, vals),
        (row_bounds, np.inf if cost_cap is None else cost_cap),
        ub,
        time_limit=0.5 * remaining,
        max_nodes=max_nodes,
    )
    if status == "limit" and clock.left() <= 0.5 * remaining + 1e-3:
        clock.fired = True  # HiGHS stopped on its time limit, not on its node limit
    if status == "infeasible":  # no plan costs at most the cap
        return ArcFlowResult((), proven_optimal=True, none_under_cap=True)
    if x is None:
        return None
    res_optimal = status == "optimal"
    flow = [int(round(v)) for v in x]
    bars = _split_paths(all_arcs, flow, sink, demand)
    return ArcFlowResult(tuple(downsize(problem, bars, limits)), proven_optimal=res_optimal)


def _solve_mip(
    cost: Any,
    triplets: tuple[list[int], list[int], list[float]],
    row_bounds: tuple[Any, float],
    ub: Any,
    *,
    time_limit: float,
    max_nodes: int,
) -> tuple[str, Any]:
    """Integer min cost·x, rows fixed at ``row_bounds[0]`` (and a last row, the cost,
    at most ``row_bounds[1]`` when finite), 0 <= x <= ub, by HiGHS's branch and bound."""
    import highspy
    import numpy as np

    from sawplan.cutlist.optimise.highs import new_highs

    rows, cols, vals = (np.asarray(v) for v in triplets)
    fixed, cap = row_bounds
    lower = fixed if cap == np.inf else np.concatenate([fixed, [-np.inf]])
    upper = fixed if cap == np.inf else np.concatenate([fixed, [cap]])
    n_rows, n_cols = len(lower), len(cost)
    order = np.lexsort((rows, cols))
    counts = np.bincount(cols, minlength=n_cols)
    starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.int32)
    highs = new_highs()
    highs.setOptionValue("time_limit", float(time_limit))
    highs.setOptionValue("mip_max_nodes", int(max_nodes))
    # Presolve spends most of the time on arc-flow graphs (a 60-piece triplet order:
    # 10 s with it, 1.5 s without) and removes little: the graph is already reduced.
    highs.setOptionValue("presolve", "off")
    highs.addRows(
        n_rows, lower.astype(float), upper.astype(float), 0,
        np.zeros(0, np.int32), np.zeros(0, np.int32), np.zeros(0),
    )  # fmt: skip
    highs.addCols(
        n_cols, np.asarray(cost, float), np.zeros(n_cols), np.asarray(ub, float), len(order),
        starts, rows[order].astype(np.int32), vals[order].astype(float),
    )  # fmt: skip
    highs.changeColsIntegrality(
        n_cols, np.arange(n_cols, dtype=np.int32),
        np.full(n_cols, highspy.HighsVarType.kInteger),
    )  # fmt: skip
    highs.run()
    status = highs.getModelStatus()
    if status == highspy.HighsModelStatus.kInfeasible:
        return "infeasible", None
    found = highs.getInfo().primal_solution_status == 2  # a feasible solution is known
    x = np.asarray(highs.getSolution().col_value) if found else None
    if status == highspy.HighsModelStatus.kOptimal:
        return "optimal", x
    return "limit", x


def _item_arcs(
    weights: Sequence[int], bounds: Sequence[int], top: int, max_arcs: int
) -> list[tuple[int, int, int]] | None:
    """Arcs (tail, head, item) with pieces entering longest first, at most ``bounds`` in a row."""
    reached = {0}
    arcs: set[tuple[int, int, int]] = set()
    work = 0
    for k, (w, bound) in enumerate(zip(weights, bounds, strict=True)):
        new: set[int] = set()
        for start in reached:
            position = start
            for _ in range(bound):
                if position + w > top:
                    break
                arcs.add((position, position + w, k))
                new.add(position + w)
                position += w
            work += bound
        reached |= new
        if len(arcs) > max_arcs or work > 20 * max_arcs:
            return None
    return sorted(arcs)


def _split_paths(
    arcs: Sequence[tuple[int, int, int]], flow: list[int], sink: int, demand: Sequence[int]
) -> list[Bar]:
    """Decompose an integer flow into one path (bar) per unit, trimming surplus pieces."""
    leaving: dict[int, list[int]] = {}
    for a, (tail, _, _) in enumerate(arcs):
        if flow[a] > 0:
            leaving.setdefault(tail, []).append(a)
    wanted = list(demand)
    bars: list[Bar] = []
    while leaving.get(0):
        node = 0
        counts = [0] * len(demand)
        while True:
            a = leaving[node][-1]
            flow[a] -= 1
            if flow[a] == 0:
                leaving[node].pop()
            tail, head, kind = arcs[a]
            if kind >= 0 and wanted[kind] > 0:
                counts[kind] += 1
                wanted[kind] -= 1
            if head == sink:
                if any(counts):
                    bars.append((-2 - kind, tuple(counts)))
                break
            node = head
    return bars
