"""How a logged cut is shown: the entry as written, in text or JSON."""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any

from sawplan.cli.view import plain
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


def render_logged(entry, sec, mat, blade, units: UnitSystem, notes: list[str]) -> str:
    from sawplan.units import Display

    d = Display(units)
    what = _cuts(entry.count)
    lines = [
        f"logged {what} of {mat.key} {sec.label(units.value)} on blade {blade.tag}"
        + (f" ({blade.saw})" if blade.saw else ""),
        f"  area {d.fmt('area', entry.area_mm2, 4)}; blade total {d.fmt('area', blade.area_mm2, 4)} "
        f"in {_cuts(blade.cuts)}",
    ]
    if entry.time_min is not None or entry.predicted_time_min is not None:
        measured = "—" if entry.time_min is None else f"{plain(entry.time_min)} min"
        model = (
            "—" if entry.predicted_time_min is None else f"{plain(entry.predicted_time_min)} min"
        )
        lines.append(f"  time measured {measured}, model {model}")
    lines += [f"  note: {n}" for n in notes]
    return "\n".join(lines)


def _cuts(n: int) -> str:
    return "1 cut" if n == 1 else f"{n:,} cuts"


def cut_table(
    entries: list[dict[str, Any]], units: UnitSystem
) -> tuple[list[str], list[list[Any]]]:
    """The cut log: one row per entry, newest first, area in the display unit."""
    from sawplan.units import Display

    d = Display(units)
    headers = ["id", "date", "blade", "saw", "material", "section", "cuts", f"area {d.label('area')}",
               "min", "model min", "job", "heat"]  # fmt: skip
    rows = [
        [r["id"], r["cut_on"], r["blade"], r["saw"] or "", r["material"], r["section"], r["count"],
         plain(d.value("area", r["area_mm2"])), "" if r["time_min"] is None else plain(r["time_min"]),
         "" if r["predicted_time_min"] is None else plain(r["predicted_time_min"]), r["job"] or "", r["heat"] or ""]
        for r in entries
    ]  # fmt: skip
    return headers, rows
