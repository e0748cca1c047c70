"""`sawplan cut --economics`: a log with blades at three band speeds, the figures' sources, bad input.

The log is invented test data (fixed seed): 4140 blades run at 50, 60 and
75 m/min with Weibull lives whose mean follows Taylor's relation with
n = 0.2 (life as area cut).  Checks: the fit finds n within its interval;
the cost per cut adds up by hand from the given rate and the logged prices
(derived); refusals name the field.
"""

from __future__ import annotations

import json
import math
import random

import pytest

AREA_MM2 = math.pi * 60.0**2 / 4.0  # round 60 mm, πd²/4
N_TRUE = 0.2


def write_blades(path, grade, prefix, life_cuts, seed):
    """45 invented blades of one type: 15 at each of 50, 60, 75 m/min, the last 6 running."""
    from sawplan.store import connect
    from sawplan.store.records import BladeSpec, CutEntry, add_blade, log_cut, retire_blade

    rng = random.Random(seed)
    c = 60.0 * (life_cuts * AREA_MM2 / 100.0) ** N_TRUE  # mean life of life_cuts at 60 m/min
    with connect(path) as db:
        for i in range(45):
            v = (50.0, 60.0, 75.0)[i % 3]
            tag = f"{prefix}{i:03d}"
            blade = add_blade(
                db,
                BladeSpec(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=3.0,
                          tpi_fine=4.0, price=(58.0, 62.0)[i % 2], grade=grade),
                added_on="2025-01-02",
            ).id  # fmt: skip
            mean = (c / v) ** (1.0 / N_TRUE)
            life = mean / math.gamma(1.5) * rng.weibullvariate(1.0, 2.0)
            running = i >= 39
            cuts = max(1, int((life if not running else 0.5 * life) / (AREA_MM2 / 100.0)))
            log_cut(
                db,
                CutEntry(blade_id=blade, cut_on="2025-02-03", material="4140",
                         material_group="alloy-steel", section="round 60mm",
                         area_mm2=AREA_MM2 * cuts, count=cuts, band_speed_m_min=v),
            )  # fmt: skip
            if not running:
                retire_blade(db, tag, "dull", on="2025-03-03")


@pytest.fixture(scope="module")
def speed_log(tmp_path_factory):
    path = tmp_path_factory.mktemp("econ") / "log.sqlite"
    write_blades(path, "M42", "T", 300, 17)
    return path


def test_blade_choice_buys_the_longer_lived_type(cli, tmp_path):
    # invented: two types at the same prices, M51 lasting twice as long at every speed
    path = tmp_path / "two.sqlite"
    write_blades(path, "M42", "A", 300, 17)
    write_blades(path, "M51", "B", 600, 18)
    r = cli("cut", "4140", "round", "60mm", "--economics", "--db", str(path), "--json")
    assert r.code == 0, r.err
    choice = json.loads(r.out)["blade_choice"]
    assert choice["buy"].startswith("bi-metal M51")
    assert choice["runner_up"].startswith("bi-metal M42")
    assert choice["saving_per_cut"] > 0
    assert choice["on_fits"] is True
    text = cli("cut", "4140", "round", "60mm", "--economics", "--db", str(path)).out
    assert "Buy next: bi-metal M51" in text


def test_economics_from_the_log(cli, speed_log):
    r = cli("cut", "4140", "round", "60mm", "--economics", "--shop-rate", "90",
            "--db", str(speed_log), "--json")  # fmt: skip
    assert r.code == 0, r.err
    econ = json.loads(r.out)["economics"]
    life = econ["life"]
    assert life["fitted"] is True
    assert life["n_ci"][0] < N_TRUE < life["n_ci"][1]
    inputs = econ["inputs"]
    assert inputs["rate_per_h"] == {"value": 90.0, "source": "given"}
    # 23 blades at 58 and 22 at 62: the median is 58
    assert inputs["blade_price"]["value"] == pytest.approx(58.0)
    assert inputs["blade_price"]["source"].startswith("blade log")
    for run in econ["runs"]:
        cost = run["cost"]
        # derived: 90 per hour = 1.5 per minute × (cut + handling)
        assert cost["machine"] == pytest.approx(1.5 * (cost["cut_time_min"] + 0.5))
        share = AREA_MM2 / 100.0 / cost["blade_life_cm2"]
        assert cost["blade"] == pytest.approx(58.0 * share)
        assert cost["change"] == pytest.approx(15.0 * 1.5 * share)
        assert cost["total"] == pytest.approx(cost["machine"] + cost["blade"] + cost["change"])
    by = {run["run"]: run for run in econ["runs"]}
    assert by["cost"]["cost"]["total"] <= by["recommended"]["cost"]["total"] + 1e-9
    assert by["production"]["cost"]["time_per_cut_min"] <= by["cost"]["cost"]["time_per_cut_min"]


def test_text_and_chart_show_three_speeds_and_sources(cli, speed_log):
    r = cli("cut", "4140", "round", "60mm", "--economics", "--chart", "--db", str(speed_log))
    assert r.code == 0, r.err
    assert "recommended" in r.out and "cheapest" in r.out and "fastest" in r.out
    assert "blade log fit: 45 blades (39 retired" in r.out
    assert "default: set your own with --shop-rate" in r.out
    assert "cost per cut against band speed" in r.out


def test_without_a_log_the_published_exponent_is_named(cli, tmp_path):
    r = cli("cut", "4140", "round", "60mm", "--economics", "--db", str(tmp_path / "none.sqlite"))
    assert r.code == 0, r.err
    assert "Groover" in r.out
    assert "no blade log" in r.out


@pytest.mark.parametrize(
    ("args", "code", "words"),
    [
        pytest.param(("--shop-rate", "0"), 3, "shop rate", id="zero rate"),
        pytest.param(("--shop-rate", "-5"), 3, "shop rate", id="negative rate"),
        pytest.param(("--price", "0"), 3, "blade price", id="zero price"),
        pytest.param(("--change-time", "0min"), 3, "blade change time", id="zero change time"),
        pytest.param(("--change-time", "-3min"), 3, "blade change time", id="negative change"),
    ],
)
def test_bad_figures_are_refused(cli, tmp_path, args, code, words):
    r = cli("cut", "4140", "round", "60mm", "--economics", *args,
            "--db", str(tmp_path / "none.sqlite"))  # fmt: skip
    assert r.code == code, r.out
    assert words in r.err
    assert "Traceback" not in r.err


def test_rates_without_economics_say_how(cli):
    r = cli("cut", "4140", "round", "60mm", "--shop-rate", "80")
    assert r.code == 2
    assert "--economics" in r.err


def test_plan_quotes_at_the_chosen_run(cli, tmp_path):
    from pathlib import Path

    job = Path(__file__).parent / "data" / "plan_small.toml"
    r = cli("plan", str(job), "--run", "cost", "--json", "--db", str(tmp_path / "none.sqlite"))
    assert r.code == 0, r.err
    quote = json.loads(r.out)["run_quote"]
    assert quote["run"] == "cost"
    # derived: the quote is Σ cuts × cost per cut at each section's cheapest speed
    total = 0.0
    for s in quote["sections"]:
        cheapest = next(x for x in s["economics"]["runs"] if x["run"] == "cost")
        total += s["cuts"] * cheapest["cost"]["total"]
        # the job file's shop rate is the source of the machine term
        assert s["economics"]["inputs"]["rate_per_h"]["source"] == "job file"
    assert quote["saw_and_blades"] == pytest.approx(total)


def test_plan_run_must_be_a_known_speed(cli):
    from pathlib import Path

    job = Path(__file__).parent / "data" / "plan_small.toml"
    r = cli("plan", str(job), "--run", "fastest-ever")
    assert r.code in (2, 3)
    assert "run speed" in r.err
    assert "recommended, cost" in r.err or "recommended" in r.err


# --- the log's summary kept in the user's cache folder (sawplan.cli.log_life) ----------


def _economics(cli, path):
    r = cli("cut", "4140", "round", "60mm", "--economics", "--db", str(path), "--json")
    assert r.code == 0, r.err
    return json.loads(r.out)


def _count_reads(monkeypatch):
    from sawplan.store.lookup import BladeLog

    reads = []
    original = BladeLog.speed_rows

    def counted(self, material_group=None):
        reads.append(material_group)
        return original(self, material_group)

    monkeypatch.setattr(BladeLog, "speed_rows", counted)
    return reads


def test_the_kept_summary_is_used_while_the_log_is_unchanged(cli, speed_log, monkeypatch):
    reads = _count_reads(monkeypatch)
    first = _economics(cli, speed_log)
    assert reads == ["alloy-steel"]
    again = _economics(cli, speed_log)
    assert reads == ["alloy-steel"]  # not read again
    assert again == first  # and nothing in the answer differs
    import os

    from sawplan.cli.log_life import cache_folder

    files = list((cache_folder() / "log-life").glob("*.json"))
    assert len(files) == 1
    assert files[0].stat().st_mode & 0o777 == 0o600  # private, like the log
    assert "58.0" in files[0].read_text() and "T000" not in files[0].read_text()  # no rows
    assert os.environ["SAWPLAN_HOME"] in str(files[0])  # never the user's own cache in tests


def test_a_change_to_the_log_is_seen(cli, tmp_path, monkeypatch):
    import shutil

    from sawplan.store import connect
    from sawplan.store.records import retire_blade

    path = tmp_path / "log.sqlite"
    write_blades(path, "M42", "T", 300, 17)
    reads = _count_reads(monkeypatch)
    before = _economics(cli, path)
    with connect(path) as db:  # a running blade wears out: one more failure, same cuts
        retire_blade(db, "T040", "dull", on="2025-04-01")
    after = _economics(cli, path)
    assert reads == ["alloy-steel", "alloy-steel"]
    assert after["economics"]["life"] != before["economics"]["life"]
    # the same as working it out afresh, with nothing kept
    from sawplan.cli.log_life import cache_folder

    shutil.rmtree(cache_folder())
    assert _economics(cli, path) == after


def test_a_damaged_cache_file_is_worked_out_again(cli, speed_log):
    from sawplan.cli.log_life import cache_folder

    first = _economics(cli, speed_log)
    for kept in (cache_folder() / "log-life").glob("*.json"):
        kept.write_text("{ not json", encoding="utf-8")
    assert _economics(cli, speed_log) == first
