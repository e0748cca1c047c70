"""A fabricator's common cuts against the pitch a trade chart gives (issue 10, "done when").

Where each chart value comes from:

- *from memory*: the trade's pitch charts for tube and pipe (read by wall thickness and
  outside diameter) and for structurals (read by wall or web thickness and section
  size), recalled, not read from a source.  Charts differ between makers by about a
  step, so a range ("6/10-8/12") is given where recollection spans two pitches.
- *common practice + MH31*: a bundle is read at its average width of cut — metal area ÷
  blade travel, as printed in saw operators' manuals — on the width-of-cut pairs of
  Machinery's Handbook, 31st edition (1/4 in 10/14, 3/4 in 6/10, 1 1/4 in 4/6, 4 in 3/4,
  8 in 2/3), interpolated on the catalogue's scale (``mh31_pitch``).  The average widths
  are worked by hand in each row's comment and checked against the section.

A step is the distance between neighbours among the catalogue's variable pitches ordered
by mean TPI, as ``test_mh31_width_of_cut_pairs_within_one_step`` counts them; a constant
pitch sits where its TPI falls between them.  Every cut must come out within one step of
its chart value (of the nearer end of a range).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from sawplan.cutting import evaluate, recommend
from sawplan.cutting.pitch import catalogue
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section

CAT = load_catalogue()
MID = get_saw("mid-production")
VARIABLE = [p for p in catalogue() if p.kind == "variable"]  # coarsest mean first
MH31_PAIRS = [(0.25, "10/14"), (0.75, "6/10"), (1.25, "4/6"), (4.0, "3/4"), (8.0, "2/3")]


def place(label: str) -> float:
    """Where a pitch sits on the scale of variable pitches (0 = the coarsest): between two
    of them by log mean TPI, beyond the ends by the end step (24 TPI: 1.4 steps finer
    than 14/18)."""
    x = math.log(next(p.tpi_mean for p in catalogue() if p.label == label))
    means = np.log([p.tpi_mean for p in VARIABLE])
    k = int(np.clip(np.searchsorted(means, x) - 1, 0, len(means) - 2))
    return k + float((x - means[k]) / (means[k + 1] - means[k]))


def steps_from(label: str, chart: str) -> float:
    """Steps from a chart value "a/b" or a range "a/b-c/d" (0 inside the range)."""
    low, _, high = chart.partition("-")
    ends = sorted((place(low), place(high or low)))
    here = place(label)
    return max(ends[0] - here, here - ends[1], 0.0)


def mh31_pitch(width_in: float) -> str:
    """MH31's width-of-cut pairs, interpolated on log width and rounded to a catalogue step."""
    widths = np.log([w for w, _ in MH31_PAIRS])
    places = [place(label) for _, label in MH31_PAIRS]
    at = float(np.interp(math.log(width_in), widths, places))
    return VARIABLE[round(at)].label


def test_mh31_pitch_reads_the_handbook_pairs():
    # the interpolation returns the handbook's own pairs at their widths (MH31)
    for width_in, label in MH31_PAIRS:
        assert mh31_pitch(width_in) == label
    assert mh31_pitch(0.89) == "5/8"  # between 3/4 in (6/10) and 1 1/4 in (4/6)
    # the scale: neighbours one step apart, 24 TPI 1.41 steps finer than 14/18 (16 → 24
    # mean TPI over the 12 → 16 step of 10/14 → 14/18, on log scale)
    assert steps_from("8/12", "6/10") == pytest.approx(1)
    assert steps_from("24", "14/18") == pytest.approx(math.log(24 / 16) / math.log(16 / 12))
    assert steps_from("8", "6/10-8/12") == 0


SINGLE = [
    # --- round tube and pipe, carbon steel (from memory: tube charts by wall and OD)
    pytest.param("A36", "tube 0.84in 0.109in", "14/18", id="1/2 in sch 40 pipe"),
    pytest.param("A36", "tube 1.9in 0.145in", "10/14", id="1 1/2 in sch 40 pipe"),
    pytest.param("1018", "tube 42.4mm 2mm", "10/14-14/18", id="tube 42.4 x 2"),
    pytest.param("A36", "tube 2in 0.12in", "10/14", id="tube 2 in x 0.120 in"),
    pytest.param("A36", "tube 60mm 3mm", "8/12-10/14", id="tube 60 x 3"),
    pytest.param("A36", "tube 2.375in 0.154in", "8/12-10/14", id="2 in sch 40 pipe"),
    pytest.param("A36", "tube 4.5in 0.237in", "5/8-6/10", id="4 in sch 40 pipe"),
    pytest.param("A36", "tube 6.625in 0.28in", "5/8-6/10", id="6 in sch 40 pipe"),
    pytest.param("A36", "tube 219.1mm 8.18mm", "4/6-5/8", id="8 in sch 40 pipe"),
    # --- square and rectangular tube, both ways up (from memory: by wall and size)
    pytest.param("A36", "stube 25mm 2mm", "14/18", id="box 25 x 2"),
    pytest.param("A36", "stube 2in 0.125in", "10/14", id="box 2 x 2 x 1/8"),
    pytest.param("A36", "stube 50mm 3mm", "8/12-10/14", id="box 50 x 3"),
    pytest.param("A36", "stube 100mm 5mm", "6/10-8/12", id="box 100 x 5"),
    pytest.param("A36", "rtube 100mm 50mm 4mm", "6/10-8/12", id="rect 100 x 50 x 4 flat"),
    pytest.param("A36", "rtube 100mm 50mm 4mm --orient edge", "6/10-8/12", id="rect 100x50x4 edge"),
    pytest.param("A36", "rtube 4in 2in 0.1875in", "8/12", id="rect 4 x 2 x 3/16 flat"),
    pytest.param("A36", "rtube 4in 2in 0.1875in --orient edge", "8/12", id="rect 4x2x3/16 edge"),
    pytest.param("A36", "rtube 150mm 100mm 6mm", "5/8-6/10", id="rect 150 x 100 x 6 flat"),
    pytest.param(
        "A36", "rtube 150mm 100mm 6mm --orient edge", "5/8-6/10", id="rect 150x100x6 edge"
    ),
    # --- angle (from memory: structural charts by thickness and leg)
    pytest.param("A36", "angle 50mm 50mm 5mm", "8/12", id="angle 50 x 5"),
    pytest.param("A36", "angle 3in 3in 0.25in", "6/10", id="angle 3 x 3 x 1/4 legs down"),
    pytest.param("A36", "angle 3in 3in 0.25in --orient vee", "6/10", id="angle 3x3x1/4 vee"),
    pytest.param("A36", "angle 75mm 50mm 6mm --orient flat", "6/10-8/12", id="angle 75x50x6 flat"),
    pytest.param("A36", "angle 100mm 100mm 10mm", "4/6-5/8", id="angle 100 x 10"),
    # --- channel (from memory: by web thickness and depth)
    pytest.param("A36", "channel 6in 2in 0.2in 0.34in", "6/10", id="channel C6"),
    pytest.param("A36", "channel 100mm 50mm 6mm 8.5mm", "6/10-8/12", id="channel 100 flanges down"),
    pytest.param(
        "A36", "channel 100mm 50mm 6mm 8.5mm --orient web-down", "6/10-8/12", id="channel 100 back"
    ),
    pytest.param(
        "A36", "channel 150mm 50mm 5mm 8mm --orient on-side", "6/10-8/12", id="channel 150 side"
    ),
    pytest.param("A36", "channel 200mm 75mm 8.5mm 11.5mm", "4/6-5/8", id="channel 200"),
    # --- I-beam upright and on its side (from memory: by web thickness and depth)
    pytest.param("A36", "ibeam 100mm 55mm 4.1mm 5.7mm", "8/12-10/14", id="I-beam 100 upright"),
    pytest.param(
        "A36", "ibeam 100mm 55mm 4.1mm 5.7mm --orient on-side", "8/12-10/14", id="I-beam 100 side"
    ),
    pytest.param("A36", "ibeam 200mm 100mm 5.6mm 8.5mm", "6/10-8/12", id="I-beam 200 upright"),
    pytest.param(
        "A36", "ibeam 200mm 100mm 5.6mm 8.5mm --orient on-side", "6/10-8/12", id="I-beam 200 side"
    ),
    pytest.param("A36", "ibeam 8in 5.25in 0.23in 0.36in", "6/10-8/12", id="W8 upright"),
    pytest.param("A36", "ibeam 8in 5.25in 0.23in 0.36in --orient on-side", "6/10", id="W8 side"),
    pytest.param("A36", "ibeam 240mm 120mm 6.2mm 9.8mm", "5/8-6/10", id="I-beam 240 upright"),
    pytest.param("A36", "ibeam 200mm 200mm 9mm 15mm", "4/6-5/8", id="H-beam 200 upright"),
    # --- stainless (from memory: the same charts by wall)
    pytest.param("304", "tube 42.4mm 2mm", "10/14-14/18", id="304 tube 42.4 x 2"),
    pytest.param("304", "tube 60.3mm 2.77mm", "10/14", id="304 2 in sch 10S pipe"),
    pytest.param("304", "tube 1in 0.065in", "14/18", id="304 tube 1 in x 16 ga"),
    pytest.param("316", "tube 4.5in 0.237in", "5/8-6/10", id="316 4 in sch 40 pipe"),
    pytest.param("304", "stube 40mm 2mm", "10/14-14/18", id="304 box 40 x 2"),
    pytest.param("304", "rtube 80mm 40mm 3mm", "8/12-10/14", id="304 rect 80 x 40 x 3"),
    pytest.param("304", "angle 50mm 50mm 5mm", "6/10-8/12", id="304 angle 50 x 5"),
    # --- aluminium (from memory: charts read by wall, often a step coarser)
    pytest.param("6061-T6", "tube 50mm 3mm", "8/12-10/14", id="6061 tube 50 x 3"),
    pytest.param("6061-T6", "stube 50mm 2mm", "10/14-14/18", id="6061 box 50 x 2"),
    pytest.param("6061-T6", "rtube 4in 2in 0.125in", "8/12-10/14", id="6061 rect 4 x 2 x 1/8"),
    pytest.param("6061-T6", "angle 50mm 50mm 5mm", "6/10-8/12", id="6061 angle 50 x 5"),
    pytest.param("6061-T6", "channel 100mm 50mm 5mm 8mm", "6/10-8/12", id="6061 channel 100"),
]

# Bundles: (material, section, average width of cut in inches worked by hand) — common
# practice (operators' manuals: area ÷ travel) read on the MH31 pairs.
BUNDLES = [
    # 12 × π/4(60² − 54²) = 6447 mm² over 3 rows × 60 mm = 35.8 mm
    pytest.param("A36", "tube 60mm 3mm --bundle 3x4", 1.41, id="tubes 60x3, 3x4"),
    # 4 × π/4(2² − 1.76²) = 2.835 in² over 2 × 2 in
    pytest.param("A36", "tube 2in 0.12in --bundle 2x2", 0.709, id="tubes 2 in, 2x2"),
    # 4 × π/4(2.375² − 2.067²) = 4.298 in² over 2 × 2.375 in
    pytest.param("A36", "tube 2.375in 0.154in --bundle 2x2", 0.905, id="2 in pipe, 2x2"),
    # 6 × (50² − 44²) = 3384 mm² over 3 × 50 mm
    pytest.param("A36", "stube 50mm 3mm --bundle 3x2", 0.888, id="boxes 50x3, 3x2"),
    # 4 × (100·50 − 92·42) = 4544 mm² over 2 × 50 mm
    pytest.param("A36", "rtube 100mm 50mm 4mm --bundle 2x2", 1.789, id="rect 100x50x4, 2x2"),
    # 4 × (3 + 3 − 0.25)·0.25 = 5.75 in² over 2 × 3.25/√2 in
    pytest.param("A36", "angle 3in 3in 0.25in --bundle 2x2", 1.251, id="angles 3x3x1/4, 2x2"),
    # 4 × (6·0.2 + 2·1.8·0.34) = 9.696 in² over 2 × 2 in
    pytest.param("A36", "channel 6in 2in 0.2in 0.34in --bundle 2x2", 2.424, id="C6, 2x2"),
    # 2 × (2·100·8.5 + 183·5.6) = 5450 mm² over 200 mm
    pytest.param("A36", "ibeam 200mm 100mm 5.6mm 8.5mm --bundle 1x2", 1.073, id="I-beams, 1x2"),
    # 6 × π/4(50² − 46²) = 1810 mm² over 2 × 50 mm
    pytest.param("304", "tube 50mm 2mm --bundle 2x3", 0.712, id="304 tubes 50x2, 2x3"),
    # 4 × π/4(50² − 44²) = 1772 mm² over 2 × 50 mm
    pytest.param("6061-T6", "tube 50mm 3mm --bundle 2x2", 0.698, id="6061 tubes 50x3, 2x2"),
]


@pytest.mark.parametrize(("key", "spec", "chart"), SINGLE)
def test_single_cuts_within_one_step_of_a_trade_chart(key, spec, chart):
    result = recommend(CAT.get(key), parse_section(spec), MID, extras=False)
    assert steps_from(result.pitch_label, chart) <= 1 + 1e-9, result.explanation


@pytest.mark.parametrize(("key", "spec", "width_in"), BUNDLES)
def test_bundles_within_one_step_of_the_chart_at_their_average_width(key, spec, width_in):
    section = parse_section(spec)
    assert section.mean_chord_mm / 25.4 == pytest.approx(width_in, rel=0.01)
    result = recommend(CAT.get(key), section, MID, extras=False)
    assert steps_from(result.pitch_label, mh31_pitch(width_in)) <= 1 + 1e-9, result.explanation


@pytest.mark.parametrize(
    ("key", "spec", "chart"),
    [*SINGLE, *(pytest.param(*p.values[:2], "", id=p.id) for p in BUNDLES)],
)
def test_a_thin_wall_or_web_gets_one_warning_that_says_what_to_do(key, spec, chart):
    # three teeth over the whole chord where it is thinnest (common practice), or two on
    # average with a variable pitch (trade charts for tube and structurals, from memory)
    # and one warning: ease the feed there; never advice to fit a finer pitch
    result = recommend(CAT.get(key), parse_section(spec), MID, extras=False)
    eased = [w for w in result.warnings if "ease the feed" in w]
    if result.teeth_in_thinnest >= 3 - 1e-9:
        assert eased == []
    else:
        assert result.tpi_coarse < result.tpi_fine
        assert result.teeth_in_thinnest_mean >= 2 - 1e-9
        assert len(eased) == 1 and "variable pitch damps" in eased[0]
    assert not any("finer pitch" in w for w in result.warnings)


def test_the_i_beam_web_before_and_after():
    # an upright 200 mm beam with a 5.6 mm web: three teeth over the web alone would need
    # 3 × 25.4 / 5.6 = 13.6 TPI coarse (derived: 14/18); the structural chart gives
    # 6/10-8/12 (from memory); 8/12 keeps 5.6 × 10 / 25.4 = 2.2 teeth on average (derived)
    result = recommend(CAT.get("A36"), parse_section("ibeam 200mm 100mm 5.6mm 8.5mm"), MID)
    assert result.pitch_label == "8/12"
    assert result.teeth_in_thinnest_mean == pytest.approx(5.6 * 10 / 25.4)
    why = result.explanation[0]
    assert "14/18" in why and "6/10" in why  # what three teeth would take, and the chart


@pytest.mark.parametrize(
    ("given", "says"),
    [
        # the recommendation itself: the same one warning, no finer pitch offered
        pytest.param("8/12", "under 3: ease the feed", id="8/12 as recommended"),
        # 6/10 keeps 5.6 × 8 / 25.4 = 1.8 on average (derived): under the floor of two,
        # and the fix offered is the recommendation, not a pitch that rubs more
        pytest.param("6/10", "fewer than 2 on average", id="6/10 too coarse"),
        # 14/18 keeps three teeth: no tooth warning at all
        pytest.param("14/18", None, id="14/18 keeps three"),
    ],
)
def test_a_given_pitch_is_held_to_the_recommendation_s_own_tooth_floor(given, says):
    section = parse_section("ibeam 200mm 100mm 5.6mm 8.5mm")
    result = evaluate(CAT.get("A36"), section, MID, given)
    teeth = [w for w in result.warnings if "under 3" in w or "fewer than" in w]
    if says is None:
        assert teeth == []
    else:
        assert len(teeth) == 1 and says in teeth[0]
        if "fewer than" in says:
            assert "such as 8/12" in teeth[0]
