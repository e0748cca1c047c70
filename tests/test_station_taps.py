"""The station's taps in-process: times measured from Start, batches and bundles, repeats.

The station's clock (``taps.now``) is set by the test, so "three minutes after
Start" is exact.  Requests come from 127.0.0.1 (no key needed) through
Starlette's TestClient; the log is read back through the engine's driver.
"""

from __future__ import annotations

import datetime as dt
import math
import re
import shutil
from pathlib import Path

import pytest
from logrows import snapshot
from starlette.testclient import TestClient
from station_server import form_values

HERE = Path(__file__).parent
SAW = "mid-production"
AREA_MM2 = math.pi * 30.0**2  # a 60 mm round (closed form)
CUT_COLUMNS = ("id", "blade_id", "saw_id", "cut_on", "material", "material_group", "section",
               "area_mm2", "pieces", "count", "band_speed_m_min", "feed_mm_min", "feed_setting",
               "time_min", "coolant", "job", "note", "heat", "predicted_time_min")  # fmt: skip


@pytest.fixture
def station(cli, tmp_path, monkeypatch):
    """The small job sent to its saw with blade T-1 fitted; a client and a settable clock."""
    log = str(tmp_path / "log.sqlite")
    shutil.copyfile(HERE / "data" / "plan_small.toml", tmp_path / "job.toml")
    assert cli("plan", str(tmp_path / "job.toml"), "--send", "--db", log).code == 0
    assert cli("blade", "add", "T-1", "--pitch", "4/6", "--blade-width", "27mm",
               "--blade-thickness", "0.9mm", "--db", log).code == 0  # fmt: skip
    assert cli("blade", "fit", "T-1", "--saw", SAW, "--db", log).code == 0
    clock = {"now": dt.datetime.now().astimezone().replace(hour=8, minute=0)}
    monkeypatch.setattr("sawplan.station.taps.now", lambda: clock["now"])
    from sawplan.station.app import create_app

    with TestClient(
        create_app(log, units="metric"), client=("127.0.0.1", 5000), base_url="http://127.0.0.1"
    ) as client:
        yield client, log, clock


def form(html: str, kind: str) -> dict[str, str]:
    return form_values(html, f"/saw/{SAW}/tap/{kind}")


def tap(client, kind: str, **typed: str):
    page = client.get(f"/saw/{SAW}")
    return client.post(f"/saw/{SAW}/tap/{kind}", data={**form(page.text, kind), **typed})


def cuts(log):
    return [dict(zip(CUT_COLUMNS, row, strict=True)) for row in snapshot(log)["cuts"]]


def test_cut_done_logs_the_time_measured_from_start(station):
    client, log, clock = station
    assert tap(client, "start").status_code == 200
    clock["now"] += dt.timedelta(minutes=3)
    answer = tap(client, "done")
    assert "3.00 min measured" in answer.text
    (cut,) = cuts(log)
    assert cut["time_min"] == pytest.approx(3.0)
    assert cut["area_mm2"] == pytest.approx(AREA_MM2) and cut["count"] == 1
    assert cut["predicted_time_min"] > 0  # the model's time, kept for the calibration


def test_a_batch_logs_as_many_cuts_as_it_holds_and_a_bundle_cuts_them_at_once(station):
    client, log, _clock = station
    tap(client, "done", cuts="3", time="6min")
    tap(client, "done", cuts="2", time="5min", bundle="1")
    batch, bundle = cuts(log)
    assert (batch["count"], batch["pieces"]) == (3, 1)
    assert (bundle["count"], bundle["pieces"]) == (1, 2)
    assert batch["area_mm2"] == pytest.approx(3 * AREA_MM2)
    assert bundle["area_mm2"] == pytest.approx(2 * AREA_MM2)
    assert (batch["time_min"], bundle["time_min"]) == (pytest.approx(6.0), pytest.approx(5.0))
    done = [q for q in snapshot(log)["queue"] if q[-1] is not None]
    assert [q[-1] for q in done] == [batch["id"]] * 3 + [bundle["id"]] * 2


def test_the_same_tap_sent_twice_logs_once_and_says_what_was_saved(station):
    client, log, _clock = station
    page = client.get(f"/saw/{SAW}")
    values = {**form(page.text, "done"), "time": "2min"}
    first = client.post(f"/saw/{SAW}/tap/done", data=values)
    second = client.post(f"/saw/{SAW}/tap/done", data=values)  # the connection dropped: again
    assert len(cuts(log)) == 1
    assert first.url == second.url  # both answers show the tap that was saved
    assert "Saved: Logged job pump shafts" in second.text


def test_a_refused_tap_writes_nothing_and_says_why_beside_the_field(station):
    client, log, _clock = station
    before = snapshot(log)
    answer = tap(client, "done", cuts="0")
    assert answer.status_code == 422
    error = re.search(r'id="done-cuts-error"[^>]*>([^<]+)<', answer.text).group(1)
    assert error == "Must be from 1 to 100,000, got 0."  # the range of fields.py "cuts"
    answer = tap(client, "done", time="yesterday")
    assert answer.status_code == 422 and 'id="done-time-error"' in answer.text
    answer = tap(client, "done", cuts="99")
    assert answer.status_code == 422 and "left in the queue" in answer.text
    assert snapshot(log) == before


def test_a_blade_off_form_for_a_blade_already_changed_is_refused(station):
    client, log, _clock = station
    page = client.get(f"/saw/{SAW}")
    stale = form(page.text, "blade-off")
    assert tap(client, "blade-off", reason="unworn").status_code == 200
    assert tap(client, "blade-on", tag="T-2", pitch="4/6").status_code == 200
    before = snapshot(log)
    answer = client.post(f"/saw/{SAW}/tap/blade-off", data={**stale, "reason": "weld"})
    assert answer.status_code == 422 and "no longer on" in answer.text
    assert snapshot(log) == before
    blades = {b[1]: b for b in before["blades"]}
    assert "removed" in blades["T-1"] and "fitted" in blades["T-2"]


def test_a_saw_that_is_not_in_the_log_is_not_found(station):
    client, _log, _clock = station
    assert client.get("/saw/no-such-saw").status_code == 404


def test_cut_done_without_a_blade_says_so_in_plain_words(station):
    client, log, _clock = station
    assert tap(client, "blade-off", reason="unworn").status_code == 200
    before = snapshot(log)
    answer = tap(client, "done")
    assert answer.status_code == 422
    assert "No blade is fitted on mid-production: fit one under New blade on." in answer.text
    assert snapshot(log) == before


def test_the_saw_list_shows_each_saw_with_its_blade_and_queue(station):
    client, log, _clock = station
    tap(client, "done", cuts="2", time="4min")
    page = client.get("/").text
    left = sum(1 for q in snapshot(log)["queue"] if q[-1] is None)  # rows without a cut entry
    assert f'href="/saw/{SAW}"' in page
    assert "blade T-1" in page and f"{left} cuts in the queue" in page


@pytest.mark.parametrize(
    ("saw", "saws_file"),
    [
        pytest.param("large-column", None, id="packaged"),
        pytest.param("pivot-bay", HERE.parent / "demo" / "saws.toml", id="shop-saws-file"),
    ],
)
def test_a_known_saw_not_in_the_log_gets_a_page_and_is_added_by_its_first_tap(
    station, monkeypatch, saw, saws_file
):
    client, log, _clock = station
    if saws_file is not None:
        monkeypatch.setenv("SAWPLAN_SAWS", str(saws_file))
    assert saw in client.get("/").text  # listed as a known profile, not in the log yet
    page = client.get(f"/saw/{saw}")
    assert page.status_code == 200 and 'id="not-in-log"' in page.text
    assert len(snapshot(log)["saws"]) == 1  # opening the page writes nothing
    values = {**form_values(page.text, f"/saw/{saw}/tap/note"), "note": "vise jaw loose"}
    answer = client.post(f"/saw/{saw}/tap/note", data=values)
    assert answer.status_code == 200 and "Note saved: vise jaw loose" in answer.text
    assert 'id="not-in-log"' not in answer.text
    every = snapshot(log)
    added = [s for s in every["saws"] if s[1] == saw]
    assert len(added) == 1
    assert [n[-1] for n in every["saw_notes"]] == ["vise jaw loose"]
