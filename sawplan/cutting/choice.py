"""Which pitch to fit: solids by the model's own physics, walls by the average width of cut.

Solid bars: the fastest pitch with at least three teeth in the widest chord
and at most about 24 (the five MH31 width-of-cut pairs come out of this).

Tube, pipe, hollow sections, structurals and bundles: the trade reads the
pitch off the solids chart at the *average width of cut* — metal area ÷ blade
travel (common practice, printed in saw operators' manuals: a 4 in OD × 3 in
ID tube has 5.5 in² over 4 in of travel, 1.38 in, so 4/6).  sawplan reads it
the same way, with the same physics as for solids, in variable pitches, then
aims at three teeth over the whole chord where it is thinnest (both walls of
a tube at its equator) without rubbing over most of the cut, from that chart
pitch or a step either side.  Where none does, it takes the finest variable
pitch within that step that keeps two teeth on average — what the trade's
charts for tube and structurals accept in a thin wall or web (common
practice, from memory) — rather than a far finer pitch that packs its
gullets over the rest of the section.  Walls too thin for either get the
finest pitch (docs/pitch.md).
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
    how: str  # fastest | chart | near-chart | finer-for-teeth | coarser-for-rubbing | two-teeth
    # | thin-walls | stalled | given | other
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
    """The variable pitch the solids' physics gives for a solid as wide as the average
    width of cut."""
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
    # the trade's charts for tube, sections and bundles, like MH31's pairs, are in variable
    # pitches: read them there (a thin average width otherwise lands on 24 TPI)
    chart_cands = [c for c in cands if c.pitch.kind == "variable"] or cands
    solid = [
        score(plan, c.pitch, quad=quad, thinnest_mm=w, widest_mm=w, solid=True, set_feed=False)
        for c in chart_cands
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


def _in(group: list[Candidate], among: list[Candidate]) -> list[Candidate]:
    return [c for c in group if any(c is a for a in among)]


def _finest(group: list[Candidate]) -> Candidate:
    return max(group, key=lambda c: (c.pitch.tpi_mean, c.pitch.tpi_fine))


def _nearest(group: list[Candidate], chart: Candidate) -> Candidate:
    """The pitch of ``group`` closest to the chart pitch (variable pitches first)."""
    group = [c for c in group if c.pitch.kind == "variable"] or group
    return min(group, key=lambda c: (round(_steps(c, chart), 9), c.time))


def _walls_pick(plan: Plan, cands: list[Candidate], chart: Candidate) -> Candidate | None:
    """The rule of docs/pitch.md, in its order; None when no pitch keeps two teeth.

    1. Three teeth over the thinnest chord without rubbing over most of the cut, from
       the chart pitch or one step either side: the fastest of those.
    2. Else, one step either side of the chart, the finest variable pitch that keeps at
       least two teeth on average there (one that does not rub over most of the cut
       first), unless all of those rub and a pitch further off keeps three without rubbing.
    3. Else (no pitch within a step keeps two) the variable pitch nearest the chart that
       does, or failing that the nearest that keeps three.
    """
    live = [c for c in cands if not c.stalled]
    window = _in(live, _window(chart, cands))
    clean3 = [c for c in live if not c.too_few and not c.rubs_most]
    near = _in(clean3, window)
    if near:
        return _fastest(near, plan.material.work_hardens)
    two = [c for c in window if c.keeps_two]
    if two:
        clean = [c for c in two if not c.rubs_most]
        if clean or not clean3:
            return _finest(clean or two)
        return _nearest(clean3, chart)
    for group in ([c for c in live if c.keeps_two], [c for c in live if not c.too_few]):
        if group:
            return _nearest([c for c in group if not c.rubs_most] or group, chart)
    return None


def pick_walls(plan: Plan, cands: list[Candidate]) -> Choice:
    """The chart pitch at the average width of cut, or the fastest pitch one step either side
    of it; moved further only as far as the tooth and rubbing rules need."""
    chart_solid = chart_pitch(plan, cands)
    chart = next(c for c in cands if c.pitch.same_teeth(chart_solid.pitch))
    width = plan.section.mean_chord_mm
    live = [c for c in cands if not c.stalled]
    if not live:
        return Choice(_coarsest(cands), "stalled", chart, width)
    chosen = _walls_pick(plan, cands, chart)
    if chosen is None:  # the most teeth there are: stripped teeth cost more than rubbing
        finest = max(live, key=lambda c: (c.pitch.tpi_coarse, c.pitch.tpi_fine))
        return Choice(finest, "thin-walls", chart, width)
    near = any(c is chosen for c in _window(chart, cands))
    if chosen.too_few:
        how = "two-teeth"
    elif chosen.pitch.same_teeth(chart.pitch):
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


def three_teeth_aim(cands: list[Candidate]) -> Candidate | None:
    """The coarsest pitch (variable first) that keeps three teeth over the thinnest chord:
    what a ``two-teeth`` choice gave up, for its explanation."""
    three = [c for c in cands if not c.too_few and not c.stalled]
    three = [c for c in three if c.pitch.kind == "variable"] or three
    return _coarsest(three) if three else None


def two_teeth_floor(plan: Plan, recommended: Choice) -> bool:
    """The tooth floor of this cut is two teeth on average, not three: walls whose pick
    could not keep three within a step of the chart pitch (or at all) and keeps two."""
    chosen = recommended.chosen
    return not single_solid(plan.section) and chosen.too_few and chosen.keeps_two


def meets_floor(cand: Candidate, recommended: Choice, cands: list[Candidate], two: bool) -> bool:
    """Meets this cut's tooth rule: three teeth; where the floor is ``two``, also two on
    average from a pitch no further from the chart pitch than the pick itself."""
    if not cand.too_few:
        return True
    if not (two and cand.keeps_two):
        return False
    chart = recommended.chart
    if chart is None or any(c is cand for c in _window(chart, cands)):
        return True
    return _steps(cand, chart) <= _steps(recommended.chosen, chart) + 1e-9


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
