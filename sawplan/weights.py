"""Weight of bars and blanks, and how to lift them.

Mass per length is exact: metal area of the section × density.  The handling
class comes from the revised NIOSH lifting equation applied to what the piece
is: its shape and length (``sawplan.piece_handling``).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from sawplan.errors import BadDataError
from sawplan.handling import Handling, LiftConditions
from sawplan.piece_handling import Piece, assess_piece


@dataclass(frozen=True)
class WeighResult:
    material: str
    designation: str
    section: str
    area_mm2: float
    density_kg_m3: float
    mass_per_length_kg_m: float
    length_mm: float
    count: int
    weight_kg: float
    lot_weight_kg: float
    handling: str
    lifting_index: float
    recommended_limit_kg: float
    reach_cm: float  # the hands' reach H the limit is for (given, or from the piece's size)
    advice: str
    cautions: tuple[str, ...]  # by what the piece is: it rolls or tips, it is long, its ends cut
    caution: str
    lift: Handling = field(metadata={"json": False}, repr=False)
    section_shape: object = field(default=None, metadata={"json": False}, repr=False)


def mass_per_length_kg_m(area_mm2: float, density_kg_m3: float) -> float:
    """kg/m = area [mm²] × 1e-6 [m²/mm²] × density [kg/m³]."""
    return area_mm2 * 1e-6 * density_kg_m3


def weigh(
    material,
    section,
    length_mm: float,
    count: int = 1,
    conditions: LiftConditions | None = None,
    *,
    reach_given: bool = False,
) -> WeighResult:
    """Weigh ``count`` pieces of ``section`` in ``material``, each ``length_mm`` long.

    Without ``reach_given`` the hands' reach comes from the piece's size.
    """
    if not length_mm > 0:
        raise BadDataError(f"must be a positive length, got {length_mm:g} mm", field="length")
    if length_mm > 100_000:
        raise BadDataError(f"must be at most 100 m, got {length_mm / 1000:g} m", field="length")
    if count < 1:
        raise BadDataError(f"must be at least 1, got {count}", field="count")
    per_m = mass_per_length_kg_m(section.area_mm2, material.density_kg_m3)
    one = per_m * length_mm / 1000.0
    piece = Piece(section.shape, length_mm, section.width_mm)
    lift = assess_piece(one, piece, conditions, reach_given=reach_given)
    return WeighResult(
        material=material.key,
        designation=material.designation,
        section=section.label(),
        area_mm2=section.area_mm2,
        density_kg_m3=material.density_kg_m3,
        mass_per_length_kg_m=per_m,
        length_mm=length_mm,
        count=count,
        weight_kg=one,
        lot_weight_kg=one * count,
        handling=lift.handling,
        lifting_index=lift.lifting_index,
        recommended_limit_kg=lift.rwl_kg,
        reach_cm=lift.horizontal_cm,
        advice=lift.advice,
        cautions=lift.cautions,
        caution=lift.caution,
        lift=lift,
        section_shape=section,
    )
