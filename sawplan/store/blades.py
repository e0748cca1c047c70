"""One blade's history from the log: fittings, cuts, events, and its wear curve."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from sawplan.display import Q, say
from sawplan.store.records import Blade, cuts_of, events_of, fittings_of, get_blade

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import WearCurve
    from sawplan.life.end_of_life import EndOfLife
    from sawplan.store.db import Log as Database

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
    end: EndOfLife | None = None  # how a retired blade's life ended, against its type's


def blade_history(db: Database, tag: str) -> BladeHistory:
    """Everything the log holds about one blade, and what its cut times say about wear."""
    from sawplan.life import wear_curve
    from sawplan.store.life_ends import end_of

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
    fittings = tuple(fittings_of(db, blade.id))
    end = end_of(db, blade)
    return BladeHistory(
        blade=blade,
        fittings=fittings,
        cuts=cuts,
        events=tuple(events_of(db, blade.id)),
        wear=wear,
        wear_summary=wear_summary(wear, blade, cuts, fittings, end),
        wear_notes=tuple(notes),
        cost_per_m2=cost,
        end=end,
    )


def wear_summary(
    wear: WearCurve | None,
    blade: Blade | None = None,
    cuts: Sequence[dict[str, Any]] = (),
    fittings: Sequence[dict[str, Any]] = (),
    end: EndOfLife | None = None,
) -> str:
    """One line on where the blade is on its wear curve.

    A retired or removed blade is off the saw, so the line tells the life it had
    instead (see ``life_summary``).
    """
    if blade is not None and blade.status in ("retired", "removed"):
        return life_summary(blade, wear, cuts, fittings, end)
    if wear is None:
        return "no timed cuts yet (log cuts with --time to follow the wear)"
    if wear.status == "break-in" and wear.total_area_cm2 < wear.break_in_cm2:
        return say(
            "breaking in: {} of {} cut (reduced feed, common practice)",
            Q("area", wear.total_area_cm2 * 100.0, bare=True),
            _area(wear.break_in_cm2),
        )
    if wear.status in ("break-in", "too-few-cuts"):
        return "past break-in, too few timed cuts yet to set a steady rate"
    rise = wear.latest_rise or 0.0
    steady = say("steady rate {}", Q("rate", wear.steady_rate_cm2_min * 100.0))
    if wear.status == "end-of-life-signs":
        return say(
            "END-OF-LIFE SIGNS: the latest cuts are {} slower than the {}, since {} "
            "(signs from +{}, common practice); check the teeth and chips",
            f"{rise:.0%}",
            steady,
            _area(wear.end_of_life_from_cm2),
            f"{wear.rise_threshold:.0%}",
        )
    return say(
        "{}; the latest cuts are {} against it (end-of-life signs from +{}, common practice)",
        steady,
        f"{rise:+.0%}",
        f"{wear.rise_threshold:.0%}",
    )


def life_summary(
    blade: Blade,
    wear: WearCurve | None,
    cuts: Sequence[dict[str, Any]] = (),
    fittings: Sequence[dict[str, Any]] = (),
    end: EndOfLife | None = None,
) -> str:
    """One line on the life of a blade that is off the saw: retired (worn out or a failure,
    as ``end`` judged it) or removed unworn (a right-censored life).

    A retired blade whose last cut began inside the break-in area (the first 650 cm²,
    common practice) failed during break-in; when its fittings record no
    break-in and skipping it is a usual cause of its failure mode, the line says so.
    """
    from sawplan.life import failure_modes
    from sawplan.life.wear import BREAK_IN_CM2

    area_cm2 = blade.area_mm2 / 100.0
    break_in_cm2 = wear.break_in_cm2 if wear is not None else BREAK_IN_CM2
    if blade.status == "removed":
        line = say(
            "removed unworn after {} cut: counts as a life of at least that (censored) "
            "until it is refitted and retired",
            _area(area_cm2),
        )
        if wear is not None and wear.status == "end-of-life-signs":
            line = say(
                "{}; its last cuts showed end-of-life signs, check the teeth before refitting",
                line,
            )
        return line
    mode = failure_modes().get(end.counted_as if end is not None else blade.retire_cause or "")
    cause = mode.name if mode is not None else (blade.retire_cause or "no cause recorded")
    if area_cm2 <= 0:
        return f"retired before cutting anything ({cause})"
    line = say("retired after {} ({})", _area(area_cm2), cause)
    early = _failed_in_break_in(cuts, area_cm2, break_in_cm2)
    if early:
        line = say(
            "{}: failed during break-in (the first {}, common practice)",
            line,
            _area(break_in_cm2),
        )
    elif wear is not None and wear.status == "end-of-life-signs":
        line = say(
            "{}, with end-of-life signs from {}", line, _area(wear.end_of_life_from_cm2 or 0.0)
        )
    elif wear is not None and wear.status == "steady":
        line = say(
            "{}, past break-in; its last cuts ran {} against its steady rate of {}",
            line,
            f"{wear.latest_rise or 0.0:+.0%}",
            Q("rate", wear.steady_rate_cm2_min * 100.0),
        )
    else:
        line = say("{}, past break-in", line)
    skipped = _break_in(fittings)
    if (
        skipped is not True
        and mode is not None
        and mode.is_failure
        and any("broken in" in c for c in mode.causes)
    ):
        how = "fitted without break-in" if skipped is False else "no break-in recorded"
        line = say("{}; {}, one of the usual causes of {} (common practice)", line, how, mode.name)
    return line


def _failed_in_break_in(
    cuts: Sequence[dict[str, Any]], area_cm2: float, break_in_cm2: float
) -> bool:
    """Did the last cut begin inside the break-in area?  (A batch counts as equal cuts.)"""
    if not cuts:
        return area_cm2 <= break_in_cm2
    last = cuts[-1]
    one_cut_cm2 = last["area_mm2"] / max(int(last["count"] or 1), 1) / 100.0
    return area_cm2 - one_cut_cm2 < break_in_cm2


def _break_in(fittings: Sequence[dict[str, Any]]) -> bool | None:
    """True when a fitting records a break-in, False when every fitting records none,
    None when it was not recorded."""
    marks = [f.get("break_in") for f in fittings]
    if any(m == 1 for m in marks):
        return True
    if marks and all(m == 0 for m in marks):
        return False
    return None


def _area(cm2: float) -> Q:
    """An area given in cm², as a quantity that follows ``--units``."""
    return Q("area", cm2 * 100.0)
