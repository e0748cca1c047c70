"""Numbers for people: one formatter for every quantity the program shows.

The core works in fixed units (``sawplan.units``); everything a person reads
goes through :class:`Display`, which knows the unit system (``--units``) and
whether the shop reads inches as fractions (``--fractions``).  The rules:

- estimates (speeds, feeds, times, weights, areas) keep 3 significant
  digits, with thousands separators and never scientific notation;
- lengths are measurements and keep a resolution instead: 0.1 mm (0.01 mm
  under 10 mm), 0.001 in, or the nearest 1/32 in with ``fractions``; bars of
  6 ft and more read in feet and inches;
- times over 90 min read as hours and minutes, ratios over ten as words.

Text made in the core (a cut's explanation, a warning) may hold quantities:
it is a :class:`Phrase`, a string that reads in metric by default and is
shown again in the chosen system by :meth:`Display.text`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum
from typing import Any


class UnitSystem(StrEnum):
    """Display system chosen with ``--units``."""

    US = "us"
    METRIC = "metric"


# core unit -> (label, factor) per system: shown = core_value * factor.
# Factors are exact definitions (1 in = 25.4 mm, 1 lb = 0.45359237 kg,
# 1 lbf = 1 lb × 9.80665 m/s², 1 hp = 550 ft·lbf/s, 1 psi = 1 lbf/in²) and are
# checked against pint in tests/test_units.py.
_IN = 25.4
_LB = 0.45359237
_FT = 304.8
_HP_W = 745.69987158227022
_KSI_MPA = 6.894757293168361
DISPLAY: dict[str, dict[UnitSystem, tuple[str, float]]] = {
    "length": {UnitSystem.US: ("in", 1 / _IN), UnitSystem.METRIC: ("mm", 1.0)},
    "long_length": {UnitSystem.US: ("ft", 1 / _FT), UnitSystem.METRIC: ("m", 1e-3)},
    "area": {UnitSystem.US: ("in²", 1 / _IN**2), UnitSystem.METRIC: ("cm²", 1e-2)},
    "large_area": {UnitSystem.US: ("ft²", 1 / _FT**2), UnitSystem.METRIC: ("m²", 1e-6)},
    "mass": {UnitSystem.US: ("lb", 1 / _LB), UnitSystem.METRIC: ("kg", 1.0)},
    "mass_per_length": {
        UnitSystem.US: ("lb/ft", _FT / 1000 / _LB),
        UnitSystem.METRIC: ("kg/m", 1.0),
    },
    "time": {UnitSystem.US: ("min", 1.0), UnitSystem.METRIC: ("min", 1.0)},
    "speed": {UnitSystem.US: ("ft/min", 1000 / _FT), UnitSystem.METRIC: ("m/min", 1.0)},
    "feed": {UnitSystem.US: ("in/min", 1 / _IN), UnitSystem.METRIC: ("mm/min", 1.0)},
    "rate": {UnitSystem.US: ("in²/min", 1 / _IN**2), UnitSystem.METRIC: ("cm²/min", 1e-2)},
    "volume_rate": {
        UnitSystem.US: ("in³/min", 1 / _IN**3),
        UnitSystem.METRIC: ("cm³/min", 1e-3),
    },
    "force": {UnitSystem.US: ("lbf", 1 / (_LB * 9.80665)), UnitSystem.METRIC: ("N", 1.0)},
    "power": {UnitSystem.US: ("hp", 1 / _HP_W), UnitSystem.METRIC: ("kW", 1e-3)},
    "stress": {UnitSystem.US: ("ksi", 1 / _KSI_MPA), UnitSystem.METRIC: ("MPa", 1.0)},
    "density": {UnitSystem.US: ("lb/in³", _IN**3 * 1e-9 / _LB), UnitSystem.METRIC: ("g/cm³", 1e-3)},
    # unit cutting energy: US handbooks give unit power in hp·min/in³
    "energy_density": {
        UnitSystem.US: ("hp·min/in³", _IN**3 / (_HP_W * 60)),
        UnitSystem.METRIC: ("J/mm³", 1.0),
    },
    "bite": {UnitSystem.US: ("in", 1 / _IN), UnitSystem.METRIC: ("µm", 1000.0)},
}

LONG_TIME_MIN = 90.0  # above this a time reads better as hours and minutes
LONG_BAR_IN = 72.0  # from 6 ft a bar's length reads in feet and inches
FRACTION_DENOMINATOR = 32  # --fractions: the nearest 1/32 in, a tape's resolution
FRACTION_TOLERANCE_IN = 0.0015  # a size this close to a 1/32 is that fraction
_PSI_BELOW_KSI = 1.0  # stresses under 1 ksi read in psi


@dataclass(frozen=True)
class Display:
    """Turns core floats into text for one unit system (and inch fractions or not)."""

    system: UnitSystem = UnitSystem.METRIC
    fractions: bool = False

    @property
    def us(self) -> bool:
        return self.system is UnitSystem.US

    def label(self, kind: str) -> str:
        return DISPLAY[kind][self.system][0]

    def value(self, kind: str, core_value: float) -> float:
        return core_value * DISPLAY[kind][self.system][1]

    def per(self, kind: str, amount_per_core: float) -> float:
        """An amount per core unit of ``kind`` (e.g. money per mm²) per display unit."""
        return amount_per_core / DISPLAY[kind][self.system][1]

    def num(self, kind: str, core_value: float | None, digits: int | None = None) -> str:
        """The number alone (for a column whose header names the unit)."""
        if core_value is None or not math.isfinite(core_value):
            return "—"
        if kind == "length" and digits is None:
            return self.size(core_value)
        return fmt_number(self.value(kind, core_value), digits or 3)

    def fmt(self, kind: str, core_value: float | None, digits: int | None = None) -> str:
        """A quantity with its unit.

        Estimates keep ``digits`` significant digits (3 unless told); a length
        is a measurement and keeps its resolution (:meth:`size`) unless
        ``digits`` is given, as for a mean width worked out by the model.
        """
        if core_value is None or not math.isfinite(core_value):
            return "—"
        if kind == "time":
            return fmt_duration(core_value, digits or 3)
        if kind == "length" and digits is None:
            return self.length(core_value)
        if kind == "stress" and self.us and self.value(kind, core_value) < _PSI_BELOW_KSI:
            return f"{fmt_number(self.value(kind, core_value) * 1000, digits or 3)} psi"
        return f"{fmt_number(self.value(kind, core_value), digits or 3)} {self.label(kind)}"

    # --- lengths: measurements, shown to a resolution -------------------------------

    def size(self, mm: float) -> str:
        """A size without its unit: 65, 136.6, 2.15 (mm); 7.25, or 7-1/4 with ``fractions``.

        A size is exact: with ``fractions`` it reads as a fraction only when it is
        one (within 0.0015 in of a 1/32), so a 0.170 in wall stays 0.17, not 5/32.
        """
        if not math.isfinite(mm):
            return "—"
        if self.us:
            inches = mm / _IN
            nearest = round(inches * FRACTION_DENOMINATOR) / FRACTION_DENOMINATOR
            if self.fractions and abs(inches - nearest) <= FRACTION_TOLERANCE_IN:
                return fmt_fraction(inches)
            return _strip(f"{inches:,.3f}")
        return _strip(f"{mm:,.2f}" if abs(mm) < 10 else f"{mm:,.1f}")

    def length(self, mm: float) -> str:
        """A size with its unit: ``65 mm``, ``7.25 in``, ``7-1/4 in``."""
        return f"{self.size(mm)} {self.label('length')}"

    def tape(self, mm: float) -> str:
        """A length to measure along a bar, with its unit: with ``fractions`` always the
        nearest 1/32 in, as a tape reads (``43-5/16 in``)."""
        if self.us and self.fractions:
            return f"{fmt_fraction(mm / _IN)} in"
        return self.length(mm)

    def pos(self, mm: float) -> str:
        """A position along a bar for a table column: fixed decimals so columns line up."""
        if self.us:
            inches = mm / _IN
            return fmt_fraction(inches) if self.fractions else f"{inches:,.3f}"
        return _strip(f"{mm:,.1f}")

    def span(self, start_mm: float, end_mm: float) -> str:
        """From-to positions: ``10–120`` (a spaced dash between fractions: ``1/4 – 4-3/8``)."""
        dash = " – " if self.us and self.fractions else "–"
        return f"{self.pos(start_mm)}{dash}{self.pos(end_mm)}"

    def span_of(self, kind: str, low: float, high: float, *, unit: bool = True) -> str:
        """A range of an estimate: ``20-100 m/min`` (3 digits, no trailing zeros)."""
        text = f"{fmt_plain(self.value(kind, low))}-{fmt_plain(self.value(kind, high))}"
        return f"{text} {self.label(kind)}" if unit else text

    def bar_length(self, mm: float) -> str:
        """A bar or stock length: mm; inches, or feet and inches from 6 ft (``12 ft 0.094 in``)."""
        if not self.us or mm / _IN < LONG_BAR_IN:
            return self.tape(mm)
        feet, rest_mm = divmod(mm, _FT)
        rest = fmt_fraction(rest_mm / _IN) if self.fractions else self.size(rest_mm)
        if rest in ("0", "0.000"):
            return f"{feet:,.0f} ft"
        if rest == str(12):  # rounded up to a whole foot
            return f"{feet + 1:,.0f} ft"
        return f"{feet:,.0f} ft {rest} in"

    def section(self, section) -> str:
        """A section's label in this system: ``round Ø9.843 in``, ``flat 4×1 in lying flat``."""
        return section.label(self.system.value, size=self.size)

    # --- text from the core ------------------------------------------------------------

    def text(self, words: str) -> str:
        """Core text in this system: a :class:`Phrase` is shown again, plain text as it is."""
        return words.show(self) if isinstance(words, Phrase) else str(words)

    def quantity(self, q: Q) -> str:
        if q.kind == "bar_length":
            return self.bar_length(q.value)
        if q.kind == "section":
            return self.section(q.value)
        if q.kind == "size":  # a length whose unit the context gives (a blade's 27×0.9)
            return self.size(q.value)
        if q.bare:
            return self.num(q.kind, q.value, q.digits)
        return self.fmt(q.kind, q.value, q.digits)


def section_text(d: Display, text: str) -> str:
    """A section as a user typed it (``flat 50mm 12mm``), shown again in ``d``'s units;
    text that no longer reads as a section is shown as it is."""
    from sawplan.errors import SawplanError
    from sawplan.sections import parse_section

    try:
        return d.section(parse_section(str(text).split()))
    except SawplanError:
        return str(text)


def as_display(units: UnitSystem | Display | str) -> Display:
    """A renderer's ``units`` argument as a Display (a bare system: decimal inches)."""
    return units if isinstance(units, Display) else Display(UnitSystem(units))


def _strip(text: str) -> str:
    """``7.250`` → ``7.25``; ``12.0`` → ``12``."""
    return text.rstrip("0").rstrip(".") if "." in text else text


def fmt_number(v: float, digits: int = 3) -> str:
    """Round to ``digits`` significant figures without scientific notation."""
    if v == 0 or not math.isfinite(v):
        return "0" if v == 0 else "—"
    v = float(f"{v:.{digits}g}")  # round first so 0.99999 counts as 1
    mag = math.floor(math.log10(abs(v)))
    decimals = max(0, digits - 1 - mag)
    return f"{v:,.{decimals}f}"


def fmt_count(n: int) -> str:
    """A whole count with thousands separators: ``4,390`` (cuts, entries, blades)."""
    return f"{int(n):,}"


def fmt_plain(v: float, digits: int = 3) -> str:
    """:func:`fmt_number` without trailing zeros, for axis ticks: 20, 0.75, 1,000."""
    return _strip(fmt_number(v, digits))


def fmt_money(amount: float, currency: str = "") -> str:
    """Money to the cent with thousands separators: ``1,302.62 EUR``."""
    text = f"{amount:,.2f}"
    return f"{text} {currency}" if currency else text


def fmt_fraction(inches: float, denominator: int = FRACTION_DENOMINATOR) -> str:
    """Inches as a shop writes them, to the nearest 1/32: ``7-1/4``, ``3/32``, ``12``."""
    if not math.isfinite(inches):
        return "—"
    sign = "-" if inches < 0 else ""
    n = round(abs(inches) * denominator)
    whole, num = divmod(n, denominator)
    if num == 0:
        return f"{sign}{whole:,}"
    g = math.gcd(num, denominator)
    frac = f"{num // g}/{denominator // g}"
    return f"{sign}{whole:,}-{frac}" if whole else f"{sign}{frac}"


def fmt_duration(minutes: float | None, digits: int = 3) -> str:
    """A time for people: '8.40 s' under a minute, '42.5 min' up to 90 min, then
    '3 h 20 min' (whole minutes)."""
    if minutes is None or not math.isfinite(minutes):
        return "—"
    if 0 < minutes < 1:
        return f"{fmt_number(minutes * 60, digits)} s"
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


def fmt_percent(share: float, *, signed: bool = False) -> str:
    """A share for people: '53 %', '+6 %', '−11 %'; a small share as '<1 %', never '0 %'."""
    if not math.isfinite(share):
        return "—"
    pct = share * 100
    sign = ("+" if pct > 0 else "−" if pct < 0 else "") if signed else ""
    if 0 < abs(pct) < 0.5:
        return f"{sign}<1 %"
    return f"{sign}{abs(pct):.0f} %"


# --- text with quantities in it ---------------------------------------------------------


@dataclass(frozen=True)
class Q:
    """A quantity inside core text: a ``DISPLAY`` kind and a core value; or ``bar_length``
    (mm, feet and inches from 6 ft), ``size`` (a length without its unit), or
    ``section`` with a ``Section`` as its value."""

    kind: str
    value: Any
    digits: int | None = None  # None: the kind's own rule (3 digits; lengths to resolution)
    bare: bool = False  # the number alone, its unit said next to it ("300 of 650 cm²")


_METRIC = Display()


class Phrase(str):
    """Text holding quantities: it reads as its metric wording (so JSON and logs keep SI)
    and :meth:`show` writes it again in any unit system.

    Build one with :func:`say`; joining or concatenating phrases with plain ``+``
    or f-strings loses the quantities, so use :func:`say` and :func:`join`.
    """

    parts: tuple[str | Q, ...]

    def __new__(cls, parts: tuple[str | Q, ...]) -> Phrase:
        obj = super().__new__(cls, _render(parts, _METRIC))
        obj.parts = parts
        return obj

    def show(self, d: Display) -> str:
        return _render(self.parts, d)

    def __reduce__(self):  # keep the quantities through copy and pickle
        return (Phrase, (self.parts,))


def _render(parts: tuple[str | Q, ...], d: Display) -> str:
    return "".join(p if isinstance(p, str) else d.quantity(p) for p in parts)


def _parts(value: object) -> tuple[str | Q, ...]:
    if isinstance(value, Phrase):
        return value.parts
    if isinstance(value, Q):
        return (value,)
    return (str(value),)


def say(template: str, *values: object) -> Phrase:
    """``say("{} teeth in the {} chord", 18, Q("length", 184.2))``: each ``{}`` takes
    one value; a :class:`Q` or a :class:`Phrase` keeps its quantities, anything
    else is written with ``str``."""
    pieces = template.split("{}")
    if len(pieces) != len(values) + 1:
        raise ValueError(f"{template!r} has {len(pieces) - 1} slots for {len(values)} values")
    parts: list[str | Q] = [pieces[0]]
    for value, piece in zip(values, pieces[1:], strict=True):
        parts += [*_parts(value), piece]
    merged: list[str | Q] = []
    for p in parts:
        if isinstance(p, str) and merged and isinstance(merged[-1], str):
            merged[-1] += p
        elif p != "":
            merged.append(p)
    return Phrase(tuple(merged))


def join(separator: str, items: list) -> Phrase:
    """``separator.join(items)`` keeping the quantities of every phrase."""
    if not items:
        return Phrase(())
    return say(separator.join("{}" for _ in items), *items)
