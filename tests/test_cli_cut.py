"""`sawplan cut` from the command line: JSON contract, comparison, chart and bad input."""

from __future__ import annotations

import json
import re

import pytest

CUT_KEYS = (
    "tpi_coarse",
    "tpi_fine",
    "band_speed_m_min",
    "feed_mm_min",
    "cutting_rate_cm2_min",
    "cut_time_min",
    "area_mm2",
    "governing_limit",
    "warnings",
)


def test_cut_json_has_the_contract_keys(cli):
    result = cli("cut", "4140", "round", "7in", "--json")
    assert result.code == 0, result.err
    data = json.loads(result.out)
    for key in CUT_KEYS:
        assert key in data, key
    # area of a 7 in round: π/4·(177.8 mm)² (closed form)
    assert data["area_mm2"] == pytest.approx(3.141592653589793 / 4 * 177.8**2, rel=1e-9)
    # mean cutting rate is area over time (definition of the cutting rate)
    rate = data["area_mm2"] / 100 / data["cut_time_min"]
    assert data["cutting_rate_cm2_min"] == pytest.approx(rate, rel=0.01)
    assert data["tpi_coarse"] <= data["tpi_fine"]


def test_constant_pitch_has_equal_numbers(cli):
    data = json.loads(cli("cut", "1018", "flat", "50mm", "6mm", "--pitch", "14", "--json").out)
    assert data["tpi_coarse"] == data["tpi_fine"] == 14


def test_fine_pitch_on_big_solid_is_compared_and_warned(cli):
    result = cli("cut", "4140", "round", "10in", "--pitch", "6/10")
    assert result.code == 0, result.err
    # 80 teeth in the chord, over three times the ~24 a solid takes (common practice): the
    # gullets pack and the bounded ploughing model keeps the cut several times slower
    times = re.search(r"takes (over ten times|([\d.]+)×) the time of", result.out)
    assert times is not None, result.out
    assert times.group(2) is None or float(times.group(2)) >= 3
    assert "!" in result.out  # at least one warning line


def test_chart_draws_both_panels(cli):
    result = cli("cut", "304", "round", "150mm", "--chart")
    assert result.code == 0, result.err
    assert "width of cut" in result.out
    assert "down-feed" in result.out


def test_us_units(cli):
    result = cli("cut", "4140", "round", "7in", "--units", "us")
    assert "ft/min" in result.out and "in²/min" in result.out


@pytest.mark.parametrize(
    ("args", "fragment", "code"),
    [
        pytest.param(["4140", "round", "7in", "--pitch", "3-4x"], "pitch", 2, id="not a pitch"),
        pytest.param(
            ["4140", "round", "7in", "--saw", "mid-prodution"],
            "mid-production",
            4,
            id="unknown saw",
        ),
        pytest.param(["4140", "round", "2m"], "capacity", 3, id="over capacity"),
        pytest.param(
            ["4140", "round", "7in", "--pitch", "3/4", "--band-speed", "900m/min"],
            "20-100 m/min",
            3,
            id="band speed outside range says the range",
        ),
        pytest.param(
            ["1018", "tube", "60mm", "3mm", "--bundle", "3x4", "--saw", "small-horizontal"],
            "largest bundle that fits is 2×5",
            3,
            id="bundle over capacity names the largest that fits",
        ),
        pytest.param(
            ["A36", "angle", "3in", "3in", "0.25in", "--orient", "edge"],
            "choose legs-down or vee or flat",
            2,
            id="orientation the shape does not have lists those it has",
        ),
        pytest.param(
            ["4140", "round", "7in", "--feed", "-5mm/min"],
            "feed",
            3,
            id="negative feed",
        ),
        pytest.param(["4140", "round", "7kg"], "expected a length", 2, id="wrong dimension"),
        pytest.param(["unobtainium", "round", "7in"], "material", 4, id="unknown material"),
    ],
)
def test_bad_input_one_line(cli, args, fragment, code):
    result = cli("cut", *args)
    assert result.code == code, (result.code, result.err)
    assert "Traceback" not in result.err
    assert result.err.strip().count("\n") == 0
    assert fragment in result.err


def test_band_speed_alone_is_planned_and_compared(cli):
    result = cli("cut", "1018", "round", "60mm", "--band-speed", "40m/min")
    assert result.code == 0, result.err
    first = result.out.splitlines()[0]
    assert "at 40.0 m/min takes" in first and "the time of" in first


def test_long_times_read_in_hours_and_ratios_in_words(cli):
    # 10/14 through a 7 in 17-4 PH billet on the small gravity saw takes hours
    result = cli("cut", "17-4PH", "round", "7in", "--saw", "small-horizontal", "--pitch",
                 "10/14")  # fmt: skip
    assert result.code == 0, result.err
    assert re.search(r"Time \d+ h \d+ min per cut", result.out)
    assert "over ten times the time of 2/3" in result.out
    assert not re.search(r"\d[eE][+-]\d", result.out)  # never scientific notation


def test_over_speed_comparison_line(cli):
    result = cli("cut", "17-4PH", "round", "7in", "--saw", "small-horizontal", "--pitch",
                 "2/3", "--band-speed", "75m/min")  # fmt: skip
    assert result.code == 0, result.err
    first = result.out.splitlines()[0]
    assert "faster, but over ten times the blade wear per cut" in first
    assert "! band speed 75.0 m/min is 2.5× the 30.2 m/min recommended" in result.out


def test_bundle_card_shows_time_per_piece_and_the_verdict(cli):
    result = cli("cut", "A36", "stube", "50mm", "3mm", "--bundle", "3x2")
    assert result.code == 0, result.err
    assert "per piece)" in result.out
    assert "Bundle      bundling 3×2 saves time" in result.out
    data = json.loads(cli("cut", "A36", "stube", "50mm", "3mm", "--bundle", "3x2", "--json").out)
    assert data["pieces"] == 6
    assert data["time_per_piece_min"] == pytest.approx(data["cut_time_min"] / 6)
    assert data["bundle"]["better"] == "bundle"
    assert data["stalled"] is False


def test_feed_option(cli):
    result = cli("cut", "1018", "round", "100mm", "--saw", "large-column", "--feed", "200mm/min")
    assert result.code == 0, result.err
    assert "! down-feed 200 mm/min is over the" in result.out
