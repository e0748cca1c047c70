"""Plan a job: per material and section, lay out the bars, then time, blade and cost it.

For each (material, section) group of a validated :class:`~sawplan.cutlist.jobfile.Job`
the cutting model recommends the blade and settings (and gives the kerf when the
job file does not), the optimiser lays the pieces out on the bars on hand, and
each bar is turned into positions from the head, weights and a handling class.

Length bookkeeping (reference §9, and the optimiser's): the first piece starts
at ``trim`` (the squaring cut's kerf lies inside the trim); each piece costs its
length plus one kerf; the tail after the last piece loses one more kerf when
the last cut is made, and what is left is the remnant.  A bar filled exactly
(no tail) needs no last cut.

Time: time per cut (cutting model, × the blade log's calibration factor for
this saw and material group when there is one) × cuts, plus the handling and
indexing time per cut.  Blades: area cut ÷ blade life gives the blades worn
out; the blades to have on hand come from the life forecast at 90 %
confidence.  Pure: the caller looks the blade log up and passes callables.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from sawplan.cutlist.jobfile import Job, PartLine, StockLine, check_supply, located
from sawplan.errors import SawplanError
from sawplan.weights import mass_per_length_kg_m

RESOLUTION_PER_MM = 10  # the optimiser works in whole 0.1 mm
CONFIDENCE = 0.90

CAUTIONS = (
    "Know the weight before lifting: the handling class of every bar and piece is on the sheet; "
    "use a hoist or lift table for lift-aid loads.",
    "Chock round stock so it cannot roll; support long bars on stands and catch falling off-cuts.",
    "Clamp the work before the blade enters; never hold work by hand; no gloves near a moving "
    "blade (gloves only to handle blades: coiled blades spring open).",
    "Keep the guards in place; wear eye and hearing protection; stop and isolate the saw before "
    "reaching into the cut or changing a blade.",
    "Break in every new blade: normal band speed, about half the feed over the first few "
    "hundred cm² (common practice).",
    "These are estimates: the saw maker's manual, the blade maker's data, shop rules and local "
    "regulations govern.",
)


# --- results ------------------------------------------------------------------------------


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
    total_weight_kg: float
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
    material_cost: float
    saw_cost: float
    blade_cost: float
    total_cost: float
    shop_rate_per_h: float | None
    blade_price: float | None
    notes: tuple[str, ...]
    cautions: tuple[str, ...]


# --- planning --------------------------------------------------------------------------------

CalibrationLookup = Callable[[str, str], "tuple[float, int] | None"]  # (saw, group) -> (factor, n)
LifeLookup = Callable[[str], Any]  # material group -> Weibull fit or None


def plan_job(
    job: Job,
    saw: Any,
    *,
    calibration_for: CalibrationLookup | None = None,
    life_for: LifeLookup | None = None,
    log_label: str = "no blade log",
    time_limit_s: float = 5.0,
    confidence: float = CONFIDENCE,
) -> JobPlan:
    """Lay out, time, blade and cost ``job`` on ``saw``.

    ``calibration_for(saw_name, material_group)`` and ``life_for(material_group)``
    read the blade log (the CLI passes them); without them the model's times and
    the documented default lives (``sawplan.store.default_life``) are used, and the
    plan's notes say so.
    """
    from sawplan.cutting import recommend

    marks = {p.index: _mark(i) for i, p in enumerate(job.parts)}
    sections: list[SectionPlan] = []
    bars: list[BarCut] = []
    notes: list[str] = []
    lives: dict[str, tuple[float, str, Any]] = {}  # material group -> (life cm², source, fit)

    for group in job.groups():
        material = job.materials[group[0]]
        section = job.sections[group[1]]
        first_stock = next(s for s in job.stock if s.group == group)
        where = job.where(first_stock)
        factor, n_cal = 1.0, 0
        if calibration_for is not None:
            found = calibration_for(saw.name, material.group)
            if found is not None:
                factor, n_cal = float(found[0]), int(found[1])
        try:
            cut = recommend(material, section, saw, calibration=factor)
        except SawplanError as err:
            raise located(err, where) from None
        kerf_mm = job.header.kerf_mm if job.header.kerf_mm is not None else cut.kerf_mm
        kerf_source = "job file" if job.header.kerf_mm is not None else "recommended blade"
        check_supply(job, group, kerf_mm)
        if material.group not in lives:
            lives[material.group], log_note = _life(material.group, life_for)
            if log_note:
                notes.append(f"{material.group}: {log_note}")
        section_plan, group_bars = _plan_group(
            job, group, material, section, cut, factor, n_cal, kerf_mm, kerf_source,
            lives[material.group], marks, first_bar=len(bars) + 1, time_limit_s=time_limit_s,
        )  # fmt: skip
        sections.append(section_plan)
        bars.extend(group_bars)

    h = job.header
    cuts = sum(s.cuts for s in sections)
    cut_min = sum(s.cutting_time_min for s in sections)
    handling_min = sum(s.handling_time_min for s in sections)
    area_cm2 = sum(s.cut_area_cm2 for s in sections)
    consumed = sum(s.blades_consumed for s in sections)
    needed, method, life_note = _blades_on_hand(sections, lives, consumed, confidence)
    material_cost = sum(s.material_cost for s in sections)
    saw_cost = (h.shop_rate_per_h or 0.0) * (cut_min + handling_min) / 60.0
    blade_cost = (h.blade_price or 0.0) * consumed
    stock_len = sum(s.stock_length_mm for s in sections)
    waste = sum(s.waste_mm for s in sections)

    if h.shop_rate_per_h is None:
        notes.append("no shop_rate in [job]: saw time is not in the quote")
    if h.blade_price is None:
        notes.append("no blade_price in [job]: blade wear is not in the quote")
    unpriced = sorted({b.stock for b in bars if b.cost == 0 and not b.from_rack_remnant})
    if unpriced:
        notes.append("no price for " + "; ".join(unpriced) + ": material cost counted as 0")
    for s in sections:
        if s.calibration_n:
            notes.append(
                f"{s.group}: cut time × {s.calibration_factor:.2f} from {s.calibration_n} "
                f"logged cut(s) on {saw.name} ({log_label})"
            )
    notes.append(life_note)

    remnants = tuple(
        Remnant(b.bar, b.group, b.remnant_mm, b.heat, b.location, b.remnant_weight_kg)
        for b in bars
        if b.remnant_kept
    )
    return JobPlan(
        job=h.name,
        file=job.file,
        customer=h.customer,
        due=h.due,
        saw=saw.name,
        currency=h.currency,
        sections=tuple(sections),
        bars=tuple(bars),
        remnants=remnants,
        bars_used=len(bars),
        lp_bound_bars=sum(s.lp_bound_bars for s in sections),
        gap_bars=sum(s.gap_bars for s in sections),
        pieces=sum(s.pieces for s in sections),
        cuts=cuts,
        stock_length_mm=stock_len,
        waste_mm=waste,
        waste_pct=100.0 * waste / stock_len if stock_len else 0.0,
        total_weight_kg=sum(b.weight_kg for b in bars),
        total_cut_time_min=cut_min,
        total_handling_time_min=handling_min,
        total_time_min=cut_min + handling_min,
        handling_time_per_cut_min=h.handling_time_min,
        cut_area_cm2=area_cm2,
        blades_consumed=consumed,
        blades_needed=needed,
        blade_confidence=confidence,
        blade_forecast_method=method,
        blade_life_source="; ".join(f"{g}: {src}" for g, (_l, src, _f) in lives.items()),
        material_cost=material_cost,
        saw_cost=saw_cost,
        blade_cost=blade_cost,
        total_cost=material_cost + saw_cost + blade_cost,
        shop_rate_per_h=h.shop_rate_per_h,
        blade_price=h.blade_price,
        notes=tuple(notes),
        cautions=_lift_cautions(bars) + CAUTIONS,
    )


def _plan_group(
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
    time_limit_s: float,
) -> tuple[SectionPlan, list[BarCut]]:
    from sawplan.cutlist.optimise import Allowances, Demand, StockType, optimise

    h = job.header
    kg_per_m = mass_per_length_kg_m(section.area_mm2, material.density_kg_m3)
    stock = [s for s in job.stock if s.group == group and s.count != 0]
    parts = [p for p in job.parts if p.group == group]
    by_stock = {f"S{s.index}": s for s in stock}
    by_part = {f"P{p.index}": p for p in parts}
    stock_types = [
        StockType(
            key=key,
            length=_down(s.length_mm),
            count=s.count,
            cost=_bar_cost(s, kg_per_m),
            is_remnant=s.remnant,
        )
        for key, s in by_stock.items()
    ]
    demand = [Demand(key=key, length=_up(p.length_mm), count=p.count) for key, p in by_part.items()]
    allow = Allowances(
        kerf=_up(kerf_mm),
        trim=_up(h.trim_mm),
        grip=_up(h.grip_mm),
        min_remnant=_up(h.min_remnant_mm),
    )
    try:
        result = optimise(
            stock_types,
            demand,
            allow,
            time_limit_s=time_limit_s,
            length_text=lambda units: f"{units / RESOLUTION_PER_MM:g} mm",
        )
    except SawplanError as err:  # e.g. too few bars for the layout, though enough length
        raise located(err, job.where(stock[0])) from None

    # the section as the job file's first stock entry writes it: what is on the rack label
    label = f"{material.key} {stock[0].section_text}"
    time_per_cut = cut.cut_time_min
    bars: list[BarCut] = []
    for i, pattern in enumerate(result.bars):
        s = by_stock[pattern.stock_key]
        pieces = [by_part[k] for k in pattern.pieces]
        bars.append(
            _bar(first_bar + i, label, s, pieces, marks, kerf_mm, h.trim_mm, kg_per_m,
                 time_per_cut, h.min_remnant_mm)
        )  # fmt: skip

    cuts = sum(b.cuts for b in bars)
    stock_len = sum(b.length_mm for b in bars)
    made = sum(p.length_mm for b in bars for p in b.pieces)
    kept = sum(b.remnant_mm for b in bars if b.remnant_kept)
    waste = max(stock_len - made - kept, 0.0)
    area_cm2 = cuts * section.area_mm2 / 100.0
    life_cm2, life_source, _fit = life
    lp_bound = int(math.ceil(result.lp_bound_bars - 1e-9))
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
        method=str(result.method),
        solve_seconds=float(result.solve_seconds),
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


def bar_layout(
    length_mm: float, piece_lengths_mm: list[float], kerf_mm: float, trim_mm: float
) -> tuple[list[tuple[float, float]], float | None, float | None, float, float]:
    """Positions on one bar from the head (reference §9 bookkeeping).

    Returns (piece (start, end) list, squaring-cut position or None, last-cut
    position or None, remnant start, remnant length).  The squaring cut parts
    the trim at ``trim``; piece i+1 starts one kerf after piece i ends; if
    anything is left after the last piece, the last cut is made there and the
    remnant is what remains after its kerf.
    """
    spans: list[tuple[float, float]] = []
    x = trim_mm
    for i, ell in enumerate(piece_lengths_mm):
        if i:
            x += kerf_mm
        spans.append((x, x + ell))
        x += ell
    tail = length_mm - x
    if tail <= 1e-9:
        return spans, (trim_mm if trim_mm > 0 else None), None, length_mm, 0.0
    remnant = max(tail - kerf_mm, 0.0)
    return spans, (trim_mm if trim_mm > 0 else None), x, length_mm - remnant, remnant


def _bar(
    number: int,
    label: str,
    s: StockLine,
    parts: list[PartLine],
    marks: dict[int, str],
    kerf_mm: float,
    trim_mm: float,
    kg_per_m: float,
    time_per_cut: float,
    min_remnant_mm: float,
) -> BarCut:
    from sawplan.handling import assess_lift

    spans, trim_cut, last_cut, rem_start, remnant = bar_layout(
        s.length_mm, [p.length_mm for p in parts], kerf_mm, trim_mm
    )
    pieces = []
    for seq, (p, (a, b)) in enumerate(zip(parts, spans, strict=True), start=1):
        w = kg_per_m * p.length_mm / 1000.0
        pieces.append(
            PieceCut(
                seq=seq, part=p.name, mark=marks[p.index], start_mm=a, end_mm=b,
                length_mm=p.length_mm, weight_kg=w, handling=assess_lift(w).handling,
                drawing=p.drawing, tolerance=p.tolerance,
            )
        )  # fmt: skip
    # squaring cut (if any) + one per piece, less the last when the bar is used exactly
    cuts = (1 if trim_cut is not None else 0) + len(parts) - (0 if last_cut is not None else 1)
    weight = kg_per_m * s.length_mm / 1000.0
    lift = assess_lift(weight)
    # Kept or scrap is decided on the exact remnant shown on the sheet (the
    # optimiser saw lengths rounded to 0.1 mm, pieces up and bars down).
    kept = remnant > 1e-9 and remnant + 1e-9 >= min_remnant_mm
    return BarCut(
        bar=number,
        group=label,
        material=s.material,
        section=s.section_text,
        stock=f"{label} × {s.length_mm:.6g} mm" + (" (rack remnant)" if s.remnant else ""),
        stock_entry=s.index,
        location=s.location,
        heat=s.heat,
        from_rack_remnant=s.remnant,
        length_mm=s.length_mm,
        kerf_mm=kerf_mm,
        trim_mm=trim_mm,
        trim_cut_mm=trim_cut,
        pieces=tuple(pieces),
        last_cut_mm=last_cut,
        cuts=cuts,
        remnant_start_mm=rem_start,
        remnant_mm=remnant,
        remnant_kept=kept,
        remnant_weight_kg=kg_per_m * remnant / 1000.0,
        weight_kg=weight,
        handling=lift.handling,
        lifting_index=lift.lifting_index,
        cost=_bar_cost(s, kg_per_m),
        cut_time_min=cuts * time_per_cut,
    )


def _lift_cautions(bars: list[BarCut]) -> tuple[str, ...]:
    """Name the bars and pieces that one person must not lift alone."""
    out = []
    for kind, verb in (("lift-aid", "a hoist, crane or lift table"), ("two-person", "two people")):
        heavy = [str(b.bar) for b in bars if b.handling == kind]
        if len(heavy) == 1:
            out.append(f"Bar {heavy[0]} needs {verb} (weights on the sheet).")
        elif heavy:
            out.append(f"Bars {', '.join(heavy)} need {verb} (weights on the sheet).")
    pieces = sorted({p.part for b in bars for p in b.pieces if p.handling != "one-person"})
    if pieces:
        out.append(f"Pieces too heavy for one person: {', '.join(pieces)}.")
    return tuple(out)


def _bar_cost(s: StockLine, kg_per_m: float) -> float:
    """Price per bar, or price per kg × the bar's weight; an unpriced rack remnant is free."""
    if s.price is not None:
        return s.price
    if s.price_per_kg is not None:
        return s.price_per_kg * kg_per_m * s.length_mm / 1000.0
    return 0.0


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


def _mark(i: int) -> str:
    """A, B, …, Z, AA, AB, … (spreadsheet column letters)."""
    text = ""
    i += 1
    while i:
        i, r = divmod(i - 1, 26)
        text = chr(ord("A") + r) + text
    return text


def _life(group: str, life_for: LifeLookup | None) -> tuple[tuple[float, str, Any], str | None]:
    """((life cm², where it comes from, Weibull fit or None), the log's note) for a group.

    ``life_for`` may return a Weibull fit, or the blade log's answer with
    ``.fit`` and ``.note``; without a usable fit the documented default life of
    the group is used (``sawplan.store.default_life``: reference §7 typical
    lives, memory).
    """
    from sawplan.store.reports import default_life

    found = life_for(group) if life_for is not None else None
    fit = getattr(found, "fit", found)
    note = getattr(found, "note", None)
    if fit is not None and getattr(fit, "fitted", False):
        return (float(fit.mean_life_cm2), f"blade log Weibull fit ({fit.n} blades)", fit), note
    default = default_life(group)
    return (default.life_cm2, f"default {default.life_cm2:,.0f} cm² — {default.source}", None), note


def _blades_on_hand(
    sections: list[SectionPlan],
    lives: dict[str, tuple[float, str, Any]],
    consumed: float,
    confidence: float,
) -> tuple[int, str, str]:
    """Blades to have on hand for the whole job, at ``confidence``.

    One blade cuts every group, so the groups' areas are put on one scale: the
    area of the group that wears blades most, with every other group's area
    scaled by the ratio of mean lives (same-shape assumption).  With one
    material group this is exact.
    """
    from sawplan.life.forecast import forecast_blades

    if consumed <= 0:
        return 0, "none", "no cuts: no blades needed"
    wear = {}
    for s in sections:
        wear[s.material_group] = wear.get(s.material_group, 0.0) + s.blades_consumed
    ref = max(wear, key=wear.get)
    life_cm2, _source, fit = lives[ref]
    area_cm2 = consumed * life_cm2
    if fit is not None:
        forecast = forecast_blades(area_cm2, fit, confidence=confidence)
        note = f"blades on hand: Weibull forecast from the blade log at {confidence:.0%} confidence"
    else:
        forecast = forecast_blades(area_cm2, None, deterministic_life_cm2=life_cm2)
        note = (
            "blades on hand: no blade-life fit in the log, so area ÷ default life "
            "(reference §7 typical lives, memory — calibrate by logging blades)"
        )
    if len(wear) > 1:
        note += f"; groups put on the {ref} scale by mean life"
    return int(forecast.blades_needed), str(forecast.method), note
