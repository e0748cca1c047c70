"""Check the order and the stock, and turn them into the optimiser's Problem.

Every check raises ``BadDataError`` with one line naming the field at fault.
Pieces of the same length are merged into one item; stock too short to hold
the shortest piece is left out.  Objective costs: new stock costs what it says
plus a 0.1 % length tie-break (the shorter bar wins a tie); remnants on hand
cost only a token a tenth of that tie-break, so they are used whenever they
save new stock, shorter remnants first.  When no stock has a cost, the
objective is the length of stock used.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from math import isfinite

from sawplan.cutlist.optimise.problem import Problem
from sawplan.cutlist.optimise.types import Allowances, Demand, StockType
from sawplan.errors import BadDataError

LengthText = Callable[[int], str]
MAX_BAR_PRICE = 1e9  # per bar, in any currency: more is a typing mistake


@dataclass(frozen=True)
class Instance:
    """The Problem plus what is needed to speak about it in the caller's terms."""

    problem: Problem
    stock: tuple[StockType, ...]  # the stock types kept, in Problem order
    demand: tuple[Demand, ...]
    length_text: LengthText


def make_instance(
    stock: Sequence[StockType],
    demand: Sequence[Demand],
    allow: Allowances,
    length_text: LengthText = str,
    *,
    allow_short: bool = False,
) -> Instance:
    """Validate and build; raises BadDataError naming the field at fault.

    ``allow_short``: a piece longer than any stock is left for the plan to
    report as not placed instead of being refused.
    """
    _check_allowances(allow)
    _check_stock(stock)
    _check_demand(demand)
    usable = {s.key: s.length - allow.trim - allow.grip for s in stock}
    longest = max(stock, key=lambda s: usable[s.key])
    for d in demand:
        if d.length > usable[longest.key] and not allow_short:
            raise BadDataError(
                f"is {length_text(d.length)} long; the longest usable length of stock is "
                f"{length_text(max(usable[longest.key], 0))} ({longest.key}: "
                f"{length_text(longest.length)} less trim {length_text(allow.trim)} "
                f"and grip {length_text(allow.grip)})",
                field=f"part {d.key}",
            )
    shortest = min((d.length for d in demand), default=0)
    kept = tuple(s for s in stock if usable[s.key] >= shortest)
    per_length: dict[int, int] = {}
    for d in demand:
        per_length[d.length] = per_length.get(d.length, 0) + d.count
    lengths = tuple(sorted(per_length, reverse=True))
    problem = Problem(
        lengths=lengths,
        demand=tuple(per_length[length] for length in lengths),
        stock_lengths=tuple(s.length for s in kept),
        limits=tuple(s.count for s in kept),
        costs=objective_costs(kept),
        prices=tuple(float(s.cost) for s in kept),
        kerf=allow.kerf,
        trim=allow.trim,
        grip=allow.grip,
        min_remnant=allow.min_remnant,
        remnants=tuple(s.is_remnant for s in kept),
    )
    return Instance(problem, kept, tuple(demand), length_text)


def objective_costs(stock: Sequence[StockType]) -> tuple[float, ...]:
    """Cost per bar as the optimiser sees it (see the module docstring)."""
    if not stock:
        return ()
    priced = [s.cost for s in stock if not s.is_remnant and s.cost > 0]
    reference = min(priced) if priced else 1.0
    tie = 1e-3 if priced else 1.0
    longest = max(s.length for s in stock)
    # Scaled by the cheapest price, so the LP sees numbers near 1 whatever the currency.
    return tuple(
        (0.1 * tie * s.length / longest)
        if s.is_remnant
        else (float(s.cost) / reference + tie * s.length / longest)
        for s in stock
    )


def shortage_error(
    instance: Instance, unplaced: Sequence[int], *, field: str = "stock"
) -> BadDataError:
    """Not enough stock on hand: say how many pieces and how much length are missing."""
    problem = instance.problem
    text = instance.length_text
    pieces = sum(unplaced)
    length = sum(n * problem.lengths[j] for j, n in enumerate(unplaced))
    detail = ", ".join(f"{n} × {text(problem.lengths[j])}" for j, n in enumerate(unplaced) if n > 0)
    return BadDataError(
        f"not enough stock on hand: {pieces} piece{'s' if pieces != 1 else ''} totalling "
        f"{text(length)} cannot be cut ({detail}); add bars or allow unlimited stock",
        field=field,
    )


def _is_int(value: object) -> bool:
    return isinstance(value, int) and not isinstance(value, bool)


def _check_allowances(allow: Allowances) -> None:
    for name in ("kerf", "trim", "grip", "min_remnant"):
        value = getattr(allow, name)
        if not _is_int(value) or value < 0:
            raise BadDataError(f"must be a whole number >= 0, got {value!r}", field=name)


def _check_stock(stock: Sequence[StockType]) -> None:
    if not stock:
        raise BadDataError("no stock given: list at least one bar length", field="stock")
    seen: set[str] = set()
    for s in stock:
        field = f"stock {s.key}"
        if s.key in seen:
            raise BadDataError("appears twice; give each stock line its own key", field=field)
        seen.add(s.key)
        if not _is_int(s.length) or s.length <= 0:
            raise BadDataError(f"length must be a whole number > 0, got {s.length!r}", field=field)
        if s.count is not None and (not _is_int(s.count) or s.count <= 0):
            raise BadDataError(
                f"count must be a whole number > 0 or unlimited, got {s.count!r}", field=field
            )
        if not isinstance(s.cost, int | float) or not isfinite(s.cost) or s.cost < 0:
            raise BadDataError(f"cost must be a number >= 0, got {s.cost!r}", field=field)
        if s.cost > MAX_BAR_PRICE:
            raise BadDataError(
                f"cost must be at most {MAX_BAR_PRICE:,.0f} per bar, got {s.cost:g}", field=field
            )


def _check_demand(demand: Sequence[Demand]) -> None:
    seen: set[str] = set()
    for d in demand:
        field = f"part {d.key}"
        if d.key in seen:
            raise BadDataError("appears twice; give each part its own key", field=field)
        seen.add(d.key)
        if not _is_int(d.length) or d.length <= 0:
            raise BadDataError(f"length must be a whole number > 0, got {d.length!r}", field=field)
        if not _is_int(d.count) or d.count <= 0:
            raise BadDataError(f"count must be a whole number > 0, got {d.count!r}", field=field)
