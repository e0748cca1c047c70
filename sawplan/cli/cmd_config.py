"""``sawplan config show|set|unset``: defaults a shop sets once."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.options import JsonOpt, arg, command, group

HELP = """Defaults a shop sets once: units, saw, blade log, currency.

The command line beats the environment (SAWPLAN_UNITS, SAWPLAN_SAW, SAWPLAN_DB,
SAWPLAN_CURRENCY, SAWPLAN_LOG_MODE, SAWPLAN_MATERIALS, SAWPLAN_SAWS), which
beats the config file, which beats sawplan's own default. The file is
SAWPLAN_CONFIG, or config.toml in the user's config folder.

\b
Examples:
  sawplan config show
  sawplan config set units us
  sawplan config set saw "bay 2"
"""

SHOW_HELP = """Show each setting, its value and where it comes from.

\b
Examples:
  sawplan config show
  sawplan config show --json
"""

SET_HELP = """Set a default in the config file (checked as its option is).

KEY is one of units, saw, db, currency, log_mode, materials_file, saws_file.

\b
Examples:
  sawplan config set units us
  sawplan config set currency EUR
  sawplan config set log_mode group
"""

UNSET_HELP = """Remove a default from the config file; the built-in one applies.

\b
Examples:
  sawplan config unset units
"""

KeyArg = Annotated[str, arg("setting")]


def config_show_command(json_out: JsonOpt = False) -> None:
    from sawplan import config
    from sawplan.render import table, to_json

    values = config.show()
    if json_out:
        print(to_json({"file": str(config.config_path()), "settings": values}, kind="config"))
        return
    rows = [[v.key, "" if v.value is None else v.value, v.source] for v in values]
    print(table(["setting", "value", "from"], rows, align="lll"))
    print(f"\nconfig file: {config.config_path()}")


def config_set_command(
    key: KeyArg,
    value: Annotated[str, arg("setting_value")],
) -> None:
    from sawplan import config

    path = config.set_value(key, value)
    now = config.value(key)
    print(f"{now.key} = {now.value} (in {path})")
    if not now.source.endswith(str(path)):
        print(f"note: {now.source} overrides it while it is set")


def config_unset_command(key: KeyArg) -> None:
    from sawplan import config

    path = config.unset(key)
    now = config.value(key)
    shown = "not set" if now.value is None else f"{now.value} ({now.source})"
    print(f"removed {now.key} from {path}; now {shown}")


def register(app: typer.Typer) -> None:
    sub = group(app, "config", HELP)
    command(sub, "show", SHOW_HELP)(config_show_command)
    command(sub, "set", SET_HELP)(config_set_command)
    command(sub, "unset", UNSET_HELP)(config_unset_command)
