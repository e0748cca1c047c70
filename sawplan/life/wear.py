"""Wear curve of one blade: cutting rate against cumulative area cut.

A blade's life has three parts (Jia et al. 2024, Crystals 14:898): break-in and
fast initial chipping, a long steady stretch of abrasive wear, then a rapid
decline.  Here each logged cut (or batch) gives a time per unit area; the
first ≈ 300–650 cm² are the break-in region (reduced feed, common
practice) and are left out of the steady value; a trailing median smooths out
one-off slow cuts.  End-of-life signs are flagged when the smoothed
time per unit area has risen by ``rise_threshold`` (30–50 %, common practice)
over the steady value and stays there to the latest cut.

Compare like with like: time per area differs between materials and sections,
so feed this one blade's cuts on similar work (or group them first).
"""

from __future__ import annotations

import math
import statistics
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from sawplan.errors import BadDataError

BREAK_IN_CM2 = 650.0  # upper end of 300–650 cm² (common practice)
RISE_THRESHOLD = 0.30  # 30–50 % slower than steady = end-of-life sign (common practice)


@dataclass(frozen=True)
class WearPoint:
    """One logged cut (or batch) on the wear curve."""

    index: int
    area_cm2: float
    cumulative_area_cm2: float  # at the end of this cut
    time_min: float
    rate_cm2_min: float
    min_per_cm2: float
    trend_min_per_cm2: float  # trailing median
    in_break_in: bool
    rise: float | None  # trend relative to steady, e.g. 0.35 = 35 % slower


@dataclass(frozen=True)
class WearCurve:
    """The curve, its steady value and the verdict on the latest cuts."""

    points: tuple[WearPoint, ...]
    break_in_cm2: float
    steady_min_per_cm2: float | None
    steady_rate_cm2_min: float | None
    latest_rise: float | None
    rise_threshold: float
    status: Literal["break-in", "steady", "end-of-life-signs", "too-few-cuts"]
    end_of_life_from_cm2: float | None  # cumulative area where the sustained rise began
    total_area_cm2: float
    caution: str


CAUTION = (
    "A slower, louder or drifting cut and blue or powdery chips are other signs of a worn "
    "blade; change blades with the saw stopped and isolated, per the saw maker's manual."
)


def wear_curve(
    areas_cm2: Sequence[float],
    times_min: Sequence[float] | None = None,
    *,
    rates_cm2_min: Sequence[float] | None = None,
    break_in_cm2: float = BREAK_IN_CM2,
    rise_threshold: float = RISE_THRESHOLD,
    window: int = 5,
    min_steady_points: int = 3,
) -> WearCurve:
    """Build the wear curve from one blade's cuts, in the order they were made.

    Give either ``times_min`` (cut time of each entry) or ``rates_cm2_min``.
    The steady value is the median time per unit area of the first third (at
    least ``min_steady_points``) of the cuts after break-in.
    """
    areas = [float(a) for a in areas_cm2]
    times = _times(areas, times_min, rates_cm2_min)
    _check(break_in_cm2 >= 0.0, "break_in_cm2", "0 or more", break_in_cm2)
    _check(rise_threshold > 0.0, "rise_threshold", "above 0", rise_threshold)
    _check(window >= 1, "window", "at least 1", window)
    _check(min_steady_points >= 1, "min_steady_points", "at least 1", min_steady_points)

    per_area = [t / a for a, t in zip(areas, times, strict=True)]
    cumulative: list[float] = []
    running = 0.0
    for a in areas:
        running += a
        cumulative.append(running)
    # a cut belongs to break-in when it started before the break-in area was reached
    in_break = [(c - a) < break_in_cm2 for a, c in zip(areas, cumulative, strict=True)]
    steady_idx = [i for i, b in enumerate(in_break) if not b]
    trend = _trailing_median(per_area, in_break, window)

    steady = None
    if len(steady_idx) >= min_steady_points:
        head = max(min_steady_points, len(steady_idx) // 3)
        steady = statistics.median(per_area[i] for i in steady_idx[:head])
    rises = [
        None if steady is None or in_break[i] else trend[i] / steady - 1.0
        for i in range(len(areas))
    ]
    latest = rises[-1] if rises else None
    eol_from = None
    if latest is not None and latest >= rise_threshold:
        i = len(rises) - 1
        while i - 1 >= 0 and rises[i - 1] is not None and rises[i - 1] >= rise_threshold:
            i -= 1
        eol_from = cumulative[i] - areas[i]
        status = "end-of-life-signs"
    elif steady is not None:
        status = "steady"
    elif not areas or in_break[-1]:
        status = "break-in"
    else:
        status = "too-few-cuts"

    points = tuple(
        WearPoint(
            index=i,
            area_cm2=areas[i],
            cumulative_area_cm2=cumulative[i],
            time_min=times[i],
            rate_cm2_min=areas[i] / times[i],
            min_per_cm2=per_area[i],
            trend_min_per_cm2=trend[i],
            in_break_in=in_break[i],
            rise=rises[i],
        )
        for i in range(len(areas))
    )
    return WearCurve(
        points=points,
        break_in_cm2=break_in_cm2,
        steady_min_per_cm2=steady,
        steady_rate_cm2_min=None if steady is None else 1.0 / steady,
        latest_rise=latest,
        rise_threshold=rise_threshold,
        status=status,
        end_of_life_from_cm2=eol_from,
        total_area_cm2=cumulative[-1] if cumulative else 0.0,
        caution=CAUTION,
    )


def _trailing_median(values: list[float], in_break: list[bool], window: int) -> list[float]:
    """Median of the last ``window`` values, not mixing break-in with later cuts."""
    out = []
    for i, b in enumerate(in_break):
        lo = max(0, i - window + 1)
        chunk = [values[j] for j in range(lo, i + 1) if in_break[j] == b]
        out.append(statistics.median(chunk))
    return out


def _times(
    areas: list[float],
    times_min: Sequence[float] | None,
    rates_cm2_min: Sequence[float] | None,
) -> list[float]:
    if (times_min is None) == (rates_cm2_min is None):
        raise BadDataError("give exactly one of cut times or cutting rates", field="times_min")
    for a in areas:
        _check(math.isfinite(a) and a > 0.0, "areas_cm2", "above 0 cm²", a)
    given = times_min if times_min is not None else rates_cm2_min
    field = "times_min" if times_min is not None else "rates_cm2_min"
    values = [float(v) for v in given]  # type: ignore[union-attr]
    if len(values) != len(areas):
        raise BadDataError(
            f"must have one entry per area ({len(areas)}), got {len(values)}", field=field
        )
    for v in values:
        _check(math.isfinite(v) and v > 0.0, field, "above 0", v)
    if times_min is not None:
        return values
    return [a / r for a, r in zip(areas, values, strict=True)]


def _check(ok: bool, field: str, expected: str, got: object) -> None:
    if not ok:
        raise BadDataError(f"must be {expected}, got {got}", field=field)
