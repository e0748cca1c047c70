"""Exact width of cut W(y) of plane figures: signed polygons and circles.

A section is a list of signed parts (+1 metal, −1 hole) placed in the *depth
frame*: x runs along the blade's travel, y is the depth below the top of the
work (0 at the top, H at the bottom).  Between two consecutive breakpoints
(vertex depths, tops and bottoms of circles) every polygon contributes a chord
that is linear in y and every circle adds ±2·sqrt(r² − (y − c)²).  W(y) is
therefore compiled once into pieces and then evaluated by bisection, which
keeps the few hundred evaluations of a cut simulation cheap and exact.
"""

from __future__ import annotations

import math
from bisect import bisect_right
from collections.abc import Callable, Iterable
from dataclasses import dataclass

Point = tuple[float, float]

_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


@dataclass(frozen=True)
class Polygon:
    """A simple polygon (convex or not), vertices in order, either direction."""

    points: tuple[Point, ...]

    @property
    def signed_area(self) -> float:
        pts = self.points
        total = 0.0
        for i, (x0, y0) in enumerate(pts):
            x1, y1 = pts[(i + 1) % len(pts)]
            total += x0 * y1 - x1 * y0
        return total / 2.0

    @property
    def area(self) -> float:
        return abs(self.signed_area)

    def bounds(self) -> tuple[float, float, float, float]:
        xs = [p[0] for p in self.points]
        ys = [p[1] for p in self.points]
        return min(xs), min(ys), max(xs), max(ys)

    def mapped(self, fn: Callable[[float, float], Point]) -> Polygon:
        return Polygon(tuple(fn(x, y) for x, y in self.points))


@dataclass(frozen=True)
class Circle:
    """A disc of radius ``r`` centred on (cx, cy)."""

    cx: float
    cy: float
    r: float

    @property
    def area(self) -> float:
        return math.pi * self.r * self.r

    def bounds(self) -> tuple[float, float, float, float]:
        return self.cx - self.r, self.cy - self.r, self.cx + self.r, self.cy + self.r

    def mapped(self, fn: Callable[[float, float], Point]) -> Circle:
        cx, cy = fn(self.cx, self.cy)
        return Circle(cx, cy, self.r)


@dataclass(frozen=True)
class Part:
    """One figure of a section: ``sign`` +1 is metal, −1 a hole inside metal."""

    figure: Polygon | Circle
    sign: int = 1


def rect(x0: float, y0: float, x1: float, y1: float) -> Polygon:
    """Axis-aligned rectangle between two corners."""
    return Polygon(((x0, y0), (x1, y0), (x1, y1), (x0, y1)))


def _rotation(degrees: float) -> tuple[float, float]:
    """cos and sin, exact at multiples of 45° so symmetric shapes stay symmetric."""
    turns = degrees / 45.0
    if turns == round(turns):
        k = int(round(turns)) % 8
        h = math.sqrt(0.5)
        return (
            (1.0, 0.0),
            (h, h),
            (0.0, 1.0),
            (-h, h),
            (-1.0, 0.0),
            (-h, -h),
            (0.0, -1.0),
            (h, -h),
        )[k]
    rad = math.radians(degrees)
    return math.cos(rad), math.sin(rad)


def rotate(parts: Iterable[Part], degrees: float) -> list[Part]:
    """Rotate counter-clockwise (x right, z up) about the origin."""
    c, s = _rotation(degrees)
    return [
        Part(p.figure.mapped(lambda x, z: (c * x - s * z, s * x + c * z)), p.sign) for p in parts
    ]


def mirror_vertical(parts: Iterable[Part]) -> list[Part]:
    """Turn upside down (z → −z)."""
    return [Part(p.figure.mapped(lambda x, z: (x, -z)), p.sign) for p in parts]


def translate(parts: Iterable[Part], dx: float, dy: float) -> list[Part]:
    return [Part(p.figure.mapped(lambda x, y: (x + dx, y + dy)), p.sign) for p in parts]


def extent(parts: Iterable[Part]) -> tuple[float, float, float, float]:
    """Bounding box of the metal (holes lie inside it)."""
    boxes = [p.figure.bounds() for p in parts if p.sign > 0]
    return (
        min(b[0] for b in boxes),
        min(b[1] for b in boxes),
        max(b[2] for b in boxes),
        max(b[3] for b in boxes),
    )


def to_depth_frame(parts: list[Part]) -> tuple[list[Part], float, float]:
    """Move a z-up figure so x starts at 0 and y is the depth below its top.

    Returns the parts, the width (along the blade) and the height H.
    """
    xmin, zmin, xmax, zmax = extent(parts)
    placed = [Part(p.figure.mapped(lambda x, z: (x - xmin, zmax - z)), p.sign) for p in parts]
    return placed, xmax - xmin, zmax - zmin


def net_area(parts: Iterable[Part]) -> float:
    """Metal area: shoelace for polygons, πr² for circles, holes subtracted."""
    return sum(p.sign * p.figure.area for p in parts)


def _segment_integral(y: float, top: float, bottom: float) -> float:
    """Antiderivative in y of the circle chord 2·sqrt((y − top)(bottom − y)).

    u·sqrt(r² − u²) + r²·asin(u/r) with u = y − centre, written with the
    distances p, q to the top and bottom and atan2 so no digits are lost near
    the tangent points.
    """
    p = min(max(y - top, 0.0), bottom - top)
    q = min(max(bottom - y, 0.0), bottom - top)
    r = (bottom - top) / 2
    s = math.sqrt(p * q)
    u = (p - q) / 2
    return u * s + r * r * math.atan2(u, s)


class ChordProfile:
    """W(y) of a placed section, compiled into exact pieces between breakpoints.

    On piece i (``breaks[i] <= y <= breaks[i+1]``)
    W(y) = w0 + slope·(y − breaks[i]) + Σ weight·2·sqrt((y − top)(bottom − y))
    over the circles (tops and bottoms) that span the piece.
    """

    __slots__ = ("breaks", "height", "_w0", "_slope", "_circles", "_cumulative")

    def __init__(self, parts: list[Part], height: float) -> None:
        self.height = height
        self.breaks = _merged_breaks(parts, height)
        n = len(self.breaks) - 1
        w0 = [0.0] * n
        slope = [0.0] * n
        circles: list[dict[tuple[float, float], float]] = [{} for _ in range(n)]
        for part in parts:
            fig = part.figure
            if isinstance(fig, Circle):
                first = self._snap(fig.cy - fig.r)
                last = self._snap(fig.cy + fig.r)
                key = (fig.cy - fig.r, fig.cy + fig.r)
                for i in range(first, last):
                    circles[i][key] = circles[i].get(key, 0.0) + part.sign
                continue
            orient = 1.0 if fig.signed_area > 0 else -1.0
            pts = fig.points
            for j, (xa, ya) in enumerate(pts):
                xb, yb = pts[(j + 1) % len(pts)]
                first, last = self._snap(ya), self._snap(yb)
                if first == last:
                    continue  # horizontal edge (or a rounding sliver of one)
                # right-hand edges run downwards in a positive polygon: + x, left ones − x
                gain = part.sign * orient * (1.0 if yb > ya else -1.0)
                dxdy = (xb - xa) / (yb - ya)
                for i in range(min(first, last), max(first, last)):
                    w0[i] += gain * (xa + (self.breaks[i] - ya) * dxdy)
                    slope[i] += gain * dxdy
        self._w0 = w0
        self._slope = slope
        self._circles = [
            tuple((top, bot, 2.0 * k) for (top, bot), k in sorted(d.items()) if k != 0)
            for d in circles
        ]
        cumulative = [0.0]
        for i in range(n):
            cumulative.append(cumulative[-1] + self._piece_integral(i, self.breaks[i + 1]))
        self._cumulative = cumulative

    def _snap(self, y: float) -> int:
        """Index of the breakpoint nearest to y."""
        b = self.breaks
        i = bisect_right(b, y)
        if i == 0:
            return 0
        if i == len(b):
            return len(b) - 1
        return i if b[i] - y < y - b[i - 1] else i - 1

    def _piece(self, i: int, y: float) -> float:
        w = self._w0[i] + self._slope[i] * (y - self.breaks[i])
        for top, bottom, k in self._circles[i]:
            q = (y - top) * (bottom - y)  # 2·sqrt(y(D − y)) measured from the circle's top
            if q > 0.0:
                w += k * math.sqrt(q)
        return w if w > 0.0 else 0.0

    def chord(self, y: float) -> float:
        """W(y); 0 outside [0, H]; at a breakpoint the larger one-sided value."""
        b = self.breaks
        if not (0.0 <= y <= self.height):
            return 0.0
        i = bisect_right(b, y) - 1
        last = len(b) - 2
        if i > last:
            return self._piece(last, y)
        if y == b[i] and i > 0:
            return max(self._piece(i, y), self._piece(i - 1, y))
        return self._piece(i, y)

    def _piece_integral(self, i: int, y: float) -> float:
        """∫ W from breaks[i] to y (y inside piece i)."""
        a = self.breaks[i]
        t = y - a
        total = self._w0[i] * t + self._slope[i] * t * t / 2.0
        for top, bottom, k in self._circles[i]:
            total += (
                k / 2.0 * (_segment_integral(y, top, bottom) - _segment_integral(a, top, bottom))
            )
        return total

    def swept(self, y: float) -> float:
        """Metal area above depth y: ∫₀ʸ W, exact."""
        if y <= 0.0:
            return 0.0
        if y >= self.height:
            return self._cumulative[-1]
        i = min(bisect_right(self.breaks, y) - 1, len(self.breaks) - 2)
        return self._cumulative[i] + self._piece_integral(i, y)

    def maximum(self) -> float:
        """Largest W: piece ends for straight pieces, golden-section search where circles bend W."""
        best = 0.0
        for i in range(len(self.breaks) - 1):
            a, b = self.breaks[i], self.breaks[i + 1]
            best = max(best, self._piece(i, a), self._piece(i, b))
            if not self._circles[i]:
                continue
            samples = 24
            ys = [a + (b - a) * k / samples for k in range(samples + 1)]
            ws = [self._piece(i, y) for y in ys]
            k = max(range(len(ws)), key=ws.__getitem__)
            lo, hi = ys[max(k - 1, 0)], ys[min(k + 1, samples)]
            best = max(best, ws[k], self._golden(i, lo, hi))
        return best

    def thinnest_wall(self, per_piece: int = 16) -> float | None:
        """The least W(y) where the blade crosses walls, or None for a solid-like profile.

        Where W(y) rises from zero — the blade entering over a tangent or a
        corner, at the top, the bottom, or between touching rows of a bundle —
        the chord is only passing through; those ramps are left out.  What is
        left is where teeth must span the walls: both walls at a tube's
        equator, a channel's two flanges, an I-beam's web, a face on the top.
        When the ramps meet (a round, a square on its corner) nothing is left.
        """
        ys: list[float] = []
        ws: list[float] = []
        for i in range(len(self.breaks) - 1):
            a, b = self.breaks[i], self.breaks[i + 1]
            for k in range(per_piece + 1):
                y = a + (b - a) * k / per_piece
                w = self._piece(i, y)
                if ys and y == ys[-1] and abs(w - ws[-1]) <= 1e-12 * max(w, 1.0):
                    continue  # the same point seen from the next piece
                ys.append(y)
                ws.append(w)
        tol = 1e-9 * max(max(ws, default=0.0), 1.0)
        ramp = [w <= tol for w in ws]
        for start, zero in enumerate(list(ramp)):
            if not zero:
                continue
            j = start + 1
            while j < len(ws) and ws[j] > ws[j - 1] + tol:
                ramp[j] = True
                j += 1
            j = start - 1
            while j >= 0 and ws[j] > ws[j + 1] + tol:
                ramp[j] = True
                j -= 1
        left = [k for k in range(len(ws)) if not ramp[k]]
        if not left:
            return None
        k = min(left, key=ws.__getitem__)
        best = ws[k]
        # refine a minimum inside a piece where circles bend W (a tube's equator)
        i = min(bisect_right(self.breaks, ys[k]) - 1, len(self.breaks) - 2)
        if self._circles[i]:
            lo = max(ys[k - 1] if k > 0 else ys[k], self.breaks[i])
            hi = min(ys[k + 1] if k + 1 < len(ys) else ys[k], self.breaks[i + 1])
            if hi > lo:
                tol = 1e-12 * max(self.height, 1.0)
                best = min(best, -_golden_max(lambda y: -self._piece(i, y), lo, hi, tol))
        return best

    def _golden(self, i: int, lo: float, hi: float) -> float:
        return _golden_max(lambda y: self._piece(i, y), lo, hi, 1e-12 * max(self.height, 1.0))


def _golden_max(f: Callable[[float], float], lo: float, hi: float, tol: float) -> float:
    """Largest f on [lo, hi] for a unimodal f (golden-section search)."""
    x1 = hi - _GOLDEN * (hi - lo)
    x2 = lo + _GOLDEN * (hi - lo)
    f1, f2 = f(x1), f(x2)
    for _ in range(80):
        if hi - lo <= tol:
            break
        if f1 < f2:
            lo, x1, f1 = x1, x2, f2
            x2 = lo + _GOLDEN * (hi - lo)
            f2 = f(x2)
        else:
            hi, x2, f2 = x2, x1, f1
            x1 = hi - _GOLDEN * (hi - lo)
            f1 = f(x1)
    return max(f1, f2)


def _merged_breaks(parts: list[Part], height: float) -> tuple[float, ...]:
    """Sorted depths where W(y) may kink or jump; near-equal values (rounding) merged."""
    ys: list[float] = []
    for part in parts:
        fig = part.figure
        if isinstance(fig, Circle):
            ys += [fig.cy - fig.r, fig.cy + fig.r]
        else:
            ys += [p[1] for p in fig.points]
    tol = 1e-9 * max(height, 1.0)
    merged = [0.0]
    for y in sorted(ys):
        if y - merged[-1] > tol and height - y > tol:
            merged.append(y)
    merged.append(height)
    return tuple(merged)


def _part_intervals(fig: Polygon | Circle, y: float) -> list[tuple[float, float]]:
    """Where the horizontal line at depth y lies inside one figure (even-odd rule)."""
    if isinstance(fig, Circle):
        # (y − top)(bottom − y), as W(y) has it: no cancellation near the tangents
        q = (y - (fig.cy - fig.r)) * ((fig.cy + fig.r) - y)
        if q <= 0.0:
            return []
        half = math.sqrt(q)
        return [(fig.cx - half, fig.cx + half)]
    xs: list[float] = []
    pts = fig.points
    for j, (xa, ya) in enumerate(pts):
        xb, yb = pts[(j + 1) % len(pts)]
        if (ya <= y < yb) or (yb <= y < ya):  # half-open: each vertex counted once
            xs.append(xa + (y - ya) * (xb - xa) / (yb - ya))
    xs.sort()
    return [(xs[k], xs[k + 1]) for k in range(0, len(xs) - 1, 2)]


def _union(intervals: list[tuple[float, float]], gap: float) -> list[tuple[float, float]]:
    merged: list[tuple[float, float]] = []
    for a, b in sorted(intervals):
        if merged and a <= merged[-1][1] + gap:
            if b > merged[-1][1]:
                merged[-1] = (merged[-1][0], b)
        else:
            merged.append((a, b))
    return merged


def metal_runs(parts: Iterable[Part], y: float, tol: float = 1e-9) -> list[tuple[float, float]]:
    """The separate stretches of metal the blade crosses at depth y, left to right.

    Metal is the union of the + parts less the union of the − parts (holes lie
    inside metal).  Pieces that touch (a bundle of flats side by side) form one
    run; a gap or a bore between them splits the run.  Their lengths add up to
    W(y).
    """
    plus: list[tuple[float, float]] = []
    minus: list[tuple[float, float]] = []
    for part in parts:
        (plus if part.sign > 0 else minus).extend(_part_intervals(part.figure, y))
    runs = _union(plus, tol)
    for ha, hb in _union(minus, 0.0):
        cut: list[tuple[float, float]] = []
        for a, b in runs:
            if hb <= a or ha >= b:
                cut.append((a, b))
                continue
            if ha > a:
                cut.append((a, ha))
            if hb < b:
                cut.append((hb, b))
        runs = cut
    return [(a, b) for a, b in runs if b - a > tol]
