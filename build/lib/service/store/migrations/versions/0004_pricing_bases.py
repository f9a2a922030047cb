"""Pricing bases a manager signs: heating-value bases, closed-return pricing, sewer
charges and cooling of hot drains; a trap's superheated steam temperature.

Revision ID: 0004
Revises: 0003
Create Date: 2026-12-02
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0004"
down_revision: str | None = "0003"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    with op.batch_alter_table("sites", schema=None) as batch_op:
        batch_op.add_column(
            sa.Column("fuel_heating_value", sa.String(40), server_default="lhv", nullable=False)
        )
        batch_op.add_column(
            sa.Column(
                "co2_factor_heating_value", sa.String(40), server_default="lhv", nullable=False
            )
        )
        batch_op.add_column(
            sa.Column("net_to_gross_ratio", sa.Double(), server_default="0.9", nullable=False)
        )
        batch_op.add_column(
            sa.Column("sewer_cost_per_tonne", sa.Double(), server_default="0", nullable=False)
        )
        batch_op.add_column(sa.Column("drain_temperature_limit_c", sa.Double(), nullable=True))
        batch_op.add_column(
            sa.Column(
                "closed_return_pricing",
                sa.String(40),
                server_default="heat_not_recovered",
                nullable=False,
            )
        )
    with op.batch_alter_table("traps", schema=None) as batch_op:
        batch_op.add_column(sa.Column("steam_temperature_c", sa.Double(), nullable=True))


def downgrade() -> None:
    with op.batch_alter_table("traps", schema=None) as batch_op:
        batch_op.drop_column("steam_temperature_c")
    with op.batch_alter_table("sites", schema=None) as batch_op:
        for column in (
            "closed_return_pricing",
            "drain_temperature_limit_c",
            "sewer_cost_per_tonne",
            "net_to_gross_ratio",
            "co2_factor_heating_value",
            "fuel_heating_value",
        ):
            batch_op.drop_column(column)
