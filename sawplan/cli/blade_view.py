"""How blades are shown: the one-line description, the full history and the wear chart."""

from __future__ import annotations

from typing import Any

from sawplan.cli.view import fmt_q, plain
from sawplan.units import UnitSystem

_WELDED_TEXT = {"in-house": "welded in house", "bought": "bought welded"}


BLADE_CAUTION = (
    "Caution: fit and tension blades with the saw stopped and isolated, guards back on before "
    "running; break a new blade in at reduced feed. The saw maker's manual, the blade maker's "
    "data and shop rules govern."
)


def describe(blade: Any, units: UnitSystem) -> str:
    """``bi-metal M42, 27 × 0.9 mm, 3/4 TPI, 3,505 mm long``."""
    from sawplan.units import Display

    d = Display(units)
    size = (
        f"{plain(d.value('length', blade.width_mm))} × "
        f"{plain(d.value('length', blade.thickness_mm))} {d.label('length')}"
    )
    parts = [
        " ".join(p for p in (blade.blade_material, blade.grade) if p),
        size,
        f"{blade.pitch} TPI",
    ]
    if blade.length_mm:
        parts.append(f"{fmt_q(d, 'length', blade.length_mm, 4)} long")
    return ", ".join(parts)


def wear_rows_empty() -> tuple[list[str], list[list[Any]]]:
    from sawplan.charts import wear_rows
    from sawplan.life import wear_curve

    headers, _ = wear_rows(wear_curve([1.0], [1.0]))
    return headers, []


def wear_chart_text(history: Any, units: UnitSystem, width: int, height: int) -> str:
    import sys

    from sawplan.charts import wear_chart

    if history.wear is None:
        return (
            f"blade {history.blade.tag}: no timed cuts yet, so no wear curve (log cuts with --time)"
        )
    text = wear_chart(
        history.wear,
        title=f"blade {history.blade.tag}: cutting rate against area cut",
        units=units,
        width=width,
        height=height,
        colorless=not sys.stdout.isatty(),
        # a retired or removed blade's verdict is its life, not "still breaking in"
        verdict=history.wear_summary if history.blade.status in ("retired", "removed") else None,
    )
    return "\n".join([text, *history.wear_notes])


def render_history(h: Any, units: UnitSystem) -> str:
    from sawplan.config import money_suffix
    from sawplan.render import key_values, table
    from sawplan.units import Display

    d = Display(units)
    b = h.blade
    pairs = [
        ("blade", f"{b.tag}: {describe(b, units)}"),
        ("status", b.status + (f" on {b.saw}" if b.saw else "")),
    ]
    if b.status == "retired":
        pairs.append(("retired", f"{b.retired_on}: {b.retire_cause}"))
    made = [x for x in (b.supplier, f"lot {b.lot}" if b.lot else None, f"bought {b.bought_on}" if b.bought_on else None,
                        _WELDED_TEXT.get(b.welded or "")) if x]  # fmt: skip
    if made:
        pairs.append(("from", ", ".join(made)))
    if b.price is not None:
        pairs.append(("price", f"{b.price:g}{money_suffix()}"))
    pairs.append(
        ("cut", f"{d.fmt('area', b.area_mm2, 3)} in {b.cuts:,} cut{'' if b.cuts == 1 else 's'}")
    )
    if h.cost_per_m2 is not None:
        pairs.append(("cost so far", f"{plain(h.cost_per_m2)} per m² cut"))
    if b.notes:
        pairs.append(("notes", b.notes))
    out = [key_values(pairs)]
    if h.fittings:
        rows = [
            [f["saw"], f["fitted_on"], f["removed_on"] or "(on the saw)",
             "" if f["tension_mpa"] is None else fmt_q(d, "stress", f["tension_mpa"]),
             {None: "", 1: "yes", 0: "no"}[f["break_in"]] + (f" ({f['break_in_how']})" if f["break_in_how"] else "")]
            for f in h.fittings
        ]  # fmt: skip
        out.append(
            table(
                ["saw", "fitted", "removed", "tension", "break-in"],
                rows,
                align="lllll",
                title="\nfittings",
            )
        )
    if h.cuts:
        rows = [
            [c["cut_on"], c["material"], c["section"], c["count"], plain(d.value("area", c["area_mm2"])),
             "" if c["time_min"] is None else plain(c["time_min"]),
             "" if c["predicted_time_min"] is None else plain(c["predicted_time_min"]),
             c["saw"] or "", c["job"] or ""]
            for c in h.cuts[-h.shown_cuts:]
        ]  # fmt: skip
        title = (
            "\ncuts"
            if len(h.cuts) <= h.shown_cuts
            else f"\nlast {h.shown_cuts} of {len(h.cuts)} entries"
        )
        headers = [
            "date",
            "material",
            "section",
            "cuts",
            f"area {d.label('area')}",
            "min",
            "model min",
            "saw",
            "job",
        ]
        out.append(table(headers, rows, align="lllrrrrll", title=title))
    if h.events:
        rows = [[e["happened_on"], e["kind"], e["mode"] or "", e["teeth"] or "", e["location"] or "", e["note"] or ""]
                for e in h.events]  # fmt: skip
        out.append(
            table(
                ["date", "event", "mode", "teeth", "where", "note"],
                rows,
                align="llllll",
                title="\nevents",
            )
        )
    out.append("\nwear: " + h.wear_summary)
    out.extend(h.wear_notes)
    if h.wear is not None:
        out.append(h.wear.caution)
    return "\n".join(out)


def blade_table(blades: list[Any], units: UnitSystem) -> tuple[list[str], list[list[Any]]]:
    """The blade list: one row per blade, area in the display unit, price in the shop's currency."""
    from sawplan.config import money_suffix
    from sawplan.units import Display

    d = Display(units)
    headers = [
        "tag",
        "type",
        "status",
        "saw",
        "cuts",
        f"area {d.label('area')}",
        f"price{money_suffix()}",
        "retired",
    ]
    rows = [
        [
            b.tag,
            b.blade_type,
            b.status,
            b.saw or "",
            b.cuts,
            plain(d.value("area", b.area_mm2)),
            "" if b.price is None else f"{b.price:g}",
            " ".join(x for x in (b.retired_on, b.retire_cause) if x),
        ]
        for b in blades
    ]
    return headers, rows
