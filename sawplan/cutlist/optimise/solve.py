"""Cut-list optimiser: which pieces to cut from which bars (one-dimensional cutting stock).

Lengths are integers in a resolution unit the caller chooses (1 mm or 0.1 mm);
costs are per bar in any currency.  A bar of length L holds pieces l_1..l_n when

    trim + sum(l_i) + (n - 1) * kerf + grip <= L

(trim: the squaring allowance at the head, its kerf included; grip: what the
vise holds at the tail, the last kerf included), so one length l gives
n = floor((L - trim - grip + kerf) / (l + kerf)) pieces.  The remnant after the
last cut is  L - trim - sum(l_i) - n * kerf  (0 when the bar is used exactly and
there is no grip: the last piece then needs no cut).

Objective, in order: material cost, then waste, then saw cuts (the search
minimises cost; moves between bars then cut waste; cuts break ties).  *Waste* is every
length of stock used that is neither a piece nor a kept remnant: kerfs, the
squaring trim, and the tail when it is shorter than ``min_remnant`` (the grip
end goes with it).  A remnant at least ``min_remnant`` long (and not empty) is
kept and is not waste.  Remnants on hand (``StockType.is_remnant``) count as
already paid for: the optimiser charges them only a token, so they are used
whenever they save new stock, shorter remnants first; ``material_cost`` still
adds up the ``cost`` given for every bar used, remnants included.

Method: Gilmore-Gomory column generation with a bounded-knapsack pricing step,
rounding with repeated re-solves of the residual and first-fit decreasing for
the last pieces, an exact arc-flow integer program when rounding stops short of
the bound on a small order, a closing step that re-packs a few bars at a time
exactly, and first-fit decreasing as the seed every later stage must beat
(see ``search``).  The work is budgeted (``budget``): same input, same plan.
"""

from __future__ import annotations

import time
from collections.abc import Sequence

from sawplan.cutlist.optimise.budget import Clock, Effort
from sawplan.cutlist.optimise.build import LengthText, make_instance, shortage_error
from sawplan.cutlist.optimise.ffd import pack_first_fit_decreasing
from sawplan.cutlist.optimise.report import Bounds, build_plan, material_bounds
from sawplan.cutlist.optimise.types import Allowances, BarPattern, CutPlan, Demand, StockType

__all__ = [
    "Allowances",
    "BarPattern",
    "CutPlan",
    "Demand",
    "Effort",
    "StockType",
    "first_fit_decreasing",
    "optimise",
]


def optimise(
    stock: Sequence[StockType],
    demand: Sequence[Demand],
    allow: Allowances = Allowances(),
    *,
    time_limit_s: float = 5.0,
    deadline: float | None = None,
    length_text: LengthText = str,
    allow_short: bool = False,
    effort: Effort | None = None,
) -> CutPlan:
    """Cheapest plan cutting every piece ordered from the stock given.

    The search is budgeted by work (``effort``), so the same input gives the
    same plan; ``time_limit_s`` (or an absolute ``deadline`` on
    ``time.perf_counter()``) is a safety stop: when it fires, the best plan
    so far is returned and ``stopped_by_time_limit`` says so.
    ``length_text`` formats lengths in error messages (e.g. appends the unit).
    ``allow_short``: when the stock on hand cannot hold every piece, return the
    plan of what it can hold, the rest in ``CutPlan.unplaced``; otherwise that
    raises BadDataError, as do impossible data and a part no bar can hold.
    """
    from sawplan.cutlist.optimise.search import search_plan

    started = time.perf_counter()
    if deadline is None:
        deadline = started + max(time_limit_s, 0.0)
    instance = make_instance(stock, demand, allow, length_text, allow_short=allow_short)
    problem = instance.problem
    if not problem.lengths or not problem.stock_lengths:
        # nothing to cut, or (only with allow_short) no bar holds any piece
        return build_plan(
            instance,
            [],
            Bounds(0.0, 0.0, 0.0),
            method="none",
            started=started,
            proven_optimal=not problem.lengths,
            unplaced=problem.demand if problem.lengths else (),
        )
    # The search stops in time to leave the last sixth of the limit for the polish
    # and for writing the plan out (neither is interrupted).
    search_end = started + (deadline - started) * 0.85
    outcome = search_plan(instance, clock=Clock(search_end), effort=effort or Effort())
    if any(outcome.unplaced) and not allow_short:
        raise shortage_error(instance, outcome.unplaced)
    return build_plan(
        instance,
        outcome.bars,
        outcome.bounds,
        method=outcome.method,
        started=started,
        proven_optimal=outcome.proven_optimal and not any(outcome.unplaced),
        unplaced=outcome.unplaced,
        stopped_by_time_limit=outcome.stopped_by_time_limit,
    )


def first_fit_decreasing(
    stock: Sequence[StockType],
    demand: Sequence[Demand],
    allow: Allowances = Allowances(),
    *,
    length_text: LengthText = str,
) -> CutPlan:
    """Plan by first-fit decreasing alone: fast, at most 11/9·OPT + 6/9 bars (Dósa 2007).

    The bounds reported are the length bounds (total length over the best stock).
    """
    started = time.perf_counter()
    instance = make_instance(stock, demand, allow, length_text)
    bars, unplaced = pack_first_fit_decreasing(instance.problem)
    if any(unplaced):
        raise shortage_error(instance, unplaced)
    return build_plan(
        instance,
        bars,
        material_bounds(instance),
        method="first-fit-decreasing",
        started=started,
        proven_optimal=False,
    )
