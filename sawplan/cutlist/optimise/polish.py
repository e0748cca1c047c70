"""Second objective: less scrap, by moving pieces between the bars of a plan.

With the bars fixed the cost is fixed; waste falls when spare length ends up in
remnants at least ``min_remnant`` long instead of short scraps.  Two moves:

* fill: a bar whose tail will be scrap takes pieces (longest that fit first)
  from bars whose tail is kept anyway; the scrap shrinks by the piece and a
  kerf, the kept remnant grows.
* gather: a bar with a short scrap gives pieces (shortest first) to other bars
  whose tail is scrap anyway, best fit first, until its own tail reaches
  ``min_remnant``; if it cannot, the moves are undone.  A bar emptied this way
  is dropped, which also saves its cost.

Every move is checked on the plan's score, so the result is never worse.
"""

from __future__ import annotations

from bisect import bisect_left, insort
from collections.abc import Sequence

from sawplan.cutlist.optimise.budget import Clock
from sawplan.cutlist.optimise.problem import Bar, Problem, score


class _Plan:
    """Bars as mutable fillings with their spare capacity, for cheap moves."""

    def __init__(self, problem: Problem, bars: Sequence[Bar]) -> None:
        self.problem = problem
        self.stock = [s for s, _ in bars]
        # a bar's filling stays the plan's tuple until a move changes it (then a list)
        self.fills: list[Sequence[int]] = [counts for _, counts in bars]
        self.room = [problem.capacity(s) - problem.load(counts) for s, counts in bars]
        self.pieces = [problem.size(counts)[0] for _, counts in bars]
        self.weights = problem.weights
        # The tail is the spare capacity plus the grip; the remnant is the tail less a kerf.
        self.keep_from = max(problem.min_remnant, 1) + problem.kerf - problem.grip

    def kept(self, b: int) -> bool:
        return self.pieces[b] > 0 and self.room[b] >= self.keep_from

    def scrap(self, b: int) -> bool:
        return self.pieces[b] > 0 and self.room[b] < self.keep_from

    def _changing(self, b: int) -> list[int]:
        fill = self.fills[b]
        if isinstance(fill, tuple):
            fill = self.fills[b] = list(fill)
        return fill  # type: ignore[return-value]

    def move(self, j: int, src: int, dst: int) -> None:
        w = self.weights[j]
        self._changing(src)[j] -= 1
        self._changing(dst)[j] += 1
        self.room[src] += w
        self.room[dst] -= w
        self.pieces[src] -= 1
        self.pieces[dst] += 1

    def waste(self, b: int) -> int:
        return self.problem.waste(self.stock[b], self.fills[b]) if self.pieces[b] else 0

    def bars(self) -> list[Bar]:
        return [
            (s, f if isinstance(f, tuple) else tuple(f))
            for s, f, n in zip(self.stock, self.fills, self.pieces, strict=True)
            if n
        ]


def gather_remnants(
    problem: Problem, bars: Sequence[Bar], *, clock: Clock, max_donors: int = 200
) -> list[Bar]:
    """Return ``bars`` with pieces moved so that less length is scrapped (never more)."""
    if problem.min_remnant <= 0 or len(bars) < 2:
        return list(bars)
    plan = _Plan(problem, bars)
    _fill_scrap(plan, clock)
    _gather(plan, clock, max_donors)
    result = plan.bars()
    if score(problem, result).key() <= score(problem, bars).key():
        return result
    return list(bars)


def _fill_scrap(plan: _Plan, clock: Clock) -> None:
    weights = plan.problem.weights
    holders: list[list[int]] = [[] for _ in weights]  # bars with a kept tail holding item j
    for b, fill in enumerate(plan.fills):
        if plan.kept(b):
            for j, n in enumerate(fill):
                if n:
                    holders[j].append(b)
    receivers = sorted(
        (b for b in range(len(plan.fills)) if plan.scrap(b)), key=lambda b: -plan.room[b]
    )
    for r in receivers:
        if clock.expired():
            return
        for j, w in enumerate(weights):  # longest first
            while w <= plan.room[r] and plan.scrap(r):
                donor = _holder(plan, holders[j], j, r)
                if donor < 0:
                    break
                before = plan.waste(r) + plan.waste(donor)
                plan.move(j, donor, r)
                if plan.waste(r) + plan.waste(donor) >= before:
                    plan.move(j, r, donor)
                    break


def _holder(plan: _Plan, holders: list[int], j: int, receiver: int) -> int:
    """A bar with a kept tail that still holds a piece of item ``j``, or -1."""
    while holders:
        b = holders[-1]
        if b != receiver and plan.fills[b][j] > 0 and plan.kept(b):
            return b
        holders.pop()
    return -1


def _gather(plan: _Plan, clock: Clock, max_donors: int) -> None:
    weights = plan.problem.weights
    n_bars = len(plan.fills)
    # Bars with a scrap tail by spare length, kept up to date as donors succeed.
    scrap = sorted((plan.room[b], b) for b in range(n_bars) if plan.scrap(b))
    tried = 0
    for donor in sorted(range(n_bars), key=lambda b: -plan.room[b]):
        if tried >= max_donors or clock.expired():
            return
        if not plan.scrap(donor):
            continue
        tried += 1
        receivers = list(scrap)
        del receivers[bisect_left(receivers, (plan.room[donor], donor))]
        before = {donor: plan.room[donor]}  # spare length of each bar touched, before
        moves: list[tuple[int, int]] = []
        success = False
        for j in range(len(weights) - 1, -1, -1):  # shortest pieces first
            w = weights[j]
            while plan.fills[donor][j] > 0 and not success:
                spot = bisect_left(receivers, (w, -1))
                if spot == len(receivers):
                    break
                _, b = receivers.pop(spot)
                before.setdefault(b, plan.room[b])
                plan.move(j, donor, b)
                insort(receivers, (plan.room[b], b))
                moves.append((j, b))
                success = plan.pieces[donor] == 0 or plan.kept(donor)
            if success:
                break
        if not success:
            for j, b in reversed(moves):
                plan.move(j, b, donor)
            continue
        for b, room in before.items():  # every bar touched was a scrap bar before
            del scrap[bisect_left(scrap, (room, b))]
            if plan.scrap(b):
                insort(scrap, (plan.room[b], b))
