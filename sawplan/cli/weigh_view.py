"""How a weight is shown: mass, piece and lot weight and the lifting advice."""

from __future__ import annotations

from sawplan.units import UnitSystem


def render_weigh(r, units: UnitSystem) -> str:
    from sawplan.render import key_values
    from sawplan.units import Display

    d = Display(units)
    pairs = [
        ("material", f"{r.material} ({r.designation})"),
        ("section", r.section_shape.label(units.value) if r.section_shape else r.section),
        ("metal area", d.fmt("area", r.area_mm2, 4)),
        ("mass per length", d.fmt("mass_per_length", r.mass_per_length_kg_m, 4)),
        ("piece length", d.fmt("length", r.length_mm, 4)),
        ("one piece", d.fmt("mass", r.weight_kg, 3)),
    ]
    if r.count > 1:
        pairs.append((f"{r.count} pieces", d.fmt("mass", r.lot_weight_kg, 3)))
    pairs += [
        (
            "handling",
            f"{r.handling} (lifting index {r.lifting_index:.2f}, "
            f"limit {d.fmt('mass', r.recommended_limit_kg, 3)})",
        ),
        ("", _advice(r, d)),
        ("caution", r.caution),
    ]
    return key_values(pairs)


_WHO = {
    "one-person": "one person can lift it close to the body at waist height",
    "two-person": "a two-person lift, or a lift aid",
    "lift-aid": "use a hoist, crane or lift table",
}


def _advice(r, d) -> str:
    who = _WHO.get(r.handling, r.handling)
    return f"{who}: one piece is {d.fmt('mass', r.weight_kg, 3)}"
