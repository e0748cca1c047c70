"""A station served by uvicorn on 127.0.0.1 in a thread, and operators tapping at it.

Used by the browser and load tests and by ``bench/bench_station.py``.
"""

from __future__ import annotations

import contextlib
import socket
import threading
import time
from collections.abc import Iterator
from dataclasses import dataclass, field


def free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@contextlib.contextmanager
def serving(app) -> Iterator[str]:
    """``http://127.0.0.1:PORT`` while ``app`` is served; stopped at the end."""
    import uvicorn

    port = free_port()
    config = uvicorn.Config(app, host="127.0.0.1", port=port, log_level="warning", access_log=False)
    server = uvicorn.Server(config)
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    deadline = time.monotonic() + 30
    while not server.started:
        if not thread.is_alive() or time.monotonic() > deadline:
            raise RuntimeError("the station did not start")
        time.sleep(0.02)
    try:
        yield f"http://127.0.0.1:{port}"
    finally:
        server.should_exit = True
        thread.join(timeout=30)


def form_values(html: str, action: str) -> dict[str, str]:
    """The hidden and prefilled values of the form posting to ``action`` (checkboxes left out)."""
    import re

    start = html.index(f'action="{action}"')
    chunk = html[start : html.index("</form>", start)]
    values = {}
    for tag in re.findall(r"<input[^>]*>", chunk):
        name = re.search(r'name="([^"]+)"', tag)
        value = re.search(r'value="([^"]*)"', tag)
        if name and value and 'type="checkbox"' not in tag:
            values[name.group(1)] = value.group(1)
    return values


@dataclass
class StationRun:
    """What one station posted: every tap the server accepted (key -> kind), the rest."""

    saw: str
    accepted: dict[str, str] = field(default_factory=dict)
    repeats: int = 0  # taps sent a second time (the server must not log them again)
    repeats_answered: int = 0  # ... and answered as saved
    refused: list[str] = field(default_factory=list)
    slowest_s: float = 0.0


def work_station(base: str, saw: str, deadline: float, *, repeat_every: int = 5) -> StationRun:
    """Tap as an operator would until ``deadline``: Start and Cut done down the queue, then
    notes; every ``repeat_every``-th tap is sent twice, as after a dropped connection."""
    import uuid

    import httpx2

    run = StationRun(saw)
    with httpx2.Client(base_url=base, timeout=120) as client:
        page = client.get(f"/saw/{saw}")
        i = 0
        while time.monotonic() < deadline:
            i += 1
            text = page.text
            if f'/saw/{saw}/tap/start"' in text:
                kind = "done" if "started " in text else "start"
            else:
                kind = "note"
            action = f"/saw/{saw}/tap/{kind}"
            values = {**form_values(text, action), "tap": uuid.uuid4().hex}
            if kind == "note":
                values["note"] = f"load test {saw} {i}"
            began = time.perf_counter()
            answer = client.post(action, data=values)
            run.slowest_s = max(run.slowest_s, time.perf_counter() - began)
            if answer.status_code != 303:
                run.refused.append(f"{kind} {answer.status_code}")
                page = client.get(f"/saw/{saw}")
                continue
            run.accepted[values["tap"]] = kind
            if i % repeat_every == 0:
                run.repeats += 1
                again = client.post(action, data=values)
                if (
                    again.status_code == 303
                    and again.headers["location"] == answer.headers["location"]
                ):
                    run.repeats_answered += 1
            page = client.get(answer.headers["location"])
    return run


def run_stations(base: str, saws: list[str], seconds: float) -> list[StationRun]:
    """One thread per saw, all tapping at once for ``seconds``."""
    from concurrent.futures import ThreadPoolExecutor

    deadline = time.monotonic() + seconds
    with ThreadPoolExecutor(len(saws)) as pool:
        return list(pool.map(lambda saw: work_station(base, saw, deadline), saws))
