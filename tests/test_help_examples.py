"""Help that works: every example in every ``--help`` runs against a demo shop and exits 0.

Each example runs in a fresh copy of a small invented shop (``shop`` below): a
blade log with the saw "bay 2" and blades B-017 (fitted on mid-production) and B-009, a job file,
a materials CSV and an exported log folder.  A command that adds examples
needing more adds it to the shop here.  Also: a group typed alone prints its
help, summaries fit 80 columns, a closed pipe ends quietly, and a failing write
leaves no blade log behind.
"""

from __future__ import annotations

import contextlib
import io
import os
import shlex
import shutil
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest
import typer

from sawplan.cli.app import app, run
from sawplan.cli.boundary import run_guarded

HERE = Path(__file__).parent


def _walk(command, path=()):
    yield path, command
    if isinstance(getattr(command, "commands", None), dict):
        for name, sub in command.commands.items():
            yield from _walk(sub, (*path, name))


ROOT = typer.main.get_command(app)
GROUPS = [path for path, cmd in _walk(ROOT) if isinstance(getattr(cmd, "commands", None), dict)]


def _examples() -> list[str]:
    found: list[str] = []
    for _path, command in _walk(ROOT):
        text = command.help or ""
        if "Examples:" not in text:
            continue
        block = text.split("Examples:", 1)[1]
        for line in block.splitlines()[1:]:
            if not line.startswith("  sawplan "):
                if line.strip():
                    break
                continue
            found.append(line.strip())
    return list(dict.fromkeys(found))


EXAMPLES = _examples()


def invoke(args: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = run_guarded(run, args)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def shop(tmp_path_factory) -> Path:
    """The invented shop every example starts from (a folder to copy)."""
    root = tmp_path_factory.mktemp("shop")
    log = root / "home" / "blade-log.sqlite"  # the default log under SAWPLAN_HOME

    def ok(*args: str, db: Path = log) -> None:
        code, _out, err = invoke([*args, "--db", str(db)])
        assert code == 0, (args, err)

    ok("saw", "add", "bay 2", "--like", "mid-production")
    for tag, pitch, supplier, lot in (
        ("B-017", "3/4", "east depot", "E2604"),
        ("B-009", "4/6", "west depot", "T-3309"),
    ):
        ok("blade", "add", tag, "--pitch", pitch, "--blade-width", "27mm",
           "--blade-thickness", "0.9mm", "--price", "60", "--supplier", supplier,
           "--lot", lot)  # fmt: skip
    ok("blade", "fit", "B-017", "--saw", "mid-production", "--date", "30 days ago")
    ok("log", "cut", "304", "round", "60mm", "--cuts", "5", "--time", "12min", "--date",
       "20 days ago")  # fmt: skip
    shutil.copyfile(log, root / "shop-log.sqlite")
    other = root / "other.sqlite"
    ok("blade", "add", "B-501", "--pitch", "3/4", "--blade-width", "27mm",
       "--blade-thickness", "0.9mm", db=other)  # fmt: skip
    code, _out, err = invoke(["export", str(root / "old-shop-csv"), "--db", str(other)])
    assert code == 0, err
    other.unlink()
    shutil.copyfile(HERE / "data" / "plan_small.toml", root / "job.toml")
    rows = (HERE.parent / "data" / "materials.csv").read_text(encoding="utf-8").splitlines()
    header, row_1018 = rows[0], next(r for r in rows if r.startswith("1018,"))
    (root / "shop-materials.csv").write_text(
        f"{header}\n{row_1018.replace('1018,', 'shop-1018,', 1)}\n", encoding="utf-8"
    )
    (root / "usb").mkdir()
    # backups for the restore examples: a copy on the stick and an automatic one
    ok("backup", str(root / "usb" / "blade-log-2024-06-30.sqlite"))
    (root / "home" / "backups").mkdir()
    shutil.copyfile(
        root / "usb" / "blade-log-2024-06-30.sqlite",
        root / "home" / "backups" / "blade-log-schema3-20240630-120000-000000.sqlite",
    )
    from sawplan.store.backup import write_export_zip
    from sawplan.store.location import parse_location

    write_export_zip(parse_location(str(root / "shop-log.sqlite")), root / "shop-log.zip")
    from sawplan.station.access import KEYS_FILE, make_keys

    make_keys(root / "home" / KEYS_FILE)  # `sawplan serve --host 0.0.0.0` needs keys
    conn = sqlite3.connect(root / "old-log.sqlite")  # a log an earlier release wrote
    conn.executescript((HERE / "data" / "legacy" / "blade-log-schema1.sql").read_text("utf-8"))
    conn.close()
    return root


# The help's example server stands for a real PostgreSQL log (tests/pg_server.py): empty
# for the examples that fill one, else holding the shop's log.
SERVER = "postgresql://office@saw-server/sawplan"


def _server_log(example: str, folder: Path, request) -> str:
    url = request.getfixturevalue("pg_log")
    fills = f"--to {SERVER}" in example or example.startswith("sawplan restore")
    if not fills:
        from sawplan.store.transfer import copy_log

        copy_log(folder / "shop-log.sqlite", url)
    return url


def _run_example(example: str, folder: Path, monkeypatch) -> tuple[int, str, str]:
    words = shlex.split(example)[1:]
    if ">" in words:  # a shell redirection: the output is what counts
        words = words[: words.index(">")]
    monkeypatch.chdir(folder)
    monkeypatch.setenv("SAWPLAN_HOME", str(folder / "home"))
    if words[:1] == ["serve"]:  # build the application, check it answers, do not serve
        monkeypatch.setattr("sawplan.station.serve.run_server", _answers_once)
    return invoke(words)


def _answers_once(app, host: str, port: int) -> None:
    from starlette.testclient import TestClient

    with TestClient(app, client=("127.0.0.1", 50000), base_url="http://127.0.0.1") as client:
        assert client.get("/").status_code == 200


@pytest.mark.parametrize("example", EXAMPLES, ids=EXAMPLES)
def test_every_help_example_runs(shop, tmp_path, monkeypatch, request, example):
    folder = tmp_path / "shop"
    shutil.copytree(shop, folder)
    if SERVER in example:
        example = example.replace(SERVER, _server_log(example, folder, request))
    code, out, err = _run_example(example, folder, monkeypatch)
    assert code == 0, f"`{example}` exits {code}: {err}"
    assert out.strip() or "wrote" in err, f"`{example}` printed nothing"


def test_the_examples_were_found():
    assert len(EXAMPLES) > 40
    assert any(e.startswith("sawplan blade fit") for e in EXAMPLES)


@pytest.mark.parametrize("path", GROUPS, ids=[" ".join(p) or "sawplan" for p in GROUPS])
def test_a_group_alone_prints_its_help(cli, path):
    result = cli(*path)
    assert result.code == 0, result.err
    assert result.out.startswith("Usage:") and "Commands:" in result.out
    assert result.err == ""


@pytest.mark.parametrize("path", GROUPS, ids=[" ".join(p) or "sawplan" for p in GROUPS])
def test_summaries_fit_80_columns(cli, monkeypatch, path):
    monkeypatch.setenv("COLUMNS", "80")
    text = cli(*path, "--help").out
    listed = text.split("\nCommands:\n", 1)[1]
    for line in listed.splitlines():
        assert len(line) <= 80 and not line.endswith("..."), f"cut short: {line!r}"


def test_a_closed_pipe_ends_quietly(tmp_path):
    env = {**os.environ, "SAWPLAN_HOME": str(tmp_path)}
    proc = subprocess.Popen(
        [sys.executable, "-m", "sawplan", "materials"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env=env,
    )
    proc.stdout.close()  # the reader is gone before the first line is written
    err = proc.stderr.read()
    proc.stderr.close()
    assert proc.wait(timeout=60) == 0
    assert err == b""


@pytest.mark.parametrize(
    "args",
    [
        pytest.param(
            ["log", "cut", "304", "round", "60mm", "--cuts", "12", "--time", "30min"],
            id="log cut with no blade fitted",
        ),  # fmt: skip
        pytest.param(["blade", "retire", "B-1", "--failure", "dull"], id="retire an unknown blade"),
        pytest.param(["log", "event", "B-1", "teeth-lost"], id="event on an unknown blade"),
        pytest.param(["blade", "fit", "B-1", "--saw", "bay 2"], id="fit an unknown blade"),
    ],
)
def test_a_failing_write_leaves_no_log(cli, tmp_path, monkeypatch, args):
    home = tmp_path / "fresh" / "home"
    monkeypatch.setenv("SAWPLAN_HOME", str(home))
    result = cli(*args)
    assert result.code != 0
    assert not home.exists() or list(home.rglob("*")) == []


def test_a_failing_write_keeps_an_existing_log(cli, tmp_path):
    db = tmp_path / "log.sqlite"
    assert cli("saw", "add", "bay 2", "--like", "mid-production", "--db", str(db)).code == 0
    assert cli("blade", "retire", "B-1", "--failure", "dull", "--db", str(db)).code == 4
    assert "bay 2" in cli("saw", "list", "--db", str(db)).out
