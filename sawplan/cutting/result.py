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
class BundleVerdict:
    """A bundle against cutting its pieces one at a time, and why."""

    pieces: int
    per_piece_min: float | None  # bundle time ÷ pieces
    single_min: float | None  # one piece cut alone (with its own pitch when recommending)
    single_pitch: str
    ratio: float | None  # per piece bundled ÷ one piece alone
    better: str  # bundle | single | same | neither (stalled)
    why: str


@dataclass(frozen=True)
class OrientationOption:
    """The same cut with the work turned another way in the vise."""

    orientation: str
    words: str  # e.g. "on edge"
    pitch_label: str
    cut_time_min: float | None
    band_speed_m_min: float
    time_ratio: float | None  # this option ÷ the cut as planned
    wear_ratio: float | None  # blade wear per cut (Taylor), this option ÷ the cut as planned


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
    feed_mm_min: float | None  # mean down-feed: height / time (None: will not cut)
    feed_set_mm_min: (
        float | None
    )  # the setting (as given, or constant feed); force-fed: the slowest depth
    cut_time_min: float | None  # after the shop calibration factor; None: will not cut
    cut_time_model_min: float | None  # before it
    calibration_factor: float
    area_mm2: float
    height_mm: float
    max_chord_mm: float
    mean_chord_mm: float
    min_wall_mm: float | None
    thinnest_chord_mm: float  # metal on the blade's line where it is least (solids: widest)
    teeth_in_thinnest: float  # coarse-pitch teeth over that chord (the three-tooth rule)
    teeth_in_widest: float  # mean-pitch teeth in the widest chord
    governing_limit: str  # material | gullet | tooth | power | force | set
    limit_shares: tuple[tuple[str, float], ...]  # share of cut time per limit, largest first
    rubbing_share: float  # share of the metal area cut with the bite under the rubbing floor
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
    cutting_rate_mm2_min: float | None = field(metadata={"json": False})
    stalled: bool = False  # the head force cannot load the teeth: no time
    stall_reason: str | None = None
    pieces: int = 1
    time_per_piece_min: float | None = None
    bundle: BundleVerdict | None = None
    orientations: tuple[OrientationOption, ...] = ()
    better_orientation: str | None = None  # a line naming a better way to lay the work
    band_speed_recommended_m_min: float | None = None  # the model's speed for this cut
    wear_ratio: float | None = None  # blade wear per cut against the recommended speed/feed
    feed_wear_factor: float = 1.0  # the set down-feed's part of it (extended Taylor)
    taylor_n: float | None = None  # Taylor exponent behind wear_ratio
    taylor_source: str | None = None
    feed_given: bool = False

    @property
    def cutting_rate_cm2_min(self) -> float | None:
        if self.cutting_rate_mm2_min is None:
            return None
        return self.cutting_rate_mm2_min / 100.0

    def json_extra(self) -> dict[str, Any]:
        """JSON shows the cutting rate in cm²/min, as shops quote it."""
        return {"cutting_rate_cm2_min": self.cutting_rate_cm2_min}


@dataclass(frozen=True)
class Comparison:
    """The blade on the saw against the recommended one."""

    chosen: CutResult
    recommended: CutResult
    time_ratio: float | None  # chosen time / recommended time (None: one of them will not cut)
    summary: str
    wear_ratio: float | None = None  # blade wear per cut, chosen ÷ recommended (Taylor)
