"""The cutting problem in the optimiser's own terms, and the arithmetic of one bar.

Pieces of equal length are interchangeable, so the optimiser works on items
(distinct lengths, longest first) and bars are ``(stock index, copies per item)``.
Every piece costs its length plus one kerf, so a bar of length L holds a filling
when  sum(length + kerf) <= L - trim - grip + kerf  (its *capacity*): the trim
includes the squaring cut's kerf and the grip includes the last cut's kerf.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import cached_property
from operator import mul

Bar = tuple[int, tuple[int, ...]]  # (stock index, copies of each item)


@dataclass(frozen=True)
class Problem:
    """Items grouped by length (longest first) and one capacity per stock type."""

    lengths: tuple[int, ...]  # distinct piece lengths, descending
    demand: tuple[int, ...]  # pieces wanted per length
    stock_lengths: tuple[int, ...]
    limits: tuple[int | None, ...]  # bars on hand per stock type (None = unlimited)
    costs: tuple[float, ...]  # the objective's cost per bar (remnants nearly free)
    prices: tuple[float, ...]  # the cost per bar as given, for reporting
    kerf: int
    trim: int
    grip: int
    min_remnant: int
    remnants: tuple[bool, ...] = ()  # per stock type: a rack remnant on hand (else new stock)
    _sizes: dict[tuple[int, ...], tuple[int, int]] = field(
        default_factory=dict, init=False, repr=False, compare=False, hash=False
    )
    # the same tuple object asked again (a plan's bars share their fillings): found by
    # its id without hashing hundreds of counts; the entry keeps the tuple alive
    _by_id: dict[int, tuple[tuple[int, ...], tuple[int, int]]] = field(
        default_factory=dict, init=False, repr=False, compare=False, hash=False
    )

    def size(self, counts: Sequence[int]) -> tuple[int, int]:
        """(pieces, their total length) of a filling; remembered for tuples."""
        if not isinstance(counts, tuple):
            return sum(counts), sum(map(mul, counts, self.lengths))
        seen = self._by_id.get(id(counts))
        if seen is not None and seen[0] is counts:
            return seen[1]
        found = self._sizes.get(counts)
        if found is None:
            found = (sum(counts), sum(map(mul, counts, self.lengths)))  # C-level loops
            self._sizes[counts] = found
        self._by_id[id(counts)] = (counts, found)
        return found

    @cached_property
    def weights(self) -> tuple[int, ...]:
        """What each piece takes from a bar's capacity: its length and one kerf."""
        return tuple(length + self.kerf for length in self.lengths)

    @cached_property
    def capacities(self) -> tuple[int, ...]:
        return tuple(self.capacity(s) for s in range(len(self.stock_lengths)))

    def capacity(self, s: int) -> int:
        return self.stock_lengths[s] - self.trim - self.grip + self.kerf

    def load(self, counts: Sequence[int]) -> int:
        """Capacity used by a filling."""
        n, total = self.size(counts)
        return total + n * self.kerf

    def fits(self, s: int, counts: Sequence[int]) -> bool:
        return self.load(counts) <= self.capacity(s)

    def tail(self, s: int, counts: Sequence[int]) -> int:
        """Material after the last piece, before any last cut."""
        n, pieces = self.size(counts)
        return self.stock_lengths[s] - self.trim - pieces - max(n - 1, 0) * self.kerf

    def remnant(self, s: int, counts: Sequence[int]) -> int:
        """Length left at the tail once the last cut has parted the last piece."""
        return max(self.tail(s, counts) - self.kerf, 0)

    def remnant_kept(self, s: int, counts: Sequence[int]) -> bool:
        remnant = self.remnant(s, counts)
        return remnant > 0 and remnant >= self.min_remnant

    def cuts(self, s: int, counts: Sequence[int]) -> int:
        """Saw cuts: the squaring cut (if trimmed), one per piece, none after an exact fill."""
        n, _ = self.size(counts)
        if n == 0:
            return 0
        last_needed = self.tail(s, counts) > 0
        return (1 if self.trim > 0 else 0) + n - (0 if last_needed else 1)

    def waste(self, s: int, counts: Sequence[int]) -> int:
        """Stock not delivered as pieces nor kept as a remnant (kerfs, trim, grip, scrap)."""
        _, pieces = self.size(counts)
        kept = self.remnant(s, counts) if self.remnant_kept(s, counts) else 0
        return self.stock_lengths[s] - pieces - kept


@dataclass(frozen=True)
class PlanScore:
    """How good a complete plan is, in the order of the objective."""

    unplaced: int
    cost: float
    waste: int
    cuts: int

    def key(self) -> tuple[int, float, int, int]:
        return (self.unplaced, round(self.cost, 9), self.waste, self.cuts)


def score(problem: Problem, bars: Sequence[Bar], unplaced: int = 0) -> PlanScore:
    cost = sum(problem.costs[s] for s, _ in bars)
    waste = cuts = 0
    for s, counts in bars:  # the arithmetic of Problem.waste and Problem.cuts, one size() each
        n, pieces = problem.size(counts)
        tail = problem.stock_lengths[s] - problem.trim - pieces - max(n - 1, 0) * problem.kerf
        remnant = max(tail - problem.kerf, 0)
        kept = remnant if remnant > 0 and remnant >= problem.min_remnant else 0
        waste += problem.stock_lengths[s] - pieces - kept
        if n:
            cuts += (1 if problem.trim > 0 else 0) + n - (0 if tail > 0 else 1)
    return PlanScore(unplaced, cost, waste, cuts)


def downsize(
    problem: Problem, bars: Sequence[Bar], limits: Sequence[int | None] | None = None
) -> list[Bar]:
    """Move each bar's filling to the cheapest stock on hand that holds it."""
    n_stock = len(problem.stock_lengths)
    if n_stock == 1:
        return list(bars)
    left = list(problem.limits if limits is None else limits)
    capacities = problem.capacities
    cheapest_first = sorted(range(n_stock), key=lambda t: (problem.costs[t], capacities[t], t))
    loads = [problem.load(counts) for _, counts in bars]
    result: list[Bar] = list(bars)
    for s, _ in bars:
        if left[s] is not None:
            left[s] -= 1
    for i in sorted(range(len(bars)), key=lambda i: -loads[i]):
        s, counts = bars[i]
        if left[s] is not None:
            left[s] += 1
        for t in cheapest_first:
            if capacities[t] >= loads[i] and (left[t] is None or left[t] > 0):
                break
        else:
            t = s
        if left[t] is not None:
            left[t] -= 1
        result[i] = (t, counts)
    return result
