"""The ``sawplan`` command: a thin layer that parses, calls the core, renders.

Each command lives in its own module under ``sawplan.cli`` and exposes
``register(app)``; this module only assembles them and runs the error boundary.
"""

from __future__ import annotations

import importlib
import sys
from typing import Any

import typer

from sawplan import __version__

HELP = """Plan band-saw work on metal stock.

Choose the blade and settings, estimate cut time and weight, lay out cut lists
from the stock on hand, and keep a log of what each blade really cut.

\b
Examples:
  sawplan cut A36 ibeam 200mm 100mm 5.6mm 8.5mm
  sawplan weigh 6061-T6 tube 48.3mm 3.2mm --length 6m
  sawplan plan job.toml --sheet job.html
  sawplan life

Estimates only: the saw maker's manual, the blade maker's data, shop rules and
local regulations govern.
"""

# command word -> the module that registers it; --help lists them in this order
COMMANDS: dict[str, str] = {
    "plan": "sawplan.cli.cmd_plan",
    "cut": "sawplan.cli.cmd_cut",
    "weigh": "sawplan.cli.cmd_weigh",
    "materials": "sawplan.cli.cmd_materials",
    "saw": "sawplan.cli.cmd_saw",
    "blade": "sawplan.cli.cmd_blade",
    "log": "sawplan.cli.cmd_log",
    "life": "sawplan.cli.cmd_life",
    "forecast": "sawplan.cli.cmd_life",
    "chart": "sawplan.cli.cmd_life",
    "export": "sawplan.cli.cmd_logdata",
    "import": "sawplan.cli.cmd_logdata",
    "backup": "sawplan.cli.cmd_logdata",
    "check": "sawplan.cli.cmd_logdata",
    "restore": "sawplan.cli.cmd_logdata",
    "db": "sawplan.cli.cmd_db",
    "config": "sawplan.cli.cmd_config",
    "serve": "sawplan.cli.cmd_serve",
}
COMMAND_MODULES = tuple(dict.fromkeys(COMMANDS.values()))


def _version(value: bool) -> None:
    if value:
        print(f"sawplan {__version__}")
        raise typer.Exit()


def make_app(modules: tuple[str, ...] = COMMAND_MODULES) -> typer.Typer:
    """The Typer app with the given command modules registered."""
    from sawplan.cli.coercion import install

    install()  # plain option values converted without importing pydantic
    new = typer.Typer(
        name="sawplan",
        help=HELP,
        no_args_is_help=True,
        add_completion=False,
        rich_markup_mode=None,
        pretty_exceptions_enable=False,
        context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100},
    )

    @new.callback()
    def _root(
        version: bool = typer.Option(
            False, "--version", callback=_version, is_eager=True, help="Show the version and exit."
        ),
    ) -> None:
        """Plan band-saw work on metal stock."""

    for name in modules:
        importlib.import_module(name).register(new)
    return new


def _modules_for(args: list[str]) -> tuple[str, ...]:
    """Only the module of the command being run: start-up stays light."""
    word = next((a for a in args if not a.startswith("-")), None)
    if word in COMMANDS:
        return (COMMANDS[word],)
    return COMMAND_MODULES


def __getattr__(name: str) -> typer.Typer:
    """``app`` (every command registered) is built on first use, for tests and tools."""
    if name == "app":
        globals()["app"] = built = make_app()
        return built
    raise AttributeError(name)


def run(args: list[str]) -> int:
    """Run the CLI without the boundary (tests use this through ``main``).

    A group typed alone (``sawplan``, ``sawplan blade``) prints its help and
    succeeds; old option spellings are rewritten with a note (``options.RENAMED``).
    """
    from typer._click.exceptions import NoArgsIsHelpError

    command = typer.main.get_command(make_app(_modules_for(args)))
    try:
        return int(
            command.main(args=_modern(command, args), prog_name="sawplan", standalone_mode=False)
            or 0
        )
    except NoArgsIsHelpError as asked:
        print(asked.ctx.get_help())
        return 0
    except SystemExit as stop:  # click answers a closed pipe with exit 1; the boundary says 0
        from typer._click.utils import PacifyFlushWrapper

        if stop.code == 1 and isinstance(sys.stdout, PacifyFlushWrapper):
            raise BrokenPipeError(32, "the reader closed the pipe") from None
        raise


def _modern(root: Any, args: list[str]) -> list[str]:
    """``args`` with the old option spellings of the command they run rewritten."""
    from sawplan.cli.options import modernise

    node, path = root, []
    for word in args:
        sub = getattr(node, "commands", {}).get(word)
        if sub is None:
            break
        node, path = sub, [*path, word]
    if not path or getattr(node, "commands", None):
        return args
    takes_value = {
        name
        for param in node.params
        if param.param_type_name == "option" and not getattr(param, "is_flag", False)
        for name in param.opts
    }
    n = len(path)
    return args[:n] + modernise(" ".join(path), args[n:], takes_value)


def main(argv: list[str] | None = None) -> None:
    """Console-script entry point."""
    from sawplan.cli.boundary import quiet_stdout, run_guarded

    code = run_guarded(run, sys.argv[1:] if argv is None else argv)
    try:
        sys.stdout.flush()
    except BrokenPipeError:  # the reader stopped early (`| head -1`): that is fine
        quiet_stdout()
    raise SystemExit(code)


if __name__ == "__main__":  # pragma: no cover
    main()
