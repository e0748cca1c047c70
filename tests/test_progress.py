"""Long work shows a progress line on a terminal's stderr, and nothing anywhere else."""

from __future__ import annotations

import io
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from sawplan.cli.progress import progress

JOB = Path(__file__).parent / "data" / "plan_small.toml"


class FakeTerminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_a_terminal_sees_what_is_being_done():
    stream = FakeTerminal()
    with progress("planning 3 sections", stream=stream) as say:
        say("planning 3 sections: 4140 round 60mm")
    assert "planning 3 sections" in stream.getvalue()


@pytest.mark.parametrize(
    ("stream", "quiet"),
    [
        pytest.param(io.StringIO(), False, id="not a terminal"),
        pytest.param(FakeTerminal(), True, id="a terminal under --json"),
    ],
)
def test_nothing_is_shown_off_a_terminal_or_under_json(stream, quiet):
    with progress("planning", stream=stream, quiet=quiet) as say:
        say("still planning")
    assert stream.getvalue() == ""


def test_plan_piped_or_as_json_prints_no_progress(cli, tmp_path):
    shutil.copy(JOB, tmp_path / "job.toml")
    for extra in ([], ["--json"]):
        result = cli("plan", str(tmp_path / "job.toml"), *extra)
        assert result.code == 0 and result.err == "", result.err


@pytest.mark.skipif(not hasattr(os, "openpty"), reason="needs a pseudo-terminal")
def test_plan_on_a_terminal_shows_a_progress_line(tmp_path):
    shutil.copy(JOB, tmp_path / "job.toml")
    main, side = os.openpty()
    env = {**os.environ, "SAWPLAN_HOME": str(tmp_path), "TERM": "xterm"}
    env.pop("SAWPLAN_NO_PROGRESS", None)
    proc = subprocess.run(
        [sys.executable, "-m", "sawplan", "plan", str(tmp_path / "job.toml")],
        stdout=subprocess.DEVNULL,
        stderr=side,
        env=env,
        timeout=120,
        check=False,
    )
    os.close(side)
    seen = b""
    while True:
        try:
            chunk = os.read(main, 65536)
        except OSError:  # the terminal is closed and drained
            break
        if not chunk:
            break
        seen += chunk
    os.close(main)
    assert proc.returncode == 0
    assert b"planning 1 section on mid-production" in seen
