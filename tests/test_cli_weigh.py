"""`sawplan weigh` from the command line: output, JSON keys and bad input."""

from __future__ import annotations

import json

import pytest


def test_weigh_json_keys_and_values(cli):
    result = cli("weigh", "4140", "round", "60mm", "--length", "1m", "--count", "3", "--json")
    assert result.code == 0, result.err
    data = json.loads(result.out)
    for key in ("weight_kg", "mass_per_length_kg_m", "handling", "lot_weight_kg", "lifting_index"):
        assert key in data
    # 0.006165·D² kg/m for steel (common practice)
    assert data["mass_per_length_kg_m"] == pytest.approx(0.006165 * 3600, rel=0.005)
    assert data["lot_weight_kg"] == pytest.approx(3 * data["weight_kg"])


def test_weigh_us_units_table(cli):
    result = cli("weigh", "4140", "round", "2in", "--length", "1ft", "--units", "us")
    assert result.code == 0, result.err
    assert "lb/ft" in result.out
    assert "10.7 lb" in result.out  # 2.67·D² = 10.68 lb for a 2 in steel round (common practice)
    assert "caution" in result.out


def test_mixed_number_section_on_the_command_line(cli):
    a = json.loads(cli("weigh", "1018", "round", "7", "1/4", "in", "--length", "1ft", "--json").out)
    b = json.loads(cli("weigh", "1018", "round", "7.25in", "--length", "1ft", "--json").out)
    assert a["weight_kg"] == pytest.approx(b["weight_kg"])


@pytest.mark.parametrize(
    ("args", "field"),
    [
        pytest.param(["4140", "round", "60mm", "--length", "7kg"], "length", id="mass as length"),
        pytest.param(["4140", "round", "60kg", "--length", "1m"], "", id="mass as diameter"),
        pytest.param(["4140", "round", "0mm", "--length", "1m"], "", id="zero diameter"),
        pytest.param(
            ["4140", "tube", "50mm", "30mm", "--length", "1m"], "wall", id="wall too thick"
        ),
        pytest.param(
            ["4410", "round", "60mm", "--length", "1m"], "4140", id="unknown material suggests"
        ),
        pytest.param(
            ["4140", "rond", "60mm", "--length", "1m"], "round", id="unknown shape suggests"
        ),
        pytest.param(
            ["4140", "round", "60mm", "--length", "1m", "--count", "0"],
            "number of pieces",
            id="zero count",
        ),
    ],
)
def test_bad_input_is_one_line(cli, args, field):
    result = cli("weigh", *args)
    assert result.code != 0
    assert "Traceback" not in result.err
    assert result.err.strip().count("\n") == 0
    assert field in result.err
