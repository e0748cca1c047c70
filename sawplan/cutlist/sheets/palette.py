"""The job sheet's piece tints: our own rule, not a borrowed palette.

Eight hues evenly spaced round the OKLCH colour wheel (Ottosson's OKLab, a
perceptual space: equal steps look about equally different), all at one
lightness and chroma: light enough that the black marks printed on them keep a
contrast ratio above 14:1 by WCAG 2.x's formula (AAA asks 7:1), and chroma low
enough that every hue stays inside sRGB without clipping.  ColorAide does the
colour-space arithmetic.
"""

from __future__ import annotations

from functools import lru_cache

LIGHTNESS = 0.88  # OKLCH L, 0..1
CHROMA = 0.055  # OKLCH C: the largest that keeps all eight hues in sRGB at this lightness
FIRST_HUE_DEG = 25.0
SIZE = 8


@lru_cache(maxsize=4)
def piece_tints(size: int = SIZE) -> tuple[str, ...]:
    """``size`` tints as ``#rrggbb``, hue ``FIRST_HUE_DEG + i·360/size``."""
    from coloraide import Color

    return tuple(
        Color("oklch", [LIGHTNESS, CHROMA, FIRST_HUE_DEG + i * 360.0 / size])
        .convert("srgb")
        .fit("srgb")
        .to_string(hex=True)
        for i in range(size)
    )
