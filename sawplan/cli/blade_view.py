"""How blades are shown: the one-line description, the blade list, the full history and the wear chart."""

from __future__ import annotations

from typing import Any

from sawplan.display import Display, as_display, fmt_money, fmt_number, section_text
from sawplan.units import UnitSystem

_WELDED_TEXT = {"in-house": "welded in house", "bought": "bought welded"}


BLADE_CAUTION = (
    "Caution: fit and tension blades with the saw stopped and isolated, guards back on before "
    "running; break a new blade in at reduced feed. The saw maker's manual, the blade maker's "
    "data and shop rules govern."
)


def describe(blade: Any, units: UnitSystem | Display) -> str:
    """``bi-metal M42, 27 × 0.9 mm, 3/4 TPI, 3,505 mm long``."""

    d = as_display(units)
    size = (
        f"{d.num('length', blade.width_mm)} × {d.num('length', blade.thickness_mm)} "
        f"{d.label('length')}"
    )
    parts = [
        " ".join(p for p in (blade.blade_material, blade.grade) if p),
        size,
        f"{blade.pitch} TPI",
    ]
    if blade.length_mm:
        parts.append(f"{d.bar_length(blade.length_mm)} long")
    return ", ".join(parts)


def wear_rows_empty() -> tuple[list[str], list[list[Any]]]:
    from sawplan.charts import wear_rows
    from sawplan.life import wear_curve

    headers, _ = wear_rows(wear_curve([1.0], [1.0]))
    return headers, []


def wear_chart_text(history: Any, units: UnitSystem | Display, width: int, height: int) -> str:
    import sys

    from sawplan.charts import wear_chart

    if history.wear is None:
        return (
            f"blade {history.blade.tag}: no timed cuts yet, so no wear curve (log cuts with --time)"
        )
    off_saw = history.blade.status in ("retired", "removed")
    text = wear_chart(
        history.wear,
        title=f"blade {history.blade.tag}: cutting rate against area cut",
        units=units,
        width=width,
        height=height,
        colorless=not sys.stdout.isatty(),
        # a retired or removed blade's verdict is its life, not "still breaking in"
        verdict=as_display(units).text(history.wear_summary) if off_saw else None,
    )
    return "\n".join([text, *history.wear_notes])


def render_history(h: Any, units: UnitSystem | Display) -> str:
    from sawplan.config import money_suffix
    from sawplan.render import key_values, table

    d = as_display(units)
    b = h.blade
    pairs = [
        ("blade", f"{b.tag}: {describe(b, units)}"),
        ("status", b.status + (f" on {b.saw}" if b.saw else "")),
    ]
    if b.status == "retired":
        pairs.append(("retired", f"{b.retired_on}: {b.retire_cause}"))
        if h.end is not None:
            pairs.append(("life", d.text(h.end.verdict)))
    made = [x for x in (b.supplier, f"lot {b.lot}" if b.lot else None, f"bought {b.bought_on}" if b.bought_on else None,
                        _WELDED_TEXT.get(b.welded or "")) if x]  # fmt: skip
    if made:
        pairs.append(("from", ", ".join(made)))
    if b.price is not None:
        pairs.append(("price", fmt_money(b.price) + money_suffix()))
    pairs.append(
        ("cut", f"{d.fmt('area', b.area_mm2)} in {b.cuts:,} cut{'' if b.cuts == 1 else 's'}")
    )
    if h.cost_per_m2 is not None:
        per_unit = fmt_number(d.per("large_area", h.cost_per_m2 / 1e6))
        pairs.append(("cost so far", f"{per_unit} per {d.label('large_area')} cut"))
    if b.notes:
        pairs.append(("notes", b.notes))
    out = [key_values(pairs)]
    if h.fittings:
        rows = [
            [f["saw"], f["fitted_on"], f["removed_on"] or "(on the saw)",
             d.fmt("stress", f["tension_mpa"]) if f["tension_mpa"] is not None else "",
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
            [c["cut_on"], c["material"], section_text(d, c["section"]), c["count"],
             d.num("area", c["area_mm2"]),
             "" if c["time_min"] is None else fmt_number(c["time_min"]),
             "" if c["predicted_time_min"] is None else fmt_number(c["predicted_time_min"]),
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
    out.append("\nwear: " + d.text(h.wear_summary))
    out.extend(h.wear_notes)
    if h.wear is not None:
        out.append(h.wear.caution)
    return "\n".join(out)


def blade_table(blades: list[Any], d: Display) -> tuple[list[str], list[list[Any]]]:
    """The blade list: one row per blade, area in the display unit, price in the shop's currency."""
    from sawplan.config import money_suffix

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
            d.text(b.blade_type),
            b.status,
            b.saw or "",
            b.cuts,
            d.num("area", b.area_mm2),
            "" if b.price is None else fmt_money(b.price),
            " ".join(x for x in (b.retired_on, b.retire_cause) if x),
        ]
        for b in blades
    ]
    return headers, rows


def render_retirement(r: Any, on: str, units: UnitSystem | Display) -> str:
    """What ``blade retire`` prints: how the life ended, against its type's expected life."""
    d = as_display(units)
    b, end = r.blade, r.end
    cuts = "1 cut" if b.cuts == 1 else f"{b.cuts:,} cuts"
    lines = [
        f"retired blade {b.tag} ({on}) after {d.fmt('area', b.area_mm2)} in {cuts}: {end.name}",
        f"  {d.text(end.verdict)}",
    ]
    if end.kind == "wear":
        lines.append(
            "  the Weibull fit counts it as a failure of wear; the failure table and the "
            "early-failure warnings leave it out"
        )
    elif end.causes:
        lines.append("  usual causes (common practice): " + "; ".join(end.causes))
    from sawplan.render import terminal_text

    return terminal_text("\n".join(lines), lines=True)
