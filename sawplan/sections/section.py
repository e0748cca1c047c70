"""A cross-section as the saw sees it: shape, sizes, orientation and bundle.

The blade travels along x; the head descends along y, the depth below the top
of the work, from 0 to the section height H.  W(y) is the total length of metal
on the horizontal line at depth y (the sum of all its intervals, so tubes and
bundles give several).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property
from typing import Any

from sawplan.errors import BadDataError, UsageError
from sawplan.sections.geometry import (
    ChordProfile,
    Circle,
    Part,
    net_area,
    to_depth_frame,
    translate,
)
from sawplan.sections.outlines import outline
from sawplan.sections.shapes import (
    MAX_SIZE_MM,
    SHAPE_ALIASES,
    SHAPES,
    canonical_orientation,
    min_wall,
    orientation_error,
    validate_dims,
)

MAX_BUNDLE_SIDE = 100  # rows or columns; more is a typing mistake
NESTABLE = ("round", "tube")

_SYMBOLS = {"round": "Ø", "tube": "Ø"}
_TITLES = {"stube": "square tube", "rtube": "rect tube", "ibeam": "I-beam"}
_PHRASES = {
    "flat": {"flat": "lying flat", "rtube": "lying flat", "angle": "one leg flat"},
    "edge": {"": "on edge"},
    "corner": {"": "on a corner"},
    "legs-down": {"": "legs down"},
    "vee": {"": "in a vee"},
    "flanges-down": {"": "flanges down"},
    "web-down": {"": "web down"},
    "on-side": {"": "on its side"},
    "upright": {"": "upright"},
}


def orientation_words(shape: str, orientation: str) -> str:
    """How a person says an orientation of a shape: 'on edge', 'in a vee', 'web down'."""
    phrases = _PHRASES.get(orientation, {})
    return phrases.get(shape, phrases.get("", "on a flat"))


def canonical_shape(word: str) -> str | None:
    """The catalogue name ``word`` stands for, or None."""
    key = word.strip().lower().replace("_", "-")
    if key in SHAPES:
        return key
    return SHAPE_ALIASES.get(key) or SHAPE_ALIASES.get(key.replace("-", ""))


def _num(v: float) -> str:
    return f"{round(v, 4):g}"


def _exact(v: float) -> str:
    """Shortest text that reads back as the same float (no trailing .0)."""
    text = repr(v)
    return text[:-2] if text.endswith(".0") else text


@dataclass(frozen=True)
class Section:
    """An exact cross-section: one piece or a bundle of touching pieces.

    Sizes are in mm and rounded to 1 nm so text round trips exactly.  Real
    rolled sections have root fillets and rounded corners; they are drawn sharp
    here.  ``nested`` stacks alternate rows of rounds or round tubes shifted by
    half a diameter at a row pitch of D·√3/2 (the way round bars settle); other
    shapes bundle in a plain grid only (``nested`` is a BadDataError for them).
    A single-row bundle has nothing to nest, so ``nested`` is stored False.
    """

    shape: str
    dims_mm: tuple[float, ...]
    orientation: str = ""
    bundle_rows: int = 1
    bundle_cols: int = 1
    nested: bool = False

    def __post_init__(self) -> None:
        shape = canonical_shape(self.shape) if isinstance(self.shape, str) else None
        if shape is None:
            raise UsageError(
                f"unknown shape {self.shape!r}", field="shape", hint="shapes: " + ", ".join(SHAPES)
            )
        info = SHAPES[shape]
        dims = tuple(float(d) for d in self.dims_mm)
        if len(dims) != len(info.dims):
            raise BadDataError(
                f"{shape} needs {len(info.dims)} sizes ({', '.join(info.dims)}), got {len(dims)}",
                field="dims_mm",
            )
        dims = tuple(round(d, 6) for d in validate_dims(shape, dims))
        orientation = canonical_orientation(shape, self.orientation or "")
        if orientation is None:
            raise orientation_error(shape, self.orientation)
        for name in ("bundle_rows", "bundle_cols"):
            n = getattr(self, name)
            if isinstance(n, bool) or not isinstance(n, int) or not 1 <= n <= MAX_BUNDLE_SIDE:
                raise BadDataError(
                    f"must be a whole number from 1 to {MAX_BUNDLE_SIDE}, got {n!r}", field="bundle"
                )
        nested = bool(self.nested)
        if nested and shape not in NESTABLE:
            raise BadDataError(
                f"only round and tube bundles nest; a {shape} bundle is stacked in a plain grid",
                field="nest",
            )
        object.__setattr__(self, "shape", shape)
        object.__setattr__(self, "dims_mm", dims)
        object.__setattr__(self, "orientation", orientation)
        object.__setattr__(self, "nested", nested and self.bundle_rows > 1)
        if self.width_mm > MAX_SIZE_MM or self.height_mm > MAX_SIZE_MM:
            raise BadDataError(
                f"the bundle would be {_num(self.width_mm)} × {_num(self.height_mm)} mm, "
                "beyond any saw (at most 10 m)",
                field="bundle",
            )

    # --- geometry -----------------------------------------------------------------

    @cached_property
    def _placed(self) -> tuple[list[Part], float, float]:
        """All parts of the bundle in the depth frame, with the width and height."""
        rows, cols = self.bundle_rows, self.bundle_cols
        one, w, h = to_depth_frame(outline(self.shape, self.dims_mm, self.orientation))
        if not self.nested:
            parts = [
                p for i in range(rows) for j in range(cols) for p in translate(one, j * w, i * h)
            ]
            return parts, cols * w, rows * h
        d = self.dims_mm[0]
        pitch = d * math.sqrt(3.0) / 2.0
        parts = []
        for i in range(rows):
            cy = d / 2 + i * pitch
            shift = d / 2 if i % 2 else 0.0
            for j in range(cols):
                cx = d / 2 + j * d + shift
                parts += [
                    Part(Circle(cx, cy, p.figure.r), p.sign)
                    for p in one
                    if isinstance(p.figure, Circle)
                ]
        return parts, cols * d + d / 2, d + (rows - 1) * pitch

    @cached_property
    def _profile(self) -> ChordProfile:
        parts, _w, h = self._placed
        return ChordProfile(parts, h)

    @cached_property
    def area_mm2(self) -> float:
        """Metal area of the whole bundle (shoelace and πr², holes subtracted)."""
        return net_area(self._placed[0])

    @property
    def height_mm(self) -> float:
        """Extent in the feed direction: the depth the head must travel."""
        return self._placed[2]

    @property
    def width_mm(self) -> float:
        """Extent along the blade's travel (what the vise must open to)."""
        return self._placed[1]

    @cached_property
    def max_chord_mm(self) -> float:
        """The widest W(y)."""
        return self._profile.maximum()

    @property
    def mean_chord_mm(self) -> float:
        """Area / height: the average width of cut (metal area ÷ blade travel)."""
        return self.area_mm2 / self.height_mm

    @cached_property
    def thinnest_chord_mm(self) -> float:
        """Metal on the blade's line where the teeth span the least of it.

        Counted over the whole chord: both walls at a round tube's equator, the
        two side walls of a box section, every column of a bundle.  Entry and
        exit over a tangent or a corner are passing moments, not walls, and
        are left out; a single solid bar is counted at its widest chord (the
        trade's reading of the three-tooth rule for solids).
        """
        if self.is_solid and self.pieces == 1:
            return self.max_chord_mm
        thinnest = self._profile.thinnest_wall()
        return self.max_chord_mm if thinnest is None else thinnest

    @property
    def min_wall_mm(self) -> float | None:
        """Thinnest wall the blade crosses (tube wall, leg, web or flange); None for solids."""
        return min_wall(self.shape, self.dims_mm)

    @property
    def is_solid(self) -> bool:
        return self.min_wall_mm is None

    @property
    def pieces(self) -> int:
        return self.bundle_rows * self.bundle_cols

    def chord_mm(self, y_mm: float) -> float:
        """W(y): metal length at depth y; 0 outside [0, H].

        At a depth where a horizontal face lies (a breakpoint with a jump), the
        larger of the two one-sided values is returned: the teeth touch that face.
        """
        return self._profile.chord(y_mm)

    def runs_mm(self, y_mm: float) -> tuple[float, ...]:
        """Lengths of the separate stretches of metal at depth y (they sum to W(y)).

        A tooth's gullet empties where the tooth leaves metal (a bore, the gap
        between bars of a bundle), so chip load is set by the longest run.
        """
        from sawplan.sections.geometry import metal_runs

        if not (0.0 <= y_mm <= self.height_mm):
            return ()
        eps = 1e-9 * max(self.height_mm, 1.0)
        parts = self._parts_near(y_mm, 2 * eps)
        runs = tuple(b - a for a, b in metal_runs(parts, y_mm))
        chord = self.chord_mm(y_mm)
        if abs(sum(runs) - chord) > 1e-9 * max(chord, 1.0):
            # on a horizontal face W(y) takes the side the teeth touch: do the same
            for y in (y_mm - eps, y_mm + eps):
                side = tuple(b - a for a, b in metal_runs(parts, y))
                if abs(sum(side) - chord) < abs(sum(runs) - chord):
                    runs = side
        return runs

    @cached_property
    def _by_depth(self) -> tuple[tuple[float, ...], tuple[tuple[float, float, Part], ...]]:
        """Parts sorted by the depth of their top, with their depth extents (for runs_mm)."""
        placed = []
        for part in self._placed[0]:
            _x0, top, _x1, bottom = part.figure.bounds()
            placed.append((top, bottom, part))
        placed.sort(key=lambda t: t[0])
        return tuple(t[0] for t in placed), tuple(placed)

    def _parts_near(self, y_mm: float, slack: float) -> list[Part]:
        """The parts whose depth extent reaches depth y (a bundle cuts one row at a time)."""
        tops, placed = self._by_depth
        from bisect import bisect_right

        end = bisect_right(tops, y_mm + slack)
        return [part for top, bottom, part in placed[:end] if bottom >= y_mm - slack]

    def longest_run_mm(self, y_mm: float) -> float:
        """The longest single stretch of metal at depth y (0 outside the section)."""
        return max(self.runs_mm(y_mm), default=0.0)

    def breakpoints_mm(self) -> tuple[float, ...]:
        """Sorted depths, 0 and H included, between which W(y) is smooth."""
        return self._profile.breaks

    def figures(self) -> tuple[Part, ...]:
        """The polygons and circles of the bundle in the depth frame (for drawing)."""
        return tuple(self._placed[0])

    def swept_area_mm2(self, y_mm: float) -> float:
        """Metal area already cut when the blade is at depth y: exact ∫₀ʸ W dy."""
        return self._profile.swept(y_mm)

    # --- text ---------------------------------------------------------------------

    def spec(self) -> str:
        """Canonical text that ``parse_section`` reads back to an equal Section."""
        info = SHAPES[self.shape]
        words = [self.shape, *(f"{_exact(d)}mm" for d in self.dims_mm)]
        if len(info.orientations) > 1:
            words += ["--orient", self.orientation]
        if self.pieces > 1:
            words += ["--bundle", f"{self.bundle_rows}x{self.bundle_cols}"]
        if self.nested:
            words.append("--nest")
        return " ".join(words)

    def label(self, system: str | None = None, size: Callable[[float], str] | None = None) -> str:
        """Short human label in mm, e.g. ``flat 100×25 on edge``.

        With ``system`` "us" or "metric" the unit is written out (in or mm);
        ``size`` writes one size given in mm (``sawplan.display.Display.size``).
        """
        us = system is not None and str(getattr(system, "value", system)).lower() == "us"
        scale = 1 / 25.4 if us else 1.0
        dims = [size(d) if size else _num(d * scale) for d in self.dims_mm]
        if self.shape == "stube":
            dims.insert(0, dims[0])
        text = (
            f"{_TITLES.get(self.shape, self.shape)} {_SYMBOLS.get(self.shape, '')}{'×'.join(dims)}"
        )
        if self.shape in ("hex", "octagon"):
            text += " A/F"
        if system is not None:
            text += " in" if us else " mm"
        if len(SHAPES[self.shape].orientations) > 1:
            text += " " + orientation_words(self.shape, self.orientation)
        if self.pieces > 1:
            text += f", bundle {self.bundle_rows}×{self.bundle_cols}" + (
                " nested" if self.nested else ""
            )
        return text

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready summary; field names carry their units."""
        return {
            "shape": self.shape,
            "dims_mm": list(self.dims_mm),
            "orientation": self.orientation,
            "bundle_rows": self.bundle_rows,
            "bundle_cols": self.bundle_cols,
            "nested": self.nested,
            "spec": self.spec(),
            "label": self.label(),
            "area_mm2": self.area_mm2,
            "height_mm": self.height_mm,
            "width_mm": self.width_mm,
            "max_chord_mm": self.max_chord_mm,
            "mean_chord_mm": self.mean_chord_mm,
            "min_wall_mm": self.min_wall_mm,
        }


def largest_bundle(section: Section, width_mm: float, height_mm: float) -> tuple[int, int] | None:
    """The most rows × columns of ``section``'s pieces that fit a width × height opening.

    Grid bundles stack whole pieces; nested rounds sit D·√3/2 apart in rows
    shifted by half a diameter (as ``Section`` lays them).  None when not even
    one piece fits.
    """
    one = Section(section.shape, section.dims_mm, section.orientation)
    w, h = one.width_mm, one.height_mm
    slack = 1e-9
    if w > width_mm + slack or h > height_mm + slack:
        return None
    if not (section.nested and section.shape in NESTABLE):
        rows = int(height_mm / h + slack)
        cols = int(width_mm / w + slack)
        return min(rows, MAX_BUNDLE_SIDE), min(cols, MAX_BUNDLE_SIDE)
    d = section.dims_mm[0]
    rows = 1 + int((height_mm - d) / (d * math.sqrt(3.0) / 2.0) + slack)
    cols = int((width_mm - d / 2) / d + slack) if rows > 1 else int(width_mm / d + slack)
    if cols < 1:  # the half-diameter shift does not fit: one row, no nesting needed
        rows, cols = 1, int(width_mm / d + slack)
    return min(rows, MAX_BUNDLE_SIDE), min(cols, MAX_BUNDLE_SIDE)
