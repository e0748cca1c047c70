"""Exact cross-sections of stock as the saw sees them: W(y), area, height, bundles.

Pure core: no I/O.  ``parse_section`` reads the command-line and job-file
syntax; ``Section`` holds the result; ``SHAPES`` describes the catalogue for
help text.
"""

from __future__ import annotations

from sawplan.sections.parse import parse_bundle, parse_section, split_sizes
from sawplan.sections.section import (
    MAX_BUNDLE_SIDE,
    NESTABLE,
    Section,
    canonical_shape,
    largest_bundle,
    orientation_words,
)
from sawplan.sections.shapes import MAX_SIZE_MM, SHAPES, ShapeInfo, canonical_orientation

__all__ = [
    "MAX_BUNDLE_SIDE",
    "MAX_SIZE_MM",
    "NESTABLE",
    "SHAPES",
    "Section",
    "ShapeInfo",
    "canonical_orientation",
    "canonical_shape",
    "largest_bundle",
    "orientation_words",
    "parse_bundle",
    "parse_section",
    "split_sizes",
]
