"""Result records of the cutting model (frozen, JSON-ready: units in the field names)."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from sawplan.cutting.breakin import BreakinStep

CAUTION = (
    "Estimates only. Clamp the work before the blade enters, keep guards in place, no gloves "
    "near a moving blade; the saw maker's manual, the blade maker's data and shop rules govern."
)


@dataclass(frozen=True)
class ProfilePoint:
    """One depth of the cut, for a chart of feed against depth."""

    y_mm: float
    chord_mm: float
    allowed_feed_mm_min: float  # what the limits allow at this depth
    feed_mm_min: float  # what the saw runs (constant down-feed: the set value)
    bite_um: float
    limit: str


@dataclass(frozen=True)
class CutResult:
    """A planned cut: blade, speed, feed, time and why."""

    material: str
    designation: str
    section: str
    saw: str
    feed_type: str  # constant | gravity | hydraulic
    chosen_by: str  # recommended | given
    pitch_label: str
    tpi_coarse: float
    tpi_fine: float
    tooth_form: str  # regular | hook | skip
    tooth_set: str  # raker | wavy | alternate
    blade_material: str
    dry: bool
    band_speed_m_min: float
    band_speed_clipped: str | None  # "max" | "min" when the saw's range held the speed
    feed_mm_min: float  # mean down-feed: height / time
    feed_set_mm_min: float  # constant feed: the setting; force-fed: the slowest depth
    cut_time_min: float  # after the shop calibration factor
    cut_time_model_min: float  # before it
    calibration_factor: float
    area_mm2: float
    height_mm: float
    max_chord_mm: float
    mean_chord_mm: float
    min_wall_mm: float | None
    teeth_in_thinnest: float  # coarse-pitch teeth in the thinnest wall (solids: widest chord)
    teeth_in_widest: float  # mean-pitch teeth in the widest chord
    governing_limit: str  # material | gullet | tooth | power | force
    limit_shares: tuple[tuple[str, float], ...]  # share of cut time per limit, largest first
    rubbing_share: float  # share of cut time with the bite under the rubbing floor
    bite_um: float  # mean tooth bite, time-weighted
    rubbing_floor_um: float
    kerf_mm: float
    bending_stress_mpa: float
    flex_cycles_per_min: float  # bends per minute of any point of the band (fatigue bookkeeping)
    warnings: tuple[str, ...]
    explanation: tuple[str, ...]
    profile: tuple[ProfilePoint, ...]
    breakin: tuple[BreakinStep, ...]
    caution: str
    cutting_rate_mm2_min: float = field(metadata={"json": False})

    @property
    def cutting_rate_cm2_min(self) -> float:
        return self.cutting_rate_mm2_min / 100.0

    def json_extra(self) -> dict[str, Any]:
        """JSON shows the cutting rate in cm²/min, as shops quote it."""
        return {"cutting_rate_cm2_min": self.cutting_rate_cm2_min}


@dataclass(frozen=True)
class Comparison:
    """The blade on the saw against the recommended one."""

    chosen: CutResult
    recommended: CutResult
    time_ratio: float  # chosen time / recommended time
    summary: str
