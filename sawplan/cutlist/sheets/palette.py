"""The job sheet's piece tints: our own rule, not a borrowed palette.

Eight hues evenly spaced round the OKLCH colour wheel (Ottosson's OKLab, a
perceptual space: equal steps look about equally different), all at one
lightness and chroma: light enough that the black marks printed on them keep a
contrast ratio above 14:1 by WCAG 2.x's formula (AAA asks 7:1), and chroma low
enough that every hue stays inside sRGB without clipping.  ColorAide does the
colour-space arithmetic; the eight tints every sheet uses are written out below
(importing ColorAide costs a sheet a tenth of a second), and
``tests/test_palette.py`` works them out again from the rule.
"""

from __future__ import annotations

from functools import lru_cache

LIGHTNESS = 0.88  # OKLCH L, 0..1
CHROMA = 0.055  # OKLCH C: the largest that keeps all eight hues in sRGB at this lightness
FIRST_HUE_DEG = 25.0
SIZE = 8
# piece_tints(8) worked out by ColorAide from the rule above (checked by the tests)
TINTS = ("#facac5", "#f0d2b1", "#d6dcb3", "#b9e3cb", "#ade3e9", "#bddbfb", "#d9d1f9", "#f1cae3")


@lru_cache(maxsize=4)
def piece_tints(size: int = SIZE) -> tuple[str, ...]:
    """``size`` tints as ``#rrggbb``, hue ``FIRST_HUE_DEG + i·360/size``."""
    if size == SIZE:
        return TINTS
    return tints_by_rule(size)


def tints_by_rule(size: int) -> tuple[str, ...]:
    """The rule itself, by ColorAide: OKLCH at one lightness and chroma, fitted to sRGB."""
    from coloraide import Color

    return tuple(
        Color("oklch", [LIGHTNESS, CHROMA, FIRST_HUE_DEG + i * 360.0 / size])
        .convert("srgb")
        .fit("srgb")
        .to_string(hex=True)
        for i in range(size)
    )
