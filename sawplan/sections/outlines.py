"""Exact outlines of each shape in each named orientation.

Every outline is built in a z-up frame from its sizes and turned into the
named orientation by exact rotation, so each orientation is the true figure.
Structural shapes (angle, channel, I-beam) and tubes are drawn with sharp
corners: root fillets, toe radii and corner radii of real rolled or formed
sections are ignored (they change the area by a few per cent at most and move
W(y) only near the corners).
"""

from __future__ import annotations

import math

from sawplan.sections.geometry import Circle, Part, Polygon, mirror_vertical, rect, rotate


def outline(shape: str, dims: tuple[float, ...], orientation: str) -> list[Part]:
    """The signed parts of one piece in the named orientation (z up, any position)."""
    if shape == "round":
        return [Part(Circle(0.0, 0.0, dims[0] / 2))]
    if shape == "tube":
        od, t = dims
        return [Part(Circle(0.0, 0.0, od / 2)), Part(Circle(0.0, 0.0, od / 2 - t), -1)]
    if shape in ("square", "stube"):
        s = dims[0]
        parts = [Part(_centred_square(s, orientation))]
        if shape == "stube":
            parts.append(Part(_centred_square(s - 2 * dims[1], orientation), -1))
        return parts
    if shape in ("flat", "rtube"):
        w, h = dims[0], dims[1]
        if orientation == "edge":
            w, h = h, w
        parts = [Part(rect(-w / 2, -h / 2, w / 2, h / 2))]
        if shape == "rtube":
            t = dims[2]
            parts.append(Part(rect(-w / 2 + t, -h / 2 + t, w / 2 - t, h / 2 - t), -1))
        return parts
    if shape == "hex":
        f = dims[0]
        r = f / math.sqrt(3.0)  # circumradius: corner to centre
        hexagon = [
            Part(
                Polygon(
                    (
                        (r, 0.0),
                        (r / 2, f / 2),
                        (-r / 2, f / 2),
                        (-r, 0.0),
                        (-r / 2, -f / 2),
                        (r / 2, -f / 2),
                    )
                )
            )
        ]
        return hexagon if orientation == "flat" else rotate(hexagon, 90.0)
    if shape == "octagon":
        return [Part(_octagon(dims[0], orientation))]
    if shape == "angle":
        a, b, t = dims
        ell = [Part(Polygon(((0.0, 0.0), (a, 0.0), (a, t), (t, t), (t, b), (0.0, b))))]
        # the legs' bisector points at 45°; turn it down (heel up) or up (heel down)
        return {"flat": ell, "legs-down": rotate(ell, -135.0), "vee": rotate(ell, 45.0)}[
            orientation
        ]
    if shape == "channel":
        d, bf, tw, tf = dims
        cup = [
            Part(
                Polygon(
                    (
                        (0.0, 0.0),
                        (d, 0.0),
                        (d, bf),
                        (d - tf, bf),
                        (d - tf, tw),
                        (tf, tw),
                        (tf, bf),
                        (0.0, bf),
                    )
                )
            )
        ]
        return {
            "web-down": cup,
            "flanges-down": mirror_vertical(cup),
            "on-side": rotate(cup, 90.0),
        }[orientation]
    if shape == "ibeam":
        d, bf, tw, tf = dims
        x, w, z = bf / 2, tw / 2, d / 2
        i_shape = [
            Part(
                Polygon(
                    (
                        (-x, -z),
                        (x, -z),
                        (x, -z + tf),
                        (w, -z + tf),
                        (w, z - tf),
                        (x, z - tf),
                        (x, z),
                        (-x, z),
                        (-x, z - tf),
                        (-w, z - tf),
                        (-w, -z + tf),
                        (-x, -z + tf),
                    )
                )
            )
        ]
        return i_shape if orientation == "upright" else rotate(i_shape, 90.0)
    raise KeyError(shape)


def _centred_square(s: float, orientation: str) -> Polygon:
    h = s / 2
    if orientation == "corner":
        d = s / math.sqrt(2.0)  # half the diagonal
        return Polygon(((d, 0.0), (0.0, d), (-d, 0.0), (0.0, -d)))
    return Polygon(((h, -h), (h, h), (-h, h), (-h, -h)))


def _octagon(f: float, orientation: str) -> Polygon:
    h = f / 2
    if orientation == "corner":
        r = h / math.cos(math.pi / 8)  # circumradius
        q = r * math.sqrt(0.5)
        return Polygon(
            ((r, 0.0), (q, q), (0.0, r), (-q, q), (-r, 0.0), (-q, -q), (0.0, -r), (q, -q))
        )
    s = h * (math.sqrt(2.0) - 1.0)  # half a side
    return Polygon(((h, -s), (h, s), (s, h), (-s, h), (-h, s), (-h, -s), (-s, -h), (s, -h)))
