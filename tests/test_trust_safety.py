"""The blade log survives a killed process, a full or read-only disk, damage and upgrades.

External checks: SQLite's own ``PRAGMA integrity_check`` and row counts read
with the standard ``sqlite3`` module (never through sawplan), ``iterdump``
before and after a refused write, and the exit codes of DEVELOPERS.md
(6 damaged file, 7 storage).

How the disk is made to refuse (we run as root in CI, where file permissions
do not stop writes):
- full disk: ``PRAGMA max_page_count`` set on the connection sawplan opens
  (the database cannot grow by a page; SQLite answers SQLITE_FULL exactly as
  on a full disk), and, where this machine lets the test mount one, a real
  512 kB tmpfs;
- read-only: the file opened through a ``mode=ro`` URI (what SQLite does by
  itself when the operating system refuses write access), and, where
  ``chattr`` works, the immutable flag, which stops root too.
"""

from __future__ import annotations

import contextlib
import csv
import os
import shutil
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from sawplan.store import safety

CUT_COLUMNS = ["blade", "saw", "cut_on", "material", "material_group", "section", "area_mm2",
               "pieces", "count", "band_speed_m_min", "feed_mm_min", "feed_setting", "time_min",
               "predicted_time_min", "coolant", "job", "heat", "note"]  # fmt: skip
BLADE_COLUMNS = ["tag", "blade_material", "grade", "width_mm", "thickness_mm", "length_mm",
                 "tpi_coarse", "tpi_fine", "tooth_form", "tooth_set", "supplier", "lot", "price",
                 "bought_on", "welded", "status", "retired_on", "retire_cause", "notes",
                 "added_on"]  # fmt: skip


def write_import_folder(folder: Path, cuts: int, tag: str = "K-1") -> None:
    """A CSV folder as ``sawplan export`` writes it: one blade and ``cuts`` cut rows."""
    folder.mkdir(parents=True, exist_ok=True)
    with (folder / "blades.csv").open("w", newline="", encoding="utf-8") as handle:
        out = csv.writer(handle)
        out.writerow(BLADE_COLUMNS)
        row = dict.fromkeys(BLADE_COLUMNS, "")
        row.update(tag=tag, blade_material="bi-metal", width_mm="27", thickness_mm="0.9",
                   tpi_coarse="3", tpi_fine="4", status="new")  # fmt: skip
        out.writerow([row[c] for c in BLADE_COLUMNS])
    with (folder / "cuts.csv").open("w", newline="", encoding="utf-8") as handle:
        out = csv.writer(handle)
        out.writerow(CUT_COLUMNS)
        for i in range(cuts):
            out.writerow([tag, "", "2024-01-02", "304", "austenitic-stainless", "round 60mm",
                          "2827.4", "1", "1", "", "", "", "1.5", "", "1", f"J-{i}", "H1",
                          f"cut {i}"])  # fmt: skip


def sqlite_count(path: Path, table: str) -> int:
    conn = sqlite3.connect(path)
    try:
        return int(conn.execute(f"SELECT COUNT(*) FROM {table}").fetchone()[0])
    finally:
        conn.close()


def sqlite_integrity(path: Path) -> list[str]:
    conn = sqlite3.connect(path)
    try:
        return [r[0] for r in conn.execute("PRAGMA integrity_check")]
    finally:
        conn.close()


def dump(path: Path) -> list[str]:
    conn = sqlite3.connect(path)
    try:
        return list(conn.iterdump())
    finally:
        conn.close()


@pytest.fixture
def shop_log(cli, tmp_path) -> Path:
    """A small log: a saw, a fitted blade, a few cuts."""
    path = tmp_path / "shop" / "blade-log.sqlite"
    steps = [
        ("saw", "add", "bay 2", "--like", "mid-production"),
        (
            "blade",
            "add",
            "B-1",
            "--pitch",
            "3/4",
            "--blade-width",
            "27mm",
            "--blade-thickness",
            "0.9mm",
        ),
        ("blade", "fit", "B-1", "--saw", "bay 2"),
        ("log", "cut", "304", "round", "60mm", "--cuts", "3", "--note", "first"),
    ]
    for args in steps:
        result = cli(*args, "--db", str(path))
        assert result.code == 0, result.err
    return path


def one_line(result, code: int) -> str:
    assert result.code == code, result.err
    assert result.err.count("\n") == 1 and "Traceback" not in result.err
    return result.err


# --- a process killed in the middle of an import ---------------------------------------------


def test_a_killed_import_leaves_the_log_whole(shop_log, tmp_path):
    folder = tmp_path / "big"
    rows = 60_000
    write_import_folder(folder, rows)
    before = sqlite_count(shop_log, "cuts")
    wal = shop_log.with_name(shop_log.name + "-wal")
    proc = subprocess.Popen(
        [sys.executable, "-m", "sawplan", "import", str(folder), "--db", str(shop_log)],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
        env={**os.environ, "SAWPLAN_DEBUG": "0"},
    )
    killed_while_writing = False
    try:
        deadline = time.monotonic() + 60
        while proc.poll() is None and time.monotonic() < deadline:
            if wal.exists() and wal.stat().st_size > 256_000:  # rows are going into the WAL
                proc.send_signal(signal.SIGKILL)
                killed_while_writing = True
                break
            time.sleep(0.002)
    finally:
        if proc.poll() is None and not killed_while_writing:
            proc.kill()
        proc.wait(30)
    assert killed_while_writing, "the import finished before it could be killed; make it larger"
    assert proc.returncode == -signal.SIGKILL
    assert sqlite_integrity(shop_log) == ["ok"]
    after = sqlite_count(shop_log, "cuts")
    assert after in (before, before + rows)  # all of the import or none of it
    assert after == before  # killed before COMMIT: none of it
    assert sqlite_count(shop_log, "blades") == 1  # the import's blade went with its cuts


def test_the_log_works_after_a_killed_import(shop_log, tmp_path, cli):
    folder = tmp_path / "big"
    write_import_folder(folder, 30_000)
    wal = shop_log.with_name(shop_log.name + "-wal")
    proc = subprocess.Popen(
        [sys.executable, "-m", "sawplan", "import", str(folder), "--db", str(shop_log)],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    deadline = time.monotonic() + 60
    while proc.poll() is None and time.monotonic() < deadline:
        if wal.exists() and wal.stat().st_size > 64_000:
            proc.kill()
            break
        time.sleep(0.002)
    proc.wait(30)
    result = cli("log", "cut", "304", "round", "60mm", "--note", "after", "--db", str(shop_log))
    assert result.code == 0, result.err
    result = cli("import", str(folder), "--db", str(shop_log))  # the same import, done again
    assert result.code == 0, result.err
    assert sqlite_count(shop_log, "cuts") == 1 + 1 + 30_000
    assert sqlite_integrity(shop_log) == ["ok"]


# --- a full disk ---------------------------------------------------------------------------


@pytest.fixture
def no_room(monkeypatch):
    """Every log sawplan opens may not grow by a single page."""
    from sawplan.store import db as dbmod

    real = dbmod._connect_file

    def full(path):
        conn = real(path)
        pages = conn.execute("PRAGMA page_count").fetchone()[0]
        conn.execute(f"PRAGMA max_page_count = {max(pages, 1)}")
        return conn

    monkeypatch.setattr(dbmod, "_connect_file", full)


def test_a_full_disk_is_one_line_and_writes_nothing(shop_log, tmp_path, cli, no_room):
    folder = tmp_path / "csv"
    write_import_folder(folder, 2_000)
    before = dump(shop_log)
    err = one_line(cli("import", str(folder), "--db", str(shop_log)), 7)
    assert "is full; nothing was written" in err and "free some space" in err
    assert dump(shop_log) == before


def test_a_full_disk_refuses_a_logged_cut(shop_log, cli, no_room):
    args = ("log", "cut", "304", "round", "60mm", "--note", "x" * 300, "--cuts", "2")
    for _ in range(30):  # a page holds a dozen such rows: the last free space soon runs out
        before = dump(shop_log)
        result = cli(*args, "--db", str(shop_log))
        if result.code != 0:
            break
    err = one_line(result, 7)
    assert err.startswith("error: db: the disk holding ") and "nothing was written" in err
    assert sqlite_integrity(shop_log) == ["ok"]
    assert dump(shop_log) == before


def test_a_write_the_system_refuses_is_one_line_and_writes_nothing(shop_log):
    """A file size limit (``ulimit -f``): the system refuses the write with EFBIG, which
    SQLite reports as a disk I/O error, not as a full disk."""
    import resource

    def limited() -> None:
        signal.signal(signal.SIGXFSZ, signal.SIG_IGN)  # EFBIG instead of a killed process
        resource.setrlimit(resource.RLIMIT_FSIZE, (1024, 1024))

    before = dump(shop_log)
    done = subprocess.run(
        [sys.executable, "-m", "sawplan", "log", "cut", "304", "round", "60mm", "--db",
         str(shop_log)], capture_output=True, text=True, preexec_fn=limited, timeout=60,
    )  # fmt: skip
    assert done.returncode == 7, done.stderr
    assert done.stderr.count("\n") == 1 and "Traceback" not in done.stderr
    assert "the disk refused a write" in done.stderr and "nothing was written" in done.stderr
    assert dump(shop_log) == before


@pytest.fixture
def tiny_disk(tmp_path):
    """A real 512 kB tmpfs, where this machine allows mounting one (root in a container)."""
    mount = tmp_path / "tiny"
    mount.mkdir()
    if os.geteuid() != 0 or shutil.which("mount") is None:
        pytest.skip("mounting a tmpfs needs root")
    done = subprocess.run(
        ["mount", "-t", "tmpfs", "-o", "size=512k", "tmpfs", str(mount)], capture_output=True
    )
    if done.returncode != 0:
        pytest.skip(f"cannot mount a tmpfs here: {done.stderr.decode().strip()}")
    try:
        yield mount
    finally:
        subprocess.run(["umount", "-l", str(mount)], capture_output=True)


def test_a_real_full_disk_is_one_line_and_writes_nothing(tiny_disk, tmp_path, cli):
    log = tiny_disk / "blade-log.sqlite"
    result = cli("blade", "add", "B-1", "--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness",
                 "0.9mm", "--db", str(log))  # fmt: skip
    assert result.code == 0, result.err
    folder = tmp_path / "csv"
    write_import_folder(folder, 20_000, tag="K-9")  # about 2 MB of rows for a 512 kB disk
    err = one_line(cli("import", str(folder), "--db", str(log)), 7)
    assert "full" in err and "nothing" in err
    assert sqlite_integrity(log) == ["ok"]
    assert sqlite_count(log, "blades") == 1 and sqlite_count(log, "cuts") == 0


def test_a_backup_onto_a_full_disk_is_one_line_and_leaves_no_file(tiny_disk, tmp_path, cli):
    log = tmp_path / "blade-log.sqlite"
    write_import_folder(tmp_path / "csv", 10_000)  # about 1.2 MB: more than the 512 kB disk
    assert cli("import", str(tmp_path / "csv"), "--db", str(log)).code == 0
    err = one_line(cli("backup", str(tiny_disk / "copy.sqlite"), "--db", str(log)), 7)
    assert "is full; no backup was written" in err
    assert list(tiny_disk.iterdir()) == []  # no half-written copy


# --- a read-only log -----------------------------------------------------------------------


def test_a_read_only_log_is_one_line_and_unchanged(shop_log, cli, monkeypatch):
    from sawplan.store import db as dbmod

    def read_only(path):
        uri = f"file:{Path(path).resolve()}?mode=ro"
        return sqlite3.connect(uri, uri=True, timeout=5.0, isolation_level=None)

    before = dump(shop_log)
    monkeypatch.setattr(dbmod, "_connect_file", read_only)
    listed = cli("blade", "list", "--db", str(shop_log))
    assert listed.code == 0, listed.err  # reading still works
    err = one_line(cli("log", "cut", "304", "round", "60mm", "--db", str(shop_log)), 7)
    assert "is read-only; nothing was written" in err
    assert dump(shop_log) == before


def test_a_backup_on_a_read_only_disk_can_be_read_and_stays_as_it_was(
    shop_log, tmp_path, cli, monkeypatch
):
    from sawplan.store import db as dbmod

    copy = tmp_path / "stick" / "copy.sqlite"
    assert cli("backup", str(copy), "--db", str(shop_log)).code == 0
    before = copy.read_bytes()

    def read_only(path):
        uri = f"file:{Path(path).resolve()}?mode=ro"
        return sqlite3.connect(uri, uri=True, timeout=5.0, isolation_level=None)

    monkeypatch.setattr(dbmod, "_connect_file", read_only)
    listed = cli("blade", "list", "--db", str(copy))
    assert listed.code == 0, listed.err
    assert "B-1" in listed.out
    assert copy.read_bytes() == before
    assert sorted(p.name for p in copy.parent.iterdir()) == ["copy.sqlite"]  # no -wal, no -shm


def test_an_immutable_log_is_one_line_and_unchanged(shop_log, cli):
    if shutil.which("chattr") is None:
        pytest.skip("no chattr on this machine")
    before = dump(shop_log)
    done = subprocess.run(["chattr", "+i", str(shop_log)], capture_output=True)
    if done.returncode != 0:
        pytest.skip(f"cannot set the immutable flag here: {done.stderr.decode().strip()}")
    try:
        result = cli("log", "cut", "304", "round", "60mm", "--db", str(shop_log))
    finally:
        subprocess.run(["chattr", "-i", str(shop_log)], capture_output=True)
    err = one_line(result, 7)
    assert "nothing was written" in err or "cannot open" in err
    assert dump(shop_log) == before


# --- a damaged log -------------------------------------------------------------------------


def damage(path: Path, pages: range) -> None:
    """Overwrite whole pages (never page 1, the header) with a fixed garbage pattern."""
    conn = sqlite3.connect(path)
    size = conn.execute("PRAGMA page_size").fetchone()[0]
    count = conn.execute("PRAGMA page_count").fetchone()[0]
    conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    conn.close()
    assert count > max(pages), f"the log has only {count} pages"
    with path.open("r+b") as handle:
        for page in pages:
            handle.seek((page - 1) * size)
            handle.write(bytes((i * 37 + 11) % 256 for i in range(size)))


@pytest.fixture
def big_log(cli, tmp_path) -> Path:
    path = tmp_path / "shop" / "blade-log.sqlite"
    folder = tmp_path / "csv"
    write_import_folder(folder, 3_000)
    assert cli("import", str(folder), "--db", str(path)).code == 0
    return path


def test_damage_is_found_when_opening_for_writing(big_log, cli, monkeypatch):
    folder = safety.backups_dir(big_log)
    folder.mkdir()
    older = folder / "blade-log-schema1-20240101-000000-000000.sqlite"
    newer = folder / "blade-log-schema2-20240601-000000-000000.sqlite"
    shutil.copy(big_log, older)
    shutil.copy(big_log, newer)
    damage(big_log, range(5, 12))
    monkeypatch.setattr(safety, "ROUTINE_CHECK_ONE_IN", 1)  # this open is the routine check
    before = big_log.read_bytes()
    args = (
        "blade",
        "add",
        "B-2",
        "--pitch",
        "3/4",
        "--blade-width",
        "27mm",
        "--blade-thickness",
        "0.9mm",
    )
    err = one_line(cli(*args, "--db", str(big_log)), 6)
    assert "is damaged" in err and "nothing was written" in err
    assert f"restore the newest good backup {newer}" in err  # the newest backup, by name
    assert "sawplan restore --force" in err
    assert big_log.read_bytes() == before


def test_damage_sqlite_reports_gets_the_same_advice(big_log, cli):
    damage(big_log, range(5, 12))
    result = cli("log", "list", "--limit", "0", "--db", str(big_log))
    err = one_line(result, 6)
    assert "damaged" in err and "sawplan backup" in err


def test_a_damaged_log_is_not_backed_up_as_if_sound(big_log, cli, tmp_path):
    damage(big_log, range(5, 12))
    copy = tmp_path / "copy.sqlite"
    one_line(cli("backup", str(copy), "--db", str(big_log)), 6)
    assert not copy.exists()
    assert not copy.with_name(copy.name + ".partial").exists()


def test_the_routine_check_runs_about_once_in_n_opens(monkeypatch):
    import random

    random.seed(20240601)
    runs = sum(safety.routine_check_due() for _ in range(10_000))
    n = safety.ROUTINE_CHECK_ONE_IN
    expected = 10_000 / n  # binomial mean; 5 standard deviations either side
    spread = 5 * (10_000 * (1 / n) * (1 - 1 / n)) ** 0.5
    assert expected - spread < runs < expected + spread


def test_the_restore_advice_names_no_backup_when_there_is_none(tmp_path):
    hint = safety.restore_hint(tmp_path / "blade-log.sqlite")
    assert "sawplan backup" in hint and "no sound automatic backups" in hint


@pytest.fixture(autouse=True)
def _no_leftover_immutable(tmp_path):
    yield
    with contextlib.suppress(OSError):
        subprocess.run(["chattr", "-R", "-i", str(tmp_path)], capture_output=True)
