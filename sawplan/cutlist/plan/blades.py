"""Blades for a plan: each material group's blade life, and the blades to have on hand.

Area cut ÷ blade life gives the blades worn out; the blades to have on hand
come from the life forecast at the plan's confidence (90 % by default).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from sawplan.cutlist.plan.types import SectionPlan
from sawplan.display import Q, say

LifeLookup = Callable[[str], Any]  # material group -> Weibull fit or None


def blade_life(
    group: str, life_for: LifeLookup | None
) -> tuple[tuple[float, str, Any], str | None]:
    """((life cm², where it comes from, Weibull fit or None), the log's note) for a group.

    ``life_for`` may return a Weibull fit, or the blade log's answer with
    ``.fit`` and ``.note``; without a usable fit the documented default life of
    the group is used (``sawplan.store.default_life``: typical lives recalled
    from memory).
    """
    from sawplan.store.reports import default_life

    found = life_for(group) if life_for is not None else None
    fit = getattr(found, "fit", found)
    note = getattr(found, "note", None)
    warning = getattr(found, "warning", None)  # an early-failing lot behind the fit
    if note is not None and warning:
        note = say("{}; WARNING {}", note, warning)
    if fit is not None and getattr(fit, "fitted", False):
        chosen = getattr(found, "choice", "all blades")
        which = f"{fit.n} blades" + ("" if chosen == "all blades" else f", {chosen}")
        return (float(fit.mean_life_cm2), f"blade log Weibull fit ({which})", fit), note
    default = default_life(group)
    source = say("default {} — {}", Q("area", default.life_cm2 * 100), default.source)
    return (default.life_cm2, source, None), note


def blades_on_hand(
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
            "(typical lives from memory — calibrate by logging blades)"
        )
    if len(wear) > 1:
        note += f"; groups put on the {ref} scale by mean life"
    return int(forecast.blades_needed), str(forecast.method), note
