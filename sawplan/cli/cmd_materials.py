"""``sawplan materials``: the catalogue, a group of it, or one material with sources."""

from __future__ import annotations

from typing import Annotated

import typer

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
from sawplan.display import Display, as_display
from sawplan.units import UnitSystem

HELP = """List the materials sawplan knows, or show one with its sources.

\b
Examples:
  sawplan materials
  sawplan materials --group austenitic-stainless
  sawplan materials 17-4PH
  sawplan materials --materials-file shop-materials.csv --csv
"""


def materials_command(
    key: Annotated[str | None, arg("material", help="Show this one material in full.")] = None,
    group: Annotated[str | None, opt("group")] = None,
    units: UnitsOpt = UnitSystem.METRIC,
    fractions: FractionsOpt = False,
    json_out: JsonOpt = False,
    csv_out: CsvOpt = False,
    materials_file: MaterialsFileOpt = None,
) -> None:
    from sawplan.errors import NotFoundError
    from sawplan.materials import load_catalogue
    from sawplan.render import to_csv, to_json

    cat = load_catalogue(materials_file)
    if key is not None:
        mat = cat.get(key)
        print(
            to_json(mat, kind="material")
            if json_out
            else render_one(mat, Display(units, fractions))
        )
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


def list_rows(mats, units: UnitSystem | Display):
    from sawplan.display import fmt_number

    d = as_display(units)
    headers = [
        "key",
        "designation",
        "UNS",
        "group",
        f"density {d.label('density')}",
        "HB",
        f"band speed {d.label('speed')}",
    ]
    rows = [
        [
            m.key,
            m.designation,
            m.uns,
            m.group,
            fmt_number(d.value("density", m.density_kg_m3), 3),
            f"{m.hardness_hb:.0f}",
            fmt_number(d.value("speed", m.band_speed_m_min), 2),
        ]
        for m in mats
    ]
    return headers, rows


# The widths of cut the catalogue's speeds and rates are stated for (data/materials.csv).
BAND_SPEED_CUT_MM = 101.6  # 4 in
CUTTING_RATE_CUT_MM = 100.0


def render_one(m, units: UnitSystem | Display) -> str:
    from sawplan.render import key_values

    d = as_display(units)
    pairs = [
        ("key", m.key),
        ("designation", m.designation),
        ("UNS", m.uns),
        ("standard", m.standard),
        ("group", m.group),
        ("density", f"{d.fmt('density', m.density_kg_m3, 4)}   [{m.density_source}]"),
        ("hardness", f"{m.hardness_hb:.0f} HB   [{m.hardness_source}]"),
        (
            f"band speed (bi-metal, coolant, {d.length(BAND_SPEED_CUT_MM)} cut)",
            f"{d.fmt('speed', m.band_speed_m_min)}   [{m.band_speed_source}]",
        ),
        (
            "unit cutting energy",
            f"{d.fmt('energy_density', m.unit_energy_j_mm3)}   [{m.unit_energy_source}]",
        ),
        (
            f"typical cutting rate ({d.length(CUTTING_RATE_CUT_MM)} cut)",
            f"{d.fmt('rate', m.cutting_rate_cm2_min * 100)}   [{m.cutting_rate_source}]",
        ),
        ("work-hardens", "yes" if m.work_hardens else "no"),
    ]
    if getattr(m, "notes", ""):
        pairs.append(("notes", m.notes))
    return key_values(pairs)


def register(app: typer.Typer) -> None:
    command(app, "materials", HELP)(materials_command)
