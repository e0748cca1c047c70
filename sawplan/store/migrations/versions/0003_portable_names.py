"""One schema on every engine: unique names by ``lower()``, the old migration record gone.

Logs of the first releases kept tags and saw names unique with SQLite's own
``COLLATE NOCASE`` and recorded their migrations in ``_sqlite_migrations``.
Both indexes are rebuilt as ``lower()`` expression indexes (what a new log
gets on SQLite and PostgreSQL alike) and the old record is dropped: the
history now lives in ``sawplan_schema``.
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0003"
down_revision = "0002"
branch_labels = None
depends_on = None


def upgrade() -> None:
    for name, table, column in (("saws_name", "saws", "name"), ("blades_tag", "blades", "tag")):
        op.drop_index(name, table_name=table)
        op.create_index(name, table, [sa.text(f"lower({column})")], unique=True)
    if sa.inspect(op.get_bind()).has_table("_sqlite_migrations"):
        op.drop_table("_sqlite_migrations")
