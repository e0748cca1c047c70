"""Units at the edges: one pint registry, a shop-spelling parser, display units.

The computational core works in plain floats of fixed units so it stays fast
and simple (documented in DEVELOPERS.md):

    length mm, area mm², mass kg, time min, band speed m/min, feed mm/min,
    cutting rate mm²/min, force N, power W, energy density J/mm³ (= GJ/m³),
    density kg/m³, stress MPa.

User text becomes a pint quantity here, is dimension-checked, and is handed to
the core as a float in those units.  Output goes back through ``Display``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from enum import StrEnum
from functools import lru_cache
from typing import TYPE_CHECKING

from sawplan.errors import UsageError

if TYPE_CHECKING:  # pragma: no cover
    import pint


@lru_cache(maxsize=1)
def registry() -> pint.UnitRegistry:
    """The one unit registry of the program (cached on disk when possible)."""
    import pint

    try:
        ureg = pint.UnitRegistry(cache_folder=":auto:")
    except OSError:  # cache folder cannot be made: slower start, same answers
        ureg = pint.UnitRegistry()
    ureg.formatter.default_format = "~P"
    return ureg


# Dimension names used by callers, mapped to pint dimensionality strings and the
# core unit a value of that dimension is converted to.
DIMENSIONS: dict[str, tuple[str, str]] = {
    "length": ("[length]", "mm"),
    "area": ("[length] ** 2", "mm ** 2"),
    "mass": ("[mass]", "kg"),
    "time": ("[time]", "min"),
    "speed": ("[length] / [time]", "m / min"),
    "feed": ("[length] / [time]", "mm / min"),
    "rate": ("[length] ** 2 / [time]", "mm ** 2 / min"),
    "force": ("[force]", "N"),
    "power": ("[power]", "W"),
    "density": ("[mass] / [length] ** 3", "kg / m ** 3"),
    "stress": ("[pressure]", "MPa"),
    "energy_density": ("[energy] / [length] ** 3", "J / mm ** 3"),
    "mass_per_length": ("[mass] / [length]", "kg / m"),
    "frequency": ("1 / [time]", "1 / min"),
}

_EXAMPLES = {
    "length": "e.g. 60mm, 2.5in, 7-1/4 in, 3' 6\"",
    "area": "e.g. 5m2, 800 in2, 1200 cm2",
    "mass": "e.g. 25kg, 50 lb",
    "time": "e.g. 12min, 90 s, 1.5 h",
    "speed": "e.g. 60 m/min, 200 ft/min",
    "feed": "e.g. 40 mm/min, 1.5 in/min",
    "rate": "e.g. 60 cm2/min, 10 in2/min",
    "force": "e.g. 2000 N, 450 lbf",
    "power": "e.g. 1.5 kW, 2 hp",
    "density": "e.g. 7.85 g/cm3, 0.284 lb/in3",
    "stress": "e.g. 200 MPa, 30 ksi",
    "energy_density": "e.g. 4 J/mm3",
    "mass_per_length": "e.g. 22 kg/m, 15 lb/ft",
    "frequency": "e.g. 2 /min",
}

# No quantity a saw shop types comes near a billion core units (1,000 km, 1,000 m²,
# 1e9 min...); beyond it the number is a typing slip, not a size.
MAX_CORE_MAGNITUDE = 1e9

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
# a mixed number "7-1/4" or "7 1/4", a plain fraction "1/4", or a decimal
_VALUE = re.compile(
    rf"\s*(?:(?P<whole>\d+)(?:\s+|-)(?P<num>\d+)/(?P<den>\d+)"
    rf"|(?P<fnum>\d+)/(?P<fden>\d+)"
    rf"|(?P<dec>{_NUMBER}))",
    re.ASCII,  # digits 0-9 only: other scripts' digits are refused, never guessed
)
# a foot/inch mark is a whole unit by itself (so 1'6" reads as two terms)
_UNIT = re.compile(r"\s*(?P<unit>''|['\"′″]|[^\d\s.+\-'\"′″][^\s'\"′″]*)?", re.ASCII)
# capitalised shop spellings that pint would read as other units (MM = megamolar)
_UPPER_FOLD = {"MM", "CM", "IN", "FT", "KG", "LB", "LBS", "IN.", "FT.", "M/MIN", "FT/MIN", "MM/MIN"}

_UNIT_ALIASES = {
    '"': "inch",
    "″": "inch",
    "''": "inch",
    "in.": "inch",
    "'": "foot",
    "′": "foot",
    "ft.": "foot",
    "sfm": "ft/min",
    "sfpm": "ft/min",
    "fpm": "ft/min",
    "ipm": "in/min",
    "mpm": "m/min",
    "lbs": "lb",
    "#": "lb",
}


class UnitSystem(StrEnum):
    """Display system chosen with ``--units``."""

    US = "us"
    METRIC = "metric"


def _a(word: str) -> str:
    return ("an " if word[0] in "aeiou" else "a ") + word.replace("_", " ")


def _normalise_unit(unit: str) -> str:
    if unit.upper() == unit and unit in _UPPER_FOLD:
        unit = unit.lower()
    unit = _UNIT_ALIASES.get(unit.lower(), unit) if unit.lower() in _UNIT_ALIASES else unit
    unit = unit.replace("²", "**2").replace("³", "**3").replace("^", "**")
    # "m2", "cm2/min", "in3" -> powers
    unit = re.sub(r"([A-Za-z])([23])(?![0-9])", r"\1**\2", unit)
    return unit


def _split_terms(text: str) -> list[tuple[float, str]]:
    """Split "3 ft 6 in" / "3' 6\"" / "7-1/4in" into (number, unit) terms."""
    terms: list[tuple[float, str]] = []
    pos = 0
    text = text.strip()
    while pos < len(text):
        m = _VALUE.match(text, pos)
        if not m or m.end() == pos:
            raise ValueError(f"cannot read a number at {text[pos:]!r}")
        if m.group("whole"):
            den = int(m.group("den"))
            if den == 0:
                raise ValueError("division by zero in a fraction")
            value = int(m.group("whole")) + int(m.group("num")) / den
        elif m.group("fnum"):
            den = int(m.group("fden"))
            if den == 0:
                raise ValueError("division by zero in a fraction")
            value = int(m.group("fnum")) / den
        else:
            value = float(m.group("dec"))
        pos = m.end()
        u = _UNIT.match(text, pos)
        unit = (u.group("unit") or "") if u else ""
        pos = u.end() if u else pos
        # a unit like "in2/min" may be followed by "/ min" written with spaces
        terms.append((value, unit))
        while pos < len(text) and text[pos].isspace():
            pos += 1
    return terms


def parse_quantity(
    text: str | float | int,
    dimension: str,
    *,
    field: str,
    default_unit: str | None = None,
) -> pint.Quantity:
    """Read a user quantity such as ``7-1/4 in`` and check its dimension.

    Compound shop spellings (``3' 6"``, ``3 ft 6 in``) are summed term by term.
    A bare number is accepted only when ``default_unit`` is given.
    """
    pint_dim, _core = DIMENSIONS[dimension]
    ureg = registry()
    raw = str(text).strip()
    if not raw:
        raise UsageError(
            f"expected {_a(dimension)}, got nothing", field=field, hint=_EXAMPLES[dimension]
        )
    if len(raw) > 200:
        raise UsageError(f"expected {_a(dimension)}, got {len(raw)} characters", field=field)
    try:
        terms = _split_terms(raw)
    except ValueError:
        hint = _EXAMPLES[dimension]
        if any(c.isdigit() and not c.isascii() for c in raw):
            hint = f"write the number with the digits 0-9, {hint}"
        raise UsageError(f"expected {_a(dimension)}, got {raw!r}", field=field, hint=hint) from None
    total = None
    for value, unit in terms:
        if not math.isfinite(value):
            raise UsageError(
                f"expected a finite {dimension.replace('_', ' ')}, got {raw!r}", field=field
            )
        if not unit:
            if default_unit is None or len(terms) > 1:
                raise UsageError(
                    f"{raw!r} has no unit", field=field, hint=f"give one, {_EXAMPLES[dimension]}"
                )
            unit = default_unit
        try:
            q = value * ureg(_normalise_unit(unit))
        except Exception:  # pint raises many kinds for unknown units
            raise UsageError(
                f"unknown unit {unit!r} in {raw!r}", field=field, hint=_EXAMPLES[dimension]
            ) from None
        if not hasattr(q, "check") or not q.check(pint_dim):
            raise UsageError(
                f"expected {_a(dimension)}, got {raw!r}", field=field, hint=_EXAMPLES[dimension]
            )
        total = q if total is None else total + q
    assert total is not None
    return total


def to_core(
    text: str | float | int, dimension: str, *, field: str, default_unit: str | None = None
) -> float:
    """Parse ``text`` and return a float in the core unit of ``dimension``.

    The spellings shops type most (``60mm``, ``7in``, ``3' 6"``) are converted
    with exact factors, so everyday commands never pay for loading pint; all
    else goes through the registry.  Both give the same number (tested).
    """
    core_unit = DIMENSIONS[dimension][1]
    value = _fast_core(text, dimension, default_unit)
    if value is None:
        q = parse_quantity(text, dimension, field=field, default_unit=default_unit)
        value = float(q.to(core_unit).magnitude)
    if not math.isfinite(value):
        raise UsageError(
            f"expected a finite {dimension.replace('_', ' ')}, got {text!r}", field=field
        )
    if abs(value) > MAX_CORE_MAGNITUDE:
        from sawplan.errors import BadDataError

        raise BadDataError(
            f"{str(text).strip()!r} is out of range (at most {MAX_CORE_MAGNITUDE:.0e} "
            f"{core_unit.replace(' ** ', '^').replace(' ', '')})",
            field=field,
        )
    return value


# Exact factors to the core unit for the commonest spellings (after
# _normalise_unit).  Definitions: 1 in = 25.4 mm, 1 ft = 304.8 mm,
# 1 lb = 0.45359237 kg; checked against pint in tests/test_units.py.
FAST_FACTORS: dict[str, dict[str, float]] = {
    "length": {
        "mm": 1.0,
        "cm": 10.0,
        "m": 1000.0,
        "in": 25.4,
        "inch": 25.4,
        "inches": 25.4,
        "ft": 304.8,
        "foot": 304.8,
        "feet": 304.8,
    },
    "area": {"mm**2": 1.0, "cm**2": 100.0, "m**2": 1e6, "in**2": 645.16, "ft**2": 92903.04},
    "mass": {"kg": 1.0, "g": 1e-3, "lb": 0.45359237},
    "time": {"min": 1.0, "s": 1 / 60, "h": 60.0},
    "speed": {"m/min": 1.0, "ft/min": 0.3048},
    "feed": {"mm/min": 1.0, "in/min": 25.4},
    "rate": {"mm**2/min": 1.0, "cm**2/min": 100.0, "in**2/min": 645.16},
    "power": {"W": 1.0, "kW": 1000.0},
    "force": {"N": 1.0, "kN": 1000.0},
}


def _fast_core(text: str | float | int, dimension: str, default_unit: str | None) -> float | None:
    """The value in core units when every term is a common spelling, else None."""
    factors = FAST_FACTORS.get(dimension)
    raw = str(text).strip()
    if not factors or not raw or len(raw) > 200:
        return None
    try:
        terms = _split_terms(raw)
    except ValueError:
        return None
    total = 0.0
    for value, unit in terms:
        if not unit:
            if default_unit is None or len(terms) > 1:
                return None
            unit = default_unit
        factor = factors.get(_normalise_unit(unit))
        if factor is None or not math.isfinite(value):
            return None
        total += value * factor
    return total


def positive(value: float, *, field: str, what: str = "a positive value") -> float:
    """Reject zero, negative and non-finite numbers with a clear message."""
    from sawplan.errors import BadDataError

    if not math.isfinite(value) or value <= 0:
        raise BadDataError(f"must be {what}, got {value:g}", field=field)
    return value


# --- display ---------------------------------------------------------------

# core unit -> (label, factor) per system: shown = core_value * factor.
# Factors are exact definitions (1 in = 25.4 mm, 1 lb = 0.45359237 kg) and are
# checked against pint in tests/test_units.py.
_IN = 25.4
_LB = 0.45359237
_FT = 304.8
DISPLAY: dict[str, dict[UnitSystem, tuple[str, float]]] = {
    "length": {UnitSystem.US: ("in", 1 / _IN), UnitSystem.METRIC: ("mm", 1.0)},
    "long_length": {UnitSystem.US: ("ft", 1 / _FT), UnitSystem.METRIC: ("m", 1e-3)},
    "area": {UnitSystem.US: ("in²", 1 / _IN**2), UnitSystem.METRIC: ("cm²", 1e-2)},
    "mass": {UnitSystem.US: ("lb", 1 / _LB), UnitSystem.METRIC: ("kg", 1.0)},
    "mass_per_length": {
        UnitSystem.US: ("lb/ft", _FT / 1000 / _LB),
        UnitSystem.METRIC: ("kg/m", 1.0),
    },
    "time": {UnitSystem.US: ("min", 1.0), UnitSystem.METRIC: ("min", 1.0)},
    "speed": {UnitSystem.US: ("ft/min", 1000 / _FT), UnitSystem.METRIC: ("m/min", 1.0)},
    "feed": {UnitSystem.US: ("in/min", 1 / _IN), UnitSystem.METRIC: ("mm/min", 1.0)},
    "rate": {UnitSystem.US: ("in²/min", 1 / _IN**2), UnitSystem.METRIC: ("cm²/min", 1e-2)},
    "force": {UnitSystem.US: ("lbf", 1 / (_LB * 9.80665)), UnitSystem.METRIC: ("N", 1.0)},
    "power": {UnitSystem.US: ("hp", 1 / 745.69987158227022), UnitSystem.METRIC: ("kW", 1e-3)},
    "stress": {UnitSystem.US: ("ksi", 1 / 6.894757293168361), UnitSystem.METRIC: ("MPa", 1.0)},
    "density": {UnitSystem.US: ("lb/in³", _IN**3 * 1e-9 / _LB), UnitSystem.METRIC: ("g/cm³", 1e-3)},
    "bite": {UnitSystem.US: ("in", 1 / _IN), UnitSystem.METRIC: ("µm", 1000.0)},
}


@dataclass(frozen=True)
class Display:
    """Turns core floats into display numbers and labels for one unit system."""

    system: UnitSystem = UnitSystem.METRIC

    def label(self, kind: str) -> str:
        return DISPLAY[kind][self.system][0]

    def value(self, kind: str, core_value: float) -> float:
        return core_value * DISPLAY[kind][self.system][1]

    def fmt(self, kind: str, core_value: float | None, digits: int = 3) -> str:
        """Format with sensible significant figures and the unit label."""
        if core_value is None or not math.isfinite(core_value):
            return "—"
        if kind == "time":
            return fmt_duration(core_value, digits)
        v = self.value(kind, core_value)
        return f"{fmt_number(v, digits)} {self.label(kind)}"


def fmt_number(v: float, digits: int = 3) -> str:
    """Round to ``digits`` significant figures without scientific notation."""
    if v == 0 or not math.isfinite(v):
        return f"{v:g}" if math.isfinite(v) else "—"
    v = float(f"{v:.{digits}g}")  # round first so 0.99999 counts as 1
    mag = math.floor(math.log10(abs(v)))
    decimals = max(0, digits - 1 - mag)
    return f"{v:,.{decimals}f}"


LONG_TIME_MIN = 90.0  # above this a time reads better as hours and minutes


def fmt_duration(minutes: float | None, digits: int = 3) -> str:
    """A time for people: '42.5 min' up to 90 min, then '3 h 20 min' (whole minutes)."""
    if minutes is None or not math.isfinite(minutes):
        return "—"
    if minutes <= LONG_TIME_MIN:
        return f"{fmt_number(minutes, digits)} min"
    whole = round(minutes)
    hours, mins = divmod(whole, 60)
    return f"{hours:,} h {mins} min" if mins else f"{hours:,} h"


def fmt_ratio(ratio: float) -> str:
    """A ratio for people: '0.4×', '2.5×', and 'over ten times' beyond 10."""
    if not math.isfinite(ratio) or ratio > 10:
        return "over ten times"
    return f"{fmt_number(ratio, 2)}×"
