"""What a plan is: frozen results for each piece, bar, section and the whole job.

``planning.plan_job`` builds them; the cut sheets and the JSON export read them.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class PieceCut:
    """One piece on a bar: where it lies from the head and what it weighs."""

    seq: int  # 1 = nearest the head
    part: str
    mark: str  # letter painted on the piece and used in the drawings
    start_mm: float
    end_mm: float
    length_mm: float
    weight_kg: float
    handling: str
    drawing: str
    tolerance: str


@dataclass(frozen=True)
class BarCut:
    """One bar from the rack and everything done to it."""

    bar: int  # 1-based number in the job
    group: str  # "4140 round Ø60"
    material: str
    section: str
    stock: str  # what to fetch: "4140 round Ø60 × 3000 mm"
    stock_entry: int  # 1-based [[stock]] entry
    location: str
    heat: str
    from_rack_remnant: bool
    length_mm: float
    kerf_mm: float
    trim_mm: float
    trim_cut_mm: float | None  # position of the squaring cut (None: no trim)
    pieces: tuple[PieceCut, ...]
    last_cut_mm: float | None  # where the last piece is parted off (None: bar used exactly)
    cuts: int
    remnant_start_mm: float
    remnant_mm: float
    remnant_kept: bool
    remnant_weight_kg: float
    weight_kg: float
    handling: str
    lifting_index: float
    cost: float
    cut_time_min: float


@dataclass(frozen=True)
class OrderLine:
    """Bars to buy to finish a short section: ``count`` × ``length_mm``."""

    group: str
    count: int
    length_mm: float
    price_each: float  # from the job's stock line of that length (0 when unpriced)
    stock_entry: int  # the [[stock]] entry whose length and price are ordered


@dataclass(frozen=True)
class Shortfall:
    """A section the stock on hand cannot finish: what is not planned and what to buy."""

    group: str
    pieces: tuple[tuple[str, int], ...]  # (part name, pieces not planned)
    order: tuple[OrderLine, ...]
    length_mm: float  # total length of the bars to order
    note: str  # how the order was chosen


@dataclass(frozen=True)
class QuoteLine:
    """One line of the quote: what it charges, on what basis, and the amount."""

    item: str
    basis: str
    amount: float


@dataclass(frozen=True)
class SectionPlan:
    """One material and section: the optimiser's result, blade settings, time and cost."""

    group: str
    material: str
    designation: str
    material_group: str
    section: str
    section_spec: str
    area_mm2: float
    mass_per_length_kg_m: float
    kerf_mm: float
    kerf_source: str
    trim_mm: float
    grip_mm: float
    min_remnant_mm: float
    pieces: int
    bars_used: int
    lp_bound_bars: int
    gap_bars: int
    method: str
    solve_seconds: float
    objective: str  # what the gap is measured in: "bars", "cost" or "length" (mm of new stock)
    objective_value: float
    objective_bound: float  # LP bound of the same problem, rack remnants included (bars: ⌈LP⌉)
    gap: float  # objective_value - objective_bound
    proven_optimal: bool
    stopped_by_time_limit: bool  # the wall clock, not the work budget, ended the search
    shortfall: Shortfall | None  # stock on hand too short: pieces not planned, bars to order
    stock_length_mm: float
    waste_mm: float
    waste_pct: float
    cuts: int
    pitch: str
    tooth_form: str
    tooth_set: str
    band_speed_m_min: float
    feed_mm_min: float
    governing_limit: str
    cut_time_min: float  # per cut, calibrated
    model_cut_time_min: float  # per cut, before calibration
    calibration_factor: float
    calibration_n: int
    cutting_time_min: float
    handling_time_min: float
    total_time_min: float
    cut_area_cm2: float
    blade_life_cm2: float
    blade_life_source: str
    blades_consumed: float
    material_cost: float
    warnings: tuple[str, ...]
    breakin_start_percent: float  # a new blade starts at this share of the normal feed
    breakin_area_cm2: float  # ... and reaches full feed after this much area cut
    breakin_cuts: float  # ... which is about this many cuts of this section


@dataclass(frozen=True)
class Remnant:
    """An off-cut long enough to keep: mark it and put it back on the rack."""

    bar: int
    group: str
    length_mm: float
    heat: str
    location: str
    weight_kg: float


@dataclass(frozen=True)
class JobPlan:
    """The whole job: sections, bars, remnants, time, blades and the quote."""

    job: str
    file: str
    customer: str
    due: str
    saw: str
    currency: str
    sections: tuple[SectionPlan, ...]
    bars: tuple[BarCut, ...]
    remnants: tuple[Remnant, ...]
    bars_used: int
    lp_bound_bars: int
    gap_bars: int
    pieces: int
    cuts: int
    stock_length_mm: float
    waste_mm: float
    waste_pct: float
    complete: bool  # every piece planned (else see shortfalls; the CLI exits 8)
    shortfalls: tuple[Shortfall, ...]
    proven_optimal: bool  # every section's plan equals its bound
    stopped_by_time_limit: bool
    bars_weight_kg: float  # the bars to fetch from the rack
    pieces_weight_kg: float  # the pieces to ship
    remnants_weight_kg: float  # the remnants to put back on the rack
    total_cut_time_min: float  # saw in the cut
    total_handling_time_min: float
    total_time_min: float
    handling_time_per_cut_min: float
    cut_area_cm2: float
    blades_consumed: float
    blades_needed: int  # to have on hand at `blade_confidence`
    blade_confidence: float
    blade_forecast_method: str
    blade_life_source: str
    material_cost: float  # charged to the job: bars less the rack credit (see quote)
    bars_cost: float  # whole bars at their price
    remnant_credit: float  # remnants back on the rack at their bar's price per length
    remnant_policy: str  # "bar-price" or "none" ([job] remnant_credit)
    order_cost: float  # bars to order for the shortfall (not in total_cost)
    saw_cost: float
    blade_cost: float
    total_cost: float
    quote: tuple[QuoteLine, ...]
    shop_rate_per_h: float | None
    blade_price: float | None
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
