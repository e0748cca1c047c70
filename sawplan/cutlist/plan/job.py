"""Plan a job: per material and section, lay out the bars, then time, blade and cost it.

For each (material, section) group of a validated :class:`~sawplan.cutlist.jobfile.load.Job`
the cutting model recommends the blade and settings (and gives the kerf when the
job file does not), the optimiser lays the pieces out on the bars on hand, and
each bar is turned into positions from the head, weights and a handling class.
Pure: the caller looks the blade log up and passes callables.

Modules beside this one: ``section`` (one group: layout, time, cost),
``sheets.bar_layout`` (positions on a bar), ``blades`` (blade life, blades on
hand) and ``types`` (the results); their public names import from here too.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from sawplan.cutlist.jobfile.checks import check_supply
from sawplan.cutlist.jobfile.lines import located
from sawplan.cutlist.jobfile.types import Job
from sawplan.cutlist.plan.blades import LifeLookup, blade_life, blades_on_hand
from sawplan.cutlist.plan.section import RESOLUTION_PER_MM, plan_section
from sawplan.cutlist.plan.types import BarCut, JobPlan, PieceCut, Remnant, SectionPlan
from sawplan.cutlist.sheets.bar_layout import bar_layout
from sawplan.display import join, say
from sawplan.errors import SawplanError

__all__ = [
    "CAUTIONS",
    "CONFIDENCE",
    "RESOLUTION_PER_MM",
    "BarCut",
    "CalibrationLookup",
    "JobPlan",
    "LifeLookup",
    "PieceCut",
    "Remnant",
    "SectionPlan",
    "bar_layout",
    "plan_job",
]

CONFIDENCE = 0.90

CAUTIONS = (
    "Know the weight before lifting: the handling class of every bar and piece is on the sheet; "
    "use a hoist or lift table for lift-aid loads.",
    "Support long bars on stands and catch falling off-cuts.",
    "Clamp the work before the blade enters; never hold work by hand; no gloves near a moving "
    "blade (gloves only to handle blades: coiled blades spring open).",
    "Keep the guards in place; wear eye and hearing protection; stop and isolate the saw before "
    "reaching into the cut or changing a blade.",
    "Break in every new blade: normal band speed and a reduced feed, raised step by step "
    "as each section's break-in line says (common practice).",
    "These are estimates: the saw maker's manual, the blade maker's data, shop rules and local "
    "regulations govern.",
)

CalibrationLookup = Callable[[str, str], "tuple[float, int] | None"]  # (saw, group) -> (factor, n)


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
            lives[material.group], log_note = blade_life(material.group, life_for)
            if log_note:
                notes.append(say("{}: {}", material.group, log_note))
        section_plan, group_bars = plan_section(
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
    needed, method, life_note = blades_on_hand(sections, lives, consumed, confidence)
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
        notes.append(say("no price for {}: material cost counted as 0", join("; ", unpriced)))
    for s in sections:
        if s.calibration_n:
            notes.append(
                say(
                    "{}: cut time × {} from {} logged cut(s) on {} ({})",
                    s.group,
                    f"{s.calibration_factor:.2f}",
                    s.calibration_n,
                    saw.name,
                    log_label,
                )
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
        blade_life_source=join("; ", [say("{}: {}", g, src) for g, (_l, src, _f) in lives.items()]),
        material_cost=material_cost,
        saw_cost=saw_cost,
        blade_cost=blade_cost,
        total_cost=material_cost + saw_cost + blade_cost,
        shop_rate_per_h=h.shop_rate_per_h,
        blade_price=h.blade_price,
        notes=tuple(notes),
        cautions=_lift_cautions(bars) + _shape_cautions(job) + CAUTIONS,
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


def _shape_cautions(job: Job) -> tuple[str, ...]:
    """What the job's stock needs besides its weight: it rolls, it tips, its sawn ends cut."""
    from sawplan.piece_handling import EDGE_CAUTION, ROLL_CAUTION, ROLLS, TIP_CAUTION, TIPS

    shapes = {job.sections[group[1]].shape for group in job.groups()}
    out = []
    if shapes & ROLLS:
        out.append(f"Rounds, tubes and hexagons: {ROLL_CAUTION}.")
    if shapes & TIPS:
        out.append(f"Angles, channels and I-beams: {TIP_CAUTION}.")
    out.append(EDGE_CAUTION[0].upper() + EDGE_CAUTION[1:] + ".")
    return tuple(out)


def _mark(i: int) -> str:
    """A, B, …, Z, AA, AB, … (spreadsheet column letters)."""
    text = ""
    i += 1
    while i:
        i, r = divmod(i - 1, 26)
        text = chr(ord("A") + r) + text
    return text
