"""Every command has help with an example, and the help itself never fails."""

from __future__ import annotations

import pytest
import typer

from sawplan.cli.app import app


def _walk(command, path=()):
    yield path, command
    if isinstance(getattr(command, "commands", None), dict):  # a group of sub-commands
        for name, sub in command.commands.items():
            yield from _walk(sub, (*path, name))


def _all_commands():
    root = typer.main.get_command(app)
    return [(" ".join(path) or "sawplan", cmd, path) for path, cmd in _walk(root)]


@pytest.mark.parametrize(
    ("name", "command", "path"), _all_commands(), ids=lambda v: v if isinstance(v, str) else ""
)
def test_every_command_has_help_with_an_example(cli, name, command, path):
    result = cli(*path, "--help")
    assert result.code == 0, result.err
    assert "Usage:" in result.out
    assert "Example" in result.out, f"`sawplan {name} --help` shows no example"
    assert "sawplan " in result.out.split("Example", 1)[1], (
        f"`{name}` example is not a command line"
    )
    assert "\\b" not in result.out, f"`sawplan {name} --help` shows click's no-wrap mark"
    examples = result.out.split("Example", 1)[1].split("\n\n", 1)[0]
    lines = [line for line in examples.splitlines()[1:] if line.strip()]
    assert all(line.strip().startswith("sawplan ") for line in lines), (
        f"`sawplan {name} --help`: its examples are re-wrapped"
    )


def test_no_arguments_shows_help(cli):
    result = cli()
    assert "Usage:" in result.out + result.err


def test_unknown_command_is_one_line(cli):
    result = cli("weight")
    assert result.code == 2
    assert result.err.count("\n") == 1
    assert "Traceback" not in result.err
