"""Heat/lot number and model-predicted time on cuts; an index for the time calibration.

Logs written by the first releases hold this as sqlite-utils' ``m002_cut_traceability``.
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op
from sqlalchemy.dialects import sqlite

revision = "0002"
down_revision = "0001"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.add_column("cuts", sa.Column("heat", sa.Text()))
    real = sa.Double().with_variant(sqlite.REAL(), "sqlite")
    op.add_column("cuts", sa.Column("predicted_time_min", real))
    op.create_index("idx_cuts_saw_id_material_group", "cuts", ["saw_id", "material_group"])
