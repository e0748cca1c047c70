"""A saw profile as a person types it, read by one set of rules: ``saw add`` and the office form.

Sizes, powers and forces in any unit through ``sawplan.fields``; the band speed
range as ``LOW-HIGH`` with a unit; the rectangle capacity as ``WIDTHxHEIGHT``.
A saw may start from a known profile (``base``, the CLI's ``--like``) and
change only what differs; without one every field the profile needs must be
given.  Each error is one line naming the field.
"""

from __future__ import annotations

import dataclasses
import re
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw

_RANGE = re.compile(
    r"^\s*(?P<lo>[\d.]+)\s*(?P<lo_unit>[^\d\s\-–]*)\s*(?:-|–|to|\.\.)\s*(?P<hi>[\d.]+)\s*(?P<unit>\S+)\s*$"
)


def parse_speed_range(text: str) -> tuple[float, float]:
    """``20-90m/min`` or ``65-330 ft/min`` → (low, high) in m/min."""
    from sawplan.errors import BadDataError, UsageError
    from sawplan.fields import parse

    words = "band speed range"
    m = _RANGE.match(text)
    if not m:
        raise UsageError(
            f"expected LOW-HIGH with a unit, got {text!r}", field=words, hint="e.g. 20-90m/min"
        )
    unit = m.group("unit")
    lo = parse("band_speed", m.group("lo") + (m.group("lo_unit") or unit), words=words)
    hi = parse("band_speed", m.group("hi") + unit, words=words)
    if lo > hi:
        raise BadDataError(f"the low speed is above the high one in {text!r}", field=words)
    return lo, hi


def parse_rect(text: str) -> tuple[float, float]:
    """``350x260mm`` → (width, height) in mm."""
    from sawplan.errors import UsageError
    from sawplan.fields import parse
    from sawplan.sections import split_sizes

    sizes = split_sizes(text.split())
    if len(sizes) != 2:
        raise UsageError(
            f"expected WIDTHxHEIGHT with a unit, got {text!r}",
            field="rectangle capacity",
            hint="e.g. 350x260mm",
        )
    w, h = (parse("capacity_rect", s) for s in sizes)
    return w, h


def saw_profile(
    name: str,
    *,
    base: Saw | None = None,
    kind: str | None = None,
    wheel: str | None = None,
    blade_length: str | None = None,
    blade_width: str | None = None,
    blade_thickness: str | None = None,
    speed_range: str | None = None,
    power: str | None = None,
    efficiency: float | None = None,
    capacity_round: str | None = None,
    capacity_rect: str | None = None,
    feed_type: str | None = None,
    head_force: str | None = None,
    coolant: bool | None = None,
    wheels: int | None = None,
    notes: str | None = None,
) -> Saw:
    """The profile of a saw called ``name``: ``base``'s with what is given changed."""
    from sawplan.errors import UsageError
    from sawplan.fields import parse
    from sawplan.saws import Saw

    values: dict[str, Any] = {}
    if base is not None:
        values = {f.name: getattr(base, f.name) for f in dataclasses.fields(Saw)}
        values["source"] = f"like {base.name}"
        values["notes"] = ""  # the base saw's notes describe that saw, not this one
    values["name"] = name
    given = {
        "kind": kind,
        "feed_type": feed_type,
        "drive_efficiency": efficiency,
        "coolant": coolant,
        "wheel_count": wheels,
        "notes": notes,
    }
    quantities = {
        "wheel_diameter_mm": (wheel, "wheel"),
        "blade_length_mm": (blade_length, "blade_length"),
        "blade_width_mm": (blade_width, "blade_width"),
        "blade_thickness_mm": (blade_thickness, "blade_thickness"),
        "capacity_round_mm": (capacity_round, "capacity_round"),
        "motor_power_w": (power, "power"),
        "head_force_n": (head_force, "head_force"),
    }
    for key, (text, field_key) in quantities.items():
        if text is not None:
            given[key] = parse(field_key, text)
    if speed_range is not None:
        given["band_speed_min_m_min"], given["band_speed_max_m_min"] = parse_speed_range(
            speed_range
        )
    if capacity_rect is not None:
        given["capacity_rect_w_mm"], given["capacity_rect_h_mm"] = parse_rect(capacity_rect)
    values.update({k: v for k, v in given.items() if v is not None})
    values.setdefault("source", "blade log")
    missing = [_OPTION_OF[f.name] for f in dataclasses.fields(Saw) if f.name not in values
               and f.default is dataclasses.MISSING]  # fmt: skip
    missing = list(dict.fromkeys(missing))
    if missing:
        raise UsageError(
            f"missing {', '.join(missing)}",
            field="saw",
            hint="give them, or start from a known saw with --like NAME (see `sawplan saw list`)",
        )
    return Saw(**values)


_OPTION_OF = {
    "kind": "--kind",
    "wheel_diameter_mm": "--wheel",
    "blade_length_mm": "--blade-length",
    "blade_width_mm": "--blade-width",
    "blade_thickness_mm": "--blade-thickness",
    "band_speed_min_m_min": "--speed-range",
    "band_speed_max_m_min": "--speed-range",
    "motor_power_w": "--power",
    "drive_efficiency": "--efficiency",
    "capacity_round_mm": "--capacity-round",
    "capacity_rect_w_mm": "--capacity-rect",
    "capacity_rect_h_mm": "--capacity-rect",
    "feed_type": "--feed-type",
}
