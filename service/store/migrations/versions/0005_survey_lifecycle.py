"""A survey round's life: planned, in progress, closed. Rounds stored before with an end
date are closed; the rest are in progress.

Revision ID: 0005
Revises: 0004
Create Date: 2026-12-03
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0005"
down_revision: str | None = "0004"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    with op.batch_alter_table("surveys", schema=None) as batch_op:
        batch_op.add_column(
            sa.Column(
                "status",
                sa.Enum(
                    "planned",
                    "in_progress",
                    "closed",
                    name="surveystatus",
                    native_enum=False,
                    length=40,
                ),
                server_default="in_progress",
                nullable=False,
            )
        )
    op.execute("UPDATE surveys SET status = 'closed' WHERE ended_on IS NOT NULL")


def downgrade() -> None:
    with op.batch_alter_table("surveys", schema=None) as batch_op:
        batch_op.drop_column("status")
