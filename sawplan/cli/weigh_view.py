"""How a weight is shown: mass, piece and lot weight and the lifting advice."""

from __future__ import annotations

from sawplan.display import Display


def render_weigh(r, d: Display) -> str:
    from sawplan.render import key_values

    pairs = [
        ("material", f"{r.material} ({r.designation})"),
        ("section", d.section(r.section_shape) if r.section_shape else r.section),
        ("metal area", d.fmt("area", r.area_mm2)),
        ("mass per length", d.fmt("mass_per_length", r.mass_per_length_kg_m)),
        ("piece length", d.bar_length(r.length_mm)),
        ("one piece", d.fmt("mass", r.weight_kg)),
    ]
    if r.count > 1:
        pairs.append((f"{r.count:,} pieces", d.fmt("mass", r.lot_weight_kg)))
    index = "—" if r.lifting_index == float("inf") else f"{r.lifting_index:.2f}"
    pairs += [
        (
            "handling",
            f"{r.handling} (lifting index {index}; one person's limit "
            f"{d.fmt('mass', r.recommended_limit_kg)} at a {d.fmt('length', r.reach_cm * 10, 3)} "
            "reach)",
        ),
        ("", d.text(r.advice)),
    ]
    pairs += [("caution" if i == 0 else "", d.text(c)) for i, c in enumerate(r.cautions)]
    pairs.append(("", r.caution))
    return key_values(pairs)
