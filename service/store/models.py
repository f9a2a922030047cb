"""The data model: sites, areas, traps, surveys, findings and repairs; the people who
sign in, their sessions and tokens; and the audit trail (SQLAlchemy 2 ORM).

Units follow `service.physics`: pressures kPa(g) where the name says `_kpa_g`,
temperatures degC, diameters mm, flows kg/h, hours per year h, money in the site's
currency. The schema itself is made by the Alembic migrations in `migrations/`; a test
checks that they and these classes agree.
"""

import datetime as dt
from enum import StrEnum
from typing import Any

from sqlalchemy import (
    JSON,
    Column,
    DateTime,
    Enum,
    ForeignKey,
    Index,
    MetaData,
    String,
    Table,
    Text,
    TypeDecorator,
    UniqueConstraint,
)
from sqlalchemy.engine import Dialect
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship

from service.physics.annual import ClosedReturnPricing, HeatingValue
from service.physics.conditions import TrapCondition
from service.physics.trap_loss import CondensateDestination
from service.physics.units import UnitSystem
from service.store.vocabulary import (
    Application,
    CostBasis,
    RecommendedAction,
    RepairKind,
    SurveyStatus,
    TestMethod,
    TrapType,
)

# Named constraints, so that migrations can alter them on every database.
NAMING_CONVENTION = {
    "ix": "ix_%(column_0_label)s",
    "uq": "uq_%(table_name)s_%(column_0_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}


class UtcDateTime(TypeDecorator[dt.datetime]):
    """A moment, stored as naive UTC on every database and read back as aware UTC."""

    impl = DateTime
    cache_ok = True

    def process_bind_param(self, value: dt.datetime | None, dialect: Dialect) -> Any:
        if value is None:
            return None
        if value.tzinfo is None:
            raise ValueError("a stored moment must carry its time zone")
        if value.tzinfo is not dt.UTC:
            value = value.astimezone(dt.UTC)
        return value.replace(tzinfo=None)

    def process_result_value(self, value: Any, dialect: Dialect) -> dt.datetime | None:
        return None if value is None else value.replace(tzinfo=dt.UTC)


def _words(vocabulary: type[StrEnum]) -> Enum:
    """A column of one vocabulary, stored as its lower-case words, not Python names."""
    return Enum(
        vocabulary,
        native_enum=False,
        create_constraint=False,
        length=40,
        values_callable=lambda members: [member.value for member in members],
        validate_strings=True,
    )


def _now() -> dt.datetime:
    return dt.datetime.now(dt.UTC)


class Base(DeclarativeBase):
    metadata = MetaData(naming_convention=NAMING_CONVENTION)


class Site(Base):
    """A plant, with every price, factor and default its losses are computed with."""

    __tablename__ = "sites"

    id: Mapped[int] = mapped_column(primary_key=True)
    name: Mapped[str] = mapped_column(String(120), unique=True)
    location: Mapped[str] = mapped_column(String(200), default="")
    elevation_m: Mapped[float | None]
    atmospheric_pressure_kpa: Mapped[float]
    currency: Mapped[str] = mapped_column(String(3))
    unit_system: Mapped[UnitSystem] = mapped_column(_words(UnitSystem))
    cost_basis: Mapped[CostBasis] = mapped_column(_words(CostBasis))
    steam_cost_per_tonne: Mapped[float | None]
    fuel_price_per_gj: Mapped[float | None]
    boiler_efficiency: Mapped[float]
    water_and_treatment_cost_per_tonne: Mapped[float]
    makeup_water_temperature_c: Mapped[float]
    co2_kg_per_gj_fuel: Mapped[float]
    fuel_heating_value: Mapped[HeatingValue] = mapped_column(
        _words(HeatingValue), server_default="lhv"
    )
    co2_factor_heating_value: Mapped[HeatingValue] = mapped_column(
        _words(HeatingValue), server_default="lhv"
    )
    net_to_gross_ratio: Mapped[float] = mapped_column(server_default="0.9")
    sewer_cost_per_tonne: Mapped[float] = mapped_column(server_default="0")
    test_cost_per_trap: Mapped[float] = mapped_column(server_default="10")
    drain_temperature_limit_c: Mapped[float | None]
    closed_return_pricing: Mapped[ClosedReturnPricing] = mapped_column(
        _words(ClosedReturnPricing), server_default="heat_not_recovered"
    )
    hours_per_year: Mapped[float]
    discharge_coefficient: Mapped[float]
    discharge_coefficient_low: Mapped[float]
    discharge_coefficient_high: Mapped[float]
    # {condition: [typical, low, high]} for the conditions that waste live steam.
    loss_factors: Mapped[dict[str, list[float]]] = mapped_column(JSON)
    # {trap type: {"repaired": cost, "replaced": cost}} in the site's currency.
    repair_costs: Mapped[dict[str, dict[str, float]]] = mapped_column(JSON)
    # Bumped in the same transaction as every write to the site or its records
    # (service/store/revisions.py): a roll-up computed at one revision holds until the next.
    revision: Mapped[int] = mapped_column(default=0, server_default="0")
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)
    updated_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now, onupdate=_now)

    areas: Mapped[list["Area"]] = relationship(back_populates="site", order_by="Area.route_order")


class Area(Base):
    """A part of a site (a building, a process line), in the order a route walks them."""

    __tablename__ = "areas"
    __table_args__ = (UniqueConstraint("site_id", "name"),)

    id: Mapped[int] = mapped_column(primary_key=True)
    site_id: Mapped[int] = mapped_column(ForeignKey("sites.id"), index=True)
    name: Mapped[str] = mapped_column(String(120))
    route_order: Mapped[int] = mapped_column(default=0)

    site: Mapped[Site] = relationship(back_populates="areas")


class Trap(Base):
    """One steam trap of the register."""

    __tablename__ = "traps"
    __table_args__ = (
        UniqueConstraint("site_id", "tag"),
        # The walk counts a site's traps in service by area, and reads each area's traps
        # in walking order from here (`store/route.py`).
        Index(
            "ix_traps_walking_order",
            "site_id",
            "in_service",
            "area_id",
            "route_position",
            "tag",
        ),
    )

    id: Mapped[int] = mapped_column(primary_key=True)
    site_id: Mapped[int] = mapped_column(ForeignKey("sites.id"), index=True)
    area_id: Mapped[int | None] = mapped_column(ForeignKey("areas.id"), index=True)
    tag: Mapped[str] = mapped_column(String(40))
    location: Mapped[str] = mapped_column(String(200), default="")
    route_position: Mapped[int | None]
    application: Mapped[Application] = mapped_column(_words(Application))
    trap_type: Mapped[TrapType] = mapped_column(_words(TrapType))
    connection_size: Mapped[str] = mapped_column(String(20), default="")
    orifice_diameter_mm: Mapped[float]
    inlet_pressure_kpa_g: Mapped[float]
    steam_temperature_c: Mapped[float | None]  # a superheated line's; None: saturated
    return_pressure_kpa_g: Mapped[float]
    condensate_destination: Mapped[CondensateDestination] = mapped_column(
        _words(CondensateDestination)
    )
    condensate_load_kg_h: Mapped[float | None]
    hours_per_year: Mapped[float | None]
    in_service: Mapped[bool] = mapped_column(default=True)
    installed_on: Mapped[dt.date | None]
    notes: Mapped[str] = mapped_column(Text, default="")
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)
    updated_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now, onupdate=_now)

    area: Mapped[Area | None] = relationship()


class Survey(Base):
    """A round of testing at a site."""

    __tablename__ = "surveys"
    __table_args__ = (UniqueConstraint("site_id", "name"),)

    id: Mapped[int] = mapped_column(primary_key=True)
    site_id: Mapped[int] = mapped_column(ForeignKey("sites.id"), index=True)
    name: Mapped[str] = mapped_column(String(120))
    started_on: Mapped[dt.date]
    ended_on: Mapped[dt.date | None]
    notes: Mapped[str] = mapped_column(Text, default="")
    status: Mapped[SurveyStatus] = mapped_column(
        _words(SurveyStatus), server_default=SurveyStatus.IN_PROGRESS.value
    )


class Finding(Base):
    """One test of one trap in one survey. The latest in a survey is the one that counts."""

    __tablename__ = "findings"
    __table_args__ = (
        Index("ix_findings_survey_trap_tested", "survey_id", "trap_id", "tested_at"),
        # The walk's count of traps found not accessible in a round reads only those.
        Index("ix_findings_survey_condition", "survey_id", "condition"),
    )

    id: Mapped[int] = mapped_column(primary_key=True)
    survey_id: Mapped[int] = mapped_column(ForeignKey("surveys.id"))
    trap_id: Mapped[int] = mapped_column(ForeignKey("traps.id"), index=True)
    tested_at: Mapped[dt.datetime] = mapped_column(UtcDateTime)
    tested_by: Mapped[str] = mapped_column(String(80), default="")
    method: Mapped[TestMethod] = mapped_column(_words(TestMethod))
    condition: Mapped[TrapCondition] = mapped_column(_words(TrapCondition))
    loss_factor_override: Mapped[float | None]
    upstream_temperature_c: Mapped[float | None]
    downstream_temperature_c: Mapped[float | None]
    recommended_action: Mapped[RecommendedAction] = mapped_column(_words(RecommendedAction))
    notes: Mapped[str] = mapped_column(Text, default="")
    # A tablet's retry sends the same key: one finding is stored (issue 3).
    idempotency_key: Mapped[str | None] = mapped_column(String(100), unique=True)
    request_fingerprint: Mapped[str | None] = mapped_column(String(64))
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)

    trap: Mapped[Trap] = relationship()


class FindingPhoto(Base):
    """A photo taken at a finding. The file lives in the photo folder (a setting), under a
    random name; the site is kept here so that only those who may read it are served it."""

    __tablename__ = "finding_photos"

    id: Mapped[int] = mapped_column(primary_key=True)
    site_id: Mapped[int] = mapped_column(ForeignKey("sites.id"), index=True)
    finding_id: Mapped[int] = mapped_column(
        ForeignKey("findings.id", ondelete="CASCADE"), index=True
    )
    stored_name: Mapped[str] = mapped_column(String(64), unique=True)
    content_type: Mapped[str] = mapped_column(String(40))
    size_bytes: Mapped[int]
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)


class Repair(Base):
    """A trap repaired or replaced. The trap's next finding confirms it."""

    __tablename__ = "repairs"

    id: Mapped[int] = mapped_column(primary_key=True)
    trap_id: Mapped[int] = mapped_column(ForeignKey("traps.id"), index=True)
    repaired_on: Mapped[dt.date]
    kind: Mapped[RepairKind] = mapped_column(_words(RepairKind))
    cost: Mapped[float | None]
    notes: Mapped[str] = mapped_column(Text, default="")
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)


class Role(StrEnum):
    """What a person may do: see service/accounts/roles.py for each role's permissions."""

    TECHNICIAN = "technician"
    MANAGER = "manager"
    ADMIN = "admin"


user_sites = Table(
    "user_sites",
    Base.metadata,
    Column("user_id", ForeignKey("users.id", ondelete="CASCADE"), primary_key=True),
    Column("site_id", ForeignKey("sites.id", ondelete="CASCADE"), primary_key=True),
)


class User(Base):
    """A person who signs in. Never deleted: disabled, so the audit trail keeps its names."""

    __tablename__ = "users"

    id: Mapped[int] = mapped_column(primary_key=True)
    name: Mapped[str] = mapped_column(String(80), unique=True)
    role: Mapped[Role] = mapped_column(_words(Role))
    # Argon2id, in the PHC string format that carries its own parameters and salt.
    password_hash: Mapped[str] = mapped_column(String(200))
    disabled: Mapped[bool] = mapped_column(default=False)
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)
    password_changed_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)

    sites: Mapped[list[Site]] = relationship(secondary=user_sites, order_by="Site.name")


class UserSession(Base):
    """A signed-in browser. The cookie holds a random secret; only its SHA-256 is stored."""

    __tablename__ = "user_sessions"

    id: Mapped[int] = mapped_column(primary_key=True)
    secret_sha256: Mapped[str] = mapped_column(String(64), unique=True)
    user_id: Mapped[int] = mapped_column(ForeignKey("users.id", ondelete="CASCADE"), index=True)
    # The synchronizer token every changing form of this session must carry.
    csrf_token: Mapped[str] = mapped_column(String(64))
    started_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)
    last_seen_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)

    user: Mapped[User] = relationship()


class SignInFailure(Base):
    """A failed sign-in, counted against the name tried and the client's address in a
    moving window. Kept in the database so that every worker process counts the same."""

    __tablename__ = "sign_in_failures"
    __table_args__ = (Index("ix_sign_in_failures_kind_key_at", "kind", "key", "at"),)

    id: Mapped[int] = mapped_column(primary_key=True)
    kind: Mapped[str] = mapped_column(String(10))  # "account" or "address"
    key: Mapped[str] = mapped_column(String(200))
    at: Mapped[dt.datetime] = mapped_column(UtcDateTime)


class ApiToken(Base):
    """A bearer token for an integration, acting as its user. Stored as its SHA-256 only."""

    __tablename__ = "api_tokens"

    id: Mapped[int] = mapped_column(primary_key=True)
    secret_sha256: Mapped[str] = mapped_column(String(64), unique=True)
    user_id: Mapped[int] = mapped_column(ForeignKey("users.id", ondelete="CASCADE"), index=True)
    label: Mapped[str] = mapped_column(String(80), default="")
    created_at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)
    revoked_at: Mapped[dt.datetime | None] = mapped_column(UtcDateTime)

    user: Mapped[User] = relationship()


class AuditEntry(Base):
    """One change to a record: who, when, and the values before and after.

    Written by service/store/audit.py in the transaction of the change itself; no route
    changes or deletes an entry. Ids are plain integers, not foreign keys, so an entry
    outlives the record it tells of.
    """

    __tablename__ = "audit_entries"
    __table_args__ = (
        Index("ix_audit_entries_site_at", "site_id", "at"),
        Index("ix_audit_entries_trap_at", "trap_id", "at"),
    )

    id: Mapped[int] = mapped_column(primary_key=True)
    at: Mapped[dt.datetime] = mapped_column(UtcDateTime, default=_now)
    actor_user_id: Mapped[int | None]
    actor_name: Mapped[str] = mapped_column(String(80))
    action: Mapped[str] = mapped_column(String(10))
    record_type: Mapped[str] = mapped_column(String(20))
    record_id: Mapped[int]
    site_id: Mapped[int | None]
    trap_id: Mapped[int | None]
    old_values: Mapped[dict[str, Any] | None] = mapped_column(JSON)
    new_values: Mapped[dict[str, Any] | None] = mapped_column(JSON)
