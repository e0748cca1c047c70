"""Four stations tapping at once against 127.0.0.1: every accepted tap in the log once.

The station is served by uvicorn on 127.0.0.1; four threads, one per saw, tap
as operators do (Start, Cut done down the queue, then notes), each sending
every fifth tap twice as after a dropped connection.  Afterwards the log, read
through the engine's own driver, must hold every accepted tap once and none
twice: one ``taps`` row per accepted key and no other, one cut entry per
"cut done", one note per note, and each queued cut marked by exactly one
entry.  On a SQLite file and on PostgreSQL.  The run is bounded (a few
seconds here; ``bench/bench_station.py`` runs it for 30 s and reports the rate).
"""

from __future__ import annotations

import shutil
from collections import Counter
from pathlib import Path

from logrows import snapshot
from station_server import run_stations, serving

HERE = Path(__file__).parent
SAWS = ["saw-a", "saw-b", "saw-c", "saw-d"]
SECONDS = 4.0


def test_four_stations_at_once_log_every_accepted_tap_once(cli, log_db, tmp_path):
    shutil.copyfile(HERE / "data" / "plan_small.toml", tmp_path / "job.toml")
    for k, saw in enumerate(SAWS):
        for args in (
            ("saw", "add", saw, "--like", "mid-production"),
            ("blade", "add", f"L-{k}", "--pitch", "4/6", "--blade-width", "27mm",
             "--blade-thickness", "0.9mm"),
            ("blade", "fit", f"L-{k}", "--saw", saw),
            ("plan", str(tmp_path / "job.toml"), "--saw", saw, "--send"),
        ):  # fmt: skip
            result = cli(*args, "--db", log_db)
            assert result.code == 0, (args, result.err)
    from sawplan.station.app import create_app

    with serving(create_app(log_db, units="metric")) as url:
        runs = run_stations(url, SAWS, SECONDS)

    assert all(not r.refused for r in runs), [r.refused for r in runs]
    accepted = {key: kind for r in runs for key, kind in r.accepted.items()}
    kinds = Counter(accepted.values())
    assert kinds["done"] >= len(SAWS) and sum(kinds.values()) >= 4 * len(SAWS)
    assert sum(r.repeats for r in runs) == sum(r.repeats_answered for r in runs) > 0

    log = snapshot(log_db)
    tap_keys = [row[1] for row in log["taps"]]  # (id, tap, saw_id, kind, tapped_at, said)
    assert sorted(tap_keys) == sorted(accepted)  # every accepted tap once, nothing else
    assert len(log["cuts"]) == kinds["done"]
    assert len(log["saw_notes"]) == kinds["note"]
    marked = Counter(q[-1] for q in log["queue"] if q[-1] is not None)  # cut_id per queue row
    assert sorted(marked) == sorted(c[0] for c in log["cuts"])
    assert set(marked.values()) == {1}
    started = [q for q in log["queue"] if q[-2] is not None]  # started_at
    assert len(started) >= kinds["start"]
