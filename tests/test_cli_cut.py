"""`sawplan cut` from the command line: JSON contract, comparison, chart and bad input."""

from __future__ import annotations

import json

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
    # mean cutting rate is area over time (definition, reference §4)
    rate = data["area_mm2"] / 100 / data["cut_time_min"]
    assert data["cutting_rate_cm2_min"] == pytest.approx(rate, rel=0.01)
    assert data["tpi_coarse"] <= data["tpi_fine"]


def test_constant_pitch_has_equal_numbers(cli):
    data = json.loads(cli("cut", "1018", "flat", "50mm", "6mm", "--pitch", "14", "--json").out)
    assert data["tpi_coarse"] == data["tpi_fine"] == 14


def test_fine_pitch_on_big_solid_is_compared_and_warned(cli):
    result = cli("cut", "4140", "round", "10in", "--pitch", "6/10")
    assert result.code == 0, result.err
    assert "takes over ten times the time of" in result.out  # 80 teeth in the chord: far slower
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
            "band",
            3,
            id="band speed outside range",
        ),
        pytest.param(
            ["4140", "round", "7in", "--band-speed", "60m/min"],
            "--pitch",
            2,
            id="speed without pitch",
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
