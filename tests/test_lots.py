"""Lots, suppliers and saws in the blade life statistics, on both engines.

The logs are built here from Weibull populations (invented data, fixed seed):
good lots of one blade type that wear out, and a bad lot of the same type that
fails early.  External checks: scipy's censored maximum-likelihood fit
(``scipy.stats.weibull_min.fit`` on ``scipy.stats.CensoredData``, floc=0) for
every lot's shape and scale, and the exit codes of DEVELOPERS.md (2 usage,
4 not found).
"""

from __future__ import annotations

import dataclasses
import json

import numpy as np
import pytest

from sawplan.store import connect, write_transaction
from sawplan.store.records import (
    BladeSpec,
    CutEntry,
    add_blade,
    add_saw,
    get_blade,
    log_cut,
    retire_blade,
)

# lot -> (supplier, bought, Weibull shape, scale cm², blades, censoring area cm², end word)
GOOD_AND_BAD = {
    "E-101": ("east depot", "2024-01-02", 2.5, 20_000.0, 12, 26_000.0, "worn-out"),
    "E-102": ("east depot", "2024-01-03", 2.5, 20_000.0, 12, 26_000.0, "worn-out"),
    "W-77": ("west depot", "2024-01-05", 0.5, 1_500.0, 16, 1e9, "stripped"),
}
SEED = 20240611


def lives_of(populations: dict, seed: int = SEED) -> dict[str, list[tuple[float, bool]]]:
    """(life cm², failed) per lot: Weibull draws censored at the lot's cut-off (Type I)."""
    rng = np.random.default_rng(seed)
    out = {}
    for lot, (_s, _b, shape, scale, n, cutoff, _w) in populations.items():
        draws = scale * rng.weibull(shape, size=n)
        out[lot] = [(float(min(x, cutoff)), bool(x < cutoff)) for x in draws]
    return out


def build(db_path: str, populations: dict, saws=("bay 1", "bay 2")) -> dict:
    """A log holding the populations' blades, one cut entry each; returns the lives."""
    from sawplan.saws import load_saws

    profile = load_saws()["mid-production"]
    lives = lives_of(populations)
    with connect(db_path) as db, write_transaction(db):
        for name in saws:
            add_saw(db, dataclasses.replace(profile, name=name), added_on="2024-01-01")
        n = 0
        for lot, (supplier, bought, *_rest, word) in populations.items():
            for life, failed in lives[lot]:
                n += 1
                tag = f"B-{n:03d}"
                add_blade(db, BladeSpec(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=4.0,
                                        tpi_fine=6.0, grade="M42", supplier=supplier, lot=lot,
                                        bought_on=bought, price=60.0),
                          added_on="2024-01-10")  # fmt: skip
                log_cut(db, CutEntry(blade_id=get_blade(db, tag).id, cut_on="2024-02-01",
                                     material="4140", material_group="alloy-steel",
                                     section="round 60mm", area_mm2=life * 100.0,
                                     saw_id=1 + n % len(saws)))  # fmt: skip
                if failed:
                    retire_blade(db, tag, word, on="2024-03-01")
    return lives


def scipy_fit(pairs: list[tuple[float, bool]]) -> tuple[float, float]:
    from scipy import stats

    data = stats.CensoredData(
        uncensored=[x for x, f in pairs if f], right=[x for x, f in pairs if not f]
    )
    shape, _loc, scale = stats.weibull_min.fit(data, floc=0)
    return shape, scale


@pytest.fixture
def lot_log(log_db):
    lives = build(log_db, GOOD_AND_BAD)
    return log_db, lives


def test_the_bad_lot_is_named_and_every_lots_fit_matches_scipy(lot_log, cli):
    """One log, both engines: the lot screen, the per-lot fits, and the text."""
    from sawplan.store.life_report import life_report

    db_path, lives = lot_log
    with connect(db_path, create=False) as db:
        report = life_report(db, group_by="lot")
    named = {lot.lot: lot for lot in report.suspect_lots}
    assert set(named) == {"W-77"}  # the good lots wear out and are not named
    bad = named["W-77"]
    assert (bad.supplier, bad.bought_on) == ("west depot", "2024-01-05")
    assert bad.fails_early and bad.shape_ci[1] < 1.0  # its whole shape interval lies below 1
    shape, _scale = scipy_fit(lives["W-77"])
    assert bad.shape == pytest.approx(shape, rel=0.01)
    # its median is far below the other lots' of its blade type, and is said so
    assert bad.far_below and bad.others_blades == 24
    check_lot_fits(lot_log, cli)
    check_life_text(lot_log, cli)


def check_lot_fits(lot_log, cli) -> None:
    db_path, lives = lot_log
    result = cli("life", "--group-by", "lot", "--json", "--db", str(db_path))
    assert result.code == 0, result.err
    groups = {g["keys"][0]: g for g in json.loads(result.out)["groups"]}
    assert set(groups) == set(GOOD_AND_BAD)
    for lot, pairs in lives.items():
        shape, scale = scipy_fit(pairs)
        assert groups[lot]["weibull_shape"] == pytest.approx(shape, rel=0.01), lot
        assert groups[lot]["weibull_scale_cm2"] == pytest.approx(scale, rel=0.01), lot
        assert groups[lot]["failed"] == sum(f for _x, f in pairs)


def check_life_text(lot_log, cli) -> None:
    """The lot is named in the text; two keys at once; the saw it cut most on."""
    db_path, lives = lot_log
    result = cli("life", "--group-by", "supplier,lot", "--db", str(db_path))
    assert result.code == 0, result.err
    assert "WARNING for lot W-77 (west depot, bought 2024-01-05)" in result.out
    assert "--without-lot W-77" in result.out
    table = result.out.split("by supplier and lot", 1)[1]
    assert "east depot" in table and "E-101" in table and "west depot" in table
    by_saw = json.loads(cli("life", "--group-by", "saw", "--json", "--db", str(db_path)).out)
    assert {g["key"] for g in by_saw["groups"]} == {"bay 1", "bay 2"}
    assert sum(g["blades"] for g in by_saw["groups"]) == sum(len(v) for v in lives.values())


def test_worn_out_blades_forecasts_and_bad_choices(lot_log, cli):
    """One log, both engines: worn-out blades in the fit and the table, the forecast's
    choice of blades, and refused choices."""
    check_worn_out(lot_log, cli)
    check_forecast(lot_log, cli)
    check_bad_choices(cli, lot_log[0])


def check_worn_out(lot_log, cli) -> None:
    db_path, lives = lot_log
    data = json.loads(cli("life", "--json", "--db", str(db_path)).out)
    worn = sum(f for lot in ("E-101", "E-102") for _x, f in lives[lot])
    stripped = sum(f for _x, f in lives["W-77"])
    assert data["failed"] == worn + stripped  # every retired blade is a failure in the fit
    ends = data["worn_out_blades"]
    # a worn-out blade below its type's expected life counts as teeth dulled early
    assert ends["recorded_worn_out"] + ends["worn_out_early"] == worn
    assert ends["blades"] == ends["recorded_worn_out"] and ends["recorded_worn_out"] >= worn - 2
    modes = {m["code"]: m["count"] for m in data["failure_modes"]["modes"]}
    assert "worn-out" not in modes and modes["stripped"] == stripped
    assert modes.get("dull", 0) == ends["worn_out_early"]
    warning = data["early_failure"]
    if warning is not None:  # the early-failure analysis counts failures only
        assert warning["mode"] == "stripped"
    text = cli("life", "--db", str(db_path)).out
    assert "failures of wear" in text and "worn out at the end of a normal life" in text


def check_forecast(lot_log, cli) -> None:
    """The dominant early-failing lot is named; it can be left out, or lots chosen."""
    db_path, _lives = lot_log
    base = ("forecast", "--area", "5m2", "--db", str(db_path))
    mixed = json.loads(cli(*base, "--json").out)
    assert mixed["lot_named"] == "W-77" and "west depot" in mixed["lot_warning"]
    assert mixed["blades_from"] == "all blades"
    without = json.loads(cli(*base, "--without-lot", "W-77", "--json").out)
    assert without["history_blades"] == 24 and without["lot_warning"] is None
    assert "leaving out lot W-77" in without["note"]
    assert without["blades_needed"] == mixed["blades_needed_without_lot"]
    only = json.loads(cli(*base, "--lot", "E-101", "--supplier", "east depot", "--json").out)
    assert only["history_blades"] == 12
    text = cli(*base).out
    assert "WARNING lot W-77 (west depot, bought 2024-01-05)" in text


BAD_CHOICES = [
    (("life", "--group-by", "lots"), 2, ["blade-type, material-group, lot, supplier, saw", "did you mean lot?"]),
    (("life", "--group-by", "lot,saw,supplier"), 2, ["one or two"]),
    (("forecast", "--area", "5m2", "--lot", "W-78"), 4, ["no lot 'W-78'", "W-77"]),
    (("forecast", "--area", "5m2", "--supplier", "east depo"), 4, ["no supplier 'east depo'", "east depot"]),
    (("forecast", "--area", "5m2", "--lot", "W-77", "--without-lot", "W-77"), 2, ["both chosen"]),
]  # fmt: skip


def check_bad_choices(cli, db_path) -> None:
    """Unknown group-by keys list the valid ones; lots and suppliers not in the log the
    closest ones it holds: one line, exit 2 (usage) or 4 (not found)."""
    for args, code, words in BAD_CHOICES:
        result = cli(*args, "--db", str(db_path))
        assert result.code == code, (args, result.err)
        assert len(result.err.strip().splitlines()) == 1, args
        for w in words:
            assert w in result.err, (args, w)


def test_a_short_lived_lot_is_named_even_when_it_wears_out(tmp_path):
    """Two wear-out populations (shape 2.5), one with a tenth of the other's scale."""
    from sawplan.store.life_report import life_report

    populations = {
        "E-201": ("east depot", "2024-01-02", 2.5, 20_000.0, 15, 1e9, "worn-out"),
        "S-9": ("south depot", "2024-01-04", 2.5, 2_000.0, 10, 1e9, "dull"),
    }
    db_path = tmp_path / "log.sqlite"
    lives = build(str(db_path), populations)
    with connect(db_path, create=False) as db:
        report = life_report(db)
    (named,) = report.suspect_lots
    assert named.lot == "S-9" and named.far_below and not named.fails_early
    _shape, scale = scipy_fit(lives["E-201"])
    assert named.median_ci_cm2[1] < named.others_median_cm2 < scale
    # dull blades of the short lot died below the type's expected life: dulled early
    assert report.failure_modes.modes[0].code == "dull"


def test_retiring_dull_after_a_normal_life_is_wear_not_early_dulling(log_db, cli):
    """The example of issue 13: dull after 25,400 cm² on a type that wears out around 20,000."""
    populations = {"E-101": GOOD_AND_BAD["E-101"]}
    build(log_db, populations)
    with connect(log_db) as db:
        for tag, cm2 in (("B-900", 25_400.0), ("B-901", 1_000.0)):
            add_blade(db, BladeSpec(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=4.0,
                                    tpi_fine=6.0, grade="M42", lot="E-101",
                                    bought_on="2024-01-02"), added_on="2024-01-10")  # fmt: skip
            log_cut(db, CutEntry(blade_id=get_blade(db, tag).id, cut_on="2024-02-01",
                                 material="4140", material_group="alloy-steel",
                                 section="round 60mm", area_mm2=cm2 * 100.0))  # fmt: skip
    normal = cli("blade", "retire", "B-900", "--failure", "dull", "--date", "2024-03-02",
                 "--db", str(log_db))  # fmt: skip
    assert normal.code == 0, normal.err
    assert "teeth dulled early" not in normal.out and "band speed too high" not in normal.out
    assert "worn out at the end of a normal life" in normal.out
    assert "the expected" in normal.out and "below the expected" not in normal.out
    assert "failure of wear" in normal.out
    early = cli("blade", "retire", "B-901", "--failure", "dull", "--date", "2024-03-02",
                "--db", str(log_db))  # fmt: skip
    assert early.code == 0, early.err
    assert "teeth dulled early" in early.out and "below the expected" in early.out
    assert "band speed too high" in early.out  # the usual causes of early dulling
    shown = cli("blade", "show", "B-900", "--db", str(log_db)).out
    assert "the expected" in shown and "teeth dulled early" not in shown
