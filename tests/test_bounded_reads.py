"""Files a user names are read bounded: regular files only, never past their size cap.

A FIFO or a device named as a job's ``stock_file`` once hung ``plan`` (a FIFO
waits for a writer; ``/dev/zero`` never ends).  These run the CLI in a child
process with a generous timeout, so a hang fails the test instead of blocking
the run; nothing here asserts on speed.
"""

from __future__ import annotations

import os
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

from sawplan.errors import BadDataError, NotFoundError
from sawplan.user_files import copy_member, read_limited, read_text_limited, size_words

HANG = 60  # seconds: far beyond any refusal, short of a stuck run

JOB = """[job]
name = "bounded"
kerf = "1.6mm"
{extra}
[[part]]
name = "a"
material = "1018"
section = "round 30mm"
length = "100mm"
count = 5
"""

needs_fifo = pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no FIFOs on this system")


def sawplan(tmp_path: Path, *args: str, env: dict[str, str] | None = None):
    """``python -m sawplan ARGS`` in a child process; a hang raises TimeoutExpired."""
    home = tmp_path / "home"
    home.mkdir(exist_ok=True)
    child_env = {**os.environ, "SAWPLAN_HOME": str(home), **(env or {})}
    return subprocess.run(
        [sys.executable, "-m", "sawplan", *args],
        cwd=tmp_path,
        env=child_env,
        capture_output=True,
        text=True,
        timeout=HANG,
    )


def job_with(tmp_path: Path, extra: str) -> Path:
    path = tmp_path / "job.toml"
    path.write_text(JOB.format(extra=extra), encoding="utf-8")
    return path


@needs_fifo
@pytest.mark.parametrize("command", [("plan",), ("forecast", "--job-file")])
def test_fifo_stock_file_is_refused_at_once(tmp_path, command):
    os.mkfifo(tmp_path / "stock.csv")
    job = job_with(tmp_path, 'stock_file = "stock.csv"')
    r = sawplan(tmp_path, *command, str(job))
    assert r.returncode == 3, r.stderr
    assert "stock file: stock.csv is not a regular file (a pipe)" in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1 and "Traceback" not in r.stderr


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="no /dev/zero")
def test_dev_zero_with_allow_is_refused(tmp_path):
    job = job_with(tmp_path, 'stock_file = "/dev/zero"')
    r = sawplan(tmp_path, "plan", str(job), "--allow")
    assert r.returncode == 3, r.stderr
    assert "/dev/zero is not a regular file (a device)" in r.stderr


@needs_fifo
@pytest.mark.parametrize(
    ("args", "env", "said"),
    [
        pytest.param(("plan", "{fifo}"), {}, "job file: {fifo} is not a regular file", id="job"),
        pytest.param(("materials",), {"SAWPLAN_MATERIALS": "{fifo}"}, "materials file", id="mat"),
        pytest.param(("saw", "list"), {"SAWPLAN_SAWS": "{fifo}"}, "saws file", id="saws"),
        pytest.param(("materials",), {"SAWPLAN_CONFIG": "{fifo}"}, "config file", id="config"),
    ],
)
def test_every_named_file_refuses_a_fifo(tmp_path, args, env, said):
    fifo = tmp_path / "named.pipe"
    os.mkfifo(fifo)
    args = tuple(a.format(fifo=fifo) for a in args)
    env = {k: v.format(fifo=fifo) for k, v in env.items()}
    r = sawplan(tmp_path, *args, env=env)
    assert r.returncode == 3, r.stderr
    assert said.format(fifo=fifo) in r.stderr and "not a regular file (a pipe)" in r.stderr


def test_over_the_cap_is_refused_and_the_cap_itself_is_read(tmp_path):
    path = tmp_path / "f.txt"
    path.write_bytes(b"x" * 10)
    assert read_limited(path, 10, "test file") == b"x" * 10  # exactly the cap: read
    with pytest.raises(BadDataError, match="over 9 bytes") as err:
        read_limited(path, 9, "test file")
    assert err.value.field == "test file"


def test_an_over_cap_job_file_is_refused(cli, tmp_path):
    job = job_with(tmp_path, "# " + "x" * 5_000_000)
    r = cli("plan", str(job))
    assert r.code == 3
    assert "job file" in r.err and "is over 5 MB" in r.err


def test_a_folder_and_a_missing_file(tmp_path):
    with pytest.raises(BadDataError, match="not a regular file \\(a folder\\)"):
        read_text_limited(tmp_path, 100, "stock file")
    with pytest.raises(NotFoundError, match="no such file"):
        read_text_limited(tmp_path / "none.csv", 100, "stock file")


def test_a_zip_member_is_capped_while_it_is_unpacked(tmp_path):
    # the cap holds on the bytes that come out, whatever the member's header says
    archive = tmp_path / "export.zip"
    with zipfile.ZipFile(archive, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("cuts.csv", "a" * 5_000)
    with zipfile.ZipFile(archive) as zf:
        info = zf.getinfo("cuts.csv")
        copy_member(zf, info, tmp_path / "ok.csv", 5_000, archive.name)
        assert (tmp_path / "ok.csv").stat().st_size == 5_000
        with pytest.raises(BadDataError, match="cuts.csv is over 4.999 kB"):
            copy_member(zf, info, tmp_path / "big.csv", 4_999, archive.name)


@needs_fifo
def test_import_refuses_a_pipe_under_a_table_name(cli, tmp_path):
    folder = tmp_path / "export"
    folder.mkdir()
    os.mkfifo(folder / "blades.csv")
    r = cli("import", str(folder), "--db", str(tmp_path / "log.db"))
    assert r.code == 3, r.err
    assert "blades.csv is not a regular file (a pipe)" in r.err


@pytest.mark.parametrize(
    ("cap", "words"),
    [(64_000, "64 kB"), (5_000_000, "5 MB"), (2_000_000_000, "2 GB"), (999, "999 bytes")],
)
def test_caps_read_as_people_say_them(cap, words):
    assert size_words(cap) == words
