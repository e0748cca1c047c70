"""What sawplan writes never clobbers what it reads, and never half-replaces anything.

Every file-writing command (``plan --sheet``/``--csv-dir``, ``export``,
``backup``) goes through ``sawplan/outputs.py``: an input of the run is never a
target, even with ``--force``; an existing file needs ``--force``; a device, a
FIFO or a folder is never renamed over; every target is checked before the
first byte is written; each file is written as ``NAME.partial`` and renamed;
a partial left by a killed run is removed by the next one.  Exports and
backups hold the whole log and get its mode (``log_mode``, 0600 by default),
whatever the umask.
"""

from __future__ import annotations

import hashlib
import os
import shutil
import stat
import subprocess
import sys
from pathlib import Path

import pytest
from test_trust_safety import tiny_disk  # noqa: F401  (a real 512 kB file system)

from sawplan import outputs

REPO = Path(__file__).resolve().parent.parent
SMALL = REPO / "tests" / "data" / "plan_small.toml"
BLADE = ("--pitch", "3/4", "--blade-width", "27mm", "--blade-thickness", "0.9mm")
posix_only = pytest.mark.skipif(os.name != "posix", reason="file modes and FIFOs are POSIX")


def one_line(result, code: int) -> str:
    assert result.code == code, (result.code, result.out, result.err)
    assert result.err.count("\n") == 1 and "Traceback" not in result.err
    return result.err


def digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def mode(path: Path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


def leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.rglob("*") if ".partial" in p.name or ".tmp" in p.name)


@pytest.fixture
def shop(tmp_path: Path) -> dict[str, Path]:
    """A job with its stock in a CSV beside it, the shop's own materials and saws files,
    a config file and a blade log: every input a plan reads."""
    job = tmp_path / "job.toml"
    text = SMALL.read_text(encoding="utf-8")
    job.write_text(text.replace("[job]\n", '[job]\nstock_file = "rack.csv"\n', 1), "utf-8")
    rack = tmp_path / "rack.csv"
    rack.write_text("material,section,length,count,price\n4140,round 60mm,3m,2,120\n", "utf-8")
    materials = tmp_path / "shop-materials.csv"
    shutil.copy(REPO / "data" / "materials.csv", materials)
    saws = tmp_path / "shop-saws.toml"
    shutil.copy(REPO / "data" / "saws.toml", saws)
    config = Path(os.environ["SAWPLAN_HOME"]) / "config.toml"
    config.write_text('units = "metric"\n', encoding="utf-8")
    return {"job": job, "rack": rack, "materials": materials, "saws": saws, "config": config}


@pytest.fixture
def log(cli, tmp_path: Path) -> Path:
    path = tmp_path / "shop-log.sqlite"
    assert cli("blade", "add", "B-1", *BLADE, "--db", str(path)).code == 0
    return path


def plan(cli, shop, *extra: str):
    return cli(
        "plan", str(shop["job"]), "--materials-file", str(shop["materials"]),
        "--saws", str(shop["saws"]), *extra,
    )  # fmt: skip


# --- inputs are never targets ----------------------------------------------------------------


@pytest.mark.parametrize("force", [(), ("--force",)], ids=["plain", "with --force"])
def test_a_sheet_named_like_the_job_file_is_refused_and_the_job_file_is_unchanged(cli, shop, force):
    before = digest(shop["job"])
    err = one_line(plan(cli, shop, "--sheet", str(shop["job"]), *force), 2)
    assert f"--sheet would overwrite the job file {shop['job']}" in err
    assert "choose another name" in err
    assert digest(shop["job"]) == before
    assert leftovers(shop["job"].parent) == []


@pytest.mark.parametrize(
    ("key", "what"),
    [
        pytest.param("rack", "the job's stock file", id="the job's stock file"),
        pytest.param("materials", "the materials file", id="the materials file"),
        pytest.param("saws", "the saws file", id="the saws file"),
        pytest.param("config", "the config file", id="the config file"),
    ],
)
def test_a_sheet_onto_an_input_is_refused_even_with_force(cli, shop, key, what):
    before = digest(shop[key])
    err = one_line(plan(cli, shop, "--sheet", str(shop[key]), "--force"), 2)
    assert f"would overwrite {what}" in err
    assert digest(shop[key]) == before


def test_a_sheet_onto_the_blade_log_or_its_wal_is_refused_even_with_force(cli, shop, log):
    before = digest(log)
    for target in (log, Path(f"{log}-wal")):
        err = one_line(plan(cli, shop, "--db", str(log), "--sheet", str(target), "--force"), 2)
        assert "would overwrite the blade log" in err
    assert digest(log) == before
    assert not Path(f"{log}-wal").exists() or Path(f"{log}-wal").stat().st_size == 0


def test_a_link_to_the_job_file_is_the_job_file(cli, shop, tmp_path):
    """Compared by inode too: another name of the same file is refused alike."""
    hard = tmp_path / "hard.html"
    os.link(shop["job"], hard)
    soft = tmp_path / "soft.html"
    soft.symlink_to(shop["job"])
    before = digest(shop["job"])
    for name in (hard, soft):
        err = one_line(plan(cli, shop, "--sheet", str(name), "--force"), 2)
        assert "would overwrite the job file" in err
    assert digest(shop["job"]) == before


def test_an_export_into_the_logs_own_name_is_refused_even_with_force(cli, tmp_path):
    folder = tmp_path / "shop"
    log = folder / "cuts.csv"  # a log file that happens to be named like an export file
    assert cli("blade", "add", "B-1", *BLADE, "--db", str(log)).code == 0
    before = digest(log)
    err = one_line(cli("export", str(folder), "--force", "--db", str(log)), 2)
    assert f"would overwrite the blade log {log}" in err
    assert digest(log) == before
    assert sorted(p.name for p in folder.iterdir() if p.suffix == ".csv") == ["cuts.csv"]


@pytest.mark.parametrize("suffix", ["", "-wal", "-shm"], ids=["the log", "-wal", "-shm"])
def test_a_backup_onto_the_log_or_its_helper_files_is_refused_even_with_force(cli, log, suffix):
    target = Path(f"{log}{suffix}")
    before = digest(log)
    err = one_line(cli("backup", str(target), "--force", "--db", str(log)), 2)
    assert "would overwrite the blade log" in err
    assert digest(log) == before


def test_a_backup_onto_the_config_file_is_refused_even_with_force(cli, shop, log):
    before = digest(shop["config"])
    err = one_line(cli("backup", str(shop["config"]), "--force", "--db", str(log)), 2)
    assert "would overwrite the config file" in err
    assert digest(shop["config"]) == before


def test_a_backup_onto_the_station_keys_is_refused_even_with_force(cli, log):
    from sawplan.station.access import keys_path

    assert keys_path().name == outputs.STATION_KEYS  # the name outputs.py guards
    keys = keys_path()
    keys.write_text('{"keys": []}', encoding="utf-8")
    err = one_line(cli("backup", str(keys), "--force", "--db", str(log)), 2)
    assert "would overwrite the station's keys file" in err
    assert keys.read_text(encoding="utf-8") == '{"keys": []}'


# --- existing files need --force -------------------------------------------------------------


def test_an_existing_sheet_needs_force_and_force_replaces_it(cli, shop, tmp_path):
    sheet = tmp_path / "sheet.html"
    sheet.write_text("yesterday's sheet", encoding="utf-8")
    err = one_line(plan(cli, shop, "--sheet", str(sheet)), 5)
    assert f"--sheet: {sheet} exists" in err and "--force" in err
    assert sheet.read_text(encoding="utf-8") == "yesterday's sheet"
    replaced = plan(cli, shop, "--sheet", str(sheet), "--force")
    assert replaced.code == 0, replaced.err
    assert sheet.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert leftovers(tmp_path) == []


def test_an_existing_csv_folder_needs_force_and_nothing_else_is_written(cli, shop, tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "order.csv").write_text("kept\n", encoding="utf-8")
    sheet = tmp_path / "new.html"
    err = one_line(plan(cli, shop, "--csv-dir", str(out), "--sheet", str(sheet)), 5)
    assert "--csv-dir" in err and "order.csv exists" in err
    assert sorted(p.name for p in out.iterdir()) == ["order.csv"]  # no cuts.csv written
    assert (out / "order.csv").read_text(encoding="utf-8") == "kept\n"
    assert not sheet.exists()
    assert plan(cli, shop, "--csv-dir", str(out), "--sheet", str(sheet), "--force").code == 0
    assert sorted(p.name for p in out.iterdir()) == [
        "bars.csv", "cuts.csv", "order.csv", "summary.csv"
    ]  # fmt: skip
    assert sheet.exists()


def test_export_and_backup_onto_existing_files_need_force(cli, log, tmp_path):
    copy = tmp_path / "copy.sqlite"
    copy.write_bytes(b"an older copy")
    err = one_line(cli("backup", str(copy), "--db", str(log)), 5)
    assert "exists" in err and "--force" in err
    assert copy.read_bytes() == b"an older copy"
    assert cli("backup", str(copy), "--force", "--db", str(log)).code == 0
    assert copy.read_bytes().startswith(b"SQLite format 3\0")
    folder = tmp_path / "csv"
    assert cli("export", str(folder), "--db", str(log)).code == 0
    one_line(cli("export", str(folder), "--db", str(log)), 5)
    assert cli("export", str(folder), "--force", "--db", str(log)).code == 0
    assert leftovers(tmp_path) == []


def test_nothing_is_written_when_one_of_several_targets_is_refused(cli, shop, tmp_path):
    out = tmp_path / "out"
    err = one_line(plan(cli, shop, "--csv-dir", str(out), "--sheet", str(shop["job"])), 2)
    assert "would overwrite the job file" in err
    assert not out.exists()
    err = one_line(plan(cli, shop, "--csv-dir", str(out), "--sheet", str(out / "cuts.csv")), 2)
    assert "--csv-dir and --sheet both name" in err
    assert not out.exists()


def test_a_failed_write_leaves_every_old_file_as_it_was(cli, shop, tmp_path, monkeypatch):
    """The second of two files fails half-way: the first is not replaced either."""
    out = tmp_path / "out"
    out.mkdir()
    for name in ("cuts.csv", "bars.csv", "summary.csv", "order.csv"):
        (out / name).write_text(f"old {name}\n", encoding="utf-8")
    real_fsync, calls = os.fsync, []

    def failing_fsync(fd):
        calls.append(fd)
        if len(calls) == 2:
            raise OSError(5, "Input/output error")
        real_fsync(fd)

    monkeypatch.setattr(outputs.os, "fsync", failing_fsync)
    err = one_line(plan(cli, shop, "--csv-dir", str(out), "--force"), 7)
    assert "nothing was written" in err
    for name in ("cuts.csv", "bars.csv", "summary.csv", "order.csv"):
        assert (out / name).read_text(encoding="utf-8") == f"old {name}\n"
    assert leftovers(out) == []


# --- what is never renamed over --------------------------------------------------------------


@posix_only
@pytest.mark.parametrize("kind", ["folder", "fifo", "device"])
def test_a_folder_a_fifo_or_a_device_is_never_a_target(cli, shop, tmp_path, log, kind):
    if kind == "folder":
        target = tmp_path / "sheets.html"
        target.mkdir()
    elif kind == "fifo":
        target = tmp_path / "pipe.html"
        os.mkfifo(target)
    else:
        target = Path("/dev/full")
        if not target.exists() or not stat.S_ISCHR(os.stat(target).st_mode):
            pytest.skip("no /dev/full here")
    for args in (
        ("plan", str(shop["job"]), "--sheet", str(target), "--force"),
        ("backup", str(target), "--force", "--db", str(log)),
    ):
        err = one_line(cli(*args), 2)
        assert "not a file" in err and kind.replace("fifo", "FIFO") in err
    st = os.lstat(target)  # still what it was: a rename over it would have replaced it
    expected = {"folder": stat.S_ISDIR, "fifo": stat.S_ISFIFO, "device": stat.S_ISCHR}[kind]
    assert expected(st.st_mode)
    assert not outputs.partial_of(target).exists()


@pytest.mark.parametrize("name", ["", ".", ".."])
def test_a_target_without_a_file_name_is_one_line(cli, shop, log, name):
    err = one_line(plan(cli, shop, "--sheet", name, "--force"), 2)
    assert "is not a file name" in err
    err = one_line(cli("backup", name, "--force", "--db", str(log)), 2)
    assert "is not a file name" in err


# --- leftovers of killed runs ----------------------------------------------------------------


def test_a_partial_sheet_left_by_a_killed_run_is_removed_by_the_next(cli, shop, tmp_path):
    sheet = tmp_path / "sheet.html"
    partial = tmp_path / "sheet.html.partial"
    partial.write_text("<!DOCTYPE html><p>half a sheet", encoding="utf-8")  # no one holds it
    result = plan(cli, shop, "--sheet", str(sheet))
    assert result.code == 0, result.err
    assert sheet.exists() and not partial.exists()


def test_leftovers_of_a_killed_export_are_removed_by_the_next(cli, log, tmp_path):
    folder = tmp_path / "csv"
    folder.mkdir()
    (folder / "cuts.csv.partial").write_text("blade,saw\nB-", encoding="utf-8")  # this version
    (folder / "saws.csv.tmp").write_text("name\n", encoding="utf-8")  # an older version's
    (folder / "notes.txt").write_text("the user's own", encoding="utf-8")
    assert cli("export", str(folder), "--db", str(log)).code == 0
    assert leftovers(folder) == []
    assert (folder / "notes.txt").read_text(encoding="utf-8") == "the user's own"
    assert (folder / "cuts.csv").read_text(encoding="utf-8").startswith("blade,saw,")


def test_an_input_named_like_the_partial_file_is_never_removed(cli, shop, tmp_path):
    """A job file called ``sheet.html.partial`` is not a leftover of ``--sheet sheet.html``."""
    job = tmp_path / "sheet.html.partial"
    shutil.copy(shop["job"], job)
    before = digest(job)
    err = one_line(cli("plan", str(job), "--sheet", str(tmp_path / "sheet.html"), "--force"), 2)
    assert f"would overwrite the job file {job}" in err
    assert digest(job) == before


def test_a_partial_name_that_is_a_link_is_refused_and_what_it_leads_to_is_kept(cli, shop, tmp_path):
    elsewhere = tmp_path / "precious.txt"
    elsewhere.write_text("keep me", encoding="utf-8")
    (tmp_path / "sheet.html.partial").symlink_to(elsewhere)
    err = one_line(plan(cli, shop, "--sheet", str(tmp_path / "sheet.html")), 2)
    assert "is in the way (a symbolic link)" in err
    assert elsewhere.read_text(encoding="utf-8") == "keep me"
    assert not (tmp_path / "sheet.html").exists()


def test_a_partial_being_written_by_another_run_is_a_conflict_and_is_kept(cli, shop, tmp_path):
    """A partial whose lock is held belongs to a run in progress: refused, not removed."""
    fcntl = pytest.importorskip("fcntl")
    sheet = tmp_path / "sheet.html"
    partial = tmp_path / "sheet.html.partial"
    partial.write_text("being written", encoding="utf-8")
    with partial.open("rb") as held:
        fcntl.flock(held.fileno(), fcntl.LOCK_EX)  # as the other run holds it
        err = one_line(plan(cli, shop, "--sheet", str(sheet)), 5)
    assert "another sawplan is writing" in err
    assert partial.read_text(encoding="utf-8") == "being written" and not sheet.exists()


WRITER = """
import sys, time
from pathlib import Path
from sawplan.outputs import staged
with staged(Path(sys.argv[1])) as partial:
    partial.write_text("<!DOCTYPE html><p>half a sheet", encoding="utf-8")
    print("writing", flush=True)
    time.sleep(120)
"""


@posix_only
def test_a_writer_in_progress_is_waited_for_and_a_killed_one_cleaned_up(cli, shop, tmp_path):
    """A real second process: while it writes, its partial is refused and kept; once it is
    killed (SIGKILL: no clean-up of its own), the next run removes the partial."""
    sheet = tmp_path / "sheet.html"
    writer = subprocess.Popen(
        [sys.executable, "-c", WRITER, str(sheet)], stdout=subprocess.PIPE, text=True
    )
    try:
        assert writer.stdout is not None and writer.stdout.readline().strip() == "writing"
        err = one_line(plan(cli, shop, "--sheet", str(sheet)), 5)
        assert "another sawplan is writing" in err
        assert outputs.partial_of(sheet).exists() and not sheet.exists()
    finally:
        writer.kill()
        writer.wait()
    assert outputs.partial_of(sheet).exists()  # what the killed run left
    result = plan(cli, shop, "--sheet", str(sheet))
    assert result.code == 0, result.err
    assert not outputs.partial_of(sheet).exists()
    assert sheet.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert "half a sheet" not in sheet.read_text(encoding="utf-8")


def test_a_killed_backup_is_cleaned_by_the_next_and_never_listed_as_a_backup(cli, log, tmp_path):
    from sawplan.store import safety

    folder = safety.backups_dir(log)
    folder.mkdir()
    stale = folder / f"{log.stem}-schema3-20991231-000000-000000.sqlite.partial"
    stale.write_bytes(b"SQLite format 3\0")
    Path(f"{stale}-journal").write_bytes(b"\0" * 512)
    assert safety.backups_of(log) == []  # a partial never counts as a backup
    copy = tmp_path / "usb" / "copy.sqlite"
    copy.parent.mkdir()
    outputs.partial_of(copy).write_bytes(b"SQLite format 3\0 half")
    Path(f"{outputs.partial_of(copy)}-journal").write_bytes(b"\0" * 512)
    assert cli("backup", str(copy), "--db", str(log)).code == 0
    assert sorted(p.name for p in copy.parent.iterdir()) == ["copy.sqlite"]
    assert safety.backups_of(log) == []


def test_stale_partials_of_a_pattern_go_and_busy_ones_stay(tmp_path):
    fcntl = pytest.importorskip("fcntl")
    stale = tmp_path / "shop-schema3-1.dump.partial"
    busy = tmp_path / "shop-schema3-2.dump.partial"
    other = tmp_path / "notes.txt.partial"  # not ours: another pattern
    for path in (stale, busy, other):
        path.write_bytes(b"x")
    with busy.open("rb") as held:
        fcntl.flock(held.fileno(), fcntl.LOCK_EX)
        gone = outputs.clear_stale_partials(tmp_path, "shop-schema*.dump")
    assert gone == [stale]
    assert not stale.exists() and busy.exists() and other.exists()


# --- permissions -----------------------------------------------------------------------------


@posix_only
@pytest.mark.parametrize("umask", [0o000, 0o022], ids=["umask 000", "umask 022"])
def test_exports_and_backups_are_private_whatever_the_umask(cli, log, tmp_path, umask):
    old = os.umask(umask)
    try:
        assert cli("export", str(tmp_path / "new" / "csv"), "--db", str(log)).code == 0
        assert cli("backup", str(tmp_path / "copies" / "b.sqlite"), "--db", str(log)).code == 0
    finally:
        os.umask(old)
    assert mode(tmp_path / "new") == mode(tmp_path / "new" / "csv") == 0o700
    for csv_file in (tmp_path / "new" / "csv").iterdir():
        assert mode(csv_file) == 0o600, csv_file
    assert mode(tmp_path / "copies") == 0o700
    assert mode(tmp_path / "copies" / "b.sqlite") == 0o600


@posix_only
@pytest.mark.parametrize("umask", [0o000, 0o022], ids=["umask 000", "umask 022"])
def test_the_copy_before_an_upgrade_is_private_whatever_the_umask(cli, tmp_path, umask):
    from test_store_upgrade import legacy_log

    from sawplan.store import safety

    log = legacy_log(tmp_path / "blade-log.sqlite", 2)
    old = os.umask(umask)
    try:
        assert cli("blade", "list", "--db", str(log)).code == 0  # upgrades, copying first
    finally:
        os.umask(old)
    (copy,) = safety.backups_of(log)
    assert mode(safety.backups_dir(log)) == 0o700
    assert mode(copy) == 0o600


@posix_only
def test_exports_and_backups_follow_a_shared_log_mode(cli, log, tmp_path, monkeypatch):
    monkeypatch.setenv("SAWPLAN_LOG_MODE", "group")
    old = os.umask(0o077)
    try:
        assert cli("export", str(tmp_path / "csv"), "--db", str(log)).code == 0
        assert cli("backup", str(tmp_path / "b.sqlite"), "--db", str(log)).code == 0
    finally:
        os.umask(old)
    assert mode(tmp_path / "csv") == 0o770
    assert {mode(p) for p in (tmp_path / "csv").iterdir()} == {0o660}
    assert mode(tmp_path / "b.sqlite") == 0o660


@posix_only
def test_a_replaced_export_file_gets_the_logs_mode_again(cli, log, tmp_path):
    folder = tmp_path / "csv"
    assert cli("export", str(folder), "--db", str(log)).code == 0
    (folder / "blades.csv").chmod(0o644)
    assert cli("export", str(folder), "--force", "--db", str(log)).code == 0
    assert mode(folder / "blades.csv") == 0o600


@posix_only
@pytest.mark.parametrize("umask", [0o000, 0o022], ids=["umask 000", "umask 022"])
def test_sheets_are_documents_and_follow_the_umask(cli, shop, tmp_path, umask):
    """A cut sheet is printed and passed round the shop: it gets the user's usual mode."""
    old = os.umask(umask)
    try:
        assert plan(cli, shop, "--sheet", str(tmp_path / "s.html")).code == 0
    finally:
        os.umask(old)
    assert mode(tmp_path / "s.html") == 0o666 & ~umask


# --- a real full disk ------------------------------------------------------------------------


def test_a_sheet_onto_a_full_disk_is_one_line_and_keeps_the_old_sheet(
    cli,
    shop,
    tiny_disk,  # noqa: F811
):
    sheet = tiny_disk / "sheet.html"
    sheet.write_text("the sheet from before", encoding="utf-8")
    filler = tiny_disk / "filler"
    with filler.open("wb", buffering=0) as handle:  # fill the 512 kB disk to its last block
        try:
            while True:
                handle.write(b"\0" * 4096)
        except OSError:
            pass
    err = one_line(plan(cli, shop, "--sheet", str(sheet), "--force"), 7)
    assert "full" in err and "nothing was written" in err
    assert sheet.read_text(encoding="utf-8") == "the sheet from before"
    assert sorted(p.name for p in tiny_disk.iterdir()) == ["filler", "sheet.html"]
