"""The first schema: saws, blades, fittings, cuts, events.

Logs written by the first releases hold this as sqlite-utils' ``m001_initial``.
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op
from sqlalchemy.dialects import sqlite

revision = "0001"
down_revision = None
branch_labels = None
depends_on = None

STRICT = {"sqlite_strict": True}
SAW_PROFILE = (
    ("kind", "text"),
    ("wheel_diameter_mm", "real"),
    ("blade_length_mm", "real"),
    ("blade_width_mm", "real"),
    ("blade_thickness_mm", "real"),
    ("band_speed_min_m_min", "real"),
    ("band_speed_max_m_min", "real"),
    ("motor_power_w", "real"),
    ("drive_efficiency", "real"),
    ("capacity_round_mm", "real"),
    ("capacity_rect_w_mm", "real"),
    ("capacity_rect_h_mm", "real"),
    ("feed_type", "text"),
    ("head_force_n", "real"),
    ("coolant", "integer"),
    ("wheel_count", "integer"),
    ("notes", "text"),
)
OPEN_ONLY = {
    "sqlite_where": sa.text("removed_on IS NULL"),
    "postgresql_where": sa.text("removed_on IS NULL"),
}


def real_type() -> sa.types.TypeEngine:
    """Double precision; REAL on SQLite, where STRICT tables accept no other name."""
    return sa.Double().with_variant(sqlite.REAL(), "sqlite")


def of_kind(name: str, kind: str) -> sa.Column:
    return {"text": text, "real": real, "integer": integer}[kind](name)


def text(name: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Text(), **kw)


def real(name: str, **kw) -> sa.Column:
    return sa.Column(name, real_type(), **kw)


def integer(name: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Integer(), **kw)


def key(name: str, parent: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Integer(), sa.ForeignKey(f"{parent}.id"), **kw)


def upgrade() -> None:
    op.create_table(
        "saws",
        sa.Column("id", sa.Integer(), primary_key=True),
        text("name", nullable=False),
        *(of_kind(name, kind) for name, kind in SAW_PROFILE),
        text("source", nullable=False, server_default="blade log"),
        text("added_on"),
        **STRICT,
    )
    op.create_index("saws_name", "saws", [sa.text("lower(name)")], unique=True)
    op.create_table(
        "blades",
        sa.Column("id", sa.Integer(), primary_key=True),
        text("tag", nullable=False),
        text("blade_material", nullable=False, server_default="bi-metal"),
        text("grade"),
        real("width_mm", nullable=False),
        real("thickness_mm", nullable=False),
        real("length_mm"),
        real("tpi_coarse", nullable=False),
        real("tpi_fine"),
        *(text(name) for name in ("tooth_form", "tooth_set", "supplier", "lot")),
        real("price"),
        text("bought_on"),
        text("welded"),
        text("status", nullable=False, server_default="new"),
        *(text(name) for name in ("retired_on", "retire_cause", "notes", "added_on")),
        **STRICT,
    )
    op.create_index("blades_tag", "blades", [sa.text("lower(tag)")], unique=True)
    op.create_table(
        "fittings",
        sa.Column("id", sa.Integer(), primary_key=True),
        key("blade_id", "blades", nullable=False),
        key("saw_id", "saws", nullable=False),
        text("fitted_on", nullable=False),
        text("removed_on"),
        real("tension_mpa"),
        sa.Column("break_in", sa.Integer()),
        text("break_in_how"),
        **STRICT,
    )
    op.create_index("idx_fittings_blade_id", "fittings", ["blade_id"])
    # at most one open fitting per blade and per saw, guarded by the database itself
    op.create_index("fittings_open_blade", "fittings", ["blade_id"], unique=True, **OPEN_ONLY)
    op.create_index("fittings_open_saw", "fittings", ["saw_id"], unique=True, **OPEN_ONLY)
    op.create_table(
        "cuts",
        sa.Column("id", sa.Integer(), primary_key=True),
        key("blade_id", "blades", nullable=False),
        key("saw_id", "saws"),
        text("cut_on", nullable=False),
        text("material", nullable=False),
        text("material_group"),
        text("section", nullable=False),
        real("area_mm2", nullable=False),
        sa.Column("pieces", sa.Integer(), nullable=False),
        sa.Column("count", sa.Integer(), nullable=False),
        real("band_speed_m_min"),
        real("feed_mm_min"),
        text("feed_setting"),
        real("time_min"),
        sa.Column("coolant", sa.Integer()),
        text("job"),
        text("note"),
        **STRICT,
    )
    op.create_index("idx_cuts_blade_id", "cuts", ["blade_id"])
    op.create_table(
        "events",
        sa.Column("id", sa.Integer(), primary_key=True),
        key("blade_id", "blades", nullable=False),
        text("happened_on", nullable=False),
        text("kind", nullable=False),
        text("mode"),
        text("location"),
        sa.Column("teeth", sa.Integer()),
        text("note"),
        **STRICT,
    )
    op.create_index("idx_events_blade_id", "events", ["blade_id"])
