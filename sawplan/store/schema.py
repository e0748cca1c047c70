"""The blade log's schema, built and upgraded by sqlite-utils' recorded migrations.

Every migration is registered once, in order, in the set ``sawplan-blade-log``
and recorded in ``_sqlite_migrations`` when applied; ``PRAGMA user_version``
mirrors the count so opening an up-to-date log costs two pragma reads.
Never edit a migration that has shipped: add a new one at the end.

Numbers are SI (or the program's core units) and every numeric column carries
its unit in its name.  Tables are STRICT so a wrong type is refused at once.
Dates are ISO text (``YYYY-MM-DD``).
"""

from __future__ import annotations

from functools import lru_cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from sqlite_utils import Database, Migrations

MIGRATION_SET = "sawplan-blade-log"
APPLICATION_ID = 0x53415750  # "SAWP": marks the file as a sawplan blade log
MIGRATION_NAMES: tuple[str, ...] = ("m001_initial", "m002_cut_traceability")

# Profile columns of a saw (``sawplan.saws.Saw`` fields with units), in table order.
SAW_PROFILE_COLUMNS: dict[str, type] = {
    "kind": str,
    "wheel_diameter_mm": float,
    "blade_length_mm": float,
    "blade_width_mm": float,
    "blade_thickness_mm": float,
    "band_speed_min_m_min": float,
    "band_speed_max_m_min": float,
    "motor_power_w": float,
    "drive_efficiency": float,
    "capacity_round_mm": float,
    "capacity_rect_w_mm": float,
    "capacity_rect_h_mm": float,
    "feed_type": str,
    "head_force_n": float,
    "coolant": int,
    "wheel_count": int,
    "notes": str,
}


def create_first_schema(db: Database) -> None:
    """Migration 1: saws, blades, fittings, cuts, events."""
    db["saws"].create(
        {"id": int, "name": str, **SAW_PROFILE_COLUMNS, "source": str, "added_on": str},
        pk="id",
        not_null={"name", "source"},
        defaults={"source": "blade log"},
        strict=True,
    )
    db.execute("CREATE UNIQUE INDEX saws_name ON saws (name COLLATE NOCASE)")
    db["blades"].create(
        {
            "id": int,
            "tag": str,
            "blade_material": str,
            "grade": str,
            "width_mm": float,
            "thickness_mm": float,
            "length_mm": float,
            "tpi_coarse": float,
            "tpi_fine": float,
            "tooth_form": str,
            "tooth_set": str,
            "supplier": str,
            "lot": str,
            "price": float,
            "bought_on": str,
            "welded": str,
            "status": str,
            "retired_on": str,
            "retire_cause": str,
            "notes": str,
            "added_on": str,
        },
        pk="id",
        not_null={"tag", "status", "blade_material", "width_mm", "thickness_mm", "tpi_coarse"},
        defaults={"status": "new", "blade_material": "bi-metal"},
        strict=True,
    )
    db.execute("CREATE UNIQUE INDEX blades_tag ON blades (tag COLLATE NOCASE)")
    db["fittings"].create(
        {
            "id": int,
            "blade_id": int,
            "saw_id": int,
            "fitted_on": str,
            "removed_on": str,
            "tension_mpa": float,
            "break_in": int,
            "break_in_how": str,
        },
        pk="id",
        not_null={"blade_id", "saw_id", "fitted_on"},
        foreign_keys=[("blade_id", "blades", "id"), ("saw_id", "saws", "id")],
        strict=True,
    )
    db["fittings"].create_index(["blade_id"])
    # at most one open fitting per blade and per saw, guarded by the database itself
    db.execute(
        "CREATE UNIQUE INDEX fittings_open_blade ON fittings (blade_id) WHERE removed_on IS NULL"
    )
    db.execute(
        "CREATE UNIQUE INDEX fittings_open_saw ON fittings (saw_id) WHERE removed_on IS NULL"
    )
    db["cuts"].create(
        {
            "id": int,
            "blade_id": int,
            "saw_id": int,
            "cut_on": str,
            "material": str,
            "material_group": str,
            "section": str,
            "area_mm2": float,
            "pieces": int,
            "count": int,
            "band_speed_m_min": float,
            "feed_mm_min": float,
            "feed_setting": str,
            "time_min": float,
            "coolant": int,
            "job": str,
            "note": str,
        },
        pk="id",
        not_null={"blade_id", "cut_on", "material", "section", "area_mm2", "pieces", "count"},
        foreign_keys=[("blade_id", "blades", "id"), ("saw_id", "saws", "id")],
        strict=True,
    )
    db["cuts"].create_index(["blade_id"])
    db["events"].create(
        {
            "id": int,
            "blade_id": int,
            "happened_on": str,
            "kind": str,
            "mode": str,
            "location": str,
            "teeth": int,
            "note": str,
        },
        pk="id",
        not_null={"blade_id", "happened_on", "kind"},
        foreign_keys=[("blade_id", "blades", "id")],
        strict=True,
    )
    db["events"].create_index(["blade_id"])


def add_cut_traceability(db: Database) -> None:
    """Migration 2: heat/lot number and model-predicted time on cuts; calibration index."""
    cuts = db["cuts"]
    cuts.add_column("heat", str)
    cuts.add_column("predicted_time_min", float)
    cuts.create_index(["saw_id", "material_group"])


@lru_cache(maxsize=1)
def migrations() -> Migrations:
    """The registered migration set (built on first use: sqlite_utils is heavy to import)."""
    from sqlite_utils import Migrations

    plan = Migrations(MIGRATION_SET)
    steps = (create_first_schema, add_cut_traceability)
    for name, step in zip(MIGRATION_NAMES, steps, strict=True):
        plan(name=name)(step)
    return plan
