"""Blade mechanics: bending over the wheels, tension, length and flex cycles.

A band bends to the wheel radius twice per circuit; the outer fibre sees
σ = E·t/D.  Thin blades on large wheels last longer, which is why the ratio of
wheel diameter to thickness is worth a warning when it is small.
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from functools import lru_cache

from sawplan.cutting import constants as K
from sawplan.display import Q, say
from sawplan.errors import BadDataError, DamagedFileError
from sawplan.paths import data_file


def _check_positive(**values: float) -> None:
    for name, v in values.items():
        if not math.isfinite(v) or v <= 0:
            raise BadDataError(f"must be positive, got {v:g}", field=name)


def bending_stress_mpa(
    thickness_mm: float, wheel_diameter_mm: float, *, pitch_diameter: bool = False
) -> float:
    """σ_b = E·t/D (beam theory).

    By default D is the wheel diameter, as in the handbook formula; with
    ``pitch_diameter`` the neutral-axis diameter D + t is used, which gives a
    stress lower by t/(D + t) (0.3 % for 0.9 mm on 300 mm).
    """
    _check_positive(blade_thickness=thickness_mm, wheel_diameter=wheel_diameter_mm)
    d = wheel_diameter_mm + (thickness_mm if pitch_diameter else 0.0)
    return K.number("mechanics", "elastic_modulus_mpa") * thickness_mm / d


def wheel_ratio_warning(thickness_mm: float, wheel_diameter_mm: float) -> str | None:
    """A warning when D/t is under the usual minimum (memory: 300)."""
    limit = K.number("mechanics", "min_wheel_to_thickness")
    ratio = wheel_diameter_mm / thickness_mm
    if ratio < limit:
        return say(
            "wheel diameter / blade thickness is {}, under about {}: bending stress {} "
            "shortens blade life; use a thinner blade",
            f"{ratio:.0f}",
            f"{limit:.0f}",
            Q("stress", bending_stress_mpa(thickness_mm, wheel_diameter_mm)),
        )
    return None


def tension_force_n(width_mm: float, thickness_mm: float, stress_mpa: float) -> float:
    """F = σ·w·t (the full band width is taken as the body width)."""
    _check_positive(blade_width=width_mm, blade_thickness=thickness_mm, tension=stress_mpa)
    return stress_mpa * width_mm * thickness_mm


@dataclass(frozen=True)
class TensionRange:
    low_mpa: float
    high_mpa: float
    max_mpa: float
    source: str


def tension_range(blade_material: str = "bi-metal") -> TensionRange:
    """Usual tension stress for a blade material (common practice)."""
    key = (
        "tension_carbon_mpa"
        if blade_material.lower().startswith("carbon")
        else "tension_bimetal_mpa"
    )
    low, high = (float(v) for v in K.value("mechanics", key))
    return TensionRange(
        low, high, K.number("mechanics", "tension_max_mpa"), K.source("mechanics", key)
    )


def gauge_elongation_mm(stress_mpa: float, gauge_length_mm: float) -> float:
    """Stretch a tension gauge reads over its length: ε·L with ε = σ/E."""
    _check_positive(tension=stress_mpa, gauge_length=gauge_length_mm)
    return stress_mpa / K.number("mechanics", "elastic_modulus_mpa") * gauge_length_mm


def blade_length_mm(
    centre_distance_mm: float,
    wheel_1_mm: float,
    wheel_2_mm: float | None = None,
    thickness_mm: float = 0.0,
) -> float:
    """Open-belt length L = 2C·cos β + π(D₁+D₂)/2 + β(D₁−D₂), sin β = (D₁−D₂)/(2C).

    Diameters are taken at the blade's neutral axis (wheel + t).
    """
    d1 = wheel_1_mm + thickness_mm
    d2 = (wheel_1_mm if wheel_2_mm is None else wheel_2_mm) + thickness_mm
    _check_positive(centre_distance=centre_distance_mm, wheel_diameter=min(d1, d2))
    if abs(d1 - d2) >= 2 * centre_distance_mm:
        raise BadDataError("the wheels overlap at this centre distance", field="centre_distance")
    beta = math.asin((d1 - d2) / (2 * centre_distance_mm))
    return 2 * centre_distance_mm * math.cos(beta) + math.pi * (d1 + d2) / 2 + beta * (d1 - d2)


def flex_cycles_per_min(band_speed_m_min: float, blade_length_mm: float, wheels: int = 2) -> float:
    """Bends per minute of any one point of the band: wheels · V / L."""
    _check_positive(band_speed=band_speed_m_min, blade_length=blade_length_mm)
    return wheels * band_speed_m_min * 1000.0 / blade_length_mm


@dataclass(frozen=True)
class BladeSize:
    width_mm: float
    thickness_mm: float
    width_in: str
    min_contour_radius_mm: float | None
    source: str


@lru_cache(maxsize=1)
def blade_sizes() -> tuple[BladeSize, ...]:
    """Common metal-cutting band sizes (width × thickness), narrowest first."""
    path = data_file("blade_sizes.csv")
    try:
        with path.open(newline="", encoding="utf-8") as handle:
            rows = [
                BladeSize(
                    float(r["width_mm"]),
                    float(r["thickness_mm"]),
                    r["width_in"],
                    float(r["min_contour_radius_mm"]) if r["min_contour_radius_mm"] else None,
                    r["source"],
                )
                for r in csv.DictReader(handle)
            ]
    except (OSError, KeyError, ValueError) as exc:
        raise DamagedFileError(f"cannot read the blade sizes ({exc})", field=str(path)) from None
    return tuple(sorted(rows, key=lambda s: s.width_mm))


def usual_thickness_mm(width_mm: float) -> float:
    """Thickness of the listed size closest in width (for a blade given by width only)."""
    return min(blade_sizes(), key=lambda s: abs(s.width_mm - width_mm)).thickness_mm


def kerf_mm(thickness_mm: float) -> float:
    """Kerf of a set blade: about 1.6 × body thickness (memory, 1.5–1.7)."""
    return K.number("bite", "kerf_factor") * thickness_mm


def min_contour_radius_mm(width_mm: float) -> float | None:
    """Tightest radius a vertical-saw blade of this width follows (common practice)."""
    listed = [s for s in blade_sizes() if s.min_contour_radius_mm is not None]
    for size in listed:  # metric widths stand for inch sizes (6 mm for 1/4 in): 10 % slack
        if width_mm <= size.width_mm * 1.1:
            return size.min_contour_radius_mm
    return None
