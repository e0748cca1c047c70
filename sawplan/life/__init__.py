"""Blade-life statistics: pure computations on plain lists, life counted as area cut (cm²).

- ``weibull``: censored 2-parameter Weibull fit (maximum likelihood, LR bounds).
- ``ranks``: Bernard median ranks, Johnson adjusted ranks, Weibull-plot points.
- ``failure_modes``: failure-mode table, ranking, early-failure warning.
- ``forecast``: blades needed for an area at a confidence.
- ``wear``: one blade's wear curve, break-in region, end-of-life signs.
- ``economics``: cost per area cut, calibration of predicted cut times.

Nothing here imports numpy or scipy at module level.
"""

from __future__ import annotations

from sawplan.life.economics import (
    BladeCost,
    CalibrationFactor,
    CalibrationSummary,
    PendingCalibration,
    blade_cost_per_area,
    calibration_factors,
    rank_blade_costs,
)
from sawplan.life.failure_modes import (
    EarlyFailureWarning,
    FailureMode,
    ModeCount,
    ModeRanking,
    early_failure_warning,
    failure_mode,
    failure_modes,
    rank_failure_modes,
)
from sawplan.life.forecast import Forecast, deterministic_count, forecast_blades
from sawplan.life.ranks import (
    PlotPoint,
    WeibullPlot,
    bernard_median_rank,
    johnson_adjusted_ranks,
    weibull_plot,
)
from sawplan.life.wear import WearCurve, WearPoint, wear_curve
from sawplan.life.weibull import WeibullFit, WeibullNotFitted, fit_weibull

__all__ = [
    "BladeCost",
    "CalibrationFactor",
    "CalibrationSummary",
    "EarlyFailureWarning",
    "FailureMode",
    "Forecast",
    "ModeCount",
    "ModeRanking",
    "PendingCalibration",
    "PlotPoint",
    "WearCurve",
    "WearPoint",
    "WeibullFit",
    "WeibullNotFitted",
    "WeibullPlot",
    "bernard_median_rank",
    "blade_cost_per_area",
    "calibration_factors",
    "deterministic_count",
    "early_failure_warning",
    "failure_mode",
    "failure_modes",
    "fit_weibull",
    "forecast_blades",
    "johnson_adjusted_ranks",
    "rank_blade_costs",
    "rank_failure_modes",
    "wear_curve",
    "weibull_plot",
]
