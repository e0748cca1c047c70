"""``sawplan materials``: the catalogue, a group of it, or one material with sources."""

from __future__ import annotations

from typing import Annotated

import typer

from sawplan.cli.materials_view import list_rows, render_one
from sawplan.cli.options import (
    CsvOpt,
    FractionsOpt,
    JsonOpt,
    MaterialsFileOpt,
    UnitsOpt,
    arg,
    command,
    opt,
)
from sawplan.display import Display

HELP = """List the materials sawplan knows, or show one with its sources.

\b
Examples:
  sawplan materials
  sawplan materials --group austenitic-stainless
  sawplan materials 17-4PH
  sawplan materials 1.4301
  sawplan materials --materials-file shop-materials.csv --csv
"""


def materials_command(
    key: Annotated[
        list[str] | None,
        arg("material", help="Show this one material in full: a key, UNS, EN or trade name."),
    ] = None,
    group: Annotated[str | None, opt("group")] = None,
    units: UnitsOpt = None,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    materials_file: MaterialsFileOpt = None,
) -> None:
    from sawplan.errors import NotFoundError
    from sawplan.materials import load_catalogue
    from sawplan.render import to_csv, to_json

    cat = load_catalogue(materials_file)
    if key:
        mat, alias = cat.resolve(" ".join(key))
        if json_out:
            print(to_json(mat, kind="material"))
            return
        if alias is not None:
            print(alias.note() + "\n")
        print(render_one(mat, Display(units, fractions)))
        also = [a.alias for a in cat.aliases_of(mat.key)]
        if also:
            print("\nalso written: " + ", ".join(also))
        return
    if group is not None:
        if group not in cat.groups():
            import difflib

            close = difflib.get_close_matches(group, cat.groups(), n=1)
            hint = f"did you mean {close[0]}?" if close else "groups: " + ", ".join(cat.groups())
            raise NotFoundError(f"no group {group!r}", field="group", hint=hint)
        mats = cat.in_group(group)
    else:
        mats = list(cat)
    headers, rows = list_rows(mats, Display(units, fractions))
    if json_out:
        print(to_json(mats, kind="materials"))
    elif csv_out:
        print(to_csv(headers, rows), end="")
    else:
        from sawplan.render import table

        print(table(headers, rows))
        print("\n`sawplan materials KEY` shows one material with the source of each value.")


# The widths of cut the catalogue's speeds and rates are stated for (data/materials.csv).


def register(app: typer.Typer) -> None:
    command(app, "materials", HELP)(materials_command)
