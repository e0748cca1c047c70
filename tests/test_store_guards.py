"""The blade log refuses to be harmed: damage stops every write, backups come back, leftovers
go, files stay private, and numbers too big for any database are refused before it sees them.

Each test pins one break an adversarial pass found.  External checks: SQLite's own
``PRAGMA integrity_check`` / ``quick_check`` and row counts read with the standard
``sqlite3`` module (never through sawplan), file modes from ``os.stat``, and the exit
codes of DEVELOPERS.md (3 bad data, 5 conflict, 6 damaged, 7 storage).
"""

from __future__ import annotations

import os
import shutil
import sqlite3
import stat
from pathlib import Path

import pytest
from logrows import snapshot

from sawplan.store import safety

BLADE = ("--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm")


def one_line(result, code: int) -> str:
    assert result.code == code, (result.code, result.out, result.err)
    assert result.err.count("\n") == 1 and "Traceback" not in result.err
    return result.err


@pytest.fixture(scope="module")
def template(tmp_path_factory) -> Path:
    """A small log made once: a saw, a fitted blade, a dozen cuts."""
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    path = tmp_path_factory.mktemp("template") / "blade-log.sqlite"
    steps = [
        ("saw", "add", "bay 2", "--like", "mid-production"),
        ("blade", "add", "B-1", *BLADE),
        ("blade", "fit", "B-1", "--saw", "bay 2"),
        *[("log", "cut", "304", "round", "60mm", "--note", f"cut {i}") for i in range(12)],
    ]
    for args in steps:
        assert run_guarded(run, [*args, "--db", str(path)]) == 0, args
    checkpoint(path)
    return path


@pytest.fixture
def shop_log(template, tmp_path) -> Path:
    """A copy of the template log, in a folder of its own."""
    path = tmp_path / "shop" / "blade-log.sqlite"
    path.parent.mkdir(mode=0o700)
    shutil.copy(template, path)
    path.chmod(0o600)
    return path


def checkpoint(path: Path) -> None:
    conn = sqlite3.connect(path)
    conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    conn.close()


def page_of(path: Path, name: str) -> tuple[int, int]:
    """(first byte, size) of the root page of table or index ``name``."""
    conn = sqlite3.connect(path)
    try:
        size = conn.execute("PRAGMA page_size").fetchone()[0]
        root = conn.execute("SELECT rootpage FROM sqlite_master WHERE name = ?", [name]).fetchone()
    finally:
        conn.close()
    return (root[0] - 1) * size, size


def sqlite_check(path: Path, pragma: str) -> list[str]:
    """SQLite's own verdict (its error text when it cannot even read the pages)."""
    conn = sqlite3.connect(path)
    try:
        return [r[0] for r in conn.execute(f"PRAGMA {pragma}")]
    except sqlite3.DatabaseError as err:
        return [str(err)]
    finally:
        conn.close()


# --- damage stops writes ------------------------------------------------------------------


def test_a_damaged_log_takes_no_write_from_log_cut_or_blade_add(shop_log, cli):
    """20 bytes overwritten inside the file: every write is refused, not one in 90."""
    checkpoint(shop_log)
    start, _size = page_of(shop_log, "cuts")
    with shop_log.open("r+b") as handle:
        handle.seek(start)  # the b-tree page header of the cuts table
        handle.write(b"\xa5" * 20)
    assert sqlite_check(shop_log, "quick_check") != ["ok"]  # SQLite agrees it is damaged
    before = shop_log.read_bytes()
    writes = [("log", "cut", "304", "round", "60mm"), ("blade", "add", "B-2", *BLADE)] * 15
    for args in writes:
        err = one_line(cli(*args, "--db", str(shop_log)), 6)
        assert "is damaged" in err and "nothing was written" in err
    assert shop_log.read_bytes() == before


def _drop_index_row(path: Path, cli) -> None:
    """Index damage quick_check cannot see: the cuts index page as it was before the last cut."""
    checkpoint(path)
    start, size = page_of(path, "idx_cuts_blade_id")
    old_page = path.read_bytes()[start : start + size]
    assert cli("log", "cut", "304", "round", "60mm", "--note", "last", "--db", str(path)).code == 0
    checkpoint(path)
    with path.open("r+b") as handle:
        handle.seek(start)
        handle.write(old_page)


def test_index_damage_quick_check_misses_is_found_by_check_and_stops_every_command(shop_log, cli):
    _drop_index_row(shop_log, cli)
    assert sqlite_check(shop_log, "quick_check") == ["ok"]  # the cheap check sees nothing
    assert sqlite_check(shop_log, "integrity_check") != ["ok"]  # the full one does
    checked = cli("check", "--db", str(shop_log))
    err = one_line(checked, 6)
    assert "DAMAGED" in checked.out and "missing from index" in checked.out
    assert "is damaged" in err
    before = shop_log.read_bytes()
    for args in (("log", "cut", "304", "round", "60mm"), ("blade", "list"), ("life",)):
        err = one_line(cli(*args, "--db", str(shop_log)), 6)
        assert "damage was found earlier" in err and "sawplan restore" in err
    assert shop_log.read_bytes() == before


def test_check_says_a_sound_log_is_sound(log_db, cli):
    for args in (("blade", "add", "B-1", *BLADE), ("saw", "add", "bay 2", "--like", "mid-production"),
                 ("blade", "fit", "B-1", "--saw", "bay 2"), ("log", "cut", "304", "round", "60mm")):  # fmt: skip
        assert cli(*args, "--db", log_db).code == 0
    before = snapshot(log_db)
    result = cli("check", "--db", log_db)
    assert result.code == 0, result.out + result.err
    assert "sound" in result.out and "1 cuts" in result.out
    assert snapshot(log_db) == before  # nothing written


def test_check_finds_a_broken_rule(log_db, cli):
    from logrows import execute

    assert cli("blade", "add", "B-1", *BLADE, "--db", log_db).code == 0
    execute(log_db, "UPDATE blades SET status = 'fitted'")  # fitted, but on no saw
    result = cli("check", "--db", log_db)
    one_line(result, 6)
    assert "blade marked fitted without an open fitting: B-1" in result.out


# --- restore --------------------------------------------------------------------------------


def _backups(log: Path, *, damaged_newest: bool) -> tuple[Path, Path]:
    folder = safety.backups_dir(log)
    folder.mkdir(exist_ok=True)
    older = folder / "blade-log-schema3-20240101-000000-000000.sqlite"
    newer = folder / "blade-log-schema3-20240601-000000-000000.sqlite"
    checkpoint(log)
    shutil.copy(log, older)
    shutil.copy(log, newer)
    if damaged_newest:
        start, _size = page_of(newer, "cuts")
        with newer.open("r+b") as handle:
            handle.seek(start)
            handle.write(b"\xa5" * 20)
    return older, newer


def test_restore_refuses_to_replace_a_log_without_force(shop_log, cli):
    _backups(shop_log, damaged_newest=False)
    before = snapshot(shop_log)
    err = one_line(cli("restore", "--db", str(shop_log)), 5)
    assert "exists" in err and "--force" in err
    assert snapshot(shop_log) == before


def test_restore_brings_back_the_newest_good_backup_and_keeps_the_damaged_log(shop_log, cli):
    older, newer = _backups(shop_log, damaged_newest=True)
    expected = snapshot(older)
    _drop_index_row(shop_log, cli)
    one_line(cli("check", "--db", str(shop_log)), 6)
    err = one_line(cli("log", "cut", "304", "round", "60mm", "--db", str(shop_log)), 6)
    assert f"newest good backup {older}" in err  # the damaged newer one is passed over
    result = cli("restore", "--force", "--db", str(shop_log))
    assert result.code == 0, result.err
    assert f"from {older}" in result.out
    assert snapshot(shop_log) == expected
    kept = [p for p in shop_log.parent.iterdir() if ".replaced-" in p.name]
    assert [p.suffix for p in kept if p.name.endswith(tuple("0123456789"))]  # the old log, aside
    assert sqlite_check(shop_log, "integrity_check") == ["ok"]
    assert cli("log", "cut", "304", "round", "60mm", "--db", str(shop_log)).code == 0


def test_restore_of_a_damaged_file_is_refused(shop_log, cli, tmp_path):
    _older, newer = _backups(shop_log, damaged_newest=True)
    before = snapshot(shop_log)
    err = one_line(cli("restore", str(newer), "--force", "--db", str(shop_log)), 6)
    assert "damaged" in err
    assert snapshot(shop_log) == before


# --- leftovers of killed runs ---------------------------------------------------------------


def test_a_killed_backup_leaves_partials_the_next_backup_removes(shop_log, cli, tmp_path):
    target = tmp_path / "usb" / "copy.sqlite"
    target.parent.mkdir()
    # what a backup killed half-way leaves: the partial copy and SQLite's journal beside it
    partial = target.with_name("copy.sqlite.partial")
    shutil.copy(shop_log, partial)
    Path(f"{partial}-journal").write_bytes(b"\0" * 512)
    result = cli("backup", str(target), "--db", str(shop_log))
    assert result.code == 0, result.err
    assert sorted(p.name for p in target.parent.iterdir()) == ["copy.sqlite"]


def test_a_killed_upgrade_leaves_partials_the_next_upgrade_removes_and_never_counts(tmp_path, cli):
    from test_store_upgrade import legacy_log

    log = legacy_log(tmp_path / "blade-log.sqlite", 2)
    folder = safety.backups_dir(log)
    folder.mkdir()
    leftover = folder / "blade-log-schema2-20991231-000000-000000.sqlite.partial"
    leftover.write_bytes(b"SQLite format 3\0")
    Path(f"{leftover}-journal").write_bytes(b"\0" * 512)
    assert safety.backups_of(log) == []  # a partial is never a backup
    assert "no sound automatic backups" in safety.restore_hint(log)
    assert cli("blade", "list", "--db", str(log)).code == 0  # the upgrade runs now
    names = sorted(p.name for p in folder.iterdir())
    assert len(names) == 1 and names[0].endswith(".sqlite") and "partial" not in names[0]


# --- permissions ----------------------------------------------------------------------------


posix_only = pytest.mark.skipif(os.name != "posix", reason="file modes are POSIX")


def mode(path: Path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


@posix_only
def test_a_new_log_is_private_whatever_the_umask(tmp_path, cli):
    log = tmp_path / "data" / "sawplan" / "blade-log.sqlite"
    old = os.umask(0)
    try:
        assert cli("blade", "add", "B-1", *BLADE, "--db", str(log)).code == 0
        assert cli("backup", str(tmp_path / "copies" / "b.sqlite"), "--db", str(log)).code == 0
    finally:
        os.umask(old)
    assert mode(log.parent) == mode(log.parent.parent) == 0o700
    assert mode(log) == 0o600
    for helper in log.parent.glob("blade-log.sqlite-*"):  # -wal, -shm while open
        assert mode(helper) == 0o600, helper
    assert mode(tmp_path / "copies" / "b.sqlite") == 0o600


@posix_only
def test_log_mode_shares_the_log_with_the_group(tmp_path, cli, monkeypatch):
    monkeypatch.setenv("SAWPLAN_LOG_MODE", "0660")
    log = tmp_path / "shared" / "blade-log.sqlite"
    old = os.umask(0o077)
    try:
        assert cli("blade", "add", "B-1", *BLADE, "--db", str(log)).code == 0
    finally:
        os.umask(old)
    assert mode(log) == 0o660 and mode(log.parent) == 0o770


def test_a_bad_log_mode_is_one_line(tmp_path, cli, monkeypatch):
    monkeypatch.setenv("SAWPLAN_LOG_MODE", "0444")  # the owner could not write
    log = tmp_path / "blade-log.sqlite"
    err = one_line(cli("blade", "add", "B-1", *BLADE, "--db", str(log)), 3)
    assert "SAWPLAN_LOG_MODE" in err and "octal file mode" in err
    assert not log.exists()


@posix_only
def test_check_warns_about_a_log_others_may_read(shop_log, cli):
    shop_log.chmod(0o644)
    result = cli("check", "--db", str(shop_log))
    assert result.code == 0
    assert "warning" in result.out and "chmod 0600" in result.out


# --- whole numbers bounded before the database ---------------------------------------------


def test_log_list_limit_beyond_any_integer_is_one_line(shop_log, cli):
    err = one_line(cli("log", "list", "--limit", "99999999999999999999", "--db", str(shop_log)), 3)
    assert "entries to show: must be" in err and "got a number of 20 digits" in err


def test_the_store_bounds_whole_numbers_itself(tmp_path):
    """The station will call the store without the command line: the same line comes back."""
    from sawplan.errors import BadDataError
    from sawplan.store import connect
    from sawplan.store.records import list_cuts

    with connect(tmp_path / "log.sqlite") as db, pytest.raises(BadDataError) as err:
        list_cuts(db, limit=10**20)
    assert "entries to show: must be" in str(err.value)


def test_an_imported_count_of_1e23_is_one_line_and_writes_nothing(shop_log, cli, tmp_path):
    folder = tmp_path / "csv"
    assert cli("export", str(folder), "--db", str(shop_log)).code == 0
    lines = (folder / "cuts.csv").read_text(encoding="utf-8").splitlines()
    header = lines[0].split(",")
    cells = lines[1].split(",")
    cells[header.index("count")] = "1" + "0" * 23
    (folder / "cuts.csv").write_text("\n".join([lines[0], ",".join(cells)]) + "\n", "utf-8")
    for name in ("saws", "blades", "fittings", "events"):
        (folder / f"{name}.csv").unlink()
    target = tmp_path / "other.sqlite"
    assert cli("blade", "add", "B-1", *BLADE, "--db", str(target)).code == 0
    before = snapshot(target)
    err = one_line(cli("import", str(folder), "--db", str(target)), 3)
    assert "cuts.csv row 1" in err and "count: number of cuts: must be from 1 to 100,000" in err
    assert snapshot(target) == before


def test_an_imported_control_character_is_one_line_on_both_engines(log_db, cli, tmp_path):
    """A NUL byte in a tag: SQLite would store it, PostgreSQL cannot; neither gets it."""
    folder = tmp_path / "csv"
    source = tmp_path / "source.sqlite"
    assert cli("blade", "add", "B-1", *BLADE, "--db", str(source)).code == 0
    assert cli("export", str(folder), "--db", str(source)).code == 0
    text = (folder / "blades.csv").read_text(encoding="utf-8").replace("B-1", "B-\x001")
    (folder / "blades.csv").write_text(text, encoding="utf-8")
    err = one_line(cli("import", str(folder), "--db", log_db), 3)
    assert "blades.csv row 1" in err and "tag: must not hold control characters" in err
    assert "blades" not in snapshot(log_db) or snapshot(log_db)["blades"] == []
