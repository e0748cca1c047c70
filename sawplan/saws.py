"""Saw profiles: the machine a cut is planned for.

Three generic profiles ship in ``data/saws.toml``; a shop adds its own in a
TOML file of the same layout (``--saws FILE`` or ``$SAWPLAN_SAWS``), and the
blade log passes saws kept in its database.  Later sources replace earlier ones
by name: packaged < user file < database.
"""

from __future__ import annotations

import difflib
import math
import os
import tomllib
from collections.abc import Iterable
from dataclasses import MISSING, dataclass, fields
from pathlib import Path
from typing import Any, Protocol

from sawplan.errors import BadDataError, DamagedFileError, NotFoundError
from sawplan.paths import data_file

ENV_VAR = "SAWPLAN_SAWS"
KINDS = ("horizontal", "column", "vertical")
FEED_TYPES = ("constant", "gravity", "hydraulic")
FORCE_LIMITED = ("gravity", "hydraulic")
ROUND_SHAPES = ("round", "tube")


def _positive_number(v: object) -> bool:
    return isinstance(v, int | float) and not isinstance(v, bool) and math.isfinite(v) and v > 0


@dataclass(frozen=True)
class Saw:
    """One band saw; numbers in core units (mm, m/min, W, N)."""

    name: str
    kind: str
    wheel_diameter_mm: float
    blade_length_mm: float
    blade_width_mm: float
    blade_thickness_mm: float
    band_speed_min_m_min: float
    band_speed_max_m_min: float
    motor_power_w: float
    drive_efficiency: float
    capacity_round_mm: float
    capacity_rect_w_mm: float
    capacity_rect_h_mm: float
    feed_type: str
    head_force_n: float | None = None
    coolant: bool = True
    wheel_count: int = 2
    source: str = "user"
    notes: str = ""

    def __post_init__(self) -> None:
        where = f"saw {self.name!r}"
        if not str(self.name).strip():
            raise BadDataError("a saw needs a name", field="saw")
        if self.kind not in KINDS:
            raise BadDataError(
                f"{where}: kind must be one of {', '.join(KINDS)}, got {self.kind!r}", field="kind"
            )
        if self.feed_type not in FEED_TYPES:
            raise BadDataError(
                f"{where}: feed_type must be one of {', '.join(FEED_TYPES)}, "
                f"got {self.feed_type!r}",
                field="feed_type",
            )
        for f in fields(self):
            if f.name.endswith(("_mm", "_m_min", "_w")):
                v = getattr(self, f.name)
                if not _positive_number(v):
                    raise BadDataError(
                        f"{where}: must be a positive number, got {v!r}", field=f.name
                    )
        if self.band_speed_min_m_min > self.band_speed_max_m_min:
            raise BadDataError(
                f"{where}: lowest band speed {self.band_speed_min_m_min:g} m/min is above "
                f"the highest {self.band_speed_max_m_min:g} m/min",
                field="band_speed_min_m_min",
            )
        if not _positive_number(self.drive_efficiency) or self.drive_efficiency > 1:
            raise BadDataError(
                f"{where}: must be over 0 and at most 1, got {self.drive_efficiency!r}",
                field="drive_efficiency",
            )
        if self.feed_type in FORCE_LIMITED:
            f_n = self.head_force_n
            if not _positive_number(f_n):
                raise BadDataError(
                    f"{where}: a {self.feed_type} feed needs head_force_n (N) above 0, got {f_n!r}",
                    field="head_force_n",
                )
        if not isinstance(self.coolant, bool):
            raise BadDataError(
                f"{where}: must be true or false, got {self.coolant!r}", field="coolant"
            )
        if self.wheel_count not in (2, 3, 4):
            raise BadDataError(
                f"{where}: must be 2, 3 or 4, got {self.wheel_count!r}", field="wheel_count"
            )
        _check_ranges(self, where)

    @property
    def force_limited(self) -> bool:
        return self.feed_type in FORCE_LIMITED

    @property
    def cutting_power_w(self) -> float:
        """Power at the blade: η·P."""
        return self.motor_power_w * self.drive_efficiency

    @classmethod
    def from_mapping(cls, name: str, data: dict[str, Any], *, origin: str) -> Saw:
        known = {f.name for f in fields(cls)} - {"name"}
        unknown = sorted(set(data) - known)
        if unknown:
            hint = difflib.get_close_matches(unknown[0], known, n=1)
            raise BadDataError(
                f"saw {name!r} in {origin}: unknown field {unknown[0]!r}"
                + (f" (did you mean {hint[0]}?)" if hint else ""),
                field=unknown[0],
            )
        missing = [
            f.name
            for f in fields(cls)
            if f.name in known and f.default is MISSING and f.name not in data
        ]
        if missing:
            raise BadDataError(
                f"saw {name!r} in {origin}: missing {', '.join(missing)}", field=missing[0]
            )
        values = dict(data)
        values.setdefault("source", origin)
        return cls(name=name, **values)


def _check_ranges(saw: Saw, where: str) -> None:
    """Every number within its plausible range (``sawplan.fields``), named in shop words."""
    from sawplan.fields import check, field_for

    for f in fields(saw):
        rule = field_for(f"saws.{f.name}")
        value = getattr(saw, f.name)
        if rule is not None and rule.low is not None and isinstance(value, int | float):
            check(rule, value, words=f"{where}: {rule.words}")


class SectionLike(Protocol):
    shape: str
    height_mm: float
    width_mm: float
    pieces: int


def _read_toml(path: Path, *, origin: str) -> dict[str, Saw]:
    from sawplan.user_files import MB, read_text_limited

    try:
        text = read_text_limited(path, MB, "saws file", why="a saws file is a short text file")
    except NotFoundError:
        raise NotFoundError(f"no such saws file: {path}", field="saws") from None
    try:
        raw = tomllib.loads(text)
    except (tomllib.TOMLDecodeError, RecursionError) as exc:
        raise DamagedFileError(f"cannot read the saws file {path}: {exc}", field="saws") from None
    table = raw.get("saw")
    if not isinstance(table, dict):
        raise DamagedFileError(f"{path} has no [saw.NAME] tables", field="saws")
    saws: dict[str, Saw] = {}
    for name, data in table.items():
        if not isinstance(data, dict):
            raise DamagedFileError(f"{path}: saw.{name} is not a table", field="saws")
        saws[name.lower()] = Saw.from_mapping(name, data, origin=origin)
    return saws


def load_saws(user_file: str | Path | None = None, extra: Iterable[Saw] = ()) -> dict[str, Saw]:
    """All saws by lower-case name: packaged, then the user file, then ``extra``."""
    saws = _read_toml(data_file("saws.toml"), origin="packaged")
    if user_file is None:
        user_file = os.environ.get(ENV_VAR) or None
    if user_file is not None:
        saws.update(_read_toml(Path(user_file), origin=str(user_file)))
    for saw in extra:
        saws[saw.name.lower()] = saw
    return saws


def get_saw(name: str, user_file: str | Path | None = None, extra: Iterable[Saw] = ()) -> Saw:
    """One saw by name (case-insensitive); unknown names get a suggestion."""
    saws = load_saws(user_file, extra)
    found = saws.get(name.strip().lower())
    if found is not None:
        return found
    close = difflib.get_close_matches(name.strip().lower(), list(saws), n=2, cutoff=0.5)
    hint = (
        f"did you mean {' or '.join(close)}?" if close else f"known saws: {', '.join(sorted(saws))}"
    )
    raise NotFoundError(f"unknown saw {name!r}", field="saw", hint=hint)


def fits(saw: Saw, section: SectionLike) -> bool:
    """Whether the work fits the saw's vise and throat."""
    if section.shape in ROUND_SHAPES and section.pieces == 1:
        return section.height_mm <= saw.capacity_round_mm + 1e-9
    return (
        section.height_mm <= saw.capacity_rect_h_mm + 1e-9
        and section.width_mm <= saw.capacity_rect_w_mm + 1e-9
    )


def check_capacity(
    saw: Saw, section: SectionLike, alternatives: Iterable[Saw] | None = None
) -> None:
    """BadDataError when the work does not fit the saw, naming the saws that take it.

    ``alternatives``: the saws to suggest, largest first (default: the packaged
    saws and the user's saws file).
    """
    if fits(saw, section):
        return
    if section.shape in ROUND_SHAPES and section.pieces == 1:
        message = (
            f"{section.height_mm:.4g} mm round is over the {saw.name} capacity of "
            f"{saw.capacity_round_mm:g} mm round"
        )
    else:
        message = (
            f"{section.width_mm:.4g} wide × {section.height_mm:.4g} mm high is over the "
            f"{saw.name} capacity of {saw.capacity_rect_w_mm:g} × {saw.capacity_rect_h_mm:g} mm "
            "(wide × high)"
        )
    others = list(load_saws().values() if alternatives is None else alternatives)
    takers = sorted((s for s in others if fits(s, section)), key=_size, reverse=True)
    if takers:
        names = ", ".join(f"{s.name} ({_capacity(s, section)})" for s in takers[:4])
        hint = f"it fits {names}: give --saw {_quoted(takers[0].name)}"
    else:
        largest = max(others, key=_size, default=saw)
        hint = (
            f"no known saw takes it; the largest is {largest.name} ({_capacity(largest, section)})"
        )
    raise BadDataError(message, field="section", hint=hint)


def _size(saw: Saw) -> tuple[float, float, float]:
    return (
        saw.capacity_round_mm,
        saw.capacity_rect_w_mm * saw.capacity_rect_h_mm,
        saw.capacity_rect_h_mm,
    )


def _capacity(saw: Saw, section: SectionLike) -> str:
    if section.shape in ROUND_SHAPES and section.pieces == 1:
        return f"{saw.capacity_round_mm:g} mm round"
    return f"{saw.capacity_rect_w_mm:g} × {saw.capacity_rect_h_mm:g} mm"


def _quoted(name: str) -> str:
    return f'"{name}"' if " " in name else name
