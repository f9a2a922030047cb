"""the register, surveys, findings and repairs

Revision ID: 0001
Revises:
Create Date: 2026-12-01
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

import service.store.models

revision: str = "0001"
down_revision: str | None = None
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:

    op.create_table(
        "sites",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=120), nullable=False),
        sa.Column("location", sa.String(length=200), nullable=False),
        sa.Column("elevation_m", sa.Double(), nullable=True),
        sa.Column("atmospheric_pressure_kpa", sa.Double(), nullable=False),
        sa.Column("currency", sa.String(length=3), nullable=False),
        sa.Column(
            "unit_system",
            sa.Enum("si", "us", name="unitsystem", native_enum=False, length=40),
            nullable=False,
        ),
        sa.Column(
            "cost_basis",
            sa.Enum("steam_cost", "fuel_price", name="costbasis", native_enum=False, length=40),
            nullable=False,
        ),
        sa.Column("steam_cost_per_tonne", sa.Double(), nullable=True),
        sa.Column("fuel_price_per_gj", sa.Double(), nullable=True),
        sa.Column("boiler_efficiency", sa.Double(), nullable=False),
        sa.Column("water_and_treatment_cost_per_tonne", sa.Double(), nullable=False),
        sa.Column("makeup_water_temperature_c", sa.Double(), nullable=False),
        sa.Column("co2_kg_per_gj_fuel", sa.Double(), nullable=False),
        sa.Column("hours_per_year", sa.Double(), nullable=False),
        sa.Column("discharge_coefficient", sa.Double(), nullable=False),
        sa.Column("discharge_coefficient_low", sa.Double(), nullable=False),
        sa.Column("discharge_coefficient_high", sa.Double(), nullable=False),
        sa.Column("loss_factors", sa.JSON(), nullable=False),
        sa.Column("repair_costs", sa.JSON(), nullable=False),
        sa.Column("created_at", service.store.models.UtcDateTime(), nullable=False),
        sa.Column("updated_at", service.store.models.UtcDateTime(), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_sites")),
        sa.UniqueConstraint("name", name=op.f("uq_sites_name")),
    )
    op.create_table(
        "areas",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("site_id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=120), nullable=False),
        sa.Column("route_order", sa.Integer(), nullable=False),
        sa.ForeignKeyConstraint(["site_id"], ["sites.id"], name=op.f("fk_areas_site_id_sites")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_areas")),
        sa.UniqueConstraint("site_id", "name", name=op.f("uq_areas_site_id")),
    )
    with op.batch_alter_table("areas", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_areas_site_id"), ["site_id"], unique=False)

    op.create_table(
        "surveys",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("site_id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=120), nullable=False),
        sa.Column("started_on", sa.Date(), nullable=False),
        sa.Column("ended_on", sa.Date(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.ForeignKeyConstraint(["site_id"], ["sites.id"], name=op.f("fk_surveys_site_id_sites")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_surveys")),
        sa.UniqueConstraint("site_id", "name", name=op.f("uq_surveys_site_id")),
    )
    with op.batch_alter_table("surveys", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_surveys_site_id"), ["site_id"], unique=False)

    op.create_table(
        "traps",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("site_id", sa.Integer(), nullable=False),
        sa.Column("area_id", sa.Integer(), nullable=True),
        sa.Column("tag", sa.String(length=40), nullable=False),
        sa.Column("location", sa.String(length=200), nullable=False),
        sa.Column("route_position", sa.Integer(), nullable=True),
        sa.Column(
            "application",
            sa.Enum(
                "drip",
                "tracer",
                "process",
                "space_heating",
                "other",
                name="application",
                native_enum=False,
                length=40,
            ),
            nullable=False,
        ),
        sa.Column(
            "trap_type",
            sa.Enum(
                "thermodynamic",
                "inverted_bucket",
                "float_thermostatic",
                "thermostatic_balanced_pressure",
                "thermostatic_bimetallic",
                "thermostatic_liquid_expansion",
                "fixed_orifice",
                name="traptype",
                native_enum=False,
                length=40,
            ),
            nullable=False,
        ),
        sa.Column("connection_size", sa.String(length=20), nullable=False),
        sa.Column("orifice_diameter_mm", sa.Double(), nullable=False),
        sa.Column("inlet_pressure_kpa_g", sa.Double(), nullable=False),
        sa.Column("return_pressure_kpa_g", sa.Double(), nullable=False),
        sa.Column(
            "condensate_destination",
            sa.Enum(
                "closed_return",
                "vented_receiver",
                "drain",
                name="condensatedestination",
                native_enum=False,
                length=40,
            ),
            nullable=False,
        ),
        sa.Column("condensate_load_kg_h", sa.Double(), nullable=True),
        sa.Column("hours_per_year", sa.Double(), nullable=True),
        sa.Column("in_service", sa.Boolean(), nullable=False),
        sa.Column("installed_on", sa.Date(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("created_at", service.store.models.UtcDateTime(), nullable=False),
        sa.Column("updated_at", service.store.models.UtcDateTime(), nullable=False),
        sa.ForeignKeyConstraint(["area_id"], ["areas.id"], name=op.f("fk_traps_area_id_areas")),
        sa.ForeignKeyConstraint(["site_id"], ["sites.id"], name=op.f("fk_traps_site_id_sites")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_traps")),
        sa.UniqueConstraint("site_id", "tag", name=op.f("uq_traps_site_id")),
    )
    with op.batch_alter_table("traps", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_traps_area_id"), ["area_id"], unique=False)
        batch_op.create_index(batch_op.f("ix_traps_site_id"), ["site_id"], unique=False)

    op.create_table(
        "findings",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("survey_id", sa.Integer(), nullable=False),
        sa.Column("trap_id", sa.Integer(), nullable=False),
        sa.Column("tested_at", service.store.models.UtcDateTime(), nullable=False),
        sa.Column("tested_by", sa.String(length=80), nullable=False),
        sa.Column(
            "method",
            sa.Enum(
                "ultrasonic",
                "temperature",
                "visual",
                "ultrasonic_temperature",
                "ultrasonic_visual",
                "temperature_visual",
                "ultrasonic_temperature_visual",
                name="testmethod",
                native_enum=False,
                length=40,
            ),
            nullable=False,
        ),
        sa.Column(
            "condition",
            sa.Enum(
                "working",
                "leaking",
                "blow_through",
                "plugged",
                "flooded",
                "rapid_cycling",
                "out_of_service",
                "not_accessible",
                name="trapcondition",
                native_enum=False,
                length=40,
            ),
            nullable=False,
        ),
        sa.Column("loss_factor_override", sa.Double(), nullable=True),
        sa.Column("upstream_temperature_c", sa.Double(), nullable=True),
        sa.Column("downstream_temperature_c", sa.Double(), nullable=True),
        sa.Column(
            "recommended_action",
            sa.Enum(
                "none",
                "retest",
                "repair",
                "replace",
                name="recommendedaction",
                native_enum=False,
                length=40,
            ),
            nullable=False,
        ),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("idempotency_key", sa.String(length=100), nullable=True),
        sa.Column("request_fingerprint", sa.String(length=64), nullable=True),
        sa.Column("created_at", service.store.models.UtcDateTime(), nullable=False),
        sa.ForeignKeyConstraint(
            ["survey_id"], ["surveys.id"], name=op.f("fk_findings_survey_id_surveys")
        ),
        sa.ForeignKeyConstraint(["trap_id"], ["traps.id"], name=op.f("fk_findings_trap_id_traps")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_findings")),
        sa.UniqueConstraint("idempotency_key", name=op.f("uq_findings_idempotency_key")),
    )
    with op.batch_alter_table("findings", schema=None) as batch_op:
        batch_op.create_index(
            "ix_findings_survey_trap_tested", ["survey_id", "trap_id", "tested_at"], unique=False
        )
        batch_op.create_index(batch_op.f("ix_findings_trap_id"), ["trap_id"], unique=False)

    op.create_table(
        "repairs",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("trap_id", sa.Integer(), nullable=False),
        sa.Column("repaired_on", sa.Date(), nullable=False),
        sa.Column(
            "kind",
            sa.Enum("repaired", "replaced", name="repairkind", native_enum=False, length=40),
            nullable=False,
        ),
        sa.Column("cost", sa.Double(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("created_at", service.store.models.UtcDateTime(), nullable=False),
        sa.ForeignKeyConstraint(["trap_id"], ["traps.id"], name=op.f("fk_repairs_trap_id_traps")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_repairs")),
    )
    with op.batch_alter_table("repairs", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_repairs_trap_id"), ["trap_id"], unique=False)


def downgrade() -> None:

    with op.batch_alter_table("repairs", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_repairs_trap_id"))

    op.drop_table("repairs")
    with op.batch_alter_table("findings", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_findings_trap_id"))
        batch_op.drop_index("ix_findings_survey_trap_tested")

    op.drop_table("findings")
    with op.batch_alter_table("traps", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_traps_site_id"))
        batch_op.drop_index(batch_op.f("ix_traps_area_id"))

    op.drop_table("traps")
    with op.batch_alter_table("surveys", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_surveys_site_id"))

    op.drop_table("surveys")
    with op.batch_alter_table("areas", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_areas_site_id"))

    op.drop_table("areas")
    op.drop_table("sites")
