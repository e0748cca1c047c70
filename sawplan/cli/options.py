"""Command-line options built from the one field table (``sawplan.fields``).

Every command declares its options through :func:`opt` (or the shared
aliases below), so a concept has one option name, one short flag and one
placeholder everywhere.  Old spellings still work for one release: ``RENAMED``
lists them per command, :func:`modernise` rewrites them before parsing and
says so in one line on stderr.  :class:`Command` prints help with our
placeholders (``MATERIAL SECTION...``), never Python types.
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from pathlib import Path
from typing import Annotated, Any

import typer
from typer.core import TyperCommand

from sawplan import fields
from sawplan.units import UnitSystem

# Old spellings per command (the path after ``sawplan``) -> the spelling of this release.
# They are rewritten with a note on stderr; the next release drops them.
_CHART_SIZE = {"--width": "--chart-width", "--height": "--chart-height"}
RENAMED: dict[str, dict[str, str]] = {
    "cut": {"--blade-tpi": "--pitch", "-t": "--pitch"},
    "blade add": {
        "--material": "--blade-material",
        "--width": "--blade-width",
        "-w": "--blade-width",
        "--thickness": "--blade-thickness",
        "-t": "--blade-thickness",
        "--length": "--blade-length",
        "-l": "--blade-length",
        "--notes": "--note",
    },
    "blade retire": {"--cause": "--failure", "-c": "--failure"},
    "blade show": _CHART_SIZE,
    "saw add": {"--notes": "--note"},
    "log cut": {"--speed": "--band-speed", "-n": "--cuts"},
    "log event": {"--mode": "--failure", "-m": "--failure"},
    "forecast": {"--job": "--job-file"},
    "plan": {"--csv": "--csv-dir"},
    "chart wear": _CHART_SIZE,
    "chart weibull": _CHART_SIZE,
    "chart modes": {"--width": "--chart-width"},
    "chart cost": {"--width": "--chart-width"},
}


def _range_callback(f: fields.Field) -> Callable[[Any], Any]:
    def check(value: Any) -> Any:
        if value is not None and isinstance(value, int | float):
            fields.check(f, value)
        return value

    return check


def _text_callback(f: fields.Field, then: Callable[[Any], Any] | None) -> Callable[[Any], Any]:
    """Free text checked as it is parsed (white space collapsed, no control characters, not
    too long), then handed to the option's own callback, if any."""

    def check(value: Any) -> Any:
        if isinstance(value, str):
            value = fields.check_text(f, value)
        elif isinstance(value, list | tuple):
            value = [fields.check_text(f, v) if isinstance(v, str) else v for v in value]
        return value if then is None else then(value)

    return check


def opt(key: str, *, help: str | None = None, callback: Callable | None = None, **extra) -> Any:
    """The typer option of field ``key``: its name, short flag, placeholder and help.

    A number typed as int/float is checked against the field's range as it is
    parsed, and so is free text (``fields.check_text``); text quantities are read
    with ``fields.parse`` in the command.
    """
    f = fields.field(key)
    if f.option is None:
        raise ValueError(f"field {key!r} has no command-line option")
    decls = [f"{f.option}/{f.negative}" if f.negative else f.option]
    if f.short:
        decls.append(f.short)
    if callback is None and (f.low is not None or f.high is not None) and not f.dimension:
        callback = _range_callback(f)
    elif f.is_text and not f.choices:
        callback = _text_callback(f, callback)
    return typer.Option(
        *decls,
        help=help or f.help,
        metavar=f.placeholder or None,
        show_default=extra.pop("show_default", False),
        callback=callback,
        **extra,
    )


def arg(key: str, *, help: str | None = None, **extra) -> Any:
    """The typer argument of field ``key`` with its placeholder (``MATERIAL``)."""
    f = fields.field(key)
    return typer.Argument(
        help=help or f.help,
        metavar=f.placeholder.removesuffix("...") or key.upper(),
        show_default=False,
        **extra,
    )


# --- options shared by many commands --------------------------------------------------------


def _configured(key: str, convert: Callable[[str], Any] = str) -> Callable[[Any], Any]:
    """A callback giving an option left out its default: environment, config file, built-in."""

    def resolve(value: Any) -> Any:
        if value is not None:
            return value
        from sawplan import config

        found = config.get(key)
        return None if found is None else convert(found)

    return resolve


def _db(value: str | None) -> str | None:
    """The blade log named, else the configured one; a log made by a failing command goes."""
    from sawplan.cli.boundary import forget_new_log_on_failure

    if value is not None and not value.strip():
        from sawplan.errors import UsageError

        raise UsageError("expected a file name or database URL, got nothing", field="blade log")
    resolved = _configured("db")(value)
    forget_new_log_on_failure(resolved)
    return resolved


def saw_opt(help: str, fallback: str | None = None, *, use_config: bool = True) -> Any:
    """``--saw NAME``, defaulting to the configured saw (``use_config``), else ``fallback``."""
    configured = _configured("saw") if use_config else (lambda value: value)

    def resolve(value: str | None) -> str | None:
        if value is not None and not value.strip():
            from sawplan.errors import UsageError

            raise UsageError("expected a saw name, got nothing", field="saw",
                             hint="see `sawplan saw list`")  # fmt: skip
        return configured(value) or fallback

    return opt("saw", help=help, callback=resolve)


UnitsOpt = Annotated[UnitSystem, opt("units", callback=_configured("units", UnitSystem))]
FractionsOpt = Annotated[bool, opt("fractions")]
JsonOpt = Annotated[bool, opt("json")]
CsvOpt = Annotated[bool, opt("csv")]
DbOpt = Annotated[str | None, opt("db", callback=_db)]
MaterialsFileOpt = Annotated[
    Path | None,
    opt("materials_file", exists=True, dir_okay=False, callback=_configured("materials_file")),
]
SawsFileOpt = Annotated[
    Path | None, opt("saws_file", exists=True, dir_okay=False, callback=_configured("saws_file"))
]
OrientOpt = Annotated[str | None, opt("orient")]
BundleOpt = Annotated[str | None, opt("bundle")]
NestOpt = Annotated[bool, opt("nest")]
DateOpt = Annotated[str | None, opt("date")]
NoteOpt = Annotated[str | None, opt("note")]
ForceOpt = Annotated[bool, opt("force")]
ConfidenceOpt = Annotated[float, opt("confidence", show_default=True)]
ChartWidthOpt = Annotated[int, opt("chart_width", show_default=True)]
ChartHeightOpt = Annotated[int, opt("chart_height", show_default=True)]
# the blades a blade life comes from (forecast, plan): ``store.blade_groups.blade_choice``
LotChoiceOpt = Annotated[
    list[str] | None, opt("lot", help="Take blade life only from this lot (repeat for more).")
]
WithoutLotOpt = Annotated[list[str] | None, opt("without_lot")]
SupplierChoiceOpt = Annotated[
    list[str] | None,
    opt("supplier", help="Take blade life only from this supplier's blades (repeat for more)."),
]


def _material_words(ctx: typer.Context, words: list[str]) -> list[str]:
    """Give the material the words a shell split off it: ``17-4 PH round 60mm``, ``AISI 304 …``.

    The material argument comes first; while the section's first word is not a
    shape and the material with it names a known material, it belongs to the name.
    """
    material = ctx.params.get("material")
    if not material or not words:
        return words
    from sawplan.materials import load_catalogue
    from sawplan.sections import canonical_shape

    user_file = ctx.params.get("materials_file") or _configured("materials_file")(None)
    catalogue = load_catalogue(user_file)
    taken = 0
    for n in (1, 2):
        head = words[:n]
        if len(words) <= n or canonical_shape(head[-1]) is not None:
            break
        if " ".join([material, *head]) in catalogue:
            taken = n
    if taken:
        ctx.params["material"] = " ".join([material, *words[:taken]])
    return words[taken:]


MaterialArg = Annotated[str, arg("material")]
SectionArg = Annotated[list[str], arg("section", callback=_material_words)]
TagArg = Annotated[str, arg("tag")]


# --- old spellings --------------------------------------------------------------------------


def modernise(path: str, args: list[str], takes_value: set[str]) -> list[str]:
    """``args`` of command ``path`` with this release's spellings, each old one noted once.

    ``takes_value`` holds the command's options that take a value, so a value that
    happens to look like an old option (``--note -t``) is left alone.
    """
    renamed = RENAMED.get(path)
    if not renamed:
        return args
    out: list[str] = []
    told: set[str] = set()
    skip_next = False
    for i, token in enumerate(args):
        if skip_next or token == "--":
            skip_next = False
            if token == "--":
                out += args[i:]
                break
            out.append(token)
            continue
        new, rest = _renamed(token, renamed)
        if new is None:
            out.append(token)
            skip_next = token in takes_value
            continue
        old = token[: len(token) - len(rest)] if rest else token
        if old.endswith("="):
            old = old[:-1]
        if old not in told:
            told.add(old)
            print(
                f"note: {old} is now {new}; the old spelling goes in the next release",
                file=sys.stderr,
            )
        if rest:
            out += [new, rest]
        else:
            out.append(new)
            skip_next = new in takes_value
    return out


def _renamed(token: str, renamed: dict[str, str]) -> tuple[str | None, str]:
    """(new spelling, attached value) when ``token`` is an old spelling, else (None, "")."""
    if token in renamed:
        return renamed[token], ""
    if token.startswith("--") and "=" in token:
        name, value = token.split("=", 1)
        if name in renamed:
            return renamed[name], value
        return None, ""
    if len(token) > 2 and token[0] == "-" and token[1] != "-" and token[:2] in renamed:
        return renamed[token[:2]], token[2:]
    return None, ""


# --- help that shows our placeholders -------------------------------------------------------


class Command(TyperCommand):
    """A command whose help names arguments by placeholder: ``MATERIAL SECTION...``."""

    def collect_usage_pieces(self, ctx: Any) -> list[str]:
        pieces = [self.options_metavar] if self.options_metavar else []
        for param in self.get_params(ctx):
            if param.param_type_name == "argument":
                pieces.append(_arg_name(param) if param.required else f"[{_arg_name(param)}]")
        return pieces

    def format_options(self, ctx: Any, formatter: Any) -> None:
        args, opts = [], []
        for param in self.get_params(ctx):
            if param.param_type_name == "argument":
                args.append((_arg_name(param), param.help or ""))
            else:
                record = param.get_help_record(ctx)
                if record is not None:
                    opts.append(record)
        if args:
            with formatter.section("Arguments"):
                formatter.write_dl(args)
        if opts:
            with formatter.section("Options"):
                formatter.write_dl(opts)


def _arg_name(param: Any) -> str:
    name = param.metavar or param.name.upper()
    return f"{name}..." if param.nargs != 1 else name


def command(app: typer.Typer, name: str, help: str) -> Callable:
    """``app.command`` with sawplan's help layout."""
    return app.command(name, help=help, cls=Command)


def group(app: typer.Typer, name: str, help: str) -> typer.Typer:
    """A group of commands (``sawplan blade ...``); typed alone it prints its help."""
    sub = typer.Typer(help=help, no_args_is_help=True, rich_markup_mode=None, add_completion=False)
    app.add_typer(sub, name=name, help=help)
    return sub
