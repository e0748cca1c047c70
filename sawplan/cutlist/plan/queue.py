"""A plan as the saw works it: every pass of the blade, in cut-sheet order.

``sawplan plan JOB --send`` puts these into the saw's queue on the station.
Each bar gives its squaring cut (when the job trims), then one parting cut per
piece from the head end; the last piece needs none when it ends exactly at the
bar's end (the bookkeeping of ``sheets.bar_layout``).  Every pass cuts the
whole section, so its area is the section's area.
"""

from __future__ import annotations

from dataclasses import dataclass

from sawplan.cutlist.plan.types import BarCut, JobPlan, SectionPlan


@dataclass(frozen=True)
class QueuedCut:
    """One pass of the blade: where on which bar, what it parts off, and how to cut it."""

    seq: int  # 1-based, in cut-sheet order
    bar: int
    step: str  # "trim" (squaring cut) or "part" (parts a piece off)
    position_mm: float  # where the cut is, from the head end of the bar
    mark: str | None
    part: str | None
    heat: str
    stock: str
    location: str
    material: str
    material_group: str
    section: str  # the section's canonical text (``Section.spec()``), as the log keeps it
    area_mm2: float
    predicted_time_min: float | None  # the plan's calibrated time per cut
    band_speed_m_min: float
    feed_mm_min: float
    pitch: str


def queued_cuts(plan: JobPlan) -> tuple[QueuedCut, ...]:
    """Every cut of ``plan`` in the order of its cut sheet."""
    by_group = {str(s.group): s for s in plan.sections}
    found: list[QueuedCut] = []
    for bar in plan.bars:
        section = by_group[str(bar.group)]
        for step, position, piece in _passes(bar):
            found.append(_queued(len(found) + 1, bar, section, step, position, piece))
    return tuple(found)


def _passes(bar: BarCut):
    """(step, position from the head, piece or None) for each pass on one bar."""
    if bar.trim_cut_mm is not None:
        yield "trim", bar.trim_cut_mm, None
    last = len(bar.pieces) - 1
    for i, piece in enumerate(bar.pieces):
        if i < last:
            yield "part", piece.end_mm, piece
        elif bar.last_cut_mm is not None:
            yield "part", bar.last_cut_mm, piece


def _queued(seq: int, bar: BarCut, s: SectionPlan, step: str, position: float, piece) -> QueuedCut:
    return QueuedCut(
        seq=seq,
        bar=bar.bar,
        step=step,
        position_mm=position,
        mark=piece.mark if piece is not None else None,
        part=piece.part if piece is not None else None,
        heat=bar.heat,
        stock=str(bar.stock),
        location=bar.location,
        material=s.material,
        material_group=s.material_group,
        section=s.section_spec,
        area_mm2=s.area_mm2,
        predicted_time_min=s.cut_time_min,
        band_speed_m_min=s.band_speed_m_min,
        feed_mm_min=s.feed_mm_min,
        pitch=s.pitch,
    )
