"""Reading sections from command-line words and job-file text.

Expected millimetres use the exact inch: 1 in = 25.4 mm (international yard
and pound agreement, 1959); 1 ft = 12 in.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.errors import BadDataError, UsageError
from sawplan.sections import (
    SHAPES,
    Section,
    canonical_orientation,
    parse_bundle,
    parse_section,
    split_sizes,
)
from sawplan.sections.shapes import SHAPE_ALIASES

IN = 25.4


@pytest.mark.parametrize(
    ("words", "shape", "dims_mm"),
    [
        pytest.param("round 7in", "round", (177.8,), id="7in = 177.8 mm (exact inch)"),
        pytest.param(["round", "7in"], "round", (177.8,), id="word list"),
        pytest.param('round 7"', "round", (177.8,), id="inch mark"),
        pytest.param("round 7-1/4 in", "round", (184.15,), id="7-1/4 in = 184.15 mm"),
        pytest.param(["round", "7", "1/4", "in"], "round", (184.15,), id="mixed number as 3 words"),
        pytest.param("round 7 1/4in", "round", (184.15,), id="mixed number, unit glued"),
        pytest.param("round 60mm", "round", (60.0,), id="job-file text"),
        pytest.param("round 6 cm", "round", (60.0,), id="unit as its own word"),
        pytest.param("rod 1'", "round", (304.8,), id="foot mark, alias rod"),
        pytest.param("round 1'6\"", "round", (457.2,), id="feet and inches in one word"),
        pytest.param("hex 2in", "hex", (50.8,), id="hex"),
        pytest.param("hexagon 50mm", "hex", (50.0,), id="alias hexagon"),
        pytest.param("oct 50mm", "octagon", (50.0,), id="alias oct"),
        pytest.param("sq 2in", "square", (50.8,), id="alias sq"),
        pytest.param("square 2x2in", "square", (50.8,), id="square written AxA"),
        pytest.param("flat 4in 1in", "flat", (101.6, 25.4), id="flat"),
        pytest.param("flat 1in 4in", "flat", (101.6, 25.4), id="flat sizes in either order"),
        pytest.param("rect 100x25mm", "flat", (100.0, 25.0), id="AxB sharing the unit"),
        pytest.param("rectangle 100 x 25 mm", "flat", (100.0, 25.0), id="A x B unit"),
        pytest.param("flat 4 by 1 in", "flat", (101.6, 25.4), id="A by B unit"),
        pytest.param("flat 4in x 1in", "flat", (101.6, 25.4), id="A x B, both with units"),
        pytest.param("tube 4in 0.25in", "tube", (101.6, 6.35), id="tube"),
        pytest.param("pipe 114.3mm 6.02mm", "tube", (114.3, 6.02), id="alias pipe"),
        pytest.param("stube 2in 1/8in", "stube", (50.8, 3.175), id="square tube"),
        pytest.param("stube 2x2x1/4in", "stube", (50.8, 6.35), id="square tube AxAxT"),
        pytest.param("rtube 4in 2in 0.25in", "rtube", (101.6, 50.8, 6.35), id="rect tube"),
        pytest.param("rtube 2in 4in 1/4in", "rtube", (101.6, 50.8, 6.35), id="rect tube swapped"),
        pytest.param("angle 3in 3in 0.25in", "angle", (76.2, 76.2, 6.35), id="equal angle"),
        pytest.param("angle 3in 2in 1/4in", "angle", (76.2, 50.8, 6.35), id="unequal angle"),
        pytest.param("angle 2in 3in 1/4in", "angle", (50.8, 76.2, 6.35), id="leg order kept"),
        pytest.param(
            "channel 6in 2in 0.2in 0.34in", "channel", (152.4, 50.8, 5.08, 8.636), id="channel"
        ),
        pytest.param(
            "ibeam 200mm 100mm 5.6mm 8.5mm", "ibeam", (200.0, 100.0, 5.6, 8.5), id="ibeam"
        ),
        pytest.param(
            "hbeam 200mm 100mm 5.6mm 8.5mm", "ibeam", (200.0, 100.0, 5.6, 8.5), id="hbeam"
        ),
        pytest.param("beam 200mm 100mm 5.6mm 8.5mm", "ibeam", (200.0, 100.0, 5.6, 8.5), id="beam"),
        pytest.param("ROUND 50mm", "round", (50.0,), id="shape word case-insensitive"),
        pytest.param("square tube 2in 1/8in", "stube", (50.8, 3.175), id="two-word name"),
        pytest.param(
            ["I", "beam", "200mm", "100mm", "5.6mm", "8.5mm"],
            "ibeam",
            (200.0, 100.0, 5.6, 8.5),
            id="I beam as two words",
        ),
    ],
)
def test_spellings(words: str | list[str], shape: str, dims_mm: tuple[float, ...]) -> None:
    section = parse_section(words)
    assert section.shape == shape
    assert section.dims_mm == pytest.approx(dims_mm, rel=1e-12)


@pytest.mark.parametrize("alias", sorted(SHAPE_ALIASES))
def test_every_alias_reads_as_its_shape(alias: str) -> None:
    shape = SHAPE_ALIASES[alias]
    sizes = SHAPES[shape].example.split()[1:]
    assert parse_section([alias, *sizes]) == parse_section(SHAPES[shape].example)


@pytest.mark.parametrize("shape", sorted(SHAPES))
def test_examples_in_help_parse(shape: str) -> None:
    info = SHAPES[shape]
    section = parse_section(info.example)
    assert section.shape == shape
    assert len(section.dims_mm) == len(info.dims)
    assert section.orientation == info.default_orientation
    assert info.default_orientation in info.orientations
    assert set(info.orientation_help) == set(info.orientations)


@pytest.mark.parametrize(
    ("words", "kwargs", "orientation", "bundle", "nested"),
    [
        pytest.param("flat 4in 1in --orient edge", {}, "edge", (1, 1), False, id="inline orient"),
        pytest.param("flat 4in 1in --orient=edge", {}, "edge", (1, 1), False, id="orient="),
        pytest.param("flat 4in 1in --orientation on-edge", {}, "edge", (1, 1), False, id="alias"),
        pytest.param("flat 4in 1in", {"orientation": "edge"}, "edge", (1, 1), False, id="keyword"),
        pytest.param(
            "flat 4in 1in --orient edge",
            {"orientation": "edge"},
            "edge",
            (1, 1),
            False,
            id="both same",
        ),
        pytest.param("flat 4in 1in", {}, "flat", (1, 1), False, id="default lying flat"),
        pytest.param(
            "flat 4in 1in --orient on-edge",
            {"orientation": "edge"},
            "edge",
            (1, 1),
            False,
            id="same orientation spelt two ways",
        ),
        pytest.param("square 2in --orient diamond", {}, "corner", (1, 1), False, id="diamond"),
        pytest.param("hex 2in --orient CORNER", {}, "corner", (1, 1), False, id="case"),
        pytest.param(
            "angle 3in 3in 1/4in --orient tent", {}, "legs-down", (1, 1), False, id="tent"
        ),
        pytest.param("angle 3in 3in 1/4in --orient v", {}, "vee", (1, 1), False, id="v"),
        pytest.param(
            "channel 6in 2in 0.2in 0.34in --orient web_down",
            {},
            "web-down",
            (1, 1),
            False,
            id="web_down",
        ),
        pytest.param(
            "channel 6in 2in 0.2in 0.34in --orient legs-down",
            {},
            "flanges-down",
            (1, 1),
            False,
            id="legs-down means flanges-down on a channel",
        ),
        pytest.param(
            "ibeam 8in 4in 0.25in 0.4in --orient on-side",
            {},
            "on-side",
            (1, 1),
            False,
            id="on-side",
        ),
        pytest.param("hex 2in --bundle 3x2", {}, "flat", (3, 2), False, id="inline bundle"),
        pytest.param("hex 2in --bundle=3X2", {}, "flat", (3, 2), False, id="bundle= and X"),
        pytest.param("hex 2in", {"bundle": "3 × 2"}, "flat", (3, 2), False, id="keyword ×"),
        pytest.param("round 60mm --bundle 3x4 --nest", {}, "any", (3, 4), True, id="inline nest"),
        pytest.param("round 60mm --bundle 3x4", {"nest": True}, "any", (3, 4), True, id="kw nest"),
        pytest.param("tube 60mm 3mm --nested --bundle 2x2", {}, "any", (2, 2), True, id="nested"),
        pytest.param("round 60mm --bundle 1x4 --nest", {}, "any", (1, 4), False, id="one row"),
    ],
)
def test_options(
    words: str,
    kwargs: dict[str, object],
    orientation: str,
    bundle: tuple[int, int],
    nested: bool,
) -> None:
    section = parse_section(words, **kwargs)  # type: ignore[arg-type]
    assert section.orientation == orientation
    assert (section.bundle_rows, section.bundle_cols) == bundle
    assert section.nested is nested


@pytest.mark.parametrize(
    ("tokens", "sizes"),
    [
        pytest.param(["7", "1/4", "in", "1/4in"], ["7 1/4 in", "1/4in"], id="mixed then fraction"),
        pytest.param(["3'", '6"'], ["3'", '6"'], id="a size ends after its unit"),
        pytest.param(["3'6\""], ["3'6\""], id="one word stays one size"),
        pytest.param(["100x25mm"], ["100 mm", "25mm"], id="AxB"),
        pytest.param(["2x2x1/4in"], ["2 in", "2 in", "1/4in"], id="AxBxC"),
        pytest.param(["100", "25mm"], ["100", "25mm"], id="no unit borrowed without x"),
    ],
)
def test_split_sizes(tokens: list[str], sizes: list[str]) -> None:
    assert split_sizes(tokens) == sizes


@pytest.mark.parametrize(
    ("section", "label"),
    [
        pytest.param(Section("round", (177.8,)), "round Ø177.8", id="round"),
        pytest.param(Section("flat", (100.0, 25.0), "edge"), "flat 100×25 on edge", id="flat edge"),
        pytest.param(Section("hex", (50.0,), "corner"), "hex 50 A/F on a corner", id="hex"),
        pytest.param(Section("stube", (50.0, 3.0)), "square tube 50×50×3 on a flat", id="stube"),
        pytest.param(
            Section("round", (60.0,), bundle_rows=3, bundle_cols=4, nested=True),
            "round Ø60, bundle 3×4 nested",
            id="bundle",
        ),
    ],
)
def test_labels(section: Section, label: str) -> None:
    assert section.label() == label


def test_label_in_inches() -> None:
    assert Section("round", (177.8,)).label("us") == "round Ø7 in"
    assert Section("flat", (100.0, 25.0)).label("metric") == "flat 100×25 mm lying flat"


def test_spec_text() -> None:
    assert Section("flat", (100.0, 25.0), "edge").spec() == "flat 100mm 25mm --orient edge"
    assert Section("round", (60.0,), bundle_rows=3, bundle_cols=4, nested=True).spec() == (
        "round 60mm --bundle 3x4 --nest"
    )


@st.composite
def specs(draw: st.DrawFn) -> Section:
    shape = draw(st.sampled_from(sorted(SHAPES)))
    info = SHAPES[shape]
    # tenths of a mm up to 500 mm, walls drawn small enough to be valid
    big = [draw(st.integers(200, 5000)) / 10 for _ in info.dims]
    if shape in ("tube", "stube"):
        big[1] = draw(st.integers(1, int(big[0] * 10 / 2) - 1)) / 10
    elif shape == "rtube":
        big[2] = draw(st.integers(1, int(min(big[:2]) * 10 / 2) - 1)) / 10
    elif shape == "angle":
        big[2] = draw(st.integers(1, int(min(big[:2]) * 10) - 1)) / 10
    elif shape in ("channel", "ibeam"):
        big[2] = draw(st.integers(1, int(big[1] * 10) - 1)) / 10
        big[3] = draw(st.integers(1, int(big[0] * 10 / 2) - 1)) / 10
    nested = shape in ("round", "tube") and draw(st.booleans())
    return Section(
        shape,
        tuple(big),
        draw(st.sampled_from(info.orientations)),
        draw(st.integers(1, 4)),
        draw(st.integers(1, 4)),
        nested,
    )


@settings(max_examples=200, deadline=None)
@given(specs())
def test_spec_round_trip(section: Section) -> None:
    again = parse_section(section.spec())
    assert again == section
    assert again.spec() == section.spec()


@settings(max_examples=100, deadline=None)
@given(st.floats(min_value=0.1, max_value=5000.0))  # the field table's range of a size
def test_spec_round_trip_any_float(d: float) -> None:
    section = Section("round", (d,))
    assert parse_section(section.spec()) == section


@pytest.mark.parametrize(
    ("words", "kwargs", "error", "field", "words_in_message"),
    [
        pytest.param("hexx 2in", {}, UsageError, "shape", ["did you mean hex", "round"], id="typo"),
        pytest.param("blob 2in", {}, UsageError, "shape", ["unknown shape", "ibeam"], id="unknown"),
        pytest.param("", {}, UsageError, "section", ["nothing"], id="empty"),
        pytest.param(
            "flat 4in",
            {},
            UsageError,
            "section",
            ["2 sizes", "thickness", "flat 4in 1in"],
            id="too few",
        ),
        pytest.param(
            "round 2in 3in", {}, UsageError, "section", ["1 size", "round 7in"], id="too many"
        ),
        pytest.param("round 60", {}, UsageError, "diameter", ["no unit"], id="no unit"),
        pytest.param("flat 100 25mm", {}, UsageError, "width", ["no unit"], id="unit on one only"),
        pytest.param("round 60kg", {}, UsageError, "diameter", ["length"], id="wrong dimension"),
        pytest.param(
            "round 60 furlongz", {}, UsageError, "diameter", ["unknown unit"], id="bad unit"
        ),
        pytest.param("round -5mm", {}, BadDataError, "diameter", ["from 0.1 mm"], id="negative"),
        pytest.param("round 0mm", {}, BadDataError, "diameter", ["from 0.1 mm"], id="zero"),
        pytest.param("round 11m", {}, BadDataError, "diameter", ["5,000 mm"], id="absurd size"),
        pytest.param(
            "tube 50mm 25mm", {}, BadDataError, "wall", ["half", "25 mm"], id="solid tube"
        ),
        pytest.param("tube 2in 1.5in", {}, BadDataError, "wall", ["half"], id="wall > OD/2"),
        pytest.param("stube 50mm 30mm", {}, BadDataError, "wall", ["half"], id="stube wall"),
        pytest.param("rtube 100mm 40mm 20mm", {}, BadDataError, "wall", ["half"], id="rtube wall"),
        pytest.param(
            "angle 50mm 30mm 30mm", {}, BadDataError, "thickness", ["shorter leg"], id="angle"
        ),
        pytest.param(
            "channel 100mm 50mm 5mm 50mm",
            {},
            BadDataError,
            "flange thickness",
            ["half the depth"],
            id="channel flange",
        ),
        pytest.param(
            "ibeam 100mm 50mm 60mm 5mm",
            {},
            BadDataError,
            "web thickness",
            ["flange width"],
            id="ibeam web",
        ),
        pytest.param(
            "square 2x3in", {}, BadDataError, "side", ["equal sides", "flat"], id="square AxB"
        ),
        pytest.param(
            "hex 2in --orient edge",
            {},
            UsageError,
            "orientation",
            ["flat or corner"],
            id="bad orient",
        ),
        pytest.param(
            "round 2in", {"orientation": "corner"}, UsageError, "orientation", ["any"], id="round"
        ),
        pytest.param(
            "flat 4in 1in --orient edge",
            {"orientation": "flat"},
            UsageError,
            "orientation",
            ["twice"],
            id="orient twice",
        ),
        pytest.param(
            "hex 2in --bundle 3by2", {}, UsageError, "bundle", ["ROWSxCOLS"], id="bundle text"
        ),
        pytest.param("hex 2in --bundle 0x2", {}, BadDataError, "bundle", ["1 to"], id="zero rows"),
        pytest.param("hex 2in --bundle 101x1", {}, BadDataError, "bundle", ["1 to"], id="too many"),
        pytest.param(
            "round 1m --bundle 20x1", {}, BadDataError, "bundle", ["10 m"], id="huge bundle"
        ),
        pytest.param(
            "hex 2in --bundle 2x2 --nest", {}, BadDataError, "nest", ["round"], id="nest hex"
        ),
        pytest.param("hex 2in --bundle", {}, UsageError, "bundle", ["value"], id="bundle no value"),
        pytest.param(
            "hex 2in --colour red", {}, UsageError, "section", ["--colour"], id="unknown option"
        ),
    ],
)
def test_bad_input(
    words: str,
    kwargs: dict[str, object],
    error: type[Exception],
    field: str,
    words_in_message: list[str],
) -> None:
    with pytest.raises(error) as info:
        parse_section(words, **kwargs)  # type: ignore[arg-type]
    assert type(info.value) is error
    assert info.value.field == field  # type: ignore[attr-defined]
    message = str(info.value)
    assert "\n" not in message
    assert message.startswith(f"{field}: ")
    for word in words_in_message:
        assert word in message


def test_direct_construction_checks() -> None:
    with pytest.raises(BadDataError) as info:
        Section("tube", (50.0, 30.0))
    assert info.value.field == "wall"
    with pytest.raises(BadDataError) as info:
        Section("round", (50.0, 20.0))
    assert info.value.field == "dims_mm"
    with pytest.raises(UsageError) as usage:
        Section("flat", (50.0, 20.0), "corner")
    assert usage.value.field == "orientation"
    assert Section("hexagon", (50.0,), "on-corner") == Section("hex", (50.0,), "corner")


def test_parse_bundle_and_orientation_helpers() -> None:
    assert parse_bundle("3x2") == (3, 2)
    assert parse_bundle(" 4 × 1 ") == (4, 1)
    assert canonical_orientation("angle", "heel up") == "legs-down"
    assert canonical_orientation("flat", "upright") == "edge"
    assert canonical_orientation("ibeam", "upright") == "upright"
    assert canonical_orientation("hex", "edge") is None
    assert canonical_orientation("ibeam", "web upright") == "upright"
    assert canonical_orientation("channel", "web upright") == "on-side"
    for shape, info in SHAPES.items():
        for name in info.orientations:
            assert canonical_orientation(shape, name) == name
