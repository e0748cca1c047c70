"""Median ranks and Weibull probability-plot points.

Plotting positions use Bernard's approximation of the median rank,
F = (j − 0.3)/(n + 0.4).  With censored blades (still fitted, or removed unworn)
the rank j of each failure is Johnson's adjusted rank: walking through all
blades in order of life, a failure advances the rank by

    (n + 1 − previous rank) / (1 + number of blades from this one on)

so a blade removed early pushes later failures' ranks up by less than one.
On a Weibull plot (x = ln life, y = ln(−ln(1 − F))) a Weibull sample lies on a
straight line of slope β through y = 0 at x = ln η.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from sawplan.errors import BadDataError
from sawplan.life.weibull import WeibullFit


def bernard_median_rank(rank: float, n: int) -> float:
    """Bernard's approximation of the median rank: (rank − 0.3)/(n + 0.4)."""
    if n < 1 or not 0.0 < rank <= n:
        raise BadDataError(f"must be between 1 and n ({n}), got {rank}", field="rank")
    return (rank - 0.3) / (n + 0.4)


def johnson_adjusted_ranks(lives_cm2: Sequence[float], failed: Sequence[bool]) -> list[float]:
    """Johnson's adjusted rank of each failure, in order of increasing life.

    At equal lives failures are ranked before censored blades (a blade removed
    at the same area as a failure was still alive at that area).
    """
    items = _ordered(lives_cm2, failed)
    n = len(items)
    ranks: list[float] = []
    previous = 0.0
    for position, (_, is_fail) in enumerate(items, start=1):
        if is_fail:
            remaining = n - position + 1  # this blade and every longer one
            previous += (n + 1 - previous) / (1 + remaining)
            ranks.append(previous)
    return ranks


@dataclass(frozen=True)
class PlotPoint:
    """One failure on the Weibull plot."""

    life_cm2: float
    adjusted_rank: float
    median_rank: float  # F, fraction failed
    x: float  # ln(life_cm2)
    y: float  # ln(−ln(1 − F))


@dataclass(frozen=True)
class WeibullPlot:
    """Points of the failures and the fitted line (None without a fit)."""

    points: tuple[PlotPoint, ...]
    line: tuple[tuple[float, float], ...] | None  # (x, y) pairs of the fitted line
    n: int


def weibull_plot(
    lives_cm2: Sequence[float],
    failed: Sequence[bool],
    fit: WeibullFit | None = None,
    *,
    line_points: int = 2,
) -> WeibullPlot:
    """Median-rank points of the failures and, with a fit, its straight line.

    The line y = β(x − ln η) spans the plotted lives, widened a little so it
    reaches past the first and last point.
    """
    items = _ordered(lives_cm2, failed)
    n = len(items)
    fail_lives = [x for x, f in items if f]
    ranks = johnson_adjusted_ranks(lives_cm2, failed)
    points = []
    for life, rank in zip(fail_lives, ranks, strict=True):
        f = (rank - 0.3) / (n + 0.4)
        points.append(PlotPoint(life, rank, f, math.log(life), math.log(-math.log1p(-f))))
    line = None
    if fit is not None and fit.fitted:
        span = [x for x, _ in items if x > 0.0] or [fit.scale_cm2]
        x_lo = math.log(min(min(span), fit.b10_life_cm2)) - 0.1
        x_hi = math.log(max(max(span), fit.scale_cm2)) + 0.1
        count = max(line_points, 2)
        xs = [x_lo + (x_hi - x_lo) * i / (count - 1) for i in range(count)]
        line = tuple((x, fit.shape * (x - math.log(fit.scale_cm2))) for x in xs)
    return WeibullPlot(tuple(points), line, n)


def _ordered(lives_cm2: Sequence[float], failed: Sequence[bool]) -> list[tuple[float, bool]]:
    lives = [float(x) for x in lives_cm2]
    flags = [bool(f) for f in failed]
    if len(lives) != len(flags):
        raise BadDataError(
            f"must have one entry per life ({len(lives)}), got {len(flags)}", field="failed"
        )
    for x, f in zip(lives, flags, strict=True):
        if not math.isfinite(x) or x < 0.0 or (f and x == 0.0):
            raise BadDataError(f"must be finite and greater than 0 cm², got {x}", field="lives_cm2")
    # failures before censored blades at the same life
    return sorted(zip(lives, flags, strict=True), key=lambda item: (item[0], not item[1]))
