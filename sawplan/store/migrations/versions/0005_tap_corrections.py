"""Taps that can be corrected: the cut a "cut done" tap logged, and what a correction changed.

``cut_id`` is the cut entry a "cut done" tap logged, while it stands (cleared
when the cut is taken back; no foreign key, as the cut row is then deleted).
A correction is a tap of its own (kind ``fix`` or ``undo``): ``corrects`` is
the id of the tap it corrected and ``change`` (JSON) what it changed, the old
and the new values, or the whole cut taken back.
"""

from __future__ import annotations

import sqlalchemy as sa
from alembic import op

revision = "0005"
down_revision = "0004"
branch_labels = None
depends_on = None


def upgrade() -> None:
    op.add_column("taps", sa.Column("cut_id", sa.Integer()))
    op.add_column("taps", sa.Column("corrects", sa.Integer()))
    op.add_column("taps", sa.Column("change", sa.Text()))
