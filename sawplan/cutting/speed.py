"""Band speed: the material's handbook speed corrected for width of cut,
blade material and coolant, then held inside the saw's speed range (MH31
band-saw table and footnotes; docs/feed-and-time.md).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sawplan.cutting import constants as K
from sawplan.errors import BadDataError, UsageError

MM_PER_IN = 25.4

BLADE_MATERIALS = {
    "carbon": "blade_carbon",
    "carbon-steel": "blade_carbon",
    "bi-metal": "blade_bimetal",
    "bimetal": "blade_bimetal",
    "carbide": "blade_carbide",
    "carbide-tipped": "blade_carbide",
}


@dataclass(frozen=True)
class BandSpeed:
    """The chosen band speed and how it was reached (factors multiply the base)."""

    band_speed_m_min: float
    base_m_min: float
    width_factor: float
    blade_factor: float
    coolant_factor: float
    width_of_cut_mm: float
    clipped: str | None  # "min" | "max" when the saw's range held the speed, else None
    given: bool = False
    recommended_m_min: float = 0.0  # what sawplan would run on this saw (clipped to its range)

    @property
    def off_ratio(self) -> float:
        """Given speed ÷ recommended speed (1 when the speed was not given)."""
        return self.band_speed_m_min / self.recommended_m_min if self.recommended_m_min else 1.0

    def outside_band(self) -> str | None:
        """ "above" or "below" when a given speed is off the recommendation by more than the
        band a speed chart is read to (``speed.recommended_band_percent``)."""
        if not self.given:
            return None
        band = K.number("speed", "recommended_band_percent") / 100.0
        if self.off_ratio > 1.0 + band:
            return "above"
        if self.off_ratio < 1.0 - band:
            return "below"
        return None


def width_factor(width_mm: float) -> float:
    """MH31 footnote correction for width of cut, interpolated on log width.

    Below ¼ in the ¼ in value holds; beyond 8 in the speed keeps falling by a
    fixed share per doubling (common practice).
    """
    points = [float(x) for x in K.value("speed", "width_points_in")]
    percent = [float(x) for x in K.value("speed", "width_percent")]
    width_in = max(width_mm, 1e-9) / MM_PER_IN
    if width_in <= points[0]:
        return 1 + percent[0] / 100
    if width_in >= points[-1]:
        per_doubling = 1 + K.number("speed", "beyond_8in_percent_per_doubling") / 100
        return (1 + percent[-1] / 100) * per_doubling ** math.log2(width_in / points[-1])
    for i in range(len(points) - 1):
        x0, x1 = points[i], points[i + 1]
        if x0 <= width_in <= x1:
            share = math.log(width_in / x0) / math.log(x1 / x0)
            return 1 + (percent[i] + share * (percent[i + 1] - percent[i])) / 100
    raise AssertionError("unreachable: width points must be sorted")


def blade_factor(blade_material: str) -> float:
    key = BLADE_MATERIALS.get(blade_material.strip().lower())
    if key is None:
        raise UsageError(
            f"unknown blade material {blade_material!r}",
            field="blade-material",
            hint="one of carbon, bi-metal, carbide",
        )
    return K.number("speed", key)


def band_speed(
    base_m_min: float,
    width_of_cut_mm: float,
    *,
    speed_min_m_min: float,
    speed_max_m_min: float,
    dry: bool = False,
    blade_material: str = "bi-metal",
    given_m_min: float | None = None,
) -> BandSpeed:
    """Band speed for a cut; ``given_m_min`` is a speed the operator chose.

    A chosen speed outside the saw's range is an error (the saw cannot run it);
    a computed one is clipped to the range and the result says so.
    """
    w = width_factor(width_of_cut_mm)
    b = blade_factor(blade_material)
    c = K.number("speed", "dry_factor") if dry else 1.0
    speed = base_m_min * w * b * c
    clipped = None
    if speed > speed_max_m_min:
        speed, clipped = speed_max_m_min, "max"
    elif speed < speed_min_m_min:
        speed, clipped = speed_min_m_min, "min"
    if given_m_min is not None:
        if not (math.isfinite(given_m_min) and speed_min_m_min <= given_m_min <= speed_max_m_min):
            ft = 1000.0 / 304.8
            raise BadDataError(
                f"the saw runs {speed_min_m_min:g}-{speed_max_m_min:g} m/min "
                f"({speed_min_m_min * ft:.0f}-{speed_max_m_min * ft:.0f} ft/min), "
                f"got {given_m_min:.3g} m/min ({given_m_min * ft:.3g} ft/min)",
                field="band-speed",
                hint=f"sawplan recommends {speed:.0f} m/min for this cut",
            )
        return BandSpeed(
            given_m_min, base_m_min, w, b, c, width_of_cut_mm, None, given=True,
            recommended_m_min=speed,
        )  # fmt: skip
    return BandSpeed(speed, base_m_min, w, b, c, width_of_cut_mm, clipped, recommended_m_min=speed)
