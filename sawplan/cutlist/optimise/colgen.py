"""Column generation for the cutting-stock LP (Gilmore & Gomory 1961).

Master LP:  minimise sum(cost_p x_p)  subject to  sum(a_jp x_p) >= demand_j  for
every length j,  sum(x_p over fillings of stock s) <= on hand_s  for limited
stock,  x >= 0.  It is solved with HiGHS (highspy, dual simplex: ``solve_lp``);
the duals of the demand rows price one bounded knapsack per stock length
(reduced cost = cost_s - sum(dual_j a_j) + dual of the stock row) and any
filling of negative reduced cost joins the master.  One artificial column per
length (a very dear bar holding one piece) keeps every master feasible; if it
is still used at the end, the stock on hand cannot hold the order.

At every iteration Farley's bound (1990), master value / max(1, best ratio of
priced value to cost), is a valid lower bound on the LP optimum, so the search
stops as soon as rounding it up can no longer change.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from math import ceil
from typing import Any

from sawplan.cutlist.optimise.budget import Clock
from sawplan.cutlist.optimise.knapsack import TableTooLarge, solve_bounded_knapsack
from sawplan.cutlist.optimise.pool import ColumnPool
from sawplan.cutlist.optimise.problem import Problem

_ROUND_EPS = 1e-6  # slack when rounding LP values up to whole bars


def solve_lp(c: Any, columns: tuple[Any, Any, Any], b_ub: Any) -> tuple[Any, float, Any]:
    """min c·x s.t. A·x <= b_ub, x >= 0 by HiGHS's dual simplex (no presolve: these
    masters are small and dense); A is given column-wise as (start of each column,
    row of each entry, value of each entry), rows ascending within a column.
    Returns x, the optimum and the row duals (>= 0)."""
    import numpy as np

    from sawplan.cutlist.optimise.highs import new_highs, optimal

    starts, index, value = columns
    n_rows, n_cols = len(b_ub), len(c)
    highs = new_highs()
    highs.setOptionValue("presolve", "off")
    highs.setOptionValue("simplex_strategy", 1)  # dual simplex
    highs.addRows(
        n_rows,
        np.full(n_rows, -np.inf),
        b_ub.astype(float),
        0,
        np.zeros(0, np.int32),
        np.zeros(0, np.int32),
        np.zeros(0),
    )
    highs.addCols(
        n_cols,
        c.astype(float),
        np.zeros(n_cols),
        np.full(n_cols, np.inf),
        len(index),
        starts,
        index,
        value,
    )
    highs.run()
    if highs.getModelStatus() != optimal():
        highs.setOptionValue("presolve", "on")
        highs.clearSolver()
        highs.run()
    if highs.getModelStatus() != optimal():
        raise LpFailure(
            f"master LP not solved: {highs.modelStatusToString(highs.getModelStatus())}"
        )
    solution = highs.getSolution()
    x = np.asarray(solution.col_value)
    duals = -np.asarray(solution.row_dual)
    return x, float(highs.getInfo().objective_function_value), duals


class LpFailure(RuntimeError):
    """HiGHS did not return an optimal master (numerical trouble); fall back to FFD."""


@dataclass(frozen=True)
class LpOutcome:
    """The master at the end of column generation."""

    columns: tuple[int, ...]  # pool indices with a positive value
    values: tuple[float, ...]
    value: float  # master objective
    bound: float  # valid lower bound on the LP optimum (= value when converged)
    converged: bool
    shortfall: float  # pieces carried by artificial columns (> 0: stock cannot hold the order)
    iterations: int


@dataclass(frozen=True)
class _Duals:
    items: Any  # numpy array, one price per item (0 for items not wanted)
    stock: dict[int, float]  # price of each limited stock row (>= 0)


def solve_master_lp(
    pool: ColumnPool,
    demand: Sequence[int],
    limits: Sequence[int | None],
    costs: Sequence[float],
    *,
    clock: Clock,
    bar_cost: float | None = None,
    max_iterations: int = 400,
    extra_columns: int = 4,
    smoothing: float = 0.8,
    near: float | None = None,
) -> LpOutcome:
    """Column generation on the residual ``demand`` and ``limits``, warm-started from the pool.

    ``bar_cost``: when every usable bar costs the same, stop once the bound and
    the master value round up to the same number of bars.  ``near``: stop once
    the master value is within this much of the bound.  Work is bounded by
    ``max_iterations``; the clock only stops it in an emergency.  Pricing uses duals
    smoothed towards those of the best bound so far (Wentges 1997), which cuts
    the number of master solves; a smoothed pricing that finds nothing is
    repeated with the master's own duals, so the result is exact.
    """
    import numpy as np

    problem = pool.problem
    rows = [j for j, d in enumerate(demand) if d > 0]
    usable = [s for s, left in enumerate(limits) if left is None or left > 0]
    if not rows:
        return LpOutcome((), (), 0.0, 0.0, True, 0.0, 0)
    if not usable:  # no stock left at all
        return LpOutcome((), (), float("inf"), float("inf"), True, float(sum(demand)), 0)
    master = _Master(pool, rows, demand, limits, usable, costs)
    if len(usable) == len(limits):
        active = list(range(len(pool)))
    else:
        active = np.flatnonzero(np.isin(pool.stock_of, usable)).tolist()
    wanted = np.array([max(d, 0) for d in demand], dtype=float)
    tol = 1e-9 * max(max(costs), 1e-9)
    best_bound = 0.0
    centre: _Duals | None = None
    iterations = 0
    while True:
        iterations += 1
        x, z, duals = master.solve(active)
        solved = active
        active = master.prune(solved, x, duals)
        in_master = set(active)
        new: list[int] = []
        tries = [duals] if centre is None else [_blend(centre, duals, smoothing), duals]
        for prices in tries:
            fillings, bound = _price(
                problem, prices, demand, limits, usable, costs, wanted, extra_columns, z
            )
            if bound > best_bound:
                best_bound, centre = bound, prices
            new = [
                column
                for s, counts in fillings
                if _reduced_cost(costs, duals, s, counts) < -tol
                and (column := pool.add(s, counts)) >= 0
                and column not in in_master
            ]
            if new:
                break
        converged = not new
        done = converged or iterations >= max_iterations or clock.expired()
        if bar_cost is not None and _rounds_up_alike(best_bound, z, bar_cost):
            done = True  # the bound already rounds up to the master's bar count
        if near is not None and z - best_bound <= near:
            done = True  # close enough for rounding
        if done:
            if converged:
                best_bound = z
            columns = solved
            chosen = [k for k in range(len(columns)) if x[k] > 1e-9]
            return LpOutcome(
                columns=tuple(columns[k] for k in chosen),
                values=tuple(float(x[k]) for k in chosen),
                value=z,
                bound=min(best_bound, z),
                converged=converged,
                shortfall=float(x[len(columns) :].sum()),
                iterations=iterations,
            )
        active = active + new


def _rounds_up_alike(bound: float, value: float, bar_cost: float) -> bool:
    return ceil(bound / bar_cost - _ROUND_EPS) >= ceil(value / bar_cost - _ROUND_EPS)


def _blend(centre: _Duals, duals: _Duals, weight: float) -> _Duals:
    stock = {
        s: weight * centre.stock.get(s, 0.0) + (1 - weight) * v for s, v in duals.stock.items()
    }
    return _Duals(weight * centre.items + (1 - weight) * duals.items, stock)


def _reduced_cost(costs: Sequence[float], duals: _Duals, s: int, counts: Sequence[int]) -> float:
    priced = sum(n * float(duals.items[j]) for j, n in enumerate(counts) if n)
    return costs[s] - priced + duals.stock.get(s, 0.0)


def _price(
    problem: Problem,
    prices: _Duals,
    demand: Sequence[int],
    limits: Sequence[int | None],
    usable: Sequence[int],
    costs: Sequence[float],
    wanted: Any,
    extra_columns: int,
    upper: float,
) -> tuple[list[tuple[int, tuple[int, ...]]], float]:
    """Best fillings per stock under ``prices`` and the lower bound these prices prove.

    With every cost positive, Farley's bound; otherwise (free rack remnants
    in a priced job) the Lagrangian bound of the item prices alone:
    sum(d_j pi_j) + sum over limited stock of L_s min(0, c_s - K_s) + ``upper``
    (the master value, above the LP optimum) times min(0, (c_s - K_s) / c_s) over
    unlimited priced stock, K_s being the best filling's value.  Unlimited free
    stock gives no bound but 0.
    """
    capacities = problem.capacities
    bounds = [d if d > 0 else 0 for d in demand]
    top = max(capacities[s] for s in usable)
    try:
        table = solve_bounded_knapsack(problem.weights, list(prices.items), bounds, top)
    except TableTooLarge as err:  # the search keeps the first plan and its length bound
        raise LpFailure(f"pricing table too large: {err}") from None
    ratio = 0.0
    lagrange = float(wanted @ prices.items)
    worst_unlimited = 0.0
    free_unlimited = False
    fillings: list[tuple[int, tuple[int, ...]]] = []
    for s in usable:
        stock_price = prices.stock.get(s, 0.0)
        value = table.value(capacities[s])
        priced = value - stock_price
        if costs[s] > 0:
            ratio = max(ratio, priced / costs[s])
        if limits[s] is not None:
            lagrange += limits[s] * min(0.0, costs[s] - value)
        elif costs[s] > 0:
            worst_unlimited = min(worst_unlimited, (costs[s] - value) / costs[s])
        elif value > 0:
            free_unlimited = True
        if priced > costs[s]:
            fillings.append((s, table.filling(capacities[s])))
            above = costs[s] + stock_price
            for counts in table.good_fillings(capacities[s], above, extra_columns):
                fillings.append((s, counts))
    if all(costs[s] > 0 for s in usable):
        dual_value = float(wanted @ prices.items) - sum(
            (limits[s] or 0) * v for s, v in prices.stock.items()
        )
        return fillings, dual_value / max(ratio, 1.0)
    if free_unlimited or upper == float("inf"):
        return fillings, 0.0
    return fillings, max(lagrange + upper * worst_unlimited, 0.0)


class _Master:
    """The restricted master LP over a working set of pool columns, plus artificials."""

    def __init__(
        self,
        pool: ColumnPool,
        rows: list[int],
        demand: Sequence[int],
        limits: Sequence[int | None],
        usable: list[int],
        costs: Sequence[float],
    ) -> None:
        import numpy as np

        self.pool = pool
        self.rows = rows
        self.limited = [s for s in usable if limits[s] is not None]
        self.limits = limits
        self.costs = costs
        self.d_rows = np.array([demand[j] for j in rows], dtype=float)
        self.costs_array = np.array(costs, dtype=float)
        self.big = 1e3 * max(max(costs), 1e-6)
        self.n_items = len(demand)
        self.keep = max(2 * len(rows), 100)

    def solve(self, active: list[int]) -> tuple[Any, float, _Duals]:
        import numpy as np

        pool, rows = self.pool, self.rows
        n_rows, n_active = len(rows), len(active)
        cols = np.asarray(active, dtype=np.intp)
        stock = pool.stock_of[cols]
        # Column-wise: each pool column's pieces (negated: ">=" rows as "<="), then a 1
        # in the row of its stock when that stock is limited; then one artificial column
        # per length (-1 in its row).  Rows ascend within every column.
        entry_col, entry_item, copies = pool.entries(active)
        row_of_item = np.full(self.n_items, -1, dtype=np.intp)
        row_of_item[rows] = np.arange(n_rows)
        wanted = row_of_item[entry_item] >= 0  # pieces of lengths no longer wanted drop out
        entry_col, entry_row = entry_col[wanted], row_of_item[entry_item[wanted]]
        entry_val = -copies[wanted]
        row_of_stock = np.full(len(pool.problem.stock_lengths), -1, dtype=np.intp)
        for r, s in enumerate(self.limited):
            row_of_stock[s] = n_rows + r
        limited = np.flatnonzero(row_of_stock[stock] >= 0)
        art = np.arange(n_rows)
        all_col = np.concatenate([entry_col, limited, n_active + art])
        all_row = np.concatenate([entry_row, row_of_stock[stock[limited]], art])
        all_val = np.concatenate([entry_val, np.ones(len(limited)), np.full(n_rows, -1.0)])
        order = np.lexsort((all_row, all_col))
        counts = np.bincount(all_col, minlength=n_active + n_rows)
        starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.int32)
        index = all_row[order].astype(np.int32)
        value = all_val[order].astype(float)
        b_ub = np.concatenate([-self.d_rows, [float(self.limits[s]) for s in self.limited]])
        c = np.concatenate([self.costs_array[stock], np.full(n_rows, self.big)])
        x, fun, marginals = solve_lp(c, (starts, index, value), b_ub)
        items = np.zeros(self.n_items)
        items[rows] = np.maximum(marginals[:n_rows], 0.0)
        stock_duals = {
            s: max(float(marginals[n_rows + r]), 0.0) for r, s in enumerate(self.limited)
        }
        return x, fun, _Duals(items, stock_duals)

    def prune(self, active: list[int], x: Any, duals: _Duals) -> list[int]:
        """Keep the working set small: columns in use and those of least reduced cost."""
        import numpy as np

        if len(active) <= 2 * self.keep:
            return active
        pool = self.pool
        values = duals.items @ pool.matrix[:, active]
        stock_dual = np.zeros(len(self.costs))
        for s, v in duals.stock.items():
            stock_dual[s] = v
        stock = pool.stock_of[np.asarray(active, dtype=np.intp)]
        reduced = (self.costs_array[stock] + stock_dual[stock]) - values
        reduced[x[: len(active)] > 1e-9] = -np.inf
        order = np.argsort(reduced, kind="stable")[: self.keep]
        return [active[k] for k in sorted(order)]
