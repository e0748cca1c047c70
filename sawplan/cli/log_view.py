"""How the cut log is shown: an entry as written (text or JSON) and the list of entries."""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any

from sawplan.display import Display, as_display, fmt_number, section_text
from sawplan.units import UnitSystem


@dataclass(frozen=True)
class LoggedCut:
    """The entry as written, for ``--json``."""

    id: int
    blade: str
    saw: str | None
    blade_area_mm2: float
    notes: tuple[str, ...]
    entry: Any = field(metadata={"json": False})

    def json_extra(self) -> dict[str, Any]:
        body = dataclasses.asdict(self.entry)
        body.pop("blade_id")
        body.pop("saw_id")
        return body


def render_logged(entry, sec, mat, blade, units: UnitSystem | Display, notes: list[str]) -> str:

    d = as_display(units)
    what = _cuts(entry.count)
    lines = [
        f"logged {what} of {mat.key} {d.section(sec)} on blade {blade.tag}"
        + (f" ({blade.saw})" if blade.saw else ""),
        f"  area {d.fmt('area', entry.area_mm2)}; blade total {d.fmt('area', blade.area_mm2)} "
        f"in {_cuts(blade.cuts)}",
    ]
    if entry.time_min is not None or entry.predicted_time_min is not None:
        measured = d.fmt("time", entry.time_min)
        model = d.fmt("time", entry.predicted_time_min)
        lines.append(f"  time measured {measured}, model {model}")
    lines += [f"  note: {d.text(n)}" for n in notes]
    from sawplan.render import terminal_text

    return terminal_text("\n".join(lines), lines=True)  # tags and saw names are stored text


def _cuts(n: int) -> str:
    return "1 cut" if n == 1 else f"{n:,} cuts"


def cut_table(entries: list[dict[str, Any]], d: Display) -> tuple[list[str], list[list[Any]]]:
    """The cut log: one row per entry, newest first, area in the display unit."""
    headers = ["id", "date", "blade", "saw", "material", "section", "cuts", f"area {d.label('area')}",
               "min", "model min", "job", "heat"]  # fmt: skip
    rows = [
        [r["id"], r["cut_on"], r["blade"], r["saw"] or "", r["material"],
         section_text(d, r["section"]), r["count"], d.num("area", r["area_mm2"]),
         "" if r["time_min"] is None else fmt_number(r["time_min"]),
         "" if r["predicted_time_min"] is None else fmt_number(r["predicted_time_min"]),
         r["job"] or "", r["heat"] or ""]
        for r in entries
    ]  # fmt: skip
    return headers, rows
