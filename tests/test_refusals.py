"""Refusals with a way out: trade names of materials, diameter marks, saws that take the work."""

from __future__ import annotations

import csv

import pytest

from sawplan.errors import ExitCode, NotFoundError
from sawplan.materials import load_catalogue, normalise_key
from sawplan.paths import data_file

# Each alias with the catalogue entry it must name, checked through the UNS number
# its source gives for it (an independent key: the catalogue's UNS column).
ALIASES = [
    # the trade's own spellings of AISI/SAE numbers (common practice)
    pytest.param("ss304", "S30400", id="ss304"),
    pytest.param("AISI 304", "S30400", id="AISI 304"),
    pytest.param("aisi304", "S30400", id="aisi304"),
    pytest.param("304 stainless", "S30400", id="304 stainless"),
    pytest.param("SAE 4140", "G41400", id="SAE 4140"),
    pytest.param("17-4 PH", "S17400", id="17-4 PH with a space"),
    # UNS numbers, with and without the word (ASTM E527 / SAE J1086 numbering)
    pytest.param("UNS S31600", "S31600", id="UNS S31600"),
    pytest.param("N07718", "N07718", id="UNS N07718"),
    # EN 10088-1 numbers and names; ASTM A959 lists them beside the UNS numbers (from memory)
    pytest.param("1.4301", "S30400", id="EN 1.4301 is 304"),
    pytest.param("X5CrNi18-10", "S30400", id="X5CrNi18-10 is 304"),
    pytest.param("W.Nr. 1.4401", "S31600", id="W.Nr. 1.4401 is 316"),
    pytest.param("1.4542", "S17400", id="EN 1.4542 is 17-4 PH"),
    # ASTM A564 type 630 is 17-4 PH (the standard's own type number)
    pytest.param("type 630", "S17400", id="type 630"),
    # EN 573-3 aluminium designations carry the AA number (from memory)
    pytest.param("EN AW-6082", "A96082", id="EN AW-6082"),
    # generic nickel-alloy names; DIN material numbers (from memory)
    pytest.param("Alloy 625", "N06625", id="Alloy 625"),
    pytest.param("2.4816", "N06600", id="W.Nr. 2.4816 is alloy 600"),
    # ASTM B348 grade 5 is Ti-6Al-4V (the standard's grade table)
    pytest.param("Ti grade 5", "R56400", id="Ti grade 5"),
    # near equivalents a shop uses: EN 10083-3 42CrMo4 for 4140 (from memory)
    pytest.param("42CrMo4", "G41400", id="42CrMo4 near 4140"),
]


@pytest.mark.parametrize(("name", "uns"), ALIASES)
def test_trade_names_find_the_catalogue_entry(name, uns):
    assert load_catalogue().get(name).uns == uns


def test_every_alias_names_a_catalogue_entry_and_a_source():
    catalogue = load_catalogue()
    keys = {normalise_key(m.key) for m in catalogue}
    with data_file("material_aliases.csv").open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert rows
    for row in rows:
        assert normalise_key(row["key"]) in keys, row
        assert row["source"].strip(), row
        assert normalise_key(row["alias"]) not in keys, f"{row['alias']} shadows a key"
        assert catalogue.get(row["alias"]).key == row["key"]


def test_an_unknown_material_suggests_the_closest_keys():
    with pytest.raises(NotFoundError) as err:
        load_catalogue().get("ss3o4")
    assert "did you mean 304" in err.value.one_line()


@pytest.mark.parametrize(
    "words",
    [
        pytest.param(["17-4", "PH", "round", "60mm"], id="17-4 PH unquoted"),
        pytest.param(["AISI", "304", "round", "60mm"], id="AISI 304 unquoted"),
        pytest.param(["ss", "304", "round", "60mm"], id="ss 304 unquoted"),
    ],
)
def test_a_material_name_the_shell_split_is_joined_again(cli, words):
    result = cli("weigh", *words, "--length", "1m", "--json")
    assert result.code == 0, result.err
    assert "stainless" in result.out


@pytest.mark.parametrize(
    "section",
    [
        pytest.param(["round", "Ø250mm"], id="round Ø250mm (as printed)"),
        pytest.param(["round", "Ø250", "mm"], id="round Ø250 mm"),
        pytest.param(["Ø250mm"], id="Ø250mm alone"),
        pytest.param(["dia", "250mm"], id="dia 250mm"),
        pytest.param(["250mm", "OD"], id="250mm OD"),
        pytest.param(["round", "⌀250mm"], id="diameter sign U+2300"),
    ],
)
def test_diameter_marks_are_read_as_printed(cli, section):
    import json

    plain = json.loads(cli("weigh", "1018", "round", "250mm", "--length", "1m", "--json").out)
    marked = cli("weigh", "1018", *section, "--length", "1m", "--json")
    assert marked.code == 0, marked.err
    assert json.loads(marked.out)["weight_kg"] == plain["weight_kg"]


def test_printed_hex_label_reads_back(cli):
    assert cli("weigh", "1018", "hex", "50", "A/F", "mm", "--length", "1m").code == 0


def test_over_capacity_names_the_saws_that_take_it_largest_first(cli):
    # packaged saws: mid-production takes 260 mm round, large-column 510 mm (data/saws.toml)
    result = cli("cut", "304", "round", "400mm")
    assert result.code == ExitCode.BAD_DATA
    assert "over the mid-production capacity of 260 mm round" in result.err
    assert "it fits large-column (510 mm round): give --saw large-column" in result.err
    assert cli("cut", "304", "round", "400mm", "--saw", "large-column").code == 0


def test_over_every_capacity_names_the_largest(cli):
    result = cli("cut", "304", "round", "900mm")
    assert result.code == ExitCode.BAD_DATA
    assert "no known saw takes it; the largest is large-column (510 mm round)" in result.err


def test_a_saw_in_the_log_is_offered_too(cli):
    assert (
        cli("saw", "add", "big bay", "--like", "large-column", "--capacity-round", "700mm").code
        == 0
    )
    result = cli("cut", "304", "round", "600mm")
    assert 'it fits big bay (700 mm round): give --saw "big bay"' in result.err
