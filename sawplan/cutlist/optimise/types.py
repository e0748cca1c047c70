"""Inputs and results of the cut-list optimiser (frozen dataclasses, lengths in integer units)."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class StockType:
    """Bars on hand or to buy: ``count`` None means as many as needed."""

    key: str
    length: int
    count: int | None
    cost: float
    is_remnant: bool = False


@dataclass(frozen=True)
class Demand:
    """Pieces ordered: ``count`` pieces of ``length``."""

    key: str
    length: int
    count: int


@dataclass(frozen=True)
class Allowances:
    """Length lost at the saw, in the same unit as the lengths."""

    kerf: int = 0  # width of the cut
    trim: int = 0  # squaring cut at the head, its kerf included
    grip: int = 0  # held by the vise at the tail, the last kerf included
    min_remnant: int = 0  # shortest tail worth keeping


@dataclass(frozen=True)
class BarPattern:
    """One bar as cut: pieces (demand keys) from the head, longest first."""

    stock_key: str
    stock_length: int
    pieces: tuple[str, ...]
    remnant: int  # length left at the tail after the last cut
    remnant_kept: bool  # remnant >= min_remnant (and > 0)
    cuts: int  # squaring cut (when trim > 0), one per piece, none after an exact fill
    waste: int  # stock_length - pieces - kept remnant


@dataclass(frozen=True)
class CutPlan:
    """The bars to cut and how good the plan is against the LP bound.

    ``lp_bound_bars`` is a lower bound on the number of bars: the LP optimum when
    column generation ran to the end, otherwise the better of Farley's bound and
    the length bound (the search stops early only once that bound rounds up to
    the same whole number as the LP).  With several stock types it comes from a
    second LP in which every bar costs 1.  ``lp_bound_cost`` is the material cost
    of the LP optimum (scaled down by bound / value when stopped early); remnants
    enter it, like the plan, at the cost given.  ``proven_optimal``: no plan can
    cost less (remnants counted as nearly free, see ``optimise``).
    """

    bars: tuple[BarPattern, ...]
    lp_bound_bars: float
    lp_bound_cost: float
    method: str  # "column-generation" | "arc-flow" | "first-fit-decreasing" | "none"
    gap_bars: int  # bars used - ceil(lp_bound_bars); 0 proves the fewest bars
    material_cost: float  # sum of StockType.cost over the bars used
    waste: int  # kerfs + trim + scrapped tails (kept remnants are not waste)
    solve_seconds: float
    cuts: int = 0  # saw cuts in total
    kept_remnant_length: int = 0  # total length of kept remnants
    proven_optimal: bool = False
    objective: str = "bars"  # "bars" | "cost" | "length"
    objective_value: float = 0.0
    objective_bound: float = 0.0
    unplaced: tuple[tuple[str, int], ...] = ()
    stopped_by_time_limit: bool = False

    @property
    def complete(self) -> bool:
        return not self.unplaced

    @property
    def gap(self) -> float:
        """Plan figure less its bound, in the objective's units (0: proven optimal)."""
        return max(self.objective_value - self.objective_bound, 0.0)

    @property
    def bar_count(self) -> int:
        return len(self.bars)
