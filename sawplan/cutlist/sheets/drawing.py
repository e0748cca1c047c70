"""Bars drawn to scale as plain ASCII, one line per bar.

The drawings survive e-mail, printers and any terminal: ``width`` columns for
the whole bar length.  ``#`` is the head trim, ``[-A-]`` a piece with its
mark, ``=R=`` a remnant to keep, ``...`` scrap.  Kerfs are the seams between
segments.  Pieces too narrow to draw on their own are drawn as one run
(``[A×12]``).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

DRAW_WIDTH = 72


@dataclass(frozen=True)
class Segment:
    """A stretch of the bar for drawing: [start, end) in mm and what it is."""

    kind: str  # "trim" | "piece" | "remnant" | "scrap"
    start_mm: float
    end_mm: float
    label: str


def segments(bar, *, max_segments: int = DRAW_WIDTH // 3) -> list[Segment]:
    """The bar as drawable segments; a piece takes its own length and the kerf after it.

    Runs of the same mark are merged when there are too many segments to draw
    each piece (``A×12``); if even that is too many, all pieces become one run.
    """
    out: list[Segment] = []
    if bar.trim_mm > 0:
        out.append(Segment("trim", 0.0, bar.trim_mm, "#"))
    pieces = list(bar.pieces)
    ends = [p.start_mm for p in pieces[1:]] + [bar.remnant_start_mm if pieces else bar.trim_mm]
    singles = [Segment("piece", p.start_mm, e, p.mark) for p, e in zip(pieces, ends, strict=True)]
    if len(singles) > max_segments:
        singles = _runs(singles)
    if len(singles) > max_segments and singles:
        singles = [Segment("piece", singles[0].start_mm, singles[-1].end_mm, f"{len(pieces)} pcs")]
    out.extend(singles)
    if bar.length_mm - bar.remnant_start_mm > 1e-9:
        kind = "remnant" if bar.remnant_kept else "scrap"
        label = "R" if bar.remnant_kept else ""
        out.append(Segment(kind, bar.remnant_start_mm, bar.length_mm, label))
    return out


def _runs(singles: list[Segment]) -> list[Segment]:
    runs: list[list[Segment]] = []
    for s in singles:
        if runs and runs[-1][0].label == s.label:
            runs[-1].append(s)
        else:
            runs.append([s])
    return [
        Segment("piece", r[0].start_mm, r[-1].end_mm, r[0].label + (f"×{len(r)}" * (len(r) > 1)))
        for r in runs
    ]


def columns(bounds_mm: Sequence[float], total_mm: float, width: int) -> list[int]:
    """Column of each boundary, to scale, with every segment at least one column wide."""
    n = len(bounds_mm) - 1
    cols = [round(x / total_mm * width) if total_mm > 0 else 0 for x in bounds_mm]
    cols[0], cols[-1] = 0, width
    for k in range(1, n + 1):  # at least one column each, left to right
        cols[k] = max(cols[k], cols[k - 1] + 1)
    for k in range(n - 1, 0, -1):  # and pull back from the right edge
        cols[k] = min(cols[k], cols[k + 1] - 1)
    return cols


def draw_bar(bar, width: int = DRAW_WIDTH) -> str:
    """One bar as exactly ``width`` characters, to scale."""
    segs = segments(bar, max_segments=max(1, width // 2))
    if not segs:
        return "." * width
    bounds = [segs[0].start_mm] + [s.end_mm for s in segs]
    cols = columns(bounds, bar.length_mm, width)
    out = []
    for s, a, b in zip(segs, cols, cols[1:], strict=False):
        out.append(_fill(s, b - a))
    text = "".join(out)
    return text[:width].ljust(width, ".")


def _fill(s: Segment, w: int) -> str:
    if w <= 0:
        return ""
    if s.kind == "trim":
        return "#" * w
    if s.kind == "scrap":
        return "." * w
    if s.kind == "remnant":
        return _centred("R", w, "=") if w >= 3 else "R" * min(w, 1) + "=" * (w - 1)
    label = s.label
    if w >= len(label) + 2:
        return "[" + _centred(label, w - 2, "-") + "]"
    if w == len(label) + 1:
        return label + "|"
    if w >= len(label):
        return _centred(label, w, "-")
    return label[:w]


def _centred(text: str, w: int, fill: str) -> str:
    left = (w - len(text)) // 2
    return fill * left + text + fill * (w - len(text) - left)
