"""Cutting physics: blade pitch, tooth form and set, band speed, feed, time per cut,
blade mechanics and break-in (docs/pitch.md, docs/feed-and-time.md).

Pure core: the only files read are the packaged tables.
"""

from __future__ import annotations

from sawplan.cutting.breakin import BreakinStep, breakin_schedule
from sawplan.cutting.feed import power_limited_rate_mm2_min
from sawplan.cutting.mechanics import (
    bending_stress_mpa,
    blade_length_mm,
    flex_cycles_per_min,
    gauge_elongation_mm,
    kerf_mm,
    tension_force_n,
    tension_range,
    wheel_ratio_warning,
)
from sawplan.cutting.pitch import Pitch, catalogue, parse_pitch
from sawplan.cutting.plan import check_fits, material_bite_mm
from sawplan.cutting.recommend import compare, cut_time_min, evaluate, recommend
from sawplan.cutting.result import (
    BundleVerdict,
    Comparison,
    CutResult,
    OrientationOption,
    ProfilePoint,
)
from sawplan.cutting.speed import BandSpeed, band_speed, width_factor

__all__ = [
    "BandSpeed",
    "BreakinStep",
    "BundleVerdict",
    "Comparison",
    "CutResult",
    "OrientationOption",
    "Pitch",
    "ProfilePoint",
    "band_speed",
    "bending_stress_mpa",
    "blade_length_mm",
    "breakin_schedule",
    "catalogue",
    "check_fits",
    "compare",
    "cut_time_min",
    "evaluate",
    "flex_cycles_per_min",
    "gauge_elongation_mm",
    "kerf_mm",
    "material_bite_mm",
    "parse_pitch",
    "power_limited_rate_mm2_min",
    "recommend",
    "tension_force_n",
    "tension_range",
    "wheel_ratio_warning",
    "width_factor",
]
