"""Indexes for the walk's route: traps in service by site, area, position and tag (the
walking order), and a round's findings by condition.

Revision ID: 0009
Revises: 0008
Create Date: 2026-12-03
"""

from collections.abc import Sequence

from alembic import op

revision: str = "0009"
down_revision: str | None = "0008"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    op.create_index(
        "ix_traps_walking_order",
        "traps",
        ["site_id", "in_service", "area_id", "route_position", "tag"],
    )
    op.create_index("ix_findings_survey_condition", "findings", ["survey_id", "condition"])


def downgrade() -> None:
    op.drop_index("ix_findings_survey_condition", table_name="findings")
    op.drop_index("ix_traps_walking_order", table_name="traps")
