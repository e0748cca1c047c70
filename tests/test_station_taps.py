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


# --- correcting a cut done -------------------------------------------------------------------

TAP_COLUMNS = ("id", "tap", "saw_id", "kind", "tapped_at", "said", "cut_id", "corrects", "change")


def taps_of(log, kind: str) -> list[dict]:
    rows = [dict(zip(TAP_COLUMNS, row, strict=True)) for row in snapshot(log)["taps"]]
    return [r for r in rows if r["kind"] == kind]


def marked(log) -> list:
    return [q[-1] for q in snapshot(log)["queue"] if q[-1] is not None]


def test_the_last_cut_is_corrected_in_time_and_count_and_the_taps_keep_the_change(station):
    import json

    client, log, clock = station
    tap(client, "done", cuts="3", time="6min")
    (logged,) = cuts(log)
    clock["now"] += dt.timedelta(minutes=5)
    answer = tap(client, "fix", cuts="2", time="5min")
    assert answer.status_code == 200 and "Corrected the cut done at 08:00" in answer.text
    assert "Now in the log: 2 cuts" in answer.text  # the page shows the cut as corrected
    (cut,) = cuts(log)
    assert (cut["id"], cut["count"], cut["pieces"]) == (logged["id"], 2, 1)
    assert cut["area_mm2"] == pytest.approx(2 * AREA_MM2)
    assert cut["time_min"] == pytest.approx(5.0)
    assert cut["predicted_time_min"] == pytest.approx(logged["predicted_time_min"] * 2 / 3)
    assert marked(log) == [cut["id"]] * 2  # the third cut is back in the queue
    (done,), (fixed,) = taps_of(log, "done"), taps_of(log, "fix")
    assert fixed["corrects"] == done["id"] and fixed["cut_id"] == done["cut_id"] == cut["id"]
    change = json.loads(fixed["change"])
    assert change["time_min"] == [6.0, 5.0] and change["count"] == [3, 2]
    assert tap(client, "fix", cuts="4").status_code == 200  # more: the next ones in the queue
    (cut,) = cuts(log)
    assert cut["count"] == 4 and cut["area_mm2"] == pytest.approx(4 * AREA_MM2)
    assert marked(log) == [cut["id"]] * 4


def test_the_last_cut_is_taken_back_and_kept_whole_in_the_undo_tap(station):
    import json

    client, log, _clock = station
    first_page = client.get(f"/saw/{SAW}").text
    tap(client, "done", cuts="2", time="4min")
    (logged,) = cuts(log)
    answer = tap(client, "undo")
    assert answer.status_code == 200 and "2 cuts are to cut again" in answer.text
    assert cuts(log) == [] and marked(log) == []
    (done,), (undone,) = taps_of(log, "done"), taps_of(log, "undo")
    assert done["cut_id"] is None and undone["corrects"] == done["id"]
    taken = json.loads(undone["change"])["taken_back"]
    assert taken["area_mm2"] == pytest.approx(logged["area_mm2"]) and taken["count"] == 2
    first = form(first_page, "done")["cut"]
    assert form(answer.text, "done")["cut"] == first  # the same cut is next again
    assert "Correct the last cut" not in answer.text  # nothing left to correct


def test_the_station_corrects_only_the_last_cut_and_only_for_a_while(station):
    client, log, clock = station
    tap(client, "done", time="2min")
    page = client.get(f"/saw/{SAW}").text
    assert "Correct the last cut" in page and "until 08:15" in page
    stale = form(page, "fix")
    tap(client, "done", time="3min")  # the next cut done ends the first one's window
    before = snapshot(log)
    answer = client.post(f"/saw/{SAW}/tap/fix", data={**stale, "time": "9min"})
    assert answer.status_code == 422 and "can no longer be corrected here" in answer.text
    clock["now"] += dt.timedelta(minutes=16)
    assert "Correct the last cut" not in client.get(f"/saw/{SAW}").text
    clock["now"] -= dt.timedelta(minutes=16)
    page = client.get(f"/saw/{SAW}").text
    clock["now"] += dt.timedelta(minutes=16)
    late = client.post(f"/saw/{SAW}/tap/fix", data={**form(page, "fix"), "time": "9min"})
    assert late.status_code == 422 and snapshot(log) == before


def test_a_correction_follows_the_field_rules_and_writes_nothing_when_refused(station):
    client, log, _clock = station
    tap(client, "done", cuts="2", time="4min")
    before = snapshot(log)
    zero = tap(client, "fix", cuts="0")
    error = re.search(r'id="fix-cuts-error"[^>]*>([^<]+)<', zero.text).group(1)
    assert error == "Must be from 1 to 100,000, got 0."  # the range of fields.py "cuts"
    assert 'id="fix-time-error"' in tap(client, "fix", time="yesterday").text
    assert "left in the queue" not in tap(client, "fix", cuts="999").text  # says it plainly:
    assert "can be in this tap" in tap(client, "fix", cuts="999").text
    assert tap(client, "fix").status_code == 422  # nothing typed: nothing to correct
    assert snapshot(log) == before


def test_the_office_corrects_any_cut_done_of_the_day(station):
    client, log, _clock = station
    tap(client, "done", time="2min")
    tap(client, "done", time="3min")
    first, second = cuts(log)
    day = client.get("/taps")
    assert day.status_code == 200 and day.text.count('action="/taps/fix"') == 2
    values = form_values(day.text[day.text.index('id="tap-') :], "/taps/fix")
    answer = client.post("/taps/fix", data={**values, "time": "2.5min"})
    assert answer.status_code == 200 and "Corrected the cut done at 08:00" in answer.text
    assert [c["time_min"] for c in cuts(log)] == [pytest.approx(2.5), pytest.approx(3.0)]
    again = client.post("/taps/fix", data={**values, "time": "7min"})  # the same form again
    assert again.status_code == 200 and cuts(log)[0]["time_min"] == pytest.approx(2.5)
    assert len(taps_of(log, "fix")) == 1
    undo = form_values(day.text, "/taps/undo")
    assert client.post("/taps/undo", data=undo).status_code == 200
    assert [c["id"] for c in cuts(log)] == [second["id"]]


def test_every_form_of_the_station_is_a_kind_of_tap_the_store_knows():
    from sawplan.station.forms import KINDS
    from sawplan.store.station_rows import TAP_KINDS

    assert sorted(KINDS) == sorted(TAP_KINDS)  # import checks a tap's kind against TAP_KINDS
