"""A damaged blade log is never written to, and never read as if it were sound.

A copy of the demo shop's log is damaged on its bytes (tests/damage_kit.py) in
the ways a failing disk or a bad copy does: a table page overwritten, an index
row moved to another key (``quick_check`` still passes; only the full
``integrity_check`` sees it, and a read through the index counts a cut on the
wrong blade), the file header, the stored schema.  Every command that writes
must refuse with exit code 6 (DEVELOPERS.md: damaged file) and leave the file
byte for byte as it was; every command that reads must refuse too, never print
a wrong value.  The outside check of the damage is SQLite's own
``PRAGMA integrity_check`` through the standard ``sqlite3`` module.
"""

from __future__ import annotations

import shutil
import sqlite3
from pathlib import Path

import damage_kit
import pytest
from test_trust_safety import write_import_folder

from sawplan.store import safety

DAMAGE = {
    "table page overwritten": damage_kit.break_table_page,
    "index row moved (quick_check passes)": damage_kit.move_index_row,
    "header: magic text": lambda p: damage_kit.break_header(p, "magic"),
    "header: page size": lambda p: damage_kit.break_header(p, "page size"),
    "header: application id": lambda p: damage_kit.break_header(p, "application id"),
    "schema: a CREATE statement": damage_kit.break_schema,
    "schema: a byte that is not UTF-8": damage_kit.garble_schema,
}

WRITES = [
    ("saw", "add", "bay 9", "--like", "mid-production"),
    ("blade", "add", "Z-1", "--pitch", "3/4", "--blade-width", "27mm",
     "--blade-thickness", "0.9mm"),
    ("blade", "fit", "A-015", "--saw", "pivot-bay"),
    ("blade", "remove", "P-008"),
    ("blade", "retire", "C-019", "--failure", "dull"),
    ("log", "cut", "304", "round", "60mm", "--saw", "pivot-bay", "--cuts", "2"),
    ("log", "event", "A-015", "teeth-lost", "--teeth", "1"),
    ("db", "upgrade"),
]  # fmt: skip

READS = [
    ("blade", "list"),
    ("blade", "show", "A-015"),
    ("log", "list", "--limit", "5"),
    ("life",),
    ("forecast", "--area", "5m2"),
    ("chart", "weibull", "--csv"),
    ("cut", "304", "round", "60mm", "--saw", "pivot-bay"),
    ("saw", "list"),
]


@pytest.fixture
def demo_log(demo_tree, tmp_path) -> Path:
    """A settled copy of the demo shop's log (about 350 kB: checked in full at each opening)."""
    log = damage_kit.copy_log(demo_tree / "demo" / "out" / "demo-log.sqlite",
                              tmp_path / "shop" / "blade-log.sqlite")  # fmt: skip
    assert log.stat().st_size < safety.FULL_CHECK_MAX_BYTES
    return log


def sqlite_says(path: Path) -> list[str]:
    """SQLite's own full check, or the error it gives opening the file."""
    conn = sqlite3.connect(f"file:{path}?mode=ro", uri=True)
    try:
        return [r[0] for r in conn.execute("PRAGMA integrity_check")]
    except (sqlite3.DatabaseError, UnicodeDecodeError) as err:  # the driver cannot decode
        return [str(err)]  # SQLite's complaint when it quotes garbage
    finally:
        conn.close()


def refused(result) -> str:
    assert result.code == 6, (result.code, result.err)
    assert result.err.count("\n") == 1 and "Traceback" not in result.err
    return result.err


def no_wal_content(log: Path) -> bool:
    wal = Path(f"{log}-wal")
    return not wal.exists() or wal.stat().st_size == 0


@pytest.mark.parametrize("kind", list(DAMAGE))
def test_every_write_refuses_a_damaged_log_and_leaves_it_as_it_was(kind, demo_log, cli, tmp_path):
    DAMAGE[kind](demo_log)
    assert sqlite_says(demo_log) != ["ok"] or kind.startswith("header: application")
    before = demo_log.read_bytes()
    write_import_folder(tmp_path / "csv", 3, tag="K-77")
    commands = [*WRITES, ("import", str(tmp_path / "csv"))]
    for args in commands:
        safety.clear_damage_mark(demo_log)  # each command's own check, not the mark, refuses
        err = refused(cli(*args, "--db", str(demo_log)))
        assert str(demo_log) in err, (args, err)
        assert demo_log.read_bytes() == before, args
        assert no_wal_content(demo_log), args


@pytest.mark.parametrize("kind", list(DAMAGE))
def test_every_read_refuses_a_damaged_log(kind, demo_log, cli):
    DAMAGE[kind](demo_log)
    for args in (*READS, ("check",)):
        safety.clear_damage_mark(demo_log)
        err = refused(cli(*args, "--db", str(demo_log)))
        assert err.isprintable() or err[:-1].isprintable(), err  # SQLite's words, made printable


def test_an_index_row_moved_is_refused_not_read_as_a_wrong_area(demo_log, cli):
    """The case ``quick_check`` misses: the cut moved to the next blade would add to its area."""
    sound = cli("blade", "list", "--json", "--db", str(demo_log))
    assert sound.code == 0
    _old, new = damage_kit.move_index_row(demo_log)
    conn = sqlite3.connect(demo_log)
    try:
        assert conn.execute("PRAGMA quick_check").fetchall() == [("ok",)]
        through_index = conn.execute(
            "SELECT COUNT(*) FROM cuts INDEXED BY idx_cuts_blade_id WHERE blade_id = ?", (new,)
        )
        by_table = conn.execute("SELECT COUNT(*) FROM cuts NOT INDEXED WHERE blade_id = ?", (new,))
        assert through_index.fetchone()[0] == by_table.fetchone()[0] + 1  # a wrong read exists
    finally:
        conn.close()
    err = refused(cli("blade", "list", "--json", "--db", str(demo_log)))
    assert "missing from index" in err


def test_the_message_names_the_newest_good_backup_and_restore_brings_it_back(demo_log, cli):
    folder = safety.backups_dir(demo_log)
    folder.mkdir()
    good = folder / "blade-log-schema4-20260101-000000-000000.sqlite"
    bad = folder / "blade-log-schema5-20260601-000000-000000.sqlite"  # newer, but damaged
    shutil.copy(demo_log, good)
    shutil.copy(demo_log, bad)
    damage_kit.move_index_row(bad)  # passes quick_check: only the full check finds it
    damage_kit.break_table_page(demo_log)
    err = refused(cli(*WRITES[1], "--db", str(demo_log)))
    assert f"restore the newest good backup {good}" in err
    assert f"sawplan restore --force --db {demo_log}" in err
    again = refused(cli("blade", "list", "--db", str(demo_log)))  # the mark: refused at once
    assert "damage was found earlier" in again
    done = cli("restore", "--force", "--db", str(demo_log))
    assert done.code == 0, done.err
    assert sqlite_says(demo_log) == ["ok"]
    assert cli(*WRITES[1], "--db", str(demo_log)).code == 0


def test_text_that_is_not_utf8_is_one_line_exit_6(demo_log, cli):
    conn = sqlite3.connect(demo_log)
    conn.execute("UPDATE blades SET notes = CAST(x'41ff42' AS TEXT) WHERE tag = 'A-015'")
    conn.commit()
    conn.close()
    for args in (("blade", "list"), ("blade", "show", "A-015"), ("export", "out")):
        err = refused(cli(*args, "--db", str(demo_log)))
        assert "not UTF-8 (column notes)" in err
        assert "\ufffd" not in err  # the bad text itself is never shown


def test_a_sound_log_is_checked_once_per_state(demo_log, cli, monkeypatch):
    calls = []
    real = safety.check_integrity

    def counted(conn, path, *, full=False):
        calls.append(full)
        return real(conn, path, full=full)

    monkeypatch.setattr(safety, "check_integrity", counted)
    safety._CHECKED.clear()
    from sawplan.store import connect

    for _ in range(3):
        with connect(demo_log, create=False) as db:
            db.scalar("SELECT COUNT(*) FROM blades")
    assert calls == [True]  # one full check; the unchanged file is not checked again
    assert cli(*WRITES[1], "--db", str(demo_log)).code == 0
    with connect(demo_log, create=False) as db:
        db.scalar("SELECT COUNT(*) FROM blades")
    assert calls[-1] is True and len(calls) >= 2  # a write changed the file: checked again


@pytest.mark.parametrize(
    ("size", "expected"),
    [(350_000, {"full"}), (4_000_000, {"full"}), (20_000_000, {"full", "quick"}),
     (100_000_000, {"full", None})],
)  # fmt: skip
def test_the_check_at_each_opening_follows_the_size_rule(size, expected):
    import random

    random.seed(5)
    seen = {safety.check_due(size) for _ in range(400)}
    assert seen == expected


def test_the_station_refuses_a_log_damaged_while_it_serves(demo_log):
    """The station keeps its log open between requests: a file damaged since is checked
    again before the next tap, and nothing is written."""
    from starlette.testclient import TestClient
    from station_server import form_values

    from sawplan.station.app import create_app

    saw = "pivot-bay"
    with TestClient(create_app(str(demo_log), units="metric"), client=("127.0.0.1", 5000),
                    base_url="http://127.0.0.1", raise_server_exceptions=False) as client:  # fmt: skip
        page = client.get(f"/saw/{saw}")
        assert page.status_code == 200
        fields = form_values(page.text, f"/saw/{saw}/tap/note")
        damage_kit.move_index_row(demo_log)  # only the full check sees it
        before = demo_log.read_bytes()
        answer = client.post(f"/saw/{saw}/tap/note", data={**fields, "note": "coolant low"})
        assert answer.status_code == 503
        assert answer.text.startswith("The blade log is damaged; nothing was saved.")
        assert demo_log.read_bytes() == before
        assert no_wal_content(demo_log)
