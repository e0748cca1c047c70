"""Small number helpers the command views share."""

from __future__ import annotations


def plain(v: float | None, digits: int = 3) -> str:
    """``digits`` significant figures without trailing zeros: 20.0 → 20, 0.750 → 0.75."""
    import math

    if v is None or not math.isfinite(v):
        return "—"
    if v == 0:
        return "0"
    r = float(f"{v:.{digits}g}")
    if r.is_integer():
        return f"{int(r):,}"
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(r))))
    return f"{r:,.{decimals}f}".rstrip("0").rstrip(".")


def fmt_q(d, kind: str, value: float | None, digits: int = 3) -> str:
    """A display value with its unit label, e.g. ``27 mm``; ``—`` when missing."""
    if value is None:
        return "—"
    return f"{plain(d.value(kind, value), digits)} {d.label(kind)}"
