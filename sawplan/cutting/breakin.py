"""Break-in of a new blade (common practice).

A new blade runs at normal band speed with a reduced feed — about half (three
quarters on hard alloys) — raised step by step over the first few hundred cm²
of cut.  Skipping this chips the freshly honed tips.
"""

from __future__ import annotations

from dataclasses import dataclass

from sawplan.cutting import constants as K
from sawplan.errors import BadDataError

BREAKIN_CAUTION = (
    "Break-in steps are common shop practice; the blade maker's break-in data and "
    "the saw maker's manual govern."
)


@dataclass(frozen=True)
class BreakinStep:
    area_from_mm2: float
    area_to_mm2: float
    feed_percent: float  # of the normal down-feed (force-fed saws: of the normal feed force)
    feed_mm_min: float
    cuts: float  # how many cuts of this section the step lasts


def is_hard(group: str) -> bool:
    return group in K.value("breakin", "hard_groups")


def breakin_schedule(
    feed_mm_min: float, section_area_mm2: float, group: str
) -> tuple[BreakinStep, ...]:
    """Equal area steps from the starting feed share up towards full feed."""
    if feed_mm_min <= 0 or section_area_mm2 <= 0:
        raise BadDataError("break-in needs a positive feed and section area", field="breakin")
    total = K.number("breakin", "area_mm2")
    steps = int(K.value("breakin", "steps"))
    start = K.number("breakin", "start_percent_hard" if is_hard(group) else "start_percent")
    size = total / steps
    out = []
    for i in range(steps):
        percent = start + (100.0 - start) * i / steps
        out.append(
            BreakinStep(
                area_from_mm2=i * size,
                area_to_mm2=(i + 1) * size,
                feed_percent=round(percent, 1),
                feed_mm_min=feed_mm_min * percent / 100.0,
                cuts=size / section_area_mm2,
            )
        )
    return tuple(out)
