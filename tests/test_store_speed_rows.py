"""The log read as arrays for the fit of life against band speed.

External checks: the closed-form area of a round (πd²/4), the definition of
right-censoring (life-data analysis: a blade not retired is censored) and an
area-weighted mean worked by hand (derived).
"""

from __future__ import annotations

import math

import pytest

from sawplan.store import connect
from sawplan.store.records import BladeSpec, CutEntry, add_blade, log_cut, retire_blade
from sawplan.store.speed_rows import speed_life_rows

ROUND_60_CM2 = math.pi * 60.0**2 / 4.0 / 100.0  # πd²/4 in cm²


def _blade(db, tag, **kw):
    base = dict(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=3.0, tpi_fine=4.0, price=60.0)
    return add_blade(db, BladeSpec(**(base | kw)), added_on="2024-03-01").id


def _cut(db, blade_id, speed, *, group="austenitic-stainless", on="2024-03-04", count=1):
    log_cut(
        db,
        CutEntry(
            blade_id=blade_id,
            cut_on=on,
            material="304",
            material_group=group,
            section="round 60mm",
            area_mm2=ROUND_60_CM2 * 100.0 * count,
            count=count,
            band_speed_m_min=speed,
        ),
    )


def test_rows_carry_each_cut_at_its_speed_in_order(log_db):
    path = log_db
    with connect(path) as db:
        a = _blade(db, "A1")
        b = _blade(db, "B1", tpi_coarse=4.0, tpi_fine=6.0, price=75.0)
        idle = _blade(db, "C1")
        _cut(db, a, 60.0, on="2024-03-05")
        _cut(db, a, 40.0, on="2024-03-04", count=2)
        _cut(db, b, 50.0, group="carbon-steel")
        retire_blade(db, "A1", "dull", on="2024-03-06")
        del idle  # a blade that cut nothing is no life observation
        rows = speed_life_rows(db)
    assert rows.tags == ("A1", "B1")
    assert rows.failed == (True, False)  # retired = failed; still running = censored
    assert rows.prices == (60.0, 75.0)
    assert rows.material_groups == ("austenitic-stainless", "carbon-steel")
    assert rows.blade.tolist() == [0, 0, 1]
    assert rows.speed_m_min.tolist() == [40.0, 60.0, 50.0]  # in the order cut (date, then entry)
    assert rows.area_cm2.tolist() == pytest.approx([2 * ROUND_60_CM2, ROUND_60_CM2, ROUND_60_CM2])
    assert rows.imputed_area_cm2 == 0.0
    assert rows.blade_types[0] != rows.blade_types[1]


def test_cut_without_speed_takes_the_blades_mean_and_blade_without_any_is_left_out(log_db):
    path = log_db
    with connect(path) as db:
        a = _blade(db, "A1")
        quiet = _blade(db, "Q1")
        _cut(db, a, 40.0, count=3)
        _cut(db, a, 80.0)
        _cut(db, a, None)
        _cut(db, quiet, None)
        rows = speed_life_rows(db)
    assert rows.tags == ("A1",)
    assert rows.left_out == ("Q1",)
    # derived: area-weighted mean of 3 cuts at 40 and 1 at 80 = (3·40 + 80)/4 = 50 m/min
    assert rows.speed_m_min[-1] == pytest.approx(50.0)
    assert rows.speed_logged.tolist() == [True, True, False]
    assert rows.imputed_area_cm2 == pytest.approx(ROUND_60_CM2)


def test_only_one_group_and_type_renumbers_the_blades(tmp_path):
    path = tmp_path / "log.sqlite"
    with connect(path) as db:
        a = _blade(db, "A1")
        b = _blade(db, "B1")
        _cut(db, a, 60.0, group="carbon-steel")
        _cut(db, b, 45.0)
        rows = speed_life_rows(db).only(material_group="austenitic-stainless")
    assert rows.tags == ("B1",)
    assert rows.blade.tolist() == [0]
    assert rows.speed_m_min.tolist() == [45.0]
