"""The cutting model for the blade a saw carries: its pitch and material, not a chosen one.

``sawplan log cut`` keeps the model's time beside the measured one (the
calibration compares them); the station shows the settings for the next cut.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.cutting.result import CutResult
    from sawplan.saws import Saw


def cut_with_blade(
    material,
    section,
    saw: Saw,
    tpi_coarse: float,
    tpi_fine: float,
    blade_material: str,
    *,
    dry: bool = False,
    speed_m_min: float | None = None,
    calibration: float = 1.0,
) -> tuple[CutResult | None, str | None]:
    """(the cut, None), or (None, why) when the model refuses it or the saw stalls."""
    from sawplan.cutting import evaluate
    from sawplan.cutting.pitch import Pitch
    from sawplan.errors import SawplanError

    try:
        result = evaluate(
            material,
            section,
            saw,
            Pitch.of(tpi_coarse, tpi_fine),
            dry=dry,
            band_speed_m_min=speed_m_min,
            blade_material=blade_material,
            calibration=calibration,
        )
    except SawplanError as err:
        return None, err.one_line()
    if result.stalled:
        return None, result.stall_reason
    return result, None
