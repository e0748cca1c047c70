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

from sawplan.cutlist.jobfile.lines import located
from sawplan.cutlist.jobfile.types import Job
from sawplan.cutlist.plan.blades import LifeLookup, blade_life, blades_on_hand
from sawplan.cutlist.plan.section import RESOLUTION_PER_MM, plan_section
from sawplan.cutlist.plan.types import (
    BarCut,
    JobPlan,
    OrderLine,
    PieceCut,
    QuoteLine,
    Remnant,
    SectionPlan,
    Shortfall,
)
from sawplan.cutlist.sheets.bar_layout import bar_layout
from sawplan.display import Q, join, say
from sawplan.errors import BadDataError, SawplanError

__all__ = [
    "CAUTIONS",
    "CONFIDENCE",
    "RESOLUTION_PER_MM",
    "BarCut",
    "CalibrationLookup",
    "JobPlan",
    "LifeLookup",
    "OrderLine",
    "PieceCut",
    "QuoteLine",
    "Remnant",
    "SectionPlan",
    "Shortfall",
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


OUTPUT_S_PER_PIECE = 40e-6  # bars laid out and the text sheet written, per piece (bench_limits)


def output_reserve_s(left_s: float, pieces: int) -> float:
    """Seconds kept back from the optimiser for what follows the layouts.

    A tenth of the time left, or what the pieces take to lay out and print
    (about 2 s for 50,000 pieces), whichever is more, but never more than half:
    the search always has time to improve on the first plan.
    """
    left_s = max(left_s, 0.0)
    return min(max(0.1 * left_s, pieces * OUTPUT_S_PER_PIECE), 0.5 * left_s)


def plan_job(
    job: Job,
    saw: Any,
    *,
    calibration_for: CalibrationLookup | None = None,
    life_for: LifeLookup | None = None,
    log_label: str = "no blade log",
    time_limit_s: float = 5.0,
    deadline: float | None = None,
    confidence: float = CONFIDENCE,
) -> JobPlan:
    """Lay out, time, blade and cost ``job`` on ``saw``.

    ``calibration_for(saw_name, material_group)`` and ``life_for(material_group)``
    read the blade log (the CLI passes them); without them the model's times and
    the documented default lives (``sawplan.store.default_life``) are used, and the
    plan's notes say so.  ``time_limit_s`` (or an absolute ``deadline`` on
    ``time.perf_counter()``) bounds the whole plan: each section's optimiser gets
    a share (by its pieces, at least an equal share of what is left); the time
    after the layouts (bars placed, sheets written) is kept back by
    :func:`output_reserve_s`.
    """
    import time

    from sawplan.cutting import recommend

    now = time.perf_counter()
    if deadline is None:
        deadline = now + time_limit_s
    pieces_left = sum(p.count for p in job.parts)
    layouts_end = deadline - output_reserve_s(deadline - now, pieces_left)
    groups_left = len(job.groups())

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
            cut = recommend(material, section, saw, calibration=factor, extras=False)
            if cut.stalled:
                raise BadDataError(f"{cut.stall_reason} on saw {saw.name}", field="saw")
        except SawplanError as err:
            raise located(err, where) from None
        kerf_mm = job.header.kerf_mm if job.header.kerf_mm is not None else cut.kerf_mm
        kerf_source = "job file" if job.header.kerf_mm is not None else "recommended blade"
        if material.group not in lives:
            lives[material.group], log_note = blade_life(material.group, life_for)
            if log_note:
                notes.append(say("{}: {}", material.group, log_note))
        group_pieces = sum(p.count for p in job.parts if p.group == group)
        now = time.perf_counter()
        # a share by pieces, but at least an equal share of what is left (a
        # section that finishes early leaves its time to the next)
        share = max(group_pieces / max(pieces_left, 1), 1 / groups_left)
        pieces_left -= group_pieces
        groups_left -= 1
        section_plan, group_bars = plan_section(
            job, group, material, section, cut, factor, n_cal, kerf_mm, kerf_source,
            lives[material.group], marks, first_bar=len(bars) + 1,
            deadline=now + max(layouts_end - now, 0.0) * share,
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
    bars_cost = sum(s.material_cost for s in sections)
    credit = 0.0
    if h.remnant_credit == "bar-price":
        credit = sum(b.cost * b.remnant_mm / b.length_mm for b in bars if b.remnant_kept)
    material_cost = bars_cost - credit
    shortfalls = tuple(s.shortfall for s in sections if s.shortfall is not None)
    order_cost = sum(o.count * o.price_each for f in shortfalls for o in f.order)
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
                    "{}: cut time × {} from {} timed log entries on {} ({})",
                    s.group,
                    f"{s.calibration_factor:.2f}",
                    s.calibration_n,
                    saw.name,
                    log_label,
                )
            )
    notes.append(life_note)
    if any(s.stopped_by_time_limit for s in sections):
        late = ", ".join(s.group for s in sections if s.stopped_by_time_limit)
        notes.append(
            f"the time limit stopped the optimiser for {late}: the best layout found so far "
            "is shown with its bound (a longer --time-limit may find a better one)"
        )

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
        complete=not shortfalls,
        shortfalls=shortfalls,
        proven_optimal=all(s.proven_optimal for s in sections),
        stopped_by_time_limit=any(s.stopped_by_time_limit for s in sections),
        bars_weight_kg=sum(b.weight_kg for b in bars),
        pieces_weight_kg=sum(p.weight_kg for b in bars for p in b.pieces),
        remnants_weight_kg=sum(r.weight_kg for r in remnants),
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
        bars_cost=bars_cost,
        remnant_credit=credit,
        remnant_policy=h.remnant_credit,
        order_cost=order_cost,
        saw_cost=saw_cost,
        blade_cost=blade_cost,
        total_cost=material_cost + saw_cost + blade_cost,
        quote=_quote(
            bars,
            remnants,
            h,
            (cut_min + handling_min, consumed),
            (saw_cost, blade_cost),
            shortfalls,
            order_cost,
        ),
        shop_rate_per_h=h.shop_rate_per_h,
        blade_price=h.blade_price,
        notes=tuple(notes),
        cautions=_lift_cautions(bars) + _shape_cautions(job) + CAUTIONS,
    )


def _quote(
    bars: list[BarCut],
    remnants: tuple[Remnant, ...],
    h: Any,
    work: tuple[float, float],
    costs: tuple[float, float],
    shortfalls: tuple[Shortfall, ...],
    order_cost: float,
) -> tuple[QuoteLine, ...]:
    """The quote line by line, each naming its basis (amounts in the job's currency)."""
    minutes, blades = work
    saw_cost, blade_cost = costs
    stock_mm = sum(b.length_mm for b in bars)
    bars_cost = sum(b.cost for b in bars)
    lines = [
        QuoteLine(
            "material: bars",
            say(
                "{} bar(s), {}, each at its stock line's price (rack remnants at the price "
                "given, none: already paid for)",
                len(bars),
                Q("bar_length", stock_mm),
            ),
            bars_cost,
        )
    ]
    kept = Q("bar_length", sum(r.length_mm for r in remnants))
    if h.remnant_credit == "bar-price":
        credit = sum(b.cost * b.remnant_mm / b.length_mm for b in bars if b.remnant_kept)
        lines.append(
            QuoteLine(
                "material: rack credit",
                say(
                    "{} remnant(s), {} back on the rack, credited at their bar's price per "
                    "length (the job pays for the length it uses)",
                    len(remnants),
                    kept,
                ),
                -credit,
            )
        )
    else:
        lines.append(
            QuoteLine(
                "material: rack credit",
                say(
                    '{} remnant(s), {} back on the rack, not credited (remnant_credit = "none": '
                    "whole bars charged)",
                    len(remnants),
                    kept,
                ),
                0.0,
            )
        )
    rate = f" at {h.shop_rate_per_h:,.2f}/h" if h.shop_rate_per_h is not None else ""
    lines.append(
        QuoteLine(
            "saw time",
            say(
                "{} cutting and handling{}",
                Q("time", minutes),
                rate if h.shop_rate_per_h is not None else " (no shop_rate: not charged)",
            ),
            saw_cost,
        )
    )
    each = f" at {h.blade_price:,.2f} each" if h.blade_price is not None else ""
    lines.append(
        QuoteLine(
            "blade wear",
            f"{blades:.3f} blade(s) worn{each}"
            + ("" if h.blade_price is not None else " (no blade_price: not charged)"),
            blade_cost,
        )
    )
    total = sum(line.amount for line in lines)
    lines.append(QuoteLine("total", "the lines above", total))
    if shortfalls:
        n = sum(o.count for f in shortfalls for o in f.order)
        lines.append(
            QuoteLine(
                "stock to order (not in the total)",
                f"{n} whole bar(s) bought for the short sections, at their stock line's price; "
                "their cutting is not quoted until the plan is complete",
                order_cost,
            )
        )
    return tuple(lines)


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
