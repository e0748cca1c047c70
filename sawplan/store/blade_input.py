"""A new blade as a person types it, read by one set of rules: ``blade add`` and the office form.

Text in any unit (``27mm``, ``1in``), a pitch (``4/6``), a date (``2024-03-02``,
``yesterday``), the blade material's common spellings: each read through
``sawplan.fields`` and the pitch and date parsers, each error one line naming
the field.  The store's ``add_blade`` then checks what only the log knows (a
tag already taken) and writes it.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from sawplan.errors import BadDataError, UsageError

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.blade_rows import BladeSpec

BLADE_MATERIALS = {
    "bi-metal": "bi-metal",
    "bimetal": "bi-metal",
    "carbon": "carbon",
    "carbon-steel": "carbon",
    "carbide": "carbide",
    "carbide-tipped": "carbide",
}
TOOTH_FORMS = ("regular", "hook", "skip")
TOOTH_SETS = ("raker", "wavy", "alternate")


def blade_spec(
    tag: str,
    *,
    pitch: str,
    width: str,
    thickness: str,
    length: str | None = None,
    material: str = "bi-metal",
    grade: str | None = None,
    form: str | None = None,
    tooth_set: str | None = None,
    supplier: str | None = None,
    lot: str | None = None,
    price: float | str | None = None,
    bought: str | None = None,
    welded: str = "bought",
    notes: str | None = None,
) -> BladeSpec:
    """The ``BladeSpec`` of a blade typed as text (``price`` may be a number already)."""
    from sawplan import fields
    from sawplan.cutting.pitch import parse_pitch
    from sawplan.store.blade_rows import BladeSpec
    from sawplan.store.dates import parse_day
    from sawplan.store.fields import WELDED

    p = parse_pitch(pitch, field="pitch")
    blade_material = BLADE_MATERIALS.get(material.strip().lower())
    if blade_material is None:
        raise BadDataError(
            f"must be bi-metal, carbon or carbide, got {material!r}", field="blade material"
        )
    if isinstance(price, str):
        price = fields.parse("blade_price", price)
    elif price is not None:
        price = fields.check("blade_price", price)
    return BladeSpec(
        tag=tag,
        width_mm=fields.parse("blade_width", width),
        thickness_mm=fields.parse("blade_thickness", thickness),
        length_mm=None if length is None else fields.parse("blade_length", length),
        tpi_coarse=p.tpi_coarse,
        tpi_fine=p.tpi_fine,
        blade_material=blade_material,
        grade=grade,
        tooth_form=_choice(form, TOOTH_FORMS, "form"),
        tooth_set=_choice(tooth_set, TOOTH_SETS, "set"),
        supplier=supplier,
        lot=lot,
        price=price,
        bought_on=None if bought is None else parse_day(bought, field="bought"),
        welded=_choice(welded, WELDED, "welded") or "bought",
        notes=notes,
    )


def _choice(value: str | None, allowed: tuple[str, ...], field: str) -> str | None:
    if value is None:
        return None
    key = value.strip().lower()
    if key not in allowed:
        raise UsageError(f"must be one of {', '.join(allowed)}, got {value!r}", field=field)
    return key
