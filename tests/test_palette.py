"""The job sheet's piece tints come from our rule, and black marks on them stay readable.

The rule (sawplan/cutlist/sheets/palette.py): hues evenly spaced in OKLCH at a
fixed lightness and chroma.  Each tint is read back into OKLCH with ColorAide;
the contrast with black is computed here by WCAG 2.x's own definitions
(relative luminance of sRGB, contrast ratio (L1 + 0.05) / (L2 + 0.05)), not by
the library.
"""

from __future__ import annotations

import re

import pytest
from coloraide import Color

from sawplan.cutlist.sheets.palette import (
    CHROMA,
    FIRST_HUE_DEG,
    LIGHTNESS,
    SIZE,
    TINTS,
    piece_tints,
)

HEX = re.compile(r"#[0-9a-f]{6}")
EIGHT_BIT = 0.006  # one step of 8-bit sRGB moves OKLCH L or C by well under this


def wcag_luminance(hex_colour: str) -> float:
    """WCAG 2.x relative luminance: linearised sRGB channels, weights 0.2126/0.7152/0.0722."""

    def channel(c8: int) -> float:
        c = c8 / 255
        return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4

    r, g, b = (int(hex_colour[i : i + 2], 16) for i in (1, 3, 5))
    return 0.2126 * channel(r) + 0.7152 * channel(g) + 0.0722 * channel(b)


def contrast(a: str, b: str) -> float:
    la, lb = sorted((wcag_luminance(a), wcag_luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


def test_wcag_formula_against_its_known_extremes():
    # WCAG 2.x: black on white is 21:1, a colour on itself 1:1
    assert contrast("#000000", "#ffffff") == pytest.approx(21.0)
    assert contrast("#777777", "#777777") == pytest.approx(1.0)


def test_tints_are_evenly_spaced_hues_at_one_lightness_and_chroma():
    tints = piece_tints()
    assert len(tints) == SIZE == len(set(tints))
    for i, tint in enumerate(tints):
        assert HEX.fullmatch(tint), tint
        lightness, chroma, hue = Color(tint).convert("oklch").coords()
        assert lightness == pytest.approx(LIGHTNESS, abs=EIGHT_BIT)
        assert chroma == pytest.approx(CHROMA, abs=EIGHT_BIT)
        expected = (FIRST_HUE_DEG + i * 360 / SIZE) % 360
        assert abs((hue - expected + 180) % 360 - 180) < 3.0  # degrees, after 8-bit rounding


def test_written_out_tints_are_the_rule_worked_out_by_coloraide():
    # The sheet uses TINTS without importing ColorAide; ColorAide applies the rule here.
    expected = tuple(
        Color("oklch", [LIGHTNESS, CHROMA, FIRST_HUE_DEG + i * 360.0 / SIZE])
        .convert("srgb")
        .fit("srgb")
        .to_string(hex=True)
        for i in range(SIZE)
    )
    assert expected == TINTS
    assert piece_tints() == TINTS


def test_black_marks_on_every_tint_pass_wcag_aaa():
    for tint in piece_tints():
        assert contrast(tint, "#000000") >= 7.0  # WCAG 2.x AAA for normal text


def test_neighbouring_tints_can_be_told_apart():
    tints = [Color(t).convert("oklab") for t in piece_tints()]
    for a, b in zip(tints, tints[1:] + tints[:1], strict=True):
        assert a.delta_e(b, method="ok") > 0.03  # about 1.5 just-noticeable steps in OKLab


def test_the_sheet_fills_pieces_with_the_tints(cli, tmp_path):
    job = tmp_path / "job.toml"
    job.write_text(
        '[job]\nname = "tints"\nsaw = "mid-production"\n'
        '[[stock]]\nmaterial = "1018"\nsection = "round 25mm"\nlength = "1m"\ncount = 1\n'
        '[[part]]\nname = "a"\nmaterial = "1018"\nsection = "round 25mm"\nlength = "100mm"\ncount = 2\n'
        '[[part]]\nname = "b"\nmaterial = "1018"\nsection = "round 25mm"\nlength = "80mm"\ncount = 2\n',
        encoding="utf-8",
    )
    sheet = tmp_path / "job.html"
    result = cli("plan", str(job), "--sheet", str(sheet))
    assert result.code == 0, result.err
    fills = set(re.findall(r'class="piece"[^>]*fill="(#[0-9a-f]{6})"', sheet.read_text()))
    assert fills and fills <= set(piece_tints())
    assert len(fills) == 2  # one tint per mark
