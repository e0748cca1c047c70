"""How saw profiles are shown: one saw in full, and each saw as JSON."""

from __future__ import annotations

from typing import Any

from sawplan.cli.view import fmt_q, plain
from sawplan.units import UnitSystem


def render_saw(saw, units: UnitSystem) -> str:
    from sawplan.render import key_values
    from sawplan.units import Display

    d = Display(units)
    length = d.label("length")
    pairs = [
        ("saw", saw.name),
        ("kind", saw.kind),
        ("wheels", f"{saw.wheel_count} × {fmt_q(d, 'length', saw.wheel_diameter_mm)}"),
        (
            "blade",
            f"{fmt_q(d, 'length', saw.blade_length_mm, 4)} long, "
            f"{plain(d.value('length', saw.blade_width_mm))} × "
            f"{plain(d.value('length', saw.blade_thickness_mm))} {length}",
        ),
        ("band speed", f"{_speed_range(saw, d)}"),
        ("motor", f"{fmt_q(d, 'power', saw.motor_power_w)} (efficiency {saw.drive_efficiency:g})"),
        (
            "capacity",
            f"round {fmt_q(d, 'length', saw.capacity_round_mm)}, rectangle "
            f"{plain(d.value('length', saw.capacity_rect_w_mm))} × "
            f"{plain(d.value('length', saw.capacity_rect_h_mm))} {length}",
        ),
        (
            "feed",
            saw.feed_type
            + (f", head force {fmt_q(d, 'force', saw.head_force_n)}" if saw.head_force_n else ""),
        ),
        ("coolant", "yes" if saw.coolant else "no"),
        ("source", saw.source),
    ]
    if saw.notes:
        pairs.append(("notes", saw.notes))
    return key_values(pairs)


def _speed_range(saw, d) -> str:
    lo = plain(d.value("speed", saw.band_speed_min_m_min))
    return f"{lo}-{fmt_q(d, 'speed', saw.band_speed_max_m_min)}"


def saw_json(saw, fitted: dict[str, str]) -> dict[str, Any]:
    from sawplan.render import jsonable

    return {**jsonable(saw), "blade_fitted": fitted.get(saw.name.lower())}


def saw_table(
    saws: list[Any], fitted: dict[str, str], units: UnitSystem
) -> tuple[list[str], list[list[Any]]]:
    """The saw list: one row per saw with the blade fitted on it now."""
    from sawplan.units import Display

    d = Display(units)
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
            plain(d.value("length", s.wheel_diameter_mm)),
            f"{plain(d.value('speed', s.band_speed_min_m_min))}-{plain(d.value('speed', s.band_speed_max_m_min))}",
            plain(d.value("power", s.motor_power_w)),
            plain(d.value("length", s.capacity_round_mm)),
            s.feed_type,
            fitted.get(s.name.lower(), ""),
            s.source,
        ]
        for s in saws
    ]
    return headers, rows
