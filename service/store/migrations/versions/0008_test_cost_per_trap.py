"""A site's cost of testing one trap, for the test-interval advice.

Revision ID: 0008
Revises: 0007
Create Date: 2026-12-03
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0008"
down_revision: str | None = "0007"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    with op.batch_alter_table("sites", schema=None) as batch_op:
        batch_op.add_column(
            sa.Column("test_cost_per_trap", sa.Double(), server_default="10", nullable=False)
        )


def downgrade() -> None:
    with op.batch_alter_table("sites", schema=None) as batch_op:
        batch_op.drop_column("test_cost_per_trap")
