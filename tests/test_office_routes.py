"""The office pages through Starlette's TestClient: pages, chart CSV, actions, access.

Requests come from ``127.0.0.1`` (this computer: the office role without a
key) or from ``192.0.2.10`` (RFC 5737 documentation address: a tablet on the
shop network, signed in with the station key).  The log is the invented one
of ``tests/office_log.py``.
"""

from __future__ import annotations

import csv
import io
import re

import pytest
from office_log import BLADES, build, send
from starlette.testclient import TestClient

from sawplan.station.access import CSRF_FIELD, load_keys, make_keys
from sawplan.station.app import create_app
from sawplan.store import connect

LOCAL = ("127.0.0.1", 50000)
LAN = ("192.0.2.10", 50000)
PAGES = ("/office/", "/office/life", "/office/calibration", "/office/jobs", "/office/shelf",
         "/office/blades", "/office/saws")  # fmt: skip


@pytest.fixture(scope="module")
def shop(tmp_path_factory):
    """A log with blades, timed cuts and two queued jobs (one on a saw named like a formula),
    served with keys; the keys in clear."""
    folder = tmp_path_factory.mktemp("office")
    db = str(folder / "log.sqlite")
    build(db)
    job = send(db, "bay 2", "shafts")
    send(db, "=SUM(1+1)", "spreadsheet test", cuts=2, pitch="3/4")
    keys_file = folder / "station-keys.json"
    clear = make_keys(keys_file)
    app = create_app(db, keys=load_keys(keys_file), units="metric")
    return {"db": db, "app": app, "keys": clear, "job": job}


def local(app) -> TestClient:
    return TestClient(app, client=LOCAL, base_url="http://127.0.0.1:8470")


def token(html: str) -> str:
    return re.search(rf'name="{CSRF_FIELD}" value="([^"]+)"', html).group(1)


def rows(text: str) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(text)))


def test_every_page_answers_with_its_charts(shop):
    from sawplan.station.office.views import life_view

    with local(shop["app"]) as c:
        pages = {path: c.get(path) for path in PAGES}
        sheet = c.get(f"/office/jobs/{shop['job']}")
        weibull = c.get("/office/life/weibull/chart.csv")
        shelf = c.get("/office/shelf/balance/chart.csv")
    assert {p: r.status_code for p, r in pages.items()} == dict.fromkeys(PAGES, 200)
    life = pages["/office/life"].text
    assert life.count("<svg") == 3 and "<title" in life  # Weibull plot, failure modes, cost
    assert "life: area cut (cm², log scale)" in life and "Data of this chart as CSV" in life
    assert "B-06" in life and "teeth stripped" in life  # the latest retirement, by its name
    assert "saw bay 1" in pages["/office/calibration"].text
    assert "shafts" in pages["/office/jobs"].text and "B-08" in pages["/office/shelf"].text
    assert sheet.status_code == 200 and sheet.text.count("to cut") >= 4
    assert weibull.headers["content-type"].startswith("text/csv")
    with connect(shop["db"], create=False) as db:
        view = life_view(db).weibull
    kinds = [r["kind"] for r in rows(weibull.text)]
    assert kinds.count("failure") == len(view.plot.points) == 6
    assert kinds.count("band-low") == kinds.count("band-high") == len(view.bands)
    # a saw named like a spreadsheet formula is written as text, not as a formula
    saws = [r["saws"] for r in rows(shelf.text)]
    assert "'=SUM(1+1)" in saws and "=SUM(1+1)" not in saws


def test_a_station_key_reaches_no_office_page_or_action(shop):
    before = _blade_count(shop["db"])
    with TestClient(shop["app"], client=LAN, base_url="http://192.0.2.1:8470") as c:
        refused = c.get("/office/life", follow_redirects=False)
        assert refused.status_code == 303 and refused.headers["location"] == "/key"
        key_page = c.get("/key")
        c.post("/key", data={CSRF_FIELD: token(key_page.text), "key": shop["keys"]["station"]})
        assert c.get("/").status_code == 200  # signed in as a station
        form = token(c.get("/saw/bay 1").text)  # a station page: its forms carry the token
        answers = [c.get(path).status_code for path in ("/office/life", "/office/blades")]
        post = c.post("/office/blades/add", data={CSRF_FIELD: form, "tag": "X-1", "pitch": "4/6",
                                                  "width": "27mm", "thickness": "0.9mm"})  # fmt: skip
    assert answers == [403, 403] and post.status_code == 403
    assert _blade_count(shop["db"]) == before


def test_a_form_without_its_token_is_refused(shop):
    before = _blade_count(shop["db"])
    with local(shop["app"]) as c:
        c.get("/office/blades")
        answer = c.post("/office/blades/add", data={"tag": "X-2", "pitch": "4/6",
                                                     "width": "27mm", "thickness": "0.9mm"})  # fmt: skip
    assert answer.status_code == 403
    assert _blade_count(shop["db"]) == before


def test_office_actions_write_through_the_store_and_refuse_beside_the_field(tmp_path):
    """Add, refuse, fit, retire (the life page shows it at once), add a saw, move, withdraw."""
    db = str(tmp_path / "log.sqlite")
    build(db)
    job = send(db, "bay 2", "shafts")
    app = create_app(db, units="metric")
    with local(app) as c:
        form = token(c.get("/office/blades").text)

        def post(path: str, **data: str):
            return c.post(path, data={CSRF_FIELD: form, **data}, follow_redirects=False)

        added = post("/office/blades/add", tag="B-20", pitch="4/6", width="27mm",
                     thickness="0.9mm", price="55", lot="L-3")  # fmt: skip
        assert added.status_code == 303 and "done=blade-add" in added.headers["location"]
        assert "Added blade B-20." in c.get(added.headers["location"]).text

        bad = post("/office/blades/add", tag="B-21", pitch="4/6", width="270mm", thickness="0.9mm")
        assert bad.status_code == 422
        error = re.search(r'<p class="error" id="blade-add-width-error">([^<]+)</p>', bad.text)
        assert error and error.group(1).startswith("Must be") and "mm" in error.group(1)
        assert 'value="270mm"' in bad.text  # what was typed stays in the form

        taken = post("/office/blades/add", tag="b-20", pitch="4/6", width="27mm", thickness="0.9mm")
        assert taken.status_code == 422 and "blade-add-tag-error" in taken.text

        assert (
            post("/office/blades/fit", tag="B-20", saw="bay 2", date="2024-06-03").status_code
            == 303
        )
        retired = post("/office/blades/retire", tag="B-07", cause="weld", date="2024-06-04")
        assert retired.status_code == 303
        life = c.get("/office/life").text
        latest = life[life.index("Latest retirements") :]
        assert latest.index("B-07") < latest.index("B-06")  # the new failure, first
        assert "weld break (failure)" in latest

        wrong = post("/office/blades/retire", tag="B-20", cause="snapped")
        assert wrong.status_code == 422 and "blade-retire-cause-error" in wrong.text

        saw = post("/office/saws/add", name="bay 3", like="mid-production", power="2.2kW")
        assert saw.status_code == 303
        moved = post(f"/office/jobs/{job}/move", saw="bay 3")
        assert moved.status_code == 303
        withdrawn = post(f"/office/jobs/{job}/withdraw")
        assert withdrawn.status_code == 303
        again = post(f"/office/jobs/{job}/withdraw")
        assert again.status_code == 422 and "withdrawn on" in again.text

    from sawplan.store.records import get_blade
    from sawplan.store.station_rows import job_progress

    with connect(db, create=False) as log:
        b20 = get_blade(log, "B-20")
        assert (b20.status, b20.saw, b20.price, b20.lot) == ("fitted", "bay 2", 55.0, "L-3")
        assert get_blade(log, "B-07").retire_cause == "weld"
        (sent,) = job_progress(log)
        assert (sent["saw"], sent["withdrawn_on"] is not None) == ("bay 3", True)
        assert log.scalar("SELECT COUNT(*) FROM blades") == len(BLADES) + 1  # B-21 refused


def _blade_count(db: str) -> int:
    with connect(db, create=False) as log:
        return int(log.scalar("SELECT COUNT(*) FROM blades"))


def test_numbers_follow_the_shops_units(shop):
    """Served in US units, the pages show no metric unit (the CSV keeps SI in its headers)."""
    app = create_app(shop["db"], units="us")
    with local(app) as c:
        pages = {p: c.get(p).text for p in ("/office/life", "/office/jobs", "/office/shelf")}
        sheet = c.get(f"/office/jobs/{shop['job']}").text
    assert "life: area cut (in², log scale)" in pages["/office/life"]
    for path, html in [*pages.items(), ("sheet", sheet)]:
        for metric in ("cm²", " mm", "(mm)", "m²"):
            assert metric not in html.replace("ft²", ""), f"{path} shows {metric!r}"
