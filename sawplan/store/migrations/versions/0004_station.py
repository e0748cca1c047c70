"""The shop-floor station: jobs sent to a saw, their queue of cuts, remnants racked,
notes from the saw, and the taps already saved (each form's idempotency key).

``jobs`` is a planned job sent to one saw (``sawplan plan JOB --send``); ``queue``
holds its cuts in cut-sheet order, each done when it points at the cut entry
that logged it.  ``taps`` keeps the key of every form the station saved, so a
tap sent twice is written once.
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op
from sqlalchemy.dialects import sqlite

revision = "0004"
down_revision = "0003"
branch_labels = None
depends_on = None

STRICT = {"sqlite_strict": True}


def text(name: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Text(), **kw)


def real(name: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Double().with_variant(sqlite.REAL(), "sqlite"), **kw)


def integer(name: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Integer(), **kw)


def key(name: str, parent: str, **kw) -> sa.Column:
    return sa.Column(name, sa.Integer(), sa.ForeignKey(f"{parent}.id"), **kw)


def upgrade() -> None:
    op.create_table(
        "jobs",
        sa.Column("id", sa.Integer(), primary_key=True),
        text("name", nullable=False),
        key("saw_id", "saws", nullable=False),
        text("sent_on", nullable=False),
        text("file"),
        text("customer"),
        text("due"),
        text("withdrawn_on"),
        **STRICT,
    )
    op.create_index("idx_jobs_saw_id", "jobs", ["saw_id"])
    op.create_table(
        "queue",
        sa.Column("id", sa.Integer(), primary_key=True),
        key("job_id", "jobs", nullable=False),
        integer("seq", nullable=False),
        integer("bar", nullable=False),
        text("step", nullable=False),
        real("position_mm"),
        text("mark"),
        text("part"),
        text("heat"),
        text("stock"),
        text("location"),
        text("material", nullable=False),
        text("material_group"),
        text("section", nullable=False),
        real("area_mm2", nullable=False),
        real("predicted_time_min"),
        real("band_speed_m_min"),
        real("feed_mm_min"),
        text("pitch"),
        text("started_at"),
        key("cut_id", "cuts"),
        **STRICT,
    )
    op.create_index("queue_job_seq", "queue", ["job_id", "seq"], unique=True)
    op.create_index("idx_queue_cut_id", "queue", ["cut_id"])
    op.create_table(
        "remnants",
        sa.Column("id", sa.Integer(), primary_key=True),
        key("saw_id", "saws"),
        key("job_id", "jobs"),
        integer("bar"),
        text("material"),
        text("section"),
        real("length_mm", nullable=False),
        text("heat"),
        text("rack"),
        text("racked_on", nullable=False),
        text("note"),
        **STRICT,
    )
    op.create_table(
        "saw_notes",
        sa.Column("id", sa.Integer(), primary_key=True),
        key("saw_id", "saws", nullable=False),
        key("job_id", "jobs"),
        text("noted_on", nullable=False),
        text("note", nullable=False),
        **STRICT,
    )
    op.create_table(
        "taps",
        sa.Column("id", sa.Integer(), primary_key=True),
        text("tap", nullable=False),
        key("saw_id", "saws"),
        text("kind", nullable=False),
        text("tapped_at", nullable=False),
        text("said"),
        **STRICT,
    )
    op.create_index("taps_tap", "taps", ["tap"], unique=True)
