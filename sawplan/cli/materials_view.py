"""How the materials catalogue is shown: the list, and one material with its sources."""

from __future__ import annotations

from sawplan.display import Display, as_display
from sawplan.units import UnitSystem


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
