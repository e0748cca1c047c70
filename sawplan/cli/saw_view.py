"""How saw profiles are shown: one saw in full, the saw list, and each saw as JSON."""

from __future__ import annotations

from typing import Any

from sawplan.display import Display, as_display
from sawplan.units import UnitSystem


def render_saw(saw, units: UnitSystem | Display) -> str:
    from sawplan.render import key_values

    d = as_display(units)
    length = d.label("length")
    pairs = [
        ("saw", saw.name),
        ("kind", saw.kind),
        ("wheels", f"{saw.wheel_count} × {d.fmt('length', saw.wheel_diameter_mm)}"),
        (
            "blade",
            f"{d.bar_length(saw.blade_length_mm)} long, "
            f"{d.num('length', saw.blade_width_mm)} × "
            f"{d.num('length', saw.blade_thickness_mm)} {length}",
        ),
        ("band speed", f"{_speed_range(saw, d)}"),
        ("motor", f"{d.fmt('power', saw.motor_power_w)} (efficiency {saw.drive_efficiency:g})"),
        (
            "capacity",
            f"round {d.fmt('length', saw.capacity_round_mm)}, rectangle "
            f"{d.num('length', saw.capacity_rect_w_mm)} × "
            f"{d.num('length', saw.capacity_rect_h_mm)} {length}",
        ),
        (
            "feed",
            saw.feed_type
            + (f", head force {d.fmt('force', saw.head_force_n)}" if saw.head_force_n else ""),
        ),
        ("coolant", "yes" if saw.coolant else "no"),
        ("source", saw.source),
    ]
    if saw.notes:
        pairs.append(("notes", saw.notes))
    return key_values(pairs)


def _speed_range(saw, d) -> str:
    return f"{d.span_of('speed', saw.band_speed_min_m_min, saw.band_speed_max_m_min)}"


def saw_json(saw, fitted: dict[str, str]) -> dict[str, Any]:
    from sawplan.render import jsonable

    return {**jsonable(saw), "blade_fitted": fitted.get(saw.name.lower())}


def saw_table(
    saws: list[Any], fitted: dict[str, str], d: Display
) -> tuple[list[str], list[list[Any]]]:
    """The saw list: one row per saw with the blade fitted on it now."""
    headers = [
        "saw",
        "kind",
        f"wheel {d.label('length')}",
        f"band speed {d.label('speed')}",
        f"power {d.label('power')}",
        f"round {d.label('length')}",
        "feed",
        "blade fitted",
        "source",
    ]
    rows = [
        [
            s.name,
            s.kind,
            d.num("length", s.wheel_diameter_mm),
            d.span_of("speed", s.band_speed_min_m_min, s.band_speed_max_m_min, unit=False),
            d.num("power", s.motor_power_w),
            d.num("length", s.capacity_round_mm),
            s.feed_type,
            fitted.get(s.name.lower(), ""),
            s.source,
        ]
        for s in saws
    ]
    return headers, rows
