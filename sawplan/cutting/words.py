"""Quantities inside the cutting model's sentences, in one place.

Explanations and warnings are made in the core in core units.  Every number in
them goes through these helpers, which wrap it as a quantity of
``sawplan.display`` (a ``Q`` inside a ``Phrase``): the sentence reads in metric
(JSON, logs) and a renderer shows it again in the unit system of ``--units``
with ``Display.text``.  Build sentences with :func:`say` and :func:`join`
(re-exported here); an f-string around a phrase loses its quantities.
"""

from __future__ import annotations

from sawplan.display import (
    Display,
    Phrase,
    Q,
    UnitSystem,
    fmt_number,
    fmt_percent,
    fmt_ratio,
    join,
    say,
)

__all__ = [
    "Phrase",
    "bite",
    "bite_pair",
    "change",
    "fmt_number",
    "fmt_ratio",
    "force",
    "join",
    "length",
    "power",
    "rate",
    "say",
    "share",
    "speed",
    "feed",
    "time",
    "width",
]

_SYSTEMS = (Display(UnitSystem.METRIC), Display(UnitSystem.US))


def _q(kind: str, value: float, digits: int | None = None) -> Phrase:
    return say("{}", Q(kind, value, digits))


def length(v_mm: float) -> Phrase:
    """A length as a measurement (a chord, a wall): to the formatter's resolution."""
    return _q("length", v_mm)


def width(v_mm: float) -> Phrase:
    """A width the model works out (a mean or average width of cut): 3 digits."""
    return _q("length", v_mm, 3)


def bite(v_mm: float, digits: int = 2) -> Phrase:
    """A tooth bite: µm in metric, inches in US units."""
    return _q("bite", v_mm, digits)


def bite_pair(a_mm: float, b_mm: float) -> tuple[Phrase, Phrase]:
    """Two bites said side by side ('falls to X, under the Y floor'): with one more
    digit when two digits would make them read alike in either system."""
    same = any(d.text(bite(a_mm)) == d.text(bite(b_mm)) for d in _SYSTEMS)
    digits = 3 if same and a_mm != b_mm else 2
    return bite(a_mm, digits), bite(b_mm, digits)


def speed(v_m_min: float) -> Phrase:
    return _q("speed", v_m_min)


def feed(v_mm_min: float) -> Phrase:
    return _q("feed", v_mm_min)


def rate(v_mm2_min: float) -> Phrase:
    return _q("rate", v_mm2_min)


def force(v_n: float) -> Phrase:
    return _q("force", v_n)


def power(v_w: float) -> Phrase:
    return _q("power", v_w)


def time(v_min: float | None) -> Phrase:
    """A time: seconds under a minute, hours and minutes over 90 min (the formatter's rule)."""
    return _q("time", float("nan") if v_min is None else v_min)


def share(v: float) -> str:
    """A share as a whole percentage that never reads 0 % or 100 % when it is not."""
    if 0.99 < v < 1.0:
        return "over 99 %"
    return fmt_percent(v)


def change(v: float) -> str:
    """A signed change: '+6 %', '−11 %'."""
    return fmt_percent(v, signed=True)
