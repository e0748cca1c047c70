"""Bundles and hollow sections: the gullet empties where the tooth leaves metal.

Derived from reference §2 (chip load h·W ≤ φ_s·A_g over one stretch of metal):
a tooth that crosses a gap between bars starts the next bar with an empty
gullet, so a bundle is not a solid of the bundle's width.
"""

from __future__ import annotations

import pytest

from sawplan.cutting import evaluate
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section


@pytest.fixture(scope="module")
def setup():
    return load_catalogue().get("1018"), get_saw("mid-production")


@pytest.mark.parametrize("spec", ["tube 60mm 3mm", "round 30mm"])
def test_a_bundle_costs_less_per_piece_than_single_cuts(setup, spec):
    mat, saw = setup
    single = evaluate(mat, parse_section(spec), saw, "10/14")
    bundle = evaluate(mat, parse_section(f"{spec} --bundle 3x4"), saw, "10/14")
    assert bundle.cut_time_min / 12 < single.cut_time_min


def test_gullet_limit_uses_the_longest_stretch_not_the_sum(setup):
    mat, saw = setup
    # two Ø30 rounds side by side: same gullet load per stretch as one round,
    # so the gullet-limited bite is the same even though W doubles
    one = evaluate(mat, parse_section("round 30mm"), saw, "10/14")
    two = evaluate(mat, parse_section("round 30mm --bundle 1x2"), saw, "10/14")
    if one.governing_limit == "gullet" and two.governing_limit == "gullet":
        assert two.cut_time_min == pytest.approx(one.cut_time_min, rel=0.05)
    else:  # power or force then governs the wider cut: it can only be slower
        assert two.cut_time_min >= one.cut_time_min * 0.999
