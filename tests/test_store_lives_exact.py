"""A blade's life is the exact sum of its cuts, the same on SQLite and PostgreSQL.

The log is read one row per blade, group, saw and distinct area (with its
number of cuts) and summed in Python.  The reference is exact rational
arithmetic (``fractions.Fraction`` of every cut's area, rounded once) and
``math.fsum`` over every cut, as the lives were summed before.
"""

from __future__ import annotations

import math
from fractions import Fraction

from hypothesis import given, settings
from hypothesis import strategies as st

from sawplan.store import connect
from sawplan.store.cut_rows import CutEntry
from sawplan.store.records import BladeSpec, add_blade, log_cut, retire_blade
from sawplan.store.stats import blade_lives, exact_sum

# Areas whose float sums depend on the order of adding (0.1 + 0.2 ≠ 0.3 in binary),
# spread over magnitudes so that a rounding after each addition would lose digits.
AWKWARD = (1.1, 2.2, 3.3000000000000003, 12345.678901234567, 1e8 + 0.1, 7.000000000000001, 1.3)
# (tag, [(material group, saw number or None, area, number of rows)]); B-2's two groups
# differ by less than one unit in the last place of their sums
BLADES = (
    ("B-1", [("carbon-steel", 1, a, 3) for a in AWKWARD]),
    ("B-2", [("carbon-steel", 1, 1.1, 10), ("alloy-steel", 2, 11.000000000000002, 1)]),
    ("B-3", [("alloy-steel", None, 1e8 + 0.1, 2), ("alloy-steel", 2, 1.3, 9)]),
)


def _write(url: str) -> None:
    from sawplan.saws import load_saws
    from sawplan.store.saw_rows import add_saw

    profiles = list(load_saws().values())[:2]
    with connect(url) as db:
        for profile in profiles:
            add_saw(db, profile, added_on="2024-01-01")
        for tag, cuts in BLADES:
            blade_id = add_blade(
                db,
                BladeSpec(
                    tag=tag,
                    width_mm=27.0,
                    thickness_mm=0.9,
                    tpi_coarse=3.0,
                    tpi_fine=4.0,
                    price=60.0,
                ),  # fmt: skip
                added_on="2024-01-01",
            ).id
            for group, saw, area, rows in cuts:
                for _ in range(rows):
                    log_cut(
                        db,
                        CutEntry(
                            blade_id=blade_id,
                            cut_on="2024-03-04",
                            material="4140",
                            material_group=group,
                            section="round 60mm",
                            area_mm2=area,
                            saw_id=saw,
                        ),
                    )
        retire_blade(db, "B-1", "dull", on="2024-03-05")


def _lives(url: str):
    with connect(url, create=False) as db:
        return blade_lives(db)


def _expected_area_cm2(cuts) -> float:
    return float(sum(Fraction(area) * rows for _, _, area, rows in cuts)) / 100.0


def test_lives_are_exact_sums_and_identical_on_both_engines(tmp_path, pg_log):
    file_url = str(tmp_path / "log.sqlite")
    for url in (file_url, pg_log):
        _write(url)
    on_file, on_server = _lives(file_url), _lives(pg_log)
    assert on_file == on_server  # every field, to the last digit
    for life, (tag, cuts) in zip(on_file, BLADES, strict=True):
        assert life.tag == tag
        assert life.area_cm2 == _expected_area_cm2(cuts)
        every_cut = [area for _, _, area, rows in cuts for _ in range(rows)]
        assert life.area_cm2 == math.fsum(every_cut) / 100.0
    by_tag = {life.tag: life for life in on_file}
    # B-2: ten cuts of 1.1 add up to exactly half-way between 11 and the next float
    # (11.000000000000000888…); the one cut of 11.000000000000002 is larger.
    assert Fraction(1.1) * 10 < Fraction(11.000000000000002)
    assert by_tag["B-2"].material_group == "alloy-steel"
    assert by_tag["B-3"].material_group == "alloy-steel"
    assert by_tag["B-3"].saw is None  # most of its area was cut with no saw named
    assert by_tag["B-1"].failed and not by_tag["B-2"].failed


@settings(max_examples=200, deadline=None)
@given(
    st.lists(
        st.tuples(
            st.floats(min_value=-1e12, max_value=1e12, allow_nan=False, allow_infinity=False),
            st.integers(min_value=1, max_value=50),
        ),
        max_size=12,
    )
)
def test_exact_sum_is_the_rounded_rational_sum(terms):
    exact = sum((Fraction(value) * count for value, count in terms), Fraction(0))
    assert exact_sum(terms) == float(exact)
    assert exact_sum(terms) == math.fsum(v for v, n in terms for _ in range(n))
