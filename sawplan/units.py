"""Units at the edges: one pint registry, a shop-spelling parser, display units.

The computational core works in plain floats of fixed units so it stays fast
and simple (documented in DEVELOPERS.md):

    length mm, area mm², mass kg, time min, band speed m/min, feed mm/min,
    cutting rate mm²/min, force N, power W, energy density J/mm³ (= GJ/m³),
    density kg/m³, stress MPa.

User text becomes a pint quantity here, is dimension-checked, and is handed to
the core as a float in those units.  Output goes back through ``Display``
(``sawplan.display``, re-exported here).
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import TYPE_CHECKING

from sawplan.display import (  # noqa: F401 -- the display side, importable from here too
    DISPLAY,
    Display,
    UnitSystem,
    fmt_duration,
    fmt_number,
    fmt_ratio,
)
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
            f"{str(text).strip()!r} is out of range (at most {MAX_CORE_MAGNITUDE:,.0f} "
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
