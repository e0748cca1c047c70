"""Shared fixtures: a CLI runner that goes through the real error boundary,
and an environment that never touches the user's real files."""

from __future__ import annotations

import os
from dataclasses import dataclass

import pytest
from hypothesis import settings

# CI runs the same examples every time (a clean clone has no example database),
# so a landing never hinges on a lucky draw; locally hypothesis explores freely.
settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")

os.environ.setdefault("TYPER_USE_RICH", "0")
os.environ.setdefault("_TYPER_FORCE_DISABLE_TERMINAL", "1")
os.environ["COLUMNS"] = "100"


@pytest.fixture(autouse=True)
def _isolated_home(tmp_path_factory, monkeypatch):
    home = tmp_path_factory.mktemp("home")
    monkeypatch.setenv("SAWPLAN_HOME", str(home))
    for var in (
        "SAWPLAN_DB",
        "SAWPLAN_MATERIALS",
        "SAWPLAN_SAWS",
        "SAWPLAN_DEBUG",
        "SAWPLAN_CONFIG",
        "SAWPLAN_UNITS",
        "SAWPLAN_SAW",
        "SAWPLAN_CURRENCY",
        "SAWPLAN_LOG_MODE",
    ):
        monkeypatch.delenv(var, raising=False)
    yield


@dataclass
class CliResult:
    code: int
    out: str
    err: str


@pytest.fixture
def cli(capsys):
    """Run ``sawplan ARGS`` in-process through the error boundary."""
    from sawplan.cli.app import run
    from sawplan.cli.boundary import run_guarded

    def invoke(*args: str) -> CliResult:
        capsys.readouterr()
        code = run_guarded(run, list(args))
        captured = capsys.readouterr()
        return CliResult(code, captured.out, captured.err)

    return invoke


@pytest.fixture(scope="session")
def demo_tree(tmp_path_factory):
    """A copy of demo/ (saws, jobs) with its blade log built once per session."""
    import importlib.util
    import shutil
    import sys
    from pathlib import Path

    repo = Path(__file__).resolve().parent.parent
    root = tmp_path_factory.mktemp("demo-tree")
    shutil.copytree(repo / "demo" / "jobs", root / "demo" / "jobs")
    shutil.copy2(repo / "demo" / "saws.toml", root / "demo" / "saws.toml")
    spec = importlib.util.spec_from_file_location(
        "demo_make_history", repo / "demo" / "make_history.py"
    )
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    module.build(root / "demo" / "out" / "demo-log.sqlite")
    return root


# --- the blade log on both engines ------------------------------------------------------


@pytest.fixture(scope="session")
def pg_database():
    """The URL of a PostgreSQL database made for this test run (see tests/pg_server.py)."""
    import pg_server

    try:
        with pg_server.server() as admin, pg_server.scratch_database(admin) as url:
            yield url
    except RuntimeError as err:
        if "no postgresql binaries" in str(err).lower():
            pytest.skip(str(err))
        raise


@pytest.fixture(
    params=[
        pytest.param("sqlite", id="sqlite"),
        pytest.param("postgresql", id="postgresql"),
    ]
)
def log_db(request, tmp_path):
    """``--db`` of a new, empty blade log: a file, then a PostgreSQL database (its own schema)."""
    if request.param == "sqlite":
        yield str(tmp_path / "blade-log.sqlite")
        return
    import pg_server

    with pg_server.scratch_schema(request.getfixturevalue("pg_database")) as url:
        yield url


@pytest.fixture
def pg_log(request):
    """``--db`` of a new, empty blade log on PostgreSQL only."""
    import pg_server

    with pg_server.scratch_schema(request.getfixturevalue("pg_database")) as url:
        yield url
