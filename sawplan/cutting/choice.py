"""Which pitch to fit: solids by the model's own physics, walls by the average width of cut.

Solid bars: the fastest pitch with at least three teeth in the widest chord
and at most about 24 (the five MH31 width-of-cut pairs come out of this).

Tube, pipe, hollow sections, structurals and bundles: the trade reads the
pitch off the solids chart at the *average width of cut* — metal area ÷ blade
travel (common practice, printed in saw operators' manuals: a 4 in OD × 3 in
ID tube has 5.5 in² over 4 in of travel, 1.38 in, so 4/6).  sawplan reads it
the same way, with the same physics as for solids, then keeps at least three
teeth over the whole chord where it is thinnest (both walls of a tube at its
equator), and never takes a pitch whose bite sits under the rubbing floor for
most of the cut when another one keeps the teeth and does not.  Walls too
thin for three teeth of any pitch get the finest pitch: where the two rules
pull apart, stripped teeth and a broken blade weigh more than rubbing wear.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sawplan.cutting import constants as K
from sawplan.cutting.feed import Quadrature
from sawplan.cutting.plan import Candidate, Plan, score, single_solid


@dataclass(frozen=True)
class Choice:
    """The chosen candidate and how it was reached (for the explanation)."""

    chosen: Candidate
    how: str  # fastest | chart | near-chart | finer-for-teeth | coarser-for-rubbing | thin-walls
    # | stalled | given | other
    chart: Candidate | None = None  # the pitch read at the average width of cut (walls)
    width_of_cut_mm: float | None = None


def pool(cands: list[Candidate], *, solid: bool) -> list[Candidate]:
    """Variable pitches for solids (as in the MH31 width-of-cut pairs), all for walls."""
    if solid:
        variable = [c for c in cands if c.pitch.kind == "variable" and c.allowed]
        if variable:
            return [c for c in cands if c.pitch.kind == "variable"]
    return cands


def _coarsest(cands: list[Candidate]) -> Candidate:
    return min(cands, key=lambda c: (c.pitch.tpi_mean, c.pitch.tpi_coarse))


def pick_solid(cands: list[Candidate], *, work_hardens: bool) -> Candidate:
    """The fastest pitch within the tooth-count rules.

    Variable pitches damp vibration, so a constant pitch must be clearly
    faster; among pitches nearly as fast the coarsest wins (bigger gullets,
    longer life — more so on work-hardening materials); a pitch that rubs over
    most of the cut loses to one that does not.  When no pitch meets the
    rules: the finest for small solids, the coarsest for very wide ones.
    """
    live = [c for c in cands if not c.stalled]
    if not live:
        return _coarsest(cands)
    live = pool(live, solid=True)
    allowed = [c for c in live if c.allowed]
    if allowed:
        allowed = [c for c in allowed if not c.rubs_most] or allowed
        penalty = K.number("bite", "constant_pitch_penalty")

        def weighted(c: Candidate) -> float:
            return c.time * (1.0 if c.pitch.kind == "variable" else penalty)

        best = min(weighted(c) for c in allowed)
        name = "similar_time_ratio_work_hardening" if work_hardens else "similar_time_ratio"
        near = [c for c in allowed if weighted(c) <= best * K.number("bite", name)]
        return min(near, key=lambda c: (c.pitch.tpi_mean, weighted(c)))
    if any(c.too_few for c in live):
        return max(live, key=lambda c: (c.pitch.tpi_coarse, c.pitch.tpi_fine))
    return min(live, key=lambda c: (c.pitch.tpi_mean, c.time))


def chart_pitch(plan: Plan, cands: list[Candidate]) -> Candidate:
    """The pitch the solids' physics gives for a solid as wide as the average width of cut."""
    w = plan.section.mean_chord_mm
    quad = Quadrature(
        height_mm=w,
        depths_mm=(w / 2,),
        weights_mm=(w,),
        chords_mm=(w,),
        kink_chords_mm=(w,),
        runs_mm=(w,),
        kink_runs_mm=(w,),
    )
    solid = [
        score(plan, c.pitch, quad=quad, thinnest_mm=w, widest_mm=w, solid=True, set_feed=False)
        for c in cands
    ]
    return pick_solid(solid, work_hardens=plan.material.work_hardens)


def _steps(a: Candidate, b: Candidate) -> float:
    """Distance between two pitches on the catalogue's (logarithmic) scale."""
    return abs(math.log(a.pitch.tpi_mean / b.pitch.tpi_mean))


def _window(chart: Candidate, cands: list[Candidate]) -> list[Candidate]:
    """The chart pitch and its next finer and coarser neighbours of the same kind."""
    family = sorted(
        (c for c in cands if c.pitch.kind == chart.pitch.kind),
        key=lambda c: (c.pitch.tpi_mean, c.pitch.tpi_coarse),
    )
    i = next(k for k, c in enumerate(family) if c.pitch.same_teeth(chart.pitch))
    return family[max(i - 1, 0) : i + 2]


def _fastest(group: list[Candidate], work_hardens: bool) -> Candidate:
    """The fastest, or the coarsest nearly as fast (as for solids)."""
    best = min(c.time for c in group)
    name = "similar_time_ratio_work_hardening" if work_hardens else "similar_time_ratio"
    near = [c for c in group if c.time <= best * K.number("bite", name)]
    return min(near, key=lambda c: (c.pitch.tpi_mean, c.time))


def pick_walls(plan: Plan, cands: list[Candidate]) -> Choice:
    """The chart pitch at the average width of cut, or the fastest pitch one step either side
    of it; moved further only as far as the tooth and rubbing rules need."""
    chart_solid = chart_pitch(plan, cands)
    chart = next(c for c in cands if c.pitch.same_teeth(chart_solid.pitch))
    width = plan.section.mean_chord_mm
    live = [c for c in cands if not c.stalled]
    if not live:
        return Choice(_coarsest(cands), "stalled", chart, width)
    keeps_teeth = [c for c in live if not c.too_few]
    if not keeps_teeth:  # the most teeth there are: stripped teeth cost more than rubbing
        finest = max(live, key=lambda c: (c.pitch.tpi_coarse, c.pitch.tpi_fine))
        return Choice(finest, "thin-walls", chart, width)
    # every pitch that keeps the teeth may rub (thin faces across the blade): then the
    # rubbing rule has nothing to choose between
    group = [c for c in keeps_teeth if not c.rubs_most] or keeps_teeth
    near = [c for c in _window(chart, cands) if any(c is g for g in group)]
    if near:
        chosen = _fastest(near, plan.material.work_hardens)
    else:
        group = [c for c in group if c.pitch.kind == "variable"] or group
        chosen = min(group, key=lambda c: (round(_steps(c, chart), 9), c.time))
    if chosen.pitch.same_teeth(chart.pitch):
        how = "chart"
    elif near and not chart.too_few and not chart.rubs_most:
        how = "near-chart"
    elif chart.too_few:
        how = "finer-for-teeth"
    elif chart.rubs_most and chosen.pitch.tpi_mean < chart.pitch.tpi_mean:
        how = "coarser-for-rubbing"
    else:
        how = "other"
    return Choice(chosen, how, chart, width)


def beyond_window(choice: Choice, cand: Candidate, cands: list[Candidate]) -> bool:
    """A pitch more than one step from the chart pitch (walls only)."""
    if choice.chart is None:
        return False
    return not any(c is cand for c in _window(choice.chart, cands))


def choose(plan: Plan, cands: list[Candidate]) -> Choice:
    """Solids by the fastest pitch, everything else by the average width of cut."""
    if single_solid(plan.section):
        chosen = pick_solid(cands, work_hardens=plan.material.work_hardens)
        return Choice(chosen, "stalled" if chosen.stalled else "fastest")
    return pick_walls(plan, cands)
