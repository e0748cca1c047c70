"""One material and section of a plan: the optimiser's layout, its bars, time and cost.

Time: time per cut (cutting model, × the blade log's calibration factor for
this saw and material group when there is one) × cuts, plus the handling and
indexing time per cut.  The optimiser works in whole 0.1 mm; lengths are
rounded against the plan (see ``_up`` and ``_down``).

Short stock: the optimiser lays out what the bars on hand can hold; the pieces
left over are planned a second time, by the same optimiser, on the group's
lengths of new stock as many as needed (stock lines with count 0 are lengths
to buy), and those bars are the order list.
"""

from __future__ import annotations

import dataclasses
import math
from typing import Any

from sawplan.cutlist.jobfile.lines import located
from sawplan.cutlist.jobfile.types import Job
from sawplan.cutlist.plan.types import BarCut, OrderLine, SectionPlan, Shortfall
from sawplan.cutlist.sheets.bar_layout import bar_cost, bar_cut
from sawplan.display import Q, say
from sawplan.errors import SawplanError
from sawplan.weights import mass_per_length_kg_m

RESOLUTION_PER_MM = 10  # the optimiser works in whole 0.1 mm


def plan_section(
    job: Job,
    group: tuple[str, str],
    material: Any,
    section: Any,
    cut: Any,
    factor: float,
    n_cal: int,
    kerf_mm: float,
    kerf_source: str,
    life: tuple[float, str, Any],
    marks: dict[int, str],
    *,
    first_bar: int,
    deadline: float,
) -> tuple[SectionPlan, list[BarCut]]:
    """The group's plan and its bars (numbered from ``first_bar``), from the optimiser's layout.

    ``deadline`` (on ``time.perf_counter()``) is the optimiser's safety stop.
    """
    from sawplan.cutlist.optimise.solve import Allowances, Demand, optimise

    h = job.header
    kg_per_m = mass_per_length_kg_m(section.area_mm2, material.density_kg_m3)
    lines = [s for s in job.stock if s.group == group]
    stock = [s for s in lines if s.count != 0]
    parts = [p for p in job.parts if p.group == group]
    by_stock = {f"S{s.index}": s for s in lines}
    by_part = {f"P{p.index}": p for p in parts}
    demand = [Demand(key=key, length=_up(p.length_mm), count=p.count) for key, p in by_part.items()]
    allow = Allowances(
        kerf=_up(kerf_mm),
        trim=_up(h.trim_mm),
        grip=_up(h.grip_mm),
        min_remnant=_up(h.min_remnant_mm),
    )
    # material and section, its sizes shown again in the display units (a Phrase)
    label = say("{} {}", material.key, Q("section", section))
    length_text = _length_text
    try:
        result = (
            optimise(
                _stock_types(stock, kg_per_m),
                demand,
                allow,
                deadline=deadline,
                length_text=length_text,
                allow_short=True,
            )
            if stock
            else None
        )
        unplaced = dict(result.unplaced) if result is not None else {d.key: d.count for d in demand}
        shortfall = (
            _order(label, lines, by_part, unplaced, allow, kg_per_m, deadline) if unplaced else None
        )
    except SawplanError as err:
        raise located(err, job.where(lines[0])) from None
    layout = result.bars if result is not None else ()
    time_per_cut = cut.cut_time_min
    bars: list[BarCut] = []
    alike: dict[tuple[str, tuple[str, ...]], BarCut] = {}  # bars cut alike: laid out once
    for i, pattern in enumerate(layout):
        done = alike.get((pattern.stock_key, pattern.pieces))
        if done is not None:
            bars.append(dataclasses.replace(done, bar=first_bar + i))
            continue
        s = by_stock[pattern.stock_key]
        pieces = [by_part[k] for k in pattern.pieces]
        done = bar_cut(first_bar + i, label, s, pieces, marks, kerf_mm, h.trim_mm, kg_per_m,
                       time_per_cut, h.min_remnant_mm, section)  # fmt: skip
        alike[(pattern.stock_key, pattern.pieces)] = done
        bars.append(done)

    cuts = sum(b.cuts for b in bars)
    stock_len = sum(b.length_mm for b in bars)
    made = sum(p.length_mm for b in bars for p in b.pieces)
    kept = sum(b.remnant_mm for b in bars if b.remnant_kept)
    waste = max(stock_len - made - kept, 0.0)
    area_cm2 = cuts * section.area_mm2 / 100.0
    life_cm2, life_source, _fit = life
    lp_bound = int(math.ceil(result.lp_bound_bars - 1e-9)) if result is not None else 0
    warnings = tuple(cut.warnings)
    steps = tuple(cut.breakin)
    plan = SectionPlan(
        group=label,
        material=material.key,
        designation=material.designation,
        material_group=material.group,
        section=section.label(),
        section_spec=group[1],
        area_mm2=section.area_mm2,
        mass_per_length_kg_m=kg_per_m,
        kerf_mm=kerf_mm,
        kerf_source=kerf_source,
        trim_mm=h.trim_mm,
        grip_mm=h.grip_mm,
        min_remnant_mm=h.min_remnant_mm,
        pieces=sum(len(b.pieces) for b in bars),
        bars_used=len(bars),
        lp_bound_bars=lp_bound,
        gap_bars=len(bars) - lp_bound,
        method=str(result.method) if result is not None else "none",
        solve_seconds=float(result.solve_seconds) if result is not None else 0.0,
        objective=_objective(result),
        objective_value=_in_mm(result, result.objective_value if result else 0.0),
        objective_bound=_in_mm(result, result.objective_bound if result else 0.0),
        gap=_in_mm(result, result.gap if result else 0.0),
        proven_optimal=bool(result is not None and result.proven_optimal and not shortfall),
        stopped_by_time_limit=bool(result is not None and result.stopped_by_time_limit),
        shortfall=shortfall,
        stock_length_mm=stock_len,
        waste_mm=waste,
        waste_pct=100.0 * waste / stock_len if stock_len else 0.0,
        cuts=cuts,
        pitch=str(cut.pitch_label),
        tooth_form=str(cut.tooth_form),
        tooth_set=str(cut.tooth_set),
        band_speed_m_min=float(cut.band_speed_m_min),
        feed_mm_min=float(cut.feed_mm_min),
        governing_limit=str(cut.governing_limit),
        cut_time_min=time_per_cut,
        model_cut_time_min=cut.cut_time_model_min,
        calibration_factor=factor,
        calibration_n=n_cal,
        cutting_time_min=time_per_cut * cuts,
        handling_time_min=h.handling_time_min * cuts,
        total_time_min=(time_per_cut + h.handling_time_min) * cuts,
        cut_area_cm2=area_cm2,
        blade_life_cm2=life_cm2,
        blade_life_source=life_source,
        blades_consumed=area_cm2 / life_cm2,
        material_cost=sum(b.cost for b in bars),
        warnings=warnings,
        breakin_start_percent=float(steps[0].feed_percent) if steps else 100.0,
        breakin_area_cm2=float(steps[-1].area_to_mm2) / 100.0 if steps else 0.0,
        breakin_cuts=float(sum(step.cuts for step in steps)),
    )
    return plan, bars


def _stock_types(stock: list, kg_per_m: float) -> list:
    from sawplan.cutlist.optimise.solve import StockType

    return [
        StockType(
            key=f"S{s.index}",
            length=_down(s.length_mm),
            count=s.count,
            cost=bar_cost(s, kg_per_m),
            is_remnant=s.remnant,
        )
        for s in stock
    ]


def _length_text(units: int) -> str:
    return f"{units / RESOLUTION_PER_MM:g} mm"


def _objective(result: Any) -> str:
    return "bars" if result is None else str(result.objective)


def _in_mm(result: Any, value: float) -> float:
    """The optimiser's figures in the plan's units: length objectives in mm, else as they are."""
    if result is not None and result.objective == "length":
        return value / RESOLUTION_PER_MM
    return float(value)


def _order(
    label: str,
    lines: list,
    by_part: dict,
    unplaced: dict[str, int],
    allow: Any,
    kg_per_m: float,
    deadline: float,
) -> Shortfall:
    """What to buy to finish the section: the same optimiser on the lengths of new stock.

    Orderable: every new-stock length of the group (lines with count 0 are
    lengths to buy), as many as needed; with only rack remnants in the job, the
    longest of them.
    """
    from dataclasses import replace

    from sawplan.cutlist.optimise.solve import Demand, optimise

    new = [s for s in lines if not s.remnant]
    basis = "new-stock lengths of the job, cheapest plan"
    if not new:
        new = [max(lines, key=lambda s: s.length_mm)]
        basis = "no new-stock length in the job: ordered at the longest rack remnant's length"
    seen: dict[float, Any] = {}
    for s in sorted(new, key=lambda s: (s.length_mm, s.index)):
        seen.setdefault(s.length_mm, s)
    buyable = [replace(s, count=None, remnant=False) for s in seen.values()]
    demand = [
        Demand(key=key, length=_up(by_part[key].length_mm), count=n) for key, n in unplaced.items()
    ]
    plan = optimise(
        _stock_types(buyable, kg_per_m),
        demand,
        allow,
        deadline=deadline,
        length_text=_length_text,
    )
    counts: dict[str, int] = {}
    for bar in plan.bars:
        counts[bar.stock_key] = counts.get(bar.stock_key, 0) + 1
    by_key = {f"S{s.index}": s for s in buyable}
    order = tuple(
        OrderLine(
            label, n, by_key[key].length_mm, bar_cost(by_key[key], kg_per_m), by_key[key].index
        )
        for key, n in sorted(counts.items(), key=lambda kv: by_key[kv[0]].length_mm)
    )
    pieces = tuple((by_part[key].name, n) for key, n in unplaced.items())
    return Shortfall(
        group=label,
        pieces=pieces,
        order=order,
        length_mm=sum(o.count * o.length_mm for o in order),
        note=basis,
    )


# Lengths off the 0.1 mm grid (inch sizes: a 0.063 in kerf is 1.6002 mm) are
# rounded against the plan, pieces and allowances up and bars down, except
# within 0.001 mm of the grid: far below what a saw holds, and it keeps a
# 1.6002 mm kerf at 1.6 mm instead of 1.7 mm.
_SLOP_UNITS = 0.01


def _up(mm: float) -> int:
    """mm → whole 0.1 mm, rounded up (pieces, kerf, trim, grip: never less than needed)."""
    return max(math.ceil(mm * RESOLUTION_PER_MM - _SLOP_UNITS), 0)


def _down(mm: float) -> int:
    """mm → whole 0.1 mm, rounded down (bars: never more than there is)."""
    return math.floor(mm * RESOLUTION_PER_MM + _SLOP_UNITS)
