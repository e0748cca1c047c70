"""The blade log's tables (SQLAlchemy Core) and the names of its migration history.

The tables are declared here once, for the program's reads and writes; the
migration history in ``migrations/versions/`` (Alembic) builds them step by
step on SQLite and PostgreSQL alike.  A test checks with Alembic's
``compare_metadata`` that the migrated schema equals these tables on both
engines.  Never edit a migration that has shipped: add one at the end and
append its id to ``REVISIONS``.

Numbers are SI (or the program's core units) and every numeric column carries
its unit in its name.  On SQLite the tables are STRICT, so a wrong type is
refused at once; on PostgreSQL the column types do that.  Dates are ISO text
(``YYYY-MM-DD``).  Tags and saw names are unique whatever their case
(``lower()`` expression indexes, the same on both engines).

Logs written before the move to Alembic (sqlite-utils' recorded migrations
``m001_initial`` and ``m002_cut_traceability``) are adopted at the revision
they match and upgraded from there (``sawplan.store.upgrade``).
"""

from __future__ import annotations

from functools import lru_cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from sqlalchemy import MetaData

APPLICATION_ID = 0x53415750  # "SAWP": marks a SQLite file as a sawplan blade log
VERSION_TABLE = "sawplan_schema"  # Alembic's version table, named so no other program shares it
# Alembic revision ids, oldest first.  A SQLite log also keeps the count in
# PRAGMA user_version, so opening an up-to-date file costs two pragma reads.
REVISIONS: tuple[str, ...] = ("0001", "0002", "0003", "0004", "0005")
HEAD = REVISIONS[-1]
# the sqlite-utils history of the first releases: its names map onto REVISIONS[0:2]
LEGACY_SET = "sawplan-blade-log"
LEGACY_NAMES: tuple[str, ...] = ("m001_initial", "m002_cut_traceability")
LEGACY_TABLE = "_sqlite_migrations"

TABLE_NAMES = ("saws", "blades", "fittings", "cuts", "events")  # parents before children
# the shop-floor station's tables (revision 0004): jobs sent to saws, their queue of cuts,
# remnants racked, notes from the saw, the taps saved (``sawplan.store.station_rows``)
STATION_TABLES = ("jobs", "queue", "remnants", "saw_notes", "taps")
ALL_TABLES = TABLE_NAMES + STATION_TABLES  # what copies, backups and checks carry; parents first

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


def real_type():
    """A double-precision float: REAL on SQLite (STRICT accepts it), DOUBLE PRECISION elsewhere."""
    import sqlalchemy as sa
    from sqlalchemy.dialects import sqlite

    return sa.Double().with_variant(sqlite.REAL(), "sqlite")


def column_type(kind: type):
    import sqlalchemy as sa

    return {str: sa.Text, int: sa.Integer}[kind]() if kind is not float else real_type()


@lru_cache(maxsize=1)
def metadata() -> MetaData:
    """The tables at the newest revision (built on first use: SQLAlchemy is heavy to import)."""
    import sqlalchemy as sa

    md = sa.MetaData()
    real = real_type
    strict = {"sqlite_strict": True}

    def col(name: str, kind, *args, **kw) -> sa.Column:
        return sa.Column(name, kind() if callable(kind) else kind, *args, **kw)

    saws = sa.Table(
        "saws",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("name", sa.Text, nullable=False),
        *(col(name, column_type(kind)) for name, kind in SAW_PROFILE_COLUMNS.items()),
        col("source", sa.Text, nullable=False, server_default="blade log"),
        col("added_on", sa.Text),
        **strict,
    )
    blades = sa.Table(
        "blades",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("tag", sa.Text, nullable=False),
        col("blade_material", sa.Text, nullable=False, server_default="bi-metal"),
        col("grade", sa.Text),
        col("width_mm", real, nullable=False),
        col("thickness_mm", real, nullable=False),
        col("length_mm", real),
        col("tpi_coarse", real, nullable=False),
        col("tpi_fine", real),
        *(col(name, sa.Text) for name in ("tooth_form", "tooth_set", "supplier", "lot")),
        col("price", real),
        *(col(name, sa.Text) for name in ("bought_on", "welded")),
        col("status", sa.Text, nullable=False, server_default="new"),
        *(col(name, sa.Text) for name in ("retired_on", "retire_cause", "notes", "added_on")),
        **strict,
    )
    fittings = sa.Table(
        "fittings",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("blade_id", sa.Integer, sa.ForeignKey("blades.id"), nullable=False),
        col("saw_id", sa.Integer, sa.ForeignKey("saws.id"), nullable=False),
        col("fitted_on", sa.Text, nullable=False),
        col("removed_on", sa.Text),
        col("tension_mpa", real),
        col("break_in", sa.Integer),
        col("break_in_how", sa.Text),
        **strict,
    )
    cuts = sa.Table(
        "cuts",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("blade_id", sa.Integer, sa.ForeignKey("blades.id"), nullable=False),
        col("saw_id", sa.Integer, sa.ForeignKey("saws.id")),
        col("cut_on", sa.Text, nullable=False),
        col("material", sa.Text, nullable=False),
        col("material_group", sa.Text),
        col("section", sa.Text, nullable=False),
        col("area_mm2", real, nullable=False),
        col("pieces", sa.Integer, nullable=False),
        col("count", sa.Integer, nullable=False),
        col("band_speed_m_min", real),
        col("feed_mm_min", real),
        col("feed_setting", sa.Text),
        col("time_min", real),
        col("coolant", sa.Integer),
        col("job", sa.Text),
        col("note", sa.Text),
        col("heat", sa.Text),
        col("predicted_time_min", real),
        **strict,
    )
    events = sa.Table(
        "events",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("blade_id", sa.Integer, sa.ForeignKey("blades.id"), nullable=False),
        col("happened_on", sa.Text, nullable=False),
        col("kind", sa.Text, nullable=False),
        col("mode", sa.Text),
        col("location", sa.Text),
        col("teeth", sa.Integer),
        col("note", sa.Text),
        **strict,
    )
    open_only = {
        "sqlite_where": sa.text("removed_on IS NULL"),
        "postgresql_where": sa.text("removed_on IS NULL"),
    }
    _station_tables(md, col, real, strict)
    sa.Index("saws_name", sa.func.lower(saws.c.name), unique=True)
    sa.Index("blades_tag", sa.func.lower(blades.c.tag), unique=True)
    sa.Index("idx_fittings_blade_id", fittings.c.blade_id)
    sa.Index("fittings_open_blade", fittings.c.blade_id, unique=True, **open_only)
    sa.Index("fittings_open_saw", fittings.c.saw_id, unique=True, **open_only)
    sa.Index("idx_cuts_blade_id", cuts.c.blade_id)
    sa.Index("idx_cuts_saw_id_material_group", cuts.c.saw_id, cuts.c.material_group)
    sa.Index("idx_events_blade_id", events.c.blade_id)
    return md


def _station_tables(md, col, real, strict) -> None:
    """The station's tables (revision 0004; the taps' corrections: 0005)."""
    import sqlalchemy as sa

    def key(name: str, parent: str, **kw) -> sa.Column:
        return sa.Column(name, sa.Integer, sa.ForeignKey(f"{parent}.id"), **kw)

    jobs = sa.Table(
        "jobs",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("name", sa.Text, nullable=False),
        key("saw_id", "saws", nullable=False),
        col("sent_on", sa.Text, nullable=False),
        *(col(name, sa.Text) for name in ("file", "customer", "due", "withdrawn_on")),
        **strict,
    )
    queue = sa.Table(
        "queue",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        key("job_id", "jobs", nullable=False),
        col("seq", sa.Integer, nullable=False),
        col("bar", sa.Integer, nullable=False),
        col("step", sa.Text, nullable=False),
        col("position_mm", real),
        *(col(name, sa.Text) for name in ("mark", "part", "heat", "stock", "location")),
        col("material", sa.Text, nullable=False),
        col("material_group", sa.Text),
        col("section", sa.Text, nullable=False),
        col("area_mm2", real, nullable=False),
        col("predicted_time_min", real),
        col("band_speed_m_min", real),
        col("feed_mm_min", real),
        col("pitch", sa.Text),
        col("started_at", sa.Text),
        key("cut_id", "cuts"),
        **strict,
    )
    sa.Table(
        "remnants",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        key("saw_id", "saws"),
        key("job_id", "jobs"),
        col("bar", sa.Integer),
        col("material", sa.Text),
        col("section", sa.Text),
        col("length_mm", real, nullable=False),
        col("heat", sa.Text),
        col("rack", sa.Text),
        col("racked_on", sa.Text, nullable=False),
        col("note", sa.Text),
        **strict,
    )
    sa.Table(
        "saw_notes",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        key("saw_id", "saws", nullable=False),
        key("job_id", "jobs"),
        col("noted_on", sa.Text, nullable=False),
        col("note", sa.Text, nullable=False),
        **strict,
    )
    taps = sa.Table(
        "taps",
        md,
        sa.Column("id", sa.Integer, primary_key=True),
        col("tap", sa.Text, nullable=False),
        key("saw_id", "saws"),
        col("kind", sa.Text, nullable=False),
        col("tapped_at", sa.Text, nullable=False),
        col("said", sa.Text),
        # revision 0005: the cut a "cut done" tap logged (while it stands), and for a
        # correction (kind fix or undo) the tap it corrected and what it changed (JSON)
        col("cut_id", sa.Integer),
        col("corrects", sa.Integer),
        col("change", sa.Text),
        **strict,
    )
    sa.Index("idx_jobs_saw_id", jobs.c.saw_id)
    sa.Index("queue_job_seq", queue.c.job_id, queue.c.seq, unique=True)
    sa.Index("idx_queue_cut_id", queue.c.cut_id)
    sa.Index("taps_tap", taps.c.tap, unique=True)


def table(name: str):
    """One table of ``metadata()`` by name."""
    return metadata().tables[name]


def ident(name: str) -> str:
    """A table or column name of the log, checked: the only names SQL text may interpolate."""
    if name in TABLE_NAMES or name in STATION_TABLES or name == VERSION_TABLE:
        return name
    if any(name in t.columns for t in metadata().tables.values()):
        return name
    raise ValueError(f"not a name in the blade log's schema: {name!r}")
