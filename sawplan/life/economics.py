"""Blade cost per area cut, and calibration of predicted cut times.

Cost per area = blade price ÷ area a blade cuts.  With a Weibull fit the area is
the fitted mean life E[L] = η·Γ(1 + 1/β), which counts blades still running
(censored) correctly; without one it is the plain mean of the retired blades'
areas.  The currency is whatever the caller's price is in.

Calibration factor = actual ÷ predicted cut time, per group (saw, material
group, any key the caller gives).  The estimate is the **median of the
per-cut ratios**: shop logs hold the odd cut timed through a jam, a coffee break
or a mistyped minute, and the median ignores a few of those where a mean or a
ratio of sums is pulled far off; it also weighs every cut equally instead of
letting the few longest cuts decide.  The ratio of sums is reported beside it
for comparison, with the quartiles of the ratios as the spread.  A group is only
reported from ``min_count`` (3) cuts on.
"""

from __future__ import annotations

import math
import statistics
from collections.abc import Hashable, Sequence
from dataclasses import dataclass
from typing import Literal

from sawplan.errors import BadDataError
from sawplan.life.weibull import WeibullFit, WeibullNotFitted

MIN_CALIBRATION_CUTS = 3


@dataclass(frozen=True)
class BladeCost:
    """What one blade type costs per area cut."""

    blade_type: str
    price: float
    life_cm2: float  # area one blade cuts, on average
    life_method: Literal["weibull-mean", "observed-mean", "given"]
    blades: int  # blades behind the life figure (0 when given)
    cost_per_cm2: float
    cost_per_m2: float


def blade_cost_per_area(
    blade_type: str,
    price: float,
    *,
    fit: WeibullFit | WeibullNotFitted | None = None,
    lives_cm2: Sequence[float] | None = None,
    life_cm2: float | None = None,
) -> BladeCost:
    """Price ÷ area per blade, from (in order of preference) a given life, a fit, or lives.

    ``lives_cm2`` are the areas cut by retired blades of this type.
    """
    _check(math.isfinite(price) and price >= 0.0, "price", "0 or more", price)
    if life_cm2 is not None:
        _check(math.isfinite(life_cm2) and life_cm2 > 0.0, "life_cm2", "above 0 cm²", life_cm2)
        life, method, blades = float(life_cm2), "given", 0
    elif fit is not None and fit.fitted:
        assert isinstance(fit, WeibullFit)
        life, method, blades = fit.mean_life_cm2, "weibull-mean", fit.n
    elif lives_cm2:
        values = [float(x) for x in lives_cm2]
        for x in values:
            _check(math.isfinite(x) and x >= 0.0, "lives_cm2", "0 or more cm²", x)
        life, method, blades = sum(values) / len(values), "observed-mean", len(values)
        _check(life > 0.0, "lives_cm2", "a total above 0 cm²", life)
    else:
        raise BadDataError("needs a life, a Weibull fit or blade lives", field="blade_type")
    per_cm2 = price / life
    return BladeCost(blade_type, float(price), life, method, blades, per_cm2, per_cm2 * 1.0e4)


def rank_blade_costs(costs: Sequence[BladeCost]) -> tuple[BladeCost, ...]:
    """Blade types from cheapest to dearest per area cut."""
    return tuple(sorted(costs, key=lambda c: (c.cost_per_cm2, c.blade_type)))


@dataclass(frozen=True)
class CalibrationFactor:
    """actual ÷ predicted cut time for one group of cuts."""

    key: Hashable
    n: int
    factor: float  # median of the per-cut ratios
    low: float  # lower quartile of the ratios
    high: float  # upper quartile of the ratios
    ratio_of_sums: float  # Σ actual ÷ Σ predicted, for comparison


@dataclass(frozen=True)
class PendingCalibration:
    """A group with too few cuts to report yet."""

    key: Hashable
    n: int
    needed: int


@dataclass(frozen=True)
class CalibrationSummary:
    """Factors for the groups with enough cuts; the others listed as pending."""

    factors: tuple[CalibrationFactor, ...]
    pending: tuple[PendingCalibration, ...]
    min_count: int
    method: str = "median-of-ratios"


def calibration_factors(
    actual_min: Sequence[float],
    predicted_min: Sequence[float],
    keys: Sequence[Hashable] | None = None,
    *,
    min_count: int = MIN_CALIBRATION_CUTS,
) -> CalibrationSummary:
    """Calibration factor per key (None keys = one group), groups in order of first cut."""
    actual = [float(a) for a in actual_min]
    predicted = [float(p) for p in predicted_min]
    groups_of = list(keys) if keys is not None else [None] * len(actual)
    if len(predicted) != len(actual):
        raise BadDataError(
            f"must have one entry per actual time ({len(actual)}), got {len(predicted)}",
            field="predicted_min",
        )
    if len(groups_of) != len(actual):
        raise BadDataError(
            f"must have one entry per actual time ({len(actual)}), got {len(groups_of)}",
            field="keys",
        )
    _check(min_count >= 1, "min_count", "at least 1", min_count)
    ratios: dict[Hashable, list[tuple[float, float]]] = {}
    for a, p, k in zip(actual, predicted, groups_of, strict=True):
        _check(math.isfinite(a) and a > 0.0, "actual_min", "above 0 min", a)
        _check(math.isfinite(p) and p > 0.0, "predicted_min", "above 0 min", p)
        ratios.setdefault(k, []).append((a, p))
    factors, pending = [], []
    for key, pairs in ratios.items():
        if len(pairs) < min_count:
            pending.append(PendingCalibration(key, len(pairs), min_count))
            continue
        r = [a / p for a, p in pairs]
        if len(r) >= 2:
            low, _, high = statistics.quantiles(r, n=4, method="inclusive")
        else:
            low = high = r[0]
        factors.append(
            CalibrationFactor(
                key=key,
                n=len(r),
                factor=statistics.median(r),
                low=low,
                high=high,
                ratio_of_sums=sum(a for a, _ in pairs) / sum(p for _, p in pairs),
            )
        )
    return CalibrationSummary(tuple(factors), tuple(pending), min_count)


def _check(ok: bool, field: str, expected: str, got: object) -> None:
    if not ok:
        raise BadDataError(f"must be {expected}, got {got}", field=field)
