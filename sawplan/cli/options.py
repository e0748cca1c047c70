"""Options shared by several commands, declared once."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from sawplan.units import UnitSystem

UnitsOpt = Annotated[
    UnitSystem,
    typer.Option(
        "--units", "-u", help="Units to show: us (in, lb, ft/min) or metric (mm, kg, m/min)."
    ),
]
JsonOpt = Annotated[bool, typer.Option("--json", help="Print JSON (keys carry their unit).")]
CsvOpt = Annotated[bool, typer.Option("--csv", help="Print CSV instead of a table.")]
DbOpt = Annotated[
    str | None,
    typer.Option(
        "--db",
        metavar="PATH|URL",
        help="Blade log: a file, or a postgresql:// URL "
        "(default: per-user data folder; env SAWPLAN_DB).",
        show_default=False,
    ),
]
MaterialsFileOpt = Annotated[
    Path | None,
    typer.Option(
        "--materials-file",
        help="Your own materials CSV, added to the catalogue (env SAWPLAN_MATERIALS).",
        show_default=False,
        exists=True,
        dir_okay=False,
    ),
]
OrientOpt = Annotated[
    str | None,
    typer.Option(
        "--orient",
        "-o",
        help="How the work lies in the vise, e.g. flat, edge, corner.",
        show_default=False,
    ),
]
BundleOpt = Annotated[
    str | None,
    typer.Option(
        "--bundle", "-b", help="Cut a bundle ROWSxCOLS at once, e.g. 3x2.", show_default=False
    ),
]
NestOpt = Annotated[
    bool, typer.Option("--nest", help="Rounds in a bundle nest into the row below.")
]
