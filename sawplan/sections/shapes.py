"""The shape catalogue: names, sizes, orientations, aliases and size checks."""

from __future__ import annotations

from dataclasses import dataclass

from sawplan.errors import BadDataError, UsageError

MAX_SIZE_MM = 10_000.0  # a bundle wider or taller than any band saw's capacity: a typing slip


@dataclass(frozen=True)
class ShapeInfo:
    """What help text needs to know about one shape."""

    name: str
    title: str
    dims: tuple[str, ...]
    orientations: tuple[str, ...]
    default_orientation: str
    example: str
    aliases: tuple[str, ...]
    orientation_help: dict[str, str]
    hollow: bool = False


_FLAT_CORNER = {
    "flat": "lying on a flat face",
    "corner": "standing on a corner (diagonal upright)",
}

SHAPES: dict[str, ShapeInfo] = {
    info.name: info
    for info in (
        ShapeInfo(
            "round",
            "solid round bar",
            ("diameter",),
            ("any",),
            "any",
            "round 7in",
            ("rod", "rd", "circle", "roundbar", "round-bar"),
            {"any": "a round looks the same in every orientation"},
        ),
        ShapeInfo(
            "square",
            "solid square bar",
            ("side",),
            ("flat", "corner"),
            "flat",
            "square 2in",
            ("sq", "sqr", "squarebar", "square-bar"),
            _FLAT_CORNER,
        ),
        ShapeInfo(
            "flat",
            "flat bar or plate (rectangle)",
            ("width", "thickness"),
            ("flat", "edge"),
            "flat",
            "flat 4in 1in",
            ("rect", "rectangle", "flatbar", "flat-bar", "plate", "fl"),
            {
                "flat": "lying flat (height = thickness)",
                "edge": "standing on edge (height = width)",
            },
        ),
        ShapeInfo(
            "hex",
            "hexagon bar",
            ("across_flats",),
            ("flat", "corner"),
            "flat",
            "hex 2in",
            ("hexagon", "hx", "hexbar", "hex-bar"),
            _FLAT_CORNER,
        ),
        ShapeInfo(
            "octagon",
            "octagon bar",
            ("across_flats",),
            ("flat", "corner"),
            "flat",
            "octagon 2in",
            ("oct", "octagonal", "octbar", "oct-bar"),
            _FLAT_CORNER,
        ),
        ShapeInfo(
            "tube",
            "round tube or pipe",
            ("outside_diameter", "wall"),
            ("any",),
            "any",
            "tube 4in 0.25in",
            ("pipe", "roundtube", "round-tube", "chs"),
            {"any": "a round tube looks the same in every orientation"},
            hollow=True,
        ),
        ShapeInfo(
            "stube",
            "square tube",
            ("side", "wall"),
            ("flat", "corner"),
            "flat",
            "stube 2in 0.125in",
            ("squaretube", "square-tube", "sqtube", "sq-tube", "shs", "box"),
            _FLAT_CORNER,
            hollow=True,
        ),
        ShapeInfo(
            "rtube",
            "rectangular tube",
            ("width", "height", "wall"),
            ("flat", "edge"),
            "flat",
            "rtube 4in 2in 0.25in",
            ("recttube", "rect-tube", "rectangular-tube", "rectube", "rhs"),
            {"flat": "lying on its wide face", "edge": "standing on its narrow face"},
            hollow=True,
        ),
        ShapeInfo(
            "angle",
            "angle (L section), equal or unequal legs",
            ("leg_a", "leg_b", "thickness"),
            ("legs-down", "vee", "flat"),
            "legs-down",
            "angle 3in 3in 0.25in",
            ("l", "ang", "angle-iron", "l-section"),
            {
                "legs-down": "heel up, both legs down at 45° like a tent (common practice)",
                "vee": "heel down, legs up at 45° as in a vee block",
                "flat": "leg a lying on the bed, leg b standing up",
            },
            hollow=True,
        ),
        ShapeInfo(
            "channel",
            "channel (C/U section)",
            ("depth", "flange_width", "web_thickness", "flange_thickness"),
            ("flanges-down", "web-down", "on-side"),
            "flanges-down",
            "channel 6in 2in 0.2in 0.34in",
            ("c", "u", "chan", "u-channel", "c-channel"),
            {
                "flanges-down": "web on top, flanges standing on the bed",
                "web-down": "web lying on the bed, flanges up",
                "on-side": "web upright, flanges pointing sideways",
            },
            hollow=True,
        ),
        ShapeInfo(
            "ibeam",
            "I-beam or H-beam (wide flange)",
            ("depth", "flange_width", "web_thickness", "flange_thickness"),
            ("upright", "on-side"),
            "upright",
            "ibeam 8in 4in 0.25in 0.4in",
            ("hbeam", "beam", "i-beam", "h-beam", "wideflange", "wide-flange"),
            {
                "upright": "web upright, flanges top and bottom",
                "on-side": "web lying level, flanges upright",
            },
            hollow=True,
        ),
    )
}

SHAPE_ALIASES: dict[str, str] = {a: info.name for info in SHAPES.values() for a in info.aliases}

# Other spellings of orientations; applied only where the result is valid for the shape.
ORIENTATION_ALIASES: dict[str, str] = {
    "lying": "flat",
    "lying-flat": "flat",
    "on-flat": "flat",
    "on-a-flat": "flat",
    "face": "flat",
    "on-face": "flat",
    "level": "flat",
    "horizontal": "flat",
    "on-edge": "edge",
    "upright": "edge",
    "standing": "edge",
    "vertical": "edge",
    "on-corner": "corner",
    "on-a-corner": "corner",
    "point": "corner",
    "diamond": "corner",
    "diagonal": "corner",
    "tent": "legs-down",
    "heel-up": "legs-down",
    "apex-up": "legs-down",
    "roof": "legs-down",
    "v": "vee",
    "heel-down": "vee",
    "apex-down": "vee",
    "v-block": "vee",
    "l": "flat",
    "leg-down": "flat",
    "leg-flat": "flat",
    "web-up": "flanges-down",
    "legs-down": "flanges-down",
    "n": "flanges-down",
    "flanges-up": "web-down",
    "legs-up": "web-down",
    "side": "on-side",
    "sideways": "on-side",
}

# Spellings whose meaning depends on the shape (the web of a channel on its side is
# upright, as is the web of an upright I-beam).
SHAPE_ORIENTATION_ALIASES: dict[str, dict[str, str]] = {
    "channel": {"web-upright": "on-side", "web-vertical": "on-side", "web-flat": "web-down"},
    "ibeam": {
        "web-upright": "upright",
        "web-vertical": "upright",
        "i": "upright",
        "web-level": "on-side",
        "web-flat": "on-side",
        "web-horizontal": "on-side",
        "h": "on-side",
    },
}


def canonical_orientation(shape: str, word: str) -> str | None:
    """The orientation name ``word`` stands for on ``shape``, or None."""
    info = SHAPES[shape]
    key = "-".join(word.strip().lower().replace("_", " ").replace("-", " ").split())
    if key in ("", "default"):
        return info.default_orientation
    if key in info.orientations:
        return key
    alias = SHAPE_ORIENTATION_ALIASES.get(shape, {}).get(key) or ORIENTATION_ALIASES.get(key)
    if alias in info.orientations:
        return alias
    return None


def orientation_error(shape: str, word: str) -> UsageError:
    choices = " or ".join(SHAPES[shape].orientations)
    return UsageError(f"{shape} has no orientation {word!r}; choose {choices}", field="orientation")


def _check(ok: bool, field: str, message: str) -> None:
    if not ok:
        raise BadDataError(message, field=field)


def _mm(v: float) -> str:
    return f"{v:.6g} mm"


def validate_dims(shape: str, dims: tuple[float, ...]) -> tuple[float, ...]:
    """Check sizes and return them in canonical order (flats and rtubes widest first)."""
    from sawplan.fields import check

    info = SHAPES[shape]
    for name, v in zip(info.dims, dims, strict=True):
        # the field table's range for any size of a section, named in words ("leg a")
        check("size", v, words=name.replace("_", " "))
    if shape == "flat" and dims[1] > dims[0]:
        dims = (dims[1], dims[0])
    elif shape == "rtube" and dims[1] > dims[0]:
        dims = (dims[1], dims[0], dims[2])
    if shape == "tube":
        od, t = dims
        _check(
            t < od / 2,
            "wall",
            f"must be less than half the outside diameter ({_mm(od / 2)}), got {_mm(t)}; "
            "a wall of half the diameter is a solid round",
        )
    elif shape in ("stube", "rtube"):
        small = min(dims[:-1])
        t = dims[-1]
        _check(
            t < small / 2,
            "wall",
            f"must be less than half the side ({_mm(small / 2)}), got {_mm(t)}",
        )
    elif shape == "angle":
        a, b, t = dims
        _check(
            t < min(a, b),
            "thickness",
            f"must be less than the shorter leg ({_mm(min(a, b))}), got {_mm(t)}",
        )
    elif shape in ("channel", "ibeam"):
        d, bf, tw, tf = dims
        _check(
            2 * tf < d,
            "flange thickness",
            f"must be less than half the depth ({_mm(d / 2)}), got {_mm(tf)}",
        )
        _check(
            tw < bf,
            "web thickness",
            f"must be less than the flange width ({_mm(bf)}), got {_mm(tw)}",
        )
    return dims


def min_wall(shape: str, dims: tuple[float, ...]) -> float | None:
    """The thinnest wall of a hollow or structural shape; None for solids."""
    if shape in ("tube", "stube", "rtube", "angle"):
        return dims[-1]
    if shape in ("channel", "ibeam"):
        return min(dims[2], dims[3])
    return None
