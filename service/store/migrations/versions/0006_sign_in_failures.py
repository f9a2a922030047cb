"""Failed sign-ins counted in the database, so that every worker process counts the same.

Revision ID: 0006
Revises: 0005
Create Date: 2026-12-03
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

import service.store.models

revision: str = "0006"
down_revision: str | None = "0005"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    op.create_table(
        "sign_in_failures",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("kind", sa.String(length=10), nullable=False),
        sa.Column("key", sa.String(length=200), nullable=False),
        sa.Column("at", service.store.models.UtcDateTime(), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_sign_in_failures")),
    )
    with op.batch_alter_table("sign_in_failures", schema=None) as batch_op:
        batch_op.create_index("ix_sign_in_failures_kind_key_at", ["kind", "key", "at"])


def downgrade() -> None:
    with op.batch_alter_table("sign_in_failures", schema=None) as batch_op:
        batch_op.drop_index("ix_sign_in_failures_kind_key_at")
    op.drop_table("sign_in_failures")
