"""The materials catalogue, checked against outside references.

Sources beside each value: the `periodictable` package (densities of the
elements); Machinery's Handbook, 31st edition (labelled MH31: band-saw speed
table, unit-power table); ASM data and producers' sheets for densities;
Kalpakjian's specific-energy table; shop rules of thumb (labelled common
practice); values recalled rather than read (labelled memory); values worked
from the formulas (labelled derived); and pint for unit conversions.
"""

from __future__ import annotations

import csv

import periodictable
import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.errors import BadDataError, NotFoundError
from sawplan.materials import (
    ALL_COLUMNS,
    GROUPS,
    NUMERIC_COLUMNS,
    Catalogue,
    Material,
    load_catalogue,
)
from sawplan.paths import data_file

UREG = pint.UnitRegistry()


def ft_min_to_m_min(ft_min: float) -> float:
    return UREG.Quantity(ft_min, "ft/min").to("m/min").magnitude


def in2_min_to_cm2_min(in2_min: float) -> float:
    return UREG.Quantity(in2_min, "in**2/min").to("cm**2/min").magnitude


def g_cm3_to_kg_m3(g_cm3: float) -> float:
    return UREG.Quantity(g_cm3, "g/cm**3").to("kg/m**3").magnitude


@pytest.fixture(scope="module")
def raw_rows() -> list[dict[str, str]]:
    """The packaged CSV read independently of the code under test."""
    with data_file("materials.csv").open(newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


@pytest.fixture(scope="module")
def catalogue() -> Catalogue:
    return load_catalogue()


# --- the packaged table ----------------------------------------------------


def test_table_has_the_agreed_columns(raw_rows):
    assert list(raw_rows[0]) == list(ALL_COLUMNS)


def test_at_least_thirty_rows(raw_rows, catalogue):
    assert len(raw_rows) >= 30
    assert len(catalogue) == len(raw_rows)


def test_every_number_has_a_source(raw_rows):
    for row in raw_rows:
        for number, source in NUMERIC_COLUMNS.items():
            assert float(row[number]) > 0, (row["key"], number)
            assert row[source].strip(), (row["key"], source)


def test_groups_are_known_and_all_present(raw_rows, catalogue):
    assert {row["group"] for row in raw_rows} <= set(GROUPS)
    assert catalogue.groups() == list(GROUPS)  # every group has a material
    for group in GROUPS:
        assert catalogue.in_group(group), group


def test_keys_unique_case_insensitively(raw_rows):
    keys = [row["key"].casefold() for row in raw_rows]
    assert len(keys) == len(set(keys))


def test_mh31_rows_say_mh31(raw_rows):
    """A value labelled MH31 must be one of the MH31 band-saw table rows below."""
    mh31 = {row["key"] for row in raw_rows if row["band_speed_source"].startswith("MH31")}
    assert mh31 == set(MH31_BAND_SPEEDS_FT_MIN)


# Densities of commercially pure metals vs. the element (periodictable, g/cm³).
@pytest.mark.parametrize(
    ("key", "element"),
    [
        pytest.param("1100", periodictable.Al, id="aluminium 1100 vs Al"),
        pytest.param("C110", periodictable.Cu, id="copper C110 vs Cu"),
        pytest.param("Ti-Gr2", periodictable.Ti, id="CP titanium grade 2 vs Ti"),
        pytest.param("Ni200", periodictable.Ni, id="nickel 200 vs Ni"),
    ],
)
def test_pure_metal_density_matches_element(catalogue, key, element):
    expected = g_cm3_to_kg_m3(element.density)  # periodictable
    assert catalogue.get(key).density_kg_m3 == pytest.approx(expected, rel=0.015)


# Densities, g/cm³ (ASM data and producers' sheets, partly from memory).
@pytest.mark.parametrize(
    ("key", "g_cm3"),
    [
        pytest.param("1018", 7.87, id="1018 7.87 (ASM)"),
        pytest.param("4140", 7.85, id="4140 7.85 (ASM)"),
        pytest.param("A2", 7.86, id="A2 7.86 (ASM)"),
        pytest.param("D2", 7.70, id="D2 7.70 (ASM)"),
        pytest.param("304", 7.93, id="304 7.93 (ASM)"),
        pytest.param("316", 8.00, id="316 8.00 (ASM)"),
        pytest.param("17-4PH", 7.80, id="17-4 PH 7.80 (ASM)"),
        pytest.param("6061-T6", 2.70, id="6061 2.70 (ASM)"),
        pytest.param("7075-T6", 2.81, id="7075 2.81 (ASM)"),
        pytest.param("C360", 8.50, id="C360 8.50 (ASM)"),
        pytest.param("gray-30", 7.15, id="gray cast iron 7.15 (ASM, varies by class)"),
        pytest.param("Ti-6Al-4V", 4.43, id="Ti-6Al-4V 4.43 (ASM)"),
        pytest.param("718", 8.19, id="alloy 718 8.19 (ASM)"),
    ],
)
def test_density_matches_asm_values(catalogue, key, g_cm3):
    assert catalogue.get(key).density_kg_m3 == pytest.approx(g_cm3_to_kg_m3(g_cm3), rel=0.01)


def test_steel_density_matches_shop_formula_constant(catalogue):
    # common practice: metric round bar 0.006165·D² kg/m uses ρ = 7.85 g/cm³
    assert catalogue.get("4140").density_kg_m3 == pytest.approx(7850, rel=0.005)


# Band speed, bi-metal with coolant at 4 in width: MH31 band-saw table, ft/min.
MH31_BAND_SPEEDS_FT_MIN = {
    "1018": 290,  # MH31
    "1045": 220,  # MH31
    "4340": 220,  # MH31
    "4140": 250,  # MH31
    "O1": 200,  # MH31
    "H13": 190,  # MH31
    "A2": 180,  # MH31
    "D2": 90,  # MH31
    "M2": 100,  # MH31
    "T15": 70,  # MH31
    "304": 120,  # MH31
    "Ti-6Al-4V": 70,  # MH31
    "Ti-Gr2": 80,  # MH31 (CP Ti)
}


@pytest.mark.parametrize(
    ("key", "ft_min"),
    [pytest.param(k, v, id=f"{k} {v} ft/min (MH31)") for k, v in MH31_BAND_SPEEDS_FT_MIN.items()],
)
def test_band_speed_matches_mh31(catalogue, key, ft_min):
    assert catalogue.get(key).band_speed_m_min == pytest.approx(ft_min_to_m_min(ft_min), rel=0.02)


def test_band_speed_1018_in_metres(catalogue):
    # the metric value: 88 m/min (MH31 290 ft/min)
    assert catalogue.get("1018").band_speed_m_min == pytest.approx(88, rel=0.02)


# Band speeds recalled from memory as ranges (ft/min).
@pytest.mark.parametrize(
    ("key", "low_ft_min", "high_ft_min"),
    [
        pytest.param("316", 90, 110, id="316 about 100 (memory)"),
        pytest.param("17-4PH", 100, 110, id="17-4 PH 100-110 (memory)"),
        pytest.param("718", 60, 70, id="718 60-70 (memory)"),
        pytest.param("C360", 285, 315, id="C360 285-315 (memory)"),
        pytest.param("gray-30", 200, 300, id="gray cast iron 200-300 (memory)"),
        pytest.param("6061-T6", 450, 550, id="6061 about 500 (memory)"),
        pytest.param("7075-T6", 450, 550, id="7075 about 500 (memory)"),
    ],
)
def test_band_speed_inside_memory_range(catalogue, key, low_ft_min, high_ft_min):
    speed = catalogue.get(key).band_speed_m_min
    assert ft_min_to_m_min(low_ft_min) <= speed <= ft_min_to_m_min(high_ft_min)


# Typical cutting rates, in²/min (common practice and memory).
@pytest.mark.parametrize(
    ("key", "low", "high"),
    [
        pytest.param("1018", 9, 15, id="1018 9-15"),
        pytest.param("4140", 8, 15, id="4140 8-15"),
        pytest.param("1045", 5, 10, id="1045 5-10"),
        pytest.param("A2", 2, 7, id="A2 2-7"),
        pytest.param("D2", 2, 7, id="D2 2-7"),
        pytest.param("304", 2, 3, id="304 2-3"),
        pytest.param("17-4PH", 1.5, 3, id="17-4 PH 1.5-3"),
        pytest.param("Ti-6Al-4V", 1.5, 3, id="Ti-6Al-4V 1.5-3"),
        pytest.param("Ti-Gr2", 1.5, 3, id="CP Ti 1.5-3"),
        pytest.param("718", 0.5, 1.5, id="718 0.5-1.5"),
        pytest.param("6061-T6", 20, 60, id="6061 20-60"),
        pytest.param("C360", 15, 30, id="C360 15-30"),
        pytest.param("gray-30", 5, 10, id="gray cast iron 5-10"),
        pytest.param("65-45-12", 5, 10, id="ductile cast iron 5-10"),
    ],
)
def test_cutting_rate_inside_typical_range(catalogue, key, low, high):
    rate = catalogue.get(key).cutting_rate_cm2_min
    assert in2_min_to_cm2_min(low) <= rate <= in2_min_to_cm2_min(high)


def test_material_bite_of_1018_is_about_6_um(catalogue):
    """Derived: h = A'·p/(W·V) ≈ 6 µm for 1018 at 100 mm, 3/4 pitch, 88 m/min."""
    m = catalogue.get("1018")
    pitch_mm = 25.4 / 3.5  # 3/4 variable pitch: 3.5 teeth per inch on average
    feed_mm_min = m.cutting_rate_mm2_min / 100.0  # width of cut 100 mm
    bite_um = 1000 * feed_mm_min * pitch_mm / (1000 * m.band_speed_m_min)
    assert 4.5 <= bite_um <= 7.5


def test_material_bite_of_304_is_about_3_um(catalogue):
    """Derived: 304 at 2.5 in²/min and 37 m/min gives h ≈ 3 µm."""
    m = catalogue.get("304")
    bite_um = (m.cutting_rate_mm2_min / 100.0) * (25.4 / 3.5) / m.band_speed_m_min
    assert 2.0 <= bite_um <= 4.0


# Specific cutting energy: Kalpakjian's specific-energy table (memory), J/mm³.
KALPAKJIAN_J_MM3 = {
    "aluminium": (0.4, 1.1),
    "cast-iron": (1.1, 5.4),
    "copper-alloy": (1.4, 3.3),
    "austenitic-stainless": (2, 5),
    "martensitic-stainless": (2, 5),
    "ph-stainless": (2, 5),
    "titanium": (2, 5),
    "nickel-alloy": (4.8, 6.7),
    "carbon-steel": (2, 9),
    "alloy-steel": (2, 9),
    "tool-steel": (2, 9),
    "high-speed-steel": (2, 9),
}


@pytest.mark.parametrize(
    "group", [pytest.param(g, id=f"{g} (Kalpakjian, memory)") for g in KALPAKJIAN_J_MM3]
)
def test_unit_energy_inside_kalpakjian_range(catalogue, group):
    low, high = KALPAKJIAN_J_MM3[group]
    for m in catalogue.in_group(group):
        assert low <= m.unit_energy_j_mm3 <= high, m.key


@pytest.mark.parametrize("key", ["1018", "1020", "A36", "4140"])
def test_mild_steel_unit_energy_at_saw_bites(catalogue, key):
    # derived: MH31 K_p × feed factor × wear factor gives 4-6 J/mm³ for mild steel
    assert 4.0 <= catalogue.get(key).unit_energy_j_mm3 <= 6.0


def test_unit_energy_of_1018_follows_mh31_formula(catalogue):
    """Derived: K_p 0.69 hp·min/in³ (MH31, 120-140 HB, memory) × 2.73 J/mm³
    × feed factor (0.012 in / h)^0.19 at h = 6 µm × wear 1.3."""
    h_in = UREG.Quantity(6, "micrometer").to("inch").magnitude
    hp_min_in3 = UREG.Quantity(1, "hp*min/in**3").to("J/mm**3").magnitude  # 2.73 (pint)
    expected = 0.69 * hp_min_in3 * (0.012 / h_in) ** 0.19 * 1.3
    assert catalogue.get("1018").unit_energy_j_mm3 == pytest.approx(expected, abs=0.06)


def test_work_hardening_flags(catalogue):
    # common practice: austenitic stainless and nickel alloys work-harden
    for group in ("austenitic-stainless", "nickel-alloy"):
        assert all(m.work_hardens for m in catalogue.in_group(group)), group
    assert not catalogue.get("1018").work_hardens


def test_cutting_rate_in_core_units(catalogue):
    m = catalogue.get("1018")
    expected = UREG.Quantity(m.cutting_rate_cm2_min, "cm**2/min").to("mm**2/min").magnitude
    assert m.cutting_rate_mm2_min == pytest.approx(expected)


# --- lookups -----------------------------------------------------------------


@pytest.mark.parametrize(
    ("typed", "key"),
    [
        pytest.param("4140", "4140", id="exact"),
        pytest.param("d2", "D2", id="lower case"),
        pytest.param("17-4 PH", "17-4PH", id="spaced"),
        pytest.param("ti-6al-4v", "Ti-6Al-4V", id="mixed case"),
        pytest.param("6061t6", "6061-T6", id="no hyphen"),
        pytest.param("S30400", "304", id="UNS number"),
        pytest.param("n07718", "718", id="UNS lower case"),
    ],
)
def test_lookup_forgives_case_and_spelling(catalogue, typed, key):
    assert catalogue.get(typed).key == key
    assert typed in catalogue
    assert catalogue[typed] is catalogue.get(typed)


@settings(max_examples=50, deadline=None)
@given(data=st.data())
def test_any_casing_finds_the_same_material(catalogue, data):
    material = data.draw(st.sampled_from(list(catalogue)))
    flips = data.draw(st.lists(st.booleans(), min_size=len(material.key)))
    typed = "".join(
        ch.swapcase() if flip else ch for ch, flip in zip(material.key, flips, strict=False)
    )
    assert catalogue.get(typed) is material


def test_unknown_key_suggests_close_keys(catalogue):
    with pytest.raises(NotFoundError) as err:
        catalogue.get("4410")
    message = str(err.value)
    assert "did you mean" in message
    assert "did you mean 4140," in message  # the swapped-digit key comes first
    assert "see `sawplan materials`" in message
    assert err.value.field == "material"


def test_unknown_key_without_close_match_still_points_to_list(catalogue):
    with pytest.raises(NotFoundError, match="see `sawplan materials`") as err:
        catalogue.get("unobtainium")
    assert "did you mean" not in str(err.value)


def test_temper_missing_takes_the_catalogue_temper_and_says_so(catalogue):
    material, alias = catalogue.resolve("6061")
    assert material.key == "6061-T6"
    assert alias.relation == "near" and "T6" in alias.note()


def test_unknown_group_is_an_error(catalogue):
    with pytest.raises(BadDataError, match="unknown group"):
        catalogue.in_group("bronze")


def test_iteration_and_keys_follow_table_order(raw_rows, catalogue):
    assert [m.key for m in catalogue] == [row["key"] for row in raw_rows]
    assert catalogue.keys() == [row["key"] for row in raw_rows]
    assert all(isinstance(m, Material) and m.origin == "catalogue" for m in catalogue)


def test_packaged_catalogue_is_cached():
    assert load_catalogue() is load_catalogue()


def test_material_is_frozen(catalogue):
    with pytest.raises(AttributeError):
        catalogue.get("1018").density_kg_m3 = 1.0  # type: ignore[misc]


# --- user files ----------------------------------------------------------------

USER_HEADER = (
    "key,designation,group,density_kg_m3,hardness_hb,band_speed_m_min,"
    "unit_energy_j_mm3,cutting_rate_cm2_min,work_hardens,notes\n"
)


def write_csv(tmp_path, body: str, header: str = USER_HEADER, name: str = "mine.csv"):
    path = tmp_path / name
    path.write_text(header + body, encoding="utf-8")
    return path


def test_user_file_overrides_and_adds(tmp_path):
    path = write_csv(
        tmp_path,
        "4140,4140 pre-hardened,alloy-steel,7850,300,45,6.5,30,no,our stock\n"
        "SHOP-1,Shop bronze,copper-alloy,8800,80,90,2,100,no,\n",
    )
    cat = load_catalogue(path)
    base = load_catalogue()
    assert len(cat) == len(base) + 1
    overridden = cat.get("4140")
    assert overridden.hardness_hb == 300
    assert overridden.band_speed_m_min == 45
    assert overridden.origin == str(path)
    assert overridden.density_source == "user file"
    assert overridden.uns == ""
    added = cat.get("shop-1")
    assert added.group == "copper-alloy"
    assert added.cutting_rate_mm2_min == pytest.approx(10000)
    # the override keeps the packaged row's place; the addition comes last
    assert cat.keys().index("4140") == base.keys().index("4140")
    assert cat.keys()[-1] == "SHOP-1"
    # the packaged catalogue itself is untouched
    assert base.get("4140").hardness_hb != 300


def test_user_sources_kept_when_given(tmp_path):
    header = USER_HEADER.replace("hardness_hb,", "hardness_hb,hardness_source,")
    path = write_csv(tmp_path, "X1,Test alloy,alloy-steel,7800,250,our lab,60,5,40,no,\n", header)
    m = load_catalogue(path).get("X1")
    assert m.hardness_source == "our lab"
    assert m.band_speed_source == "user file"


def test_environment_variable_names_the_user_file(tmp_path, monkeypatch):
    path = write_csv(tmp_path, "ENV-1,From env,plastic,1200,10,150,0.3,200,no,\n")
    monkeypatch.setenv("SAWPLAN_MATERIALS", str(path))
    assert load_catalogue().get("ENV-1").origin == str(path)


def test_argument_wins_over_environment(tmp_path, monkeypatch):
    env_path = write_csv(tmp_path, "ENV-1,From env,plastic,1200,10,150,0.3,200,no,\n", name="e.csv")
    arg_path = write_csv(tmp_path, "ARG-1,From arg,plastic,1200,10,150,0.3,200,no,\n", name="a.csv")
    monkeypatch.setenv("SAWPLAN_MATERIALS", str(env_path))
    cat = load_catalogue(arg_path)
    assert "ARG-1" in cat
    assert "ENV-1" not in cat


def test_empty_environment_variable_means_packaged(monkeypatch):
    monkeypatch.setenv("SAWPLAN_MATERIALS", "")
    assert load_catalogue() is load_catalogue(None)


def test_byte_order_mark_is_accepted(tmp_path):
    path = tmp_path / "excel.csv"
    row = "B-1,Bom,plastic,1200,10,150,0.3,200,yes,\n"
    path.write_text(USER_HEADER + row, encoding="utf-8-sig")
    assert load_catalogue(path).get("B-1").work_hardens is True


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        pytest.param(
            "X,Bad,alloy-steel,abc,200,60,5,40,no,\n",
            "mine.csv row 2, density_kg_m3: expected a positive number, got 'abc'",
            id="not a number",
        ),
        pytest.param(
            "X,Bad,alloy-steel,7800,-5,60,5,40,no,\n",
            "mine.csv row 2, hardness_hb: expected a positive number, got '-5'",
            id="negative",
        ),
        pytest.param(
            "X,Bad,alloy-steel,7800,200,nan,5,40,no,\n",
            "mine.csv row 2, band_speed_m_min: expected a positive number, got 'nan'",
            id="nan",
        ),
        pytest.param(
            "X,Bad,alloy-steel,7800,200,60,inf,40,no,\n",
            "mine.csv row 2, unit_energy_j_mm3: expected a positive number, got 'inf'",
            id="infinite",
        ),
        pytest.param(
            "X,Bad,alloy-steel,7800,200,60,5,,no,\n",
            "mine.csv row 2, cutting_rate_cm2_min: expected a positive number, got ''",
            id="empty number",
        ),
        pytest.param(
            "OK,Fine,plastic,1200,10,150,0.3,200,no,\n\nX,Bad,bronze,8800,80,90,2,100,no,\n",
            "mine.csv row 4, group: expected one of",
            id="unknown group, after a blank line",
        ),
        pytest.param(
            "X,Bad,alloy-steel,7800,200,60,5,40,maybe,\n",
            "mine.csv row 2, work_hardens: expected yes or no, got 'maybe'",
            id="work_hardens",
        ),
        pytest.param(
            ",Bad,alloy-steel,7800,200,60,5,40,no,\n",
            "mine.csv row 2, key: must not be empty",
            id="empty key",
        ),
        pytest.param(
            "X,One,plastic,1200,10,150,0.3,200,no,\nx,Two,plastic,1200,10,150,0.3,200,no,\n",
            "mine.csv row 3, key: duplicate key 'x' (first on row 2)",
            id="duplicate key",
        ),
    ],
)
def test_bad_rows_name_file_row_and_column(tmp_path, body, expected):
    path = write_csv(tmp_path, body)
    with pytest.raises(BadDataError) as err:
        load_catalogue(path)
    assert str(err.value).replace(str(tmp_path) + "/", "").startswith(expected)


def test_missing_column_is_named(tmp_path):
    header = USER_HEADER.replace("density_kg_m3,", "")
    path = write_csv(tmp_path, "X,Bad,alloy-steel,200,60,5,40,no,\n", header)
    with pytest.raises(BadDataError, match="missing columns: density_kg_m3"):
        load_catalogue(path)


def test_empty_file_is_bad_data(tmp_path):
    path = tmp_path / "empty.csv"
    path.write_text("", encoding="utf-8")
    with pytest.raises(BadDataError, match="empty file"):
        load_catalogue(path)


def test_non_utf8_file_is_bad_data(tmp_path):
    path = tmp_path / "latin1.csv"
    row = "X,Acier à outils,tool-steel,7800,200,60,5,40,no,\n"
    path.write_bytes((USER_HEADER + row).encode("latin-1"))
    with pytest.raises(BadDataError, match="UTF-8"):
        load_catalogue(path)


def test_missing_user_file_is_not_found(tmp_path, monkeypatch):
    with pytest.raises(NotFoundError, match="no such file") as err:
        load_catalogue(tmp_path / "nope.csv")
    assert err.value.field == "materials file"
    monkeypatch.setenv("SAWPLAN_MATERIALS", str(tmp_path / "gone.csv"))
    with pytest.raises(NotFoundError) as err:
        load_catalogue()
    assert err.value.field == "SAWPLAN_MATERIALS"
