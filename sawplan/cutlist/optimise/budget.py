"""How much work the search may do, and the wall clock that stops it in an emergency.

The search is budgeted by work, not by time: column-generation iterations, LP
re-solves in the dives, branch-and-bound nodes in the exact step, repair
rounds.  The same order therefore gives the same plan on any machine load.
The wall clock (``Clock``) is only a safety stop for a slow or busy machine;
when it fires, the plan says so (``CutPlan.stopped_by_time_limit``) and the
best plan found until then is returned with its bound and gap.
"""

from __future__ import annotations

import time
from dataclasses import dataclass


@dataclass(frozen=True)
class Effort:
    """Work limits of the whole search (none of them depends on the clock)."""

    lp_iterations: int = 400  # column-generation iterations per LP solve
    branches: int = 5  # fillings tried at each dive step
    max_resolves: int = 400  # LP re-solves in all the dives
    stall_limit: int = 120  # re-solves without a better plan before the dives give up
    exact_pieces: int = 60  # arc-flow on the rest of a dive once it is this few pieces...
    exact_arcs: int = 1_500  # ...and its graph this small
    exact_nodes: int = 200  # branch-and-bound nodes per arc-flow solve
    repair_rounds: int = 16  # closing step: bars re-packed exactly, one group per round
    repair_bars: int = 8  # bars taken apart per round
    polish_donors: int = 200  # bars tried by the remnant polish
    good_gap: float = 1e-4  # several stock types: stop within this share of the LP bound


@dataclass
class Clock:
    """A wall-clock deadline that remembers whether it fired."""

    deadline: float
    fired: bool = False

    def expired(self) -> bool:
        if not self.fired and time.perf_counter() > self.deadline:
            self.fired = True
        return self.fired

    def left(self) -> float:
        return max(self.deadline - time.perf_counter(), 0.0)

    def keep_back(self, seconds: float) -> None:
        """Stop ``seconds`` earlier: time the work after the search will need."""
        self.deadline -= max(seconds, 0.0)


# What follows the search (the report, the bars laid out, the sheet) takes two
# to four times the first-fit pass on the same pieces (bench_limits; plan_job
# keeps back a share too).  On a busy machine both slow down alike, so the
# search keeps this many first-fit passes back.
AFTER_SEARCH_PER_FFD = 3.0
