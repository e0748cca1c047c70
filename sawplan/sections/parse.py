"""Read a section from command-line words or a job file's text.

Syntax: the shape word, then its sizes, each a length with a unit, then
optional ``--orient NAME``, ``--bundle ROWSxCOLS`` and ``--nest``::

    round 7in          flat 4in 1in --orient edge      tube 4in 0.25in
    hex 2in --bundle 3x2     round 60mm --bundle 3x4 --nest
    rtube 4in 2in 1/4in      angle 3in 3in 0.25in      flat 100x25mm

A shell hands ``7 1/4 in`` over as three words, so the words are read as one
stream and a size ends after its unit: ``7 1/4 in`` and ``7-1/4in`` are one
size, ``3' 6"`` is two (write ``3'6"`` for one).  ``AxB unit`` gives several
sizes sharing the unit; a lone ``x`` or ``by`` between sizes is skipped.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Sequence

from sawplan.errors import BadDataError, UsageError
from sawplan.sections.section import MAX_BUNDLE_SIDE, Section, canonical_shape
from sawplan.sections.shapes import (
    SHAPE_ALIASES,
    SHAPES,
    canonical_orientation,
    orientation_error,
)
from sawplan.units import to_core

_SEPARATORS = frozenset({"x", "×", "by", "*"})
_FRACTION = re.compile(r"\d+/\d+\S*")
_PURE_UNIT = re.compile(r"[^\d\s.+\-/].*")
_TIMES = re.compile(
    r"(?P<body>[\d./+-]+(?:[x×*][\d./+-]+)+)(?P<unit>[^\d\s.+\-/].*)?", re.IGNORECASE
)
_BUNDLE = re.compile(r"\s*(\d+)\s*[x×*]\s*(\d+)\s*", re.IGNORECASE)
_FEET_GLUED = re.compile(r"(['′])(?=\d)")
_OPTIONS = {
    "--orient": "orientation",
    "--orientation": "orientation",
    "--bundle": "bundle",
    "--nest": "nest",
    "--nested": "nest",
}
_BUNDLE_HINT = "write ROWSxCOLS, e.g. 3x2 for 3 rows of 2"
# marks the tool prints or a shop writes beside a size: "round Ø250 mm", "dia 60mm", "2in OD",
# "hex 50 A/F mm"; a diameter mark alone makes the shape a round
_DIAMETER_SIGNS = ("Ø", "ø", "⌀")
_DIAMETER_WORDS = frozenset({"dia", "dia.", "diam", "diam.", "diameter", "od", "o.d.", "o/d"})
_FLATS_WORDS = frozenset({"a/f", "af", "a.f.", "a/c"})


def parse_bundle(text: str) -> tuple[int, int]:
    """``"3x2"`` → (3 rows stacked in the feed direction, 2 side by side)."""
    m = _BUNDLE.fullmatch(str(text))
    if not m:
        raise UsageError(f"expected ROWSxCOLS, got {text!r}", field="bundle", hint=_BUNDLE_HINT)
    rows, cols = int(m.group(1)), int(m.group(2))
    for n in (rows, cols):
        if not 1 <= n <= MAX_BUNDLE_SIDE:
            raise BadDataError(
                f"rows and columns must be 1 to {MAX_BUNDLE_SIDE}, got {text.strip()!r}",
                field="bundle",
            )
    return rows, cols


def _tokens(words: Sequence[str] | str) -> list[str]:
    items = [words] if isinstance(words, str) else list(words)
    return [t for item in items for t in str(item).split()]


def _take_options(tokens: list[str]) -> tuple[list[str], dict[str, str | bool]]:
    rest: list[str] = []
    found: dict[str, str | bool] = {}
    i = 0
    while i < len(tokens):
        token = tokens[i]
        i += 1
        if not token.startswith("--"):
            rest.append(token)
            continue
        name, eq, value = token.partition("=")
        key = _OPTIONS.get(name.lower())
        if key is None:
            raise UsageError(
                f"unknown option {name!r} in the section",
                field="section",
                hint="use --orient, --bundle, --nest",
            )
        if key == "nest":
            found["nest"] = True
            continue
        if not eq:
            if i >= len(tokens) or tokens[i].startswith("--"):
                raise UsageError(f"{name} needs a value", field=key)
            value = tokens[i]
            i += 1
        if not value.strip():
            raise UsageError(f"{name} needs a value", field=key)
        if key in found and found[key] != value:
            raise UsageError(f"given twice ({found[key]} and {value})", field=key)
        found[key] = value
    return rest, found


def _drop_marks(tokens: list[str]) -> tuple[list[str], bool]:
    """The words without diameter and across-flats marks, and whether a diameter mark was there."""
    out: list[str] = []
    diameter = False
    for token in tokens:
        low = token.lower()
        if low in _DIAMETER_WORDS or low in _FLATS_WORDS:
            diameter |= low in _DIAMETER_WORDS
            continue
        if token[:1] in _DIAMETER_SIGNS:
            diameter = True
            token = token[1:]
            if not token:
                continue
        out.append(token)
    return out, diameter


def _ends_with_unit(token: str) -> bool:
    return not (token[-1].isdigit() or token[-1] in "./-+")


def _expand_times(tokens: Sequence[str]) -> list[str]:
    """``100x25mm`` → ``100 x 25mm`` so the separator rule below applies."""
    out: list[str] = []
    for token in tokens:
        times = _TIMES.fullmatch(token)
        if not times:
            out.append(token)
            continue
        parts = re.split(r"[x×*]", times.group("body"), flags=re.IGNORECASE)
        parts[-1] += times.group("unit") or ""
        for k, part in enumerate(parts):
            out += [part] if k == 0 else ["x", part]
    return out


def split_sizes(tokens: Sequence[str]) -> list[str]:
    """Group words into one text per size; a size ends after its unit.

    Sizes joined by ``x`` share the unit written after the last of them.
    """
    sizes: list[str] = []
    joined: list[bool] = []  # size is followed by a separator
    current: list[str] = []

    def flush() -> None:
        if current:
            sizes.append(" ".join(current))
            joined.append(False)
            current.clear()

    words = _expand_times(tokens)
    i = 0
    while i < len(words):
        token = words[i]
        i += 1
        if token.lower() in _SEPARATORS:
            flush()
            if joined:
                joined[-1] = True
            continue
        current.append(token)
        if _ends_with_unit(token):
            flush()
            continue
        following = words[i] if i < len(words) else ""
        whole_then_fraction = (
            len(current) == 1 and token.isdigit() and _FRACTION.fullmatch(following)
        )
        if not (whole_then_fraction or _is_unit_word(following)):
            flush()
    flush()
    for k in range(len(sizes) - 2, -1, -1):
        if joined[k] and not _ends_with_unit(sizes[k]) and _ends_with_unit(sizes[k + 1]):
            unit = re.search(r"[^\d\s./+\-]+$", sizes[k + 1])
            if unit:
                sizes[k] += " " + unit.group(0)
    return sizes


def _is_unit_word(token: str) -> bool:
    return bool(token) and token.lower() not in _SEPARATORS and bool(_PURE_UNIT.fullmatch(token))


def _unknown_shape(word: str) -> UsageError:
    names = list(SHAPES) + list(SHAPE_ALIASES)
    close = difflib.get_close_matches(word.lower(), names, n=1, cutoff=0.6)
    listing = "shapes: " + ", ".join(SHAPES)
    if close:
        guess = canonical_shape(close[0])
        return UsageError(
            f"unknown shape {word!r}", field="shape", hint=f"did you mean {guess}? {listing}"
        )
    return UsageError(f"unknown shape {word!r}", field="shape", hint=listing)


def parse_section(
    words: Sequence[str] | str,
    *,
    orientation: str | None = None,
    bundle: str | None = None,
    nest: bool = False,
) -> Section:
    """Read ``round 7in``, ``flat 4in 1in --orient edge``... into a Section.

    Keyword options and options written inline must agree when both are given.
    """
    tokens, inline = _take_options(_tokens(words))
    tokens, diameter = _drop_marks(tokens)
    if diameter and tokens and canonical_shape(tokens[0]) is None:
        tokens = ["round", *tokens]  # "Ø60mm" or "60mm OD" alone: a round
    if not tokens:
        raise UsageError(
            "expected a shape and its sizes, got nothing",
            field="section",
            hint="e.g. round 7in or flat 4in 1in",
        )
    shape = canonical_shape("-".join(tokens[:2])) if len(tokens) > 1 else None
    if shape is not None:  # two-word names: "square tube", "i beam", "flat bar"
        tokens = tokens[1:]
    else:
        shape = canonical_shape(tokens[0])
    if shape is None:
        raise _unknown_shape(tokens[0])
    info = SHAPES[shape]
    for key, given in (("orientation", orientation), ("bundle", bundle)):
        if given is None:
            continue
        if not str(given).strip():
            option = "--orient" if key == "orientation" else f"--{key}"
            raise UsageError(f"{option} needs a value", field=key)
        written = inline.get(key)
        if written is not None and _meaning(shape, key, str(written)) != _meaning(
            shape, key, given
        ):
            raise UsageError(f"given twice ({written} and {given})", field=key)
        inline[key] = given

    sizes = split_sizes(tokens[1:])
    need = len(info.dims)
    if shape in ("square", "stube") and len(sizes) == need + 1:
        sizes = _same_sides(shape, sizes)
    if len(sizes) != need:
        plural = "size" if need == 1 else "sizes"
        raise UsageError(
            f"{shape} needs {need} {plural} ({', '.join(info.dims)}), got {len(sizes)}",
            field="section",
            hint=f"e.g. {info.example}",
        )
    dims = tuple(_length(text, name) for name, text in zip(info.dims, sizes, strict=True))

    orient_word = str(inline.get("orientation") or "")
    if orient_word and canonical_orientation(shape, orient_word) is None:
        raise orientation_error(shape, orient_word)
    rows, cols = parse_bundle(str(inline["bundle"])) if inline.get("bundle") else (1, 1)
    return Section(shape, dims, orient_word, rows, cols, bool(nest or inline.get("nest")))


def _meaning(shape: str, key: str, text: str) -> object:
    """What an option value stands for, so ``edge`` and ``on-edge`` do not clash."""
    if key == "orientation":
        return canonical_orientation(shape, text) or text
    return parse_bundle(text)


def _length(text: str, field: str) -> float:
    """A size in mm; ``3'6"`` gets the space the unit reader needs after the foot mark."""
    return to_core(_FEET_GLUED.sub(r"\1 ", text), "length", field=field)


def _same_sides(shape: str, sizes: list[str]) -> list[str]:
    """``square 2x2in`` and ``stube 2x2x1/4in`` name the side twice; keep one."""
    a = _length(sizes[0], "side")
    b = _length(sizes[1], "side")
    if abs(a - b) > 1e-9 * max(a, b):
        other = "flat" if shape == "square" else "rtube"
        raise BadDataError(
            f"a {shape} has equal sides, got {sizes[0]} and {sizes[1]}",
            field="side",
            hint=f"use {other}",
        )
    return sizes[1:]
