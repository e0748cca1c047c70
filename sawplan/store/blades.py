"""One blade's history from the log: fittings, cuts, events, and its wear curve."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from sawplan.store.records import Blade, cuts_of, events_of, fittings_of, get_blade

if TYPE_CHECKING:  # pragma: no cover
    from sqlite_utils import Database

    from sawplan.life import WearCurve

SHOWN_CUTS = 20  # the table shows the latest entries; JSON and CSV carry all


@dataclass(frozen=True)
class BladeHistory:
    blade: Blade
    fittings: tuple[dict[str, Any], ...]
    cuts: tuple[dict[str, Any], ...]
    events: tuple[dict[str, Any], ...]
    wear: WearCurve | None
    wear_summary: str
    wear_notes: tuple[str, ...]
    cost_per_m2: float | None  # price ÷ area cut so far
    shown_cuts: int = field(default=SHOWN_CUTS, metadata={"json": False})


def blade_history(db: Database, tag: str) -> BladeHistory:
    """Everything the log holds about one blade, and what its cut times say about wear."""
    from sawplan.life import wear_curve

    blade = get_blade(db, tag)
    cuts = tuple(cuts_of(db, blade.id))
    timed = [c for c in cuts if c["time_min"] and c["time_min"] > 0]
    notes = []
    wear = None
    if timed:
        wear = wear_curve([c["area_mm2"] / 100.0 for c in timed], [c["time_min"] for c in timed])
        if len(timed) < len(cuts):
            notes.append(
                f"{len(cuts) - len(timed)} cut entries without a time are left out of the curve "
                "(their area still counts toward the blade's life)"
            )
        kinds = {(c["material_group"], c["section"]) for c in timed}
        if len(kinds) > 1:
            notes.append(
                f"the timed cuts span {len(kinds)} material/section combinations; "
                "rates compare best on like work"
            )
    cost = None
    if blade.price is not None and blade.area_mm2 > 0:
        cost = blade.price / (blade.area_mm2 / 1.0e6)
    return BladeHistory(
        blade=blade,
        fittings=tuple(fittings_of(db, blade.id)),
        cuts=cuts,
        events=tuple(events_of(db, blade.id)),
        wear=wear,
        wear_summary=wear_summary(wear),
        wear_notes=tuple(notes),
        cost_per_m2=cost,
    )


def wear_summary(wear: WearCurve | None) -> str:
    """One line on where the blade is on its wear curve."""
    if wear is None:
        return "no timed cuts yet (log cuts with --time to follow the wear)"
    if wear.status == "break-in":
        return (
            f"breaking in: {wear.total_area_cm2:,.0f} of {wear.break_in_cm2:,.0f} cm² cut "
            "(reduced feed, common practice)"
        )
    if wear.status == "too-few-cuts":
        return "past break-in, too few timed cuts yet to set a steady rate"
    rise = wear.latest_rise or 0.0
    steady = f"steady rate {wear.steady_rate_cm2_min:.3g} cm²/min"
    if wear.status == "end-of-life-signs":
        return (
            f"END-OF-LIFE SIGNS: the latest cuts are {rise:.0%} slower than the {steady}, "
            f"since {wear.end_of_life_from_cm2:,.0f} cm² (signs from +{wear.rise_threshold:.0%}, "
            "common practice); check the teeth and chips"
        )
    return (
        f"{steady}; the latest cuts are {rise:+.0%} against it "
        f"(end-of-life signs from +{wear.rise_threshold:.0%}, common practice)"
    )
