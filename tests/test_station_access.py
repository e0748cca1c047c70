"""Who may use the station: loopback needs nothing, the network needs a key, forms need a token.

Requests run in-process through Starlette's TestClient, from a chosen client
address: ``127.0.0.1`` is this computer, ``192.0.2.10`` (TEST-NET-1, RFC 5737)
stands for a tablet on the shop network.
"""

from __future__ import annotations

import re

import pytest
from starlette.requests import Request
from starlette.responses import PlainTextResponse
from starlette.routing import Route
from starlette.testclient import TestClient

from sawplan.station.access import (
    CSRF_FIELD,
    SESSION_COOKIE,
    Throttle,
    load_keys,
    make_keys,
    require_office,
    session_role,
    session_value,
)
from sawplan.station.app import create_app

LAN = ("192.0.2.10", 50000)  # RFC 5737 documentation address: a tablet on the network
LOCAL = ("127.0.0.1", 50000)


def office_action(request: Request) -> PlainTextResponse:
    require_office(request)
    return PlainTextResponse("changed")


@pytest.fixture(scope="module")
def station(tmp_path_factory):
    """An app with keys on an empty log, and the keys in clear."""
    folder = tmp_path_factory.mktemp("station")
    keys_file = folder / "station-keys.json"
    clear = make_keys(keys_file)
    app = create_app(str(folder / "log.sqlite"), keys=load_keys(keys_file), units="metric")
    # first: the /office mount of the office pages would answer 404 for a route after it
    app.router.routes.insert(
        0, Route("/office/test-action", office_action, methods=["GET", "POST"])
    )
    return app, clear


@pytest.fixture
def app(station):
    return station[0]


@pytest.fixture
def keys(station):
    return station[1]


def client(app, where=LAN) -> TestClient:
    return TestClient(app, client=where, base_url="http://192.0.2.1:8470")


def token(html: str) -> str:
    return re.search(rf'name="{CSRF_FIELD}" value="([^"]+)"', html).group(1)


def sign_in(c: TestClient, key: str):
    page = c.get("/key")
    return c.post("/key", data={CSRF_FIELD: token(page.text), "key": key}, follow_redirects=False)


def test_this_computer_needs_no_key(app):
    with TestClient(app, client=LOCAL, base_url="http://127.0.0.1:8470") as c:
        page = c.get("/")
    assert page.status_code == 200 and "Saws" in page.text


def test_a_network_request_without_a_key_is_refused(app):
    c = client(app)
    page = c.get("/", follow_redirects=False)
    assert page.status_code == 303 and page.headers["location"] == "/key"
    post = c.post("/saw/any/tap/note", data={"note": "x"}, follow_redirects=False)
    assert post.status_code == 401
    assert c.get("/office/test-action", follow_redirects=False).status_code == 303


def test_a_proxied_request_from_loopback_counts_as_the_network(app):
    # a reverse proxy on this computer serves the network: its requests need the key
    with TestClient(app, client=LOCAL, base_url="http://127.0.0.1:8470") as c:
        page = c.get("/", headers={"X-Forwarded-For": "198.51.100.7"}, follow_redirects=False)
    assert page.status_code == 303


def test_behind_a_proxy_that_names_no_client_every_request_needs_a_key(station, keys):
    # --proxied: a proxy on this computer that sends no X-Forwarded-For must not open the office
    proxied = create_app(
        str(station[0].state.db), keys=station[0].state.access.keys, units="metric", proxied=True
    )
    with TestClient(proxied, client=LOCAL, base_url="http://127.0.0.1:8470") as c:
        assert c.get("/", follow_redirects=False).status_code == 303
        assert c.get("/", headers={"Authorization": f"Bearer {keys['station']}"}).status_code == 200


def test_a_key_in_the_url_opens_nothing(app, keys):
    c = client(app)
    page = c.get(f"/?key={keys['office']}", follow_redirects=False)
    assert page.status_code == 303


def test_the_station_key_logs_work_but_cannot_reach_office_actions(app, keys):
    c = client(app)
    answer = sign_in(c, keys["station"])
    assert answer.status_code == 303
    assert session_role(app.state.access.keys.secret, c.cookies[SESSION_COOKIE]) == "station"
    assert c.get("/").status_code == 200
    assert c.get("/office/test-action").status_code == 403
    assert c.get("/taps").status_code == 403  # correcting any cut of a day is office work
    refused = c.post("/taps/undo", data={CSRF_FIELD: token(c.get("/key").text), "last": "1"})
    assert refused.status_code == 403


def test_the_office_key_reaches_office_actions(app, keys):
    c = client(app)
    assert sign_in(c, keys["office"].upper().replace("-", " ")).status_code == 303
    assert c.get("/office/test-action").text == "changed"


def test_a_program_may_send_the_key_in_a_header(app, keys):
    c = client(app)
    ok = c.get("/", headers={"Authorization": f"Bearer {keys['station']}"})
    assert ok.status_code == 200
    office = c.get("/office/test-action", headers={"Authorization": f"Bearer {keys['station']}"})
    assert office.status_code == 403


def test_a_form_without_its_token_is_refused(app, keys):
    c = client(app)
    sign_in(c, keys["office"])
    refused = c.post("/office/test-action", data={"anything": "1"})
    assert refused.status_code == 403 and "nothing was saved" in refused.text
    forged = c.post("/office/test-action", data={CSRF_FIELD: "x" * 43})
    assert forged.status_code == 403
    page = c.get("/key")
    accepted = c.post("/office/test-action", data={CSRF_FIELD: token(page.text)})
    assert accepted.status_code == 200 and accepted.text == "changed"


def test_a_form_from_this_computer_needs_its_token_too(app):
    with TestClient(app, client=LOCAL, base_url="http://127.0.0.1:8470") as c:
        assert c.post("/office/test-action", data={}).status_code == 403


def test_key_attempts_are_throttled_even_for_the_right_key(app, keys):
    c = client(app, ("192.0.2.50", 50000))
    for _ in range(Throttle().per_address):
        assert sign_in(c, "wrong-key").status_code == 403
    throttled = sign_in(c, keys["office"])
    assert throttled.status_code == 403 and "too many wrong keys" in throttled.text
    assert SESSION_COOKIE not in c.cookies
    header = c.get("/", headers={"Authorization": f"Bearer {keys['office']}"})
    assert header.status_code == 429
    other = client(app, ("192.0.2.51", 50000))  # another address is not held back
    assert sign_in(other, keys["station"]).status_code == 303


def test_a_forged_or_old_session_cookie_opens_nothing(app):
    secret = app.state.access.keys.secret
    assert session_role(secret, session_value(secret, "office")) == "office"
    assert session_role(b"another secret", session_value(secret, "office")) is None
    old = session_value(secret, "office", now=0)
    assert session_role(secret, old) is None
    c = client(app)
    c.cookies.set(SESSION_COOKIE, session_value(b"guessed", "office"))
    assert c.get("/", follow_redirects=False).status_code == 303


def test_every_answer_carries_the_security_headers(app):
    with TestClient(app, client=LOCAL, base_url="http://127.0.0.1:8470") as c:
        for path in ("/", "/key", "/static/station.css", "/saw/none"):
            headers = c.get(path).headers
            assert "default-src 'self'" in headers["content-security-policy"]
            assert "frame-ancestors 'none'" in headers["content-security-policy"]
            assert headers["x-content-type-options"] == "nosniff"
            assert headers["x-frame-options"] == "DENY"
            assert headers["referrer-policy"] == "no-referrer"


def test_a_local_request_under_a_strange_host_name_is_refused(app):
    # a page elsewhere whose name points at 127.0.0.1 (DNS rebinding) must not reach the log
    with TestClient(app, client=LOCAL, base_url="http://evil.example:8470") as c:
        assert c.get("/").status_code == 403


def test_serving_the_network_without_keys_is_refused(cli):
    result = cli("serve", "--host", "0.0.0.0")
    assert result.code == 2 and "needs keys" in result.err


def test_proxied_without_keys_is_refused_and_with_keys_serves_no_request_as_local(
    cli, tmp_path, monkeypatch
):
    monkeypatch.setenv("SAWPLAN_HOME", str(tmp_path))
    refused = cli("serve", "--proxied")
    assert refused.code == 2 and "--proxied" in refused.err
    make_keys(tmp_path / "station-keys.json")
    served = {}
    monkeypatch.setattr(
        "sawplan.station.serve.run_server", lambda app, host, port: served.update(app=app)
    )
    assert cli("serve", "--proxied", "--db", str(tmp_path / "log.sqlite")).code == 0
    assert served["app"].state.access.proxied is True


def test_keys_are_shown_once_and_stored_hashed(cli, tmp_path, monkeypatch):
    monkeypatch.setenv("SAWPLAN_HOME", str(tmp_path))
    result = cli("serve", "--keys")
    assert result.code == 0
    shown = re.findall(r"key:\s+(\S+)", result.out)
    assert len(shown) == 2
    stored = (tmp_path / "station-keys.json").read_text()
    assert all(k not in stored and k.replace("-", "") not in stored for k in shown)
    assert (tmp_path / "station-keys.json").stat().st_mode & 0o077 == 0
    keys = load_keys(tmp_path / "station-keys.json")
    assert keys.role_of(shown[0]) == "station" and keys.role_of(shown[1]) == "office"
