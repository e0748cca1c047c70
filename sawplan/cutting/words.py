"""Quantities inside the cutting model's sentences, in one place.

Explanations and warnings are made in the core in core units; every number in
them goes through these helpers, so the way a quantity reads (and, later, the
unit system it reads in) is decided here once.
"""

from __future__ import annotations

from sawplan.units import fmt_number


def length(v_mm: float) -> str:
    """A length as a measurement: 0.01 mm under 10 mm, 0.1 mm under 100 mm, then whole mm."""
    if v_mm >= 100:
        text = f"{v_mm:,.0f}"
    else:
        text = f"{v_mm:.{2 if v_mm < 10 else 1}f}".rstrip("0").rstrip(".")
    return f"{text} mm"


def bite(v_mm: float, digits: int = 2) -> str:
    """A tooth bite in µm."""
    return f"{fmt_number(v_mm * 1000.0, digits)} µm"


def speed(v_m_min: float) -> str:
    return f"{fmt_number(v_m_min, 3)} m/min"


def feed(v_mm_min: float) -> str:
    return f"{fmt_number(v_mm_min, 3)} mm/min"


def rate(v_mm2_min: float) -> str:
    return f"{fmt_number(v_mm2_min / 100.0, 3)} cm²/min"


def force(v_n: float) -> str:
    return f"{fmt_number(v_n, 3)} N"


def power(v_w: float) -> str:
    return f"{fmt_number(v_w, 3)} W"


def share(v: float) -> str:
    """A share as a whole percentage that never reads 0 % or 100 % when it is not."""
    pct = 100.0 * v
    if 0 < pct < 1:
        return "under 1%"
    if 99 < pct < 100:
        return "over 99%"
    return f"{pct:.0f}%"
