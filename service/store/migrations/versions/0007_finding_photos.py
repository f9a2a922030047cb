"""Photos of findings: the file in the photo folder, its record here with its site.

Revision ID: 0007
Revises: 0006
Create Date: 2026-12-03
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

import service.store.models

revision: str = "0007"
down_revision: str | None = "0006"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    op.create_table(
        "finding_photos",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("site_id", sa.Integer(), nullable=False),
        sa.Column("finding_id", sa.Integer(), nullable=False),
        sa.Column("stored_name", sa.String(length=64), nullable=False),
        sa.Column("content_type", sa.String(length=40), nullable=False),
        sa.Column("size_bytes", sa.Integer(), nullable=False),
        sa.Column("created_at", service.store.models.UtcDateTime(), nullable=False),
        sa.ForeignKeyConstraint(
            ["finding_id"],
            ["findings.id"],
            name=op.f("fk_finding_photos_finding_id_findings"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["site_id"], ["sites.id"], name=op.f("fk_finding_photos_site_id_sites")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_finding_photos")),
        sa.UniqueConstraint("stored_name", name=op.f("uq_finding_photos_stored_name")),
    )
    with op.batch_alter_table("finding_photos", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_finding_photos_finding_id"), ["finding_id"])
        batch_op.create_index(batch_op.f("ix_finding_photos_site_id"), ["site_id"])


def downgrade() -> None:
    with op.batch_alter_table("finding_photos", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_finding_photos_site_id"))
        batch_op.drop_index(batch_op.f("ix_finding_photos_finding_id"))
    op.drop_table("finding_photos")
