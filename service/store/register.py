"""Sites, their areas and their trap register: reading and writing them.

Every function takes its arguments by keyword and works inside the caller's session;
the caller's transaction makes each request all-or-nothing.
"""

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from sqlalchemy import func, select
from sqlalchemy.orm import Session

from service.physics import steam_tables
from service.physics.conditions import TrapCondition
from service.physics.orifice import live_steam
from service.physics.pressure import (
    STANDARD_ATMOSPHERE_KPA,
    absolute_from_gauge,
    atmospheric_pressure_at_elevation_kpa,
)
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.store.latest import is_latest_finding
from service.store.models import Area, Finding, Repair, Site, Survey, Trap
from service.store.records import Page, get, merged_input, paged
from service.store.schemas import (
    AreaCreate,
    LossFactorsIn,
    RepairCostIn,
    SiteCreate,
    SpreadIn,
    TrapCreate,
)
from service.store.vocabulary import Application, TrapType

# Sites --------------------------------------------------------------------------------


def _site_columns(data: SiteCreate) -> dict[str, Any]:
    if data.atmospheric_pressure_kpa is not None:
        atmosphere = data.atmospheric_pressure_kpa
    elif data.elevation_m is not None:
        atmosphere = atmospheric_pressure_at_elevation_kpa(data.elevation_m)
    else:
        atmosphere = STANDARD_ATMOSPHERE_KPA
    columns = data.model_dump(exclude={"loss_factors", "repair_costs"})
    columns["atmospheric_pressure_kpa"] = atmosphere
    columns["loss_factors"] = {
        condition: [spread.typical, spread.low, spread.high]
        for condition, spread in data.loss_factors
    }
    columns["repair_costs"] = {
        str(trap_type): cost.model_dump() for trap_type, cost in data.repair_costs.items()
    }
    return columns


def site_as_input(site: Site) -> dict[str, Any]:
    """A stored site in the shape `SiteCreate` takes, to merge changes into."""
    fields = {name: getattr(site, name) for name in SiteCreate.model_fields}
    if site.elevation_m is not None:
        fields["atmospheric_pressure_kpa"] = None  # derived from the elevation
    fields["loss_factors"] = LossFactorsIn(
        **{
            condition: SpreadIn(typical=typical, low=low, high=high)
            for condition, (typical, low, high) in site.loss_factors.items()
        }
    )
    fields["repair_costs"] = {
        TrapType(trap_type): RepairCostIn(**cost) for trap_type, cost in site.repair_costs.items()
    }
    return fields


def _unique_site_name(session: Session, name: str, site_id: int | None = None) -> None:
    clash = session.scalar(select(Site.id).where(Site.name == name, Site.id != (site_id or -1)))
    if clash is not None:
        raise ConflictError(f"a site named '{name}' already exists")


def create_site(*, session: Session, data: SiteCreate) -> Site:
    _unique_site_name(session, data.name)
    site = Site(**_site_columns(data))
    session.add(site)
    session.flush()
    return site


def update_site(*, session: Session, site: Site, changes: dict[str, Any]) -> Site:
    data = merged_input(SiteCreate, site_as_input(site), changes)
    _unique_site_name(session, data.name, site.id)
    columns = _site_columns(data)
    for name, value in columns.items():
        setattr(site, name, value)
    _check_site_pressures(session, site)
    session.flush()
    return site


def _check_site_pressures(session: Session, site: Site) -> None:
    """A new atmosphere must leave every trap's pressures on the saturation line."""
    for trap in session.scalars(select(Trap).where(Trap.site_id == site.id)):
        try:
            _check_pressures(site, trap.inlet_pressure_kpa_g, trap.return_pressure_kpa_g)
        except FieldError as problem:
            raise FieldError("atmospheric_pressure_kpa", f"trap {trap.tag}: {problem}") from problem


def delete_site(*, session: Session, site: Site) -> None:
    if session.scalar(select(Trap.id).where(Trap.site_id == site.id).limit(1)) is not None:
        raise ConflictError("a site with traps cannot be deleted")
    for model in (Area, Survey):
        for record in session.scalars(select(model).where(model.site_id == site.id)):
            session.delete(record)
    session.delete(site)
    session.flush()


# Areas --------------------------------------------------------------------------------


def _unique_area_name(session: Session, site: Site, name: str, area_id: int | None) -> None:
    clash = session.scalar(
        select(Area.id).where(
            Area.site_id == site.id, Area.name == name, Area.id != (area_id or -1)
        )
    )
    if clash is not None:
        raise ConflictError(f"the site already has an area named '{name}'")


def create_area(*, session: Session, site: Site, data: AreaCreate) -> Area:
    _unique_area_name(session, site, data.name, None)
    area = Area(site_id=site.id, **data.model_dump())
    session.add(area)
    session.flush()
    return area


def update_area(*, session: Session, area: Area, changes: dict[str, Any]) -> Area:
    current = {"name": area.name, "route_order": area.route_order}
    data = merged_input(AreaCreate, current, changes)
    _unique_area_name(session, area.site, data.name, area.id)
    area.name, area.route_order = data.name, data.route_order
    session.flush()
    return area


def delete_area(*, session: Session, area: Area) -> None:
    if session.scalar(select(Trap.id).where(Trap.area_id == area.id).limit(1)) is not None:
        raise ConflictError("an area with traps cannot be deleted; move its traps first")
    session.delete(area)
    session.flush()


def areas_of(*, session: Session, site: Site) -> Sequence[Area]:
    return session.scalars(
        select(Area).where(Area.site_id == site.id).order_by(Area.route_order, Area.name)
    ).all()


# Traps --------------------------------------------------------------------------------


def check_pressure(site: Site, field: str, pressure_kpa_g: float) -> None:
    """FieldError unless the gauge pressure at this site lies on the saturation line."""
    try:
        steam_tables.require_saturation_pressure(
            absolute_from_gauge(pressure_kpa_g, site.atmospheric_pressure_kpa)
        )
    except ValueError as error:
        raise FieldError(field, f"{pressure_kpa_g:g} kPa(g) at this site is {error}") from error


def _check_pressures(site: Site, inlet_kpa_g: float, return_kpa_g: float) -> None:
    check_pressure(site, "inlet_pressure_kpa_g", inlet_kpa_g)
    check_pressure(site, "return_pressure_kpa_g", return_kpa_g)


# The order a technician walks: areas by their route order, traps by their position in
# the area, then by tag. Unplaced areas and traps come last on every database (SQLite
# sorts NULL first and PostgreSQL last unless told).
AREA_ORDER = (Area.route_order.asc().nulls_last(), Area.name)
TRAP_ORDER_IN_AREA = (Trap.route_position.asc().nulls_last(), Trap.tag)
ROUTE_ORDER = (*AREA_ORDER, *TRAP_ORDER_IN_AREA)


def _check_trap(session: Session, site: Site, data: TrapCreate, trap_id: int | None) -> None:
    if data.area_id is not None:
        area = session.get(Area, data.area_id)
        if area is None or area.site_id != site.id:
            raise FieldError("area_id", f"the site has no area {data.area_id}")
    _check_pressures(site, data.inlet_pressure_kpa_g, data.return_pressure_kpa_g)
    if data.steam_temperature_c is not None:
        inlet_kpa_abs = absolute_from_gauge(
            data.inlet_pressure_kpa_g, site.atmospheric_pressure_kpa
        )
        try:
            live_steam(inlet_kpa_abs, data.steam_temperature_c)
        except ValueError as error:
            raise FieldError("steam_temperature_c", str(error)) from error
    # "HP-01" and "hp-01" are one tag on a label: compared without regard to case.
    clash = session.scalar(
        select(Trap.tag).where(
            Trap.site_id == site.id,
            func.lower(Trap.tag) == data.tag.lower(),
            Trap.id != (trap_id or -1),
        )
    )
    if clash is not None:
        raise ConflictError(f"the site already has a trap tagged '{clash}'")


def create_trap(*, session: Session, site: Site, data: TrapCreate) -> Trap:
    _check_trap(session, site, data, None)
    trap = Trap(site_id=site.id, **data.model_dump())
    session.add(trap)
    session.flush()
    return trap


def trap_tagged(*, session: Session, site: Site, tag: str) -> Trap:
    """The site's trap with this tag, whatever its case (a label read aloud or typed on a
    tablet); NotFoundError names the tag."""
    trap = session.scalar(
        select(Trap).where(Trap.site_id == site.id, func.lower(Trap.tag) == tag.strip().lower())
    )
    if trap is None:
        raise NotFoundError("trap tagged", tag.strip())
    return trap


def place_after(*, session: Session, trap: Trap, found_after: Trap) -> None:
    """Put a trap found in the field right after the trap where it was found, in that
    trap's area: the traps after it in the area move down one place, in the same order."""
    trap.area_id = found_after.area_id
    position = found_after.route_position
    if position is None:  # an unplaced trap: the new one goes among the unplaced, by tag
        trap.route_position = None
        session.flush()
        return
    following = session.scalars(
        select(Trap).where(
            Trap.site_id == trap.site_id,
            Trap.area_id == found_after.area_id
            if found_after.area_id is not None
            else Trap.area_id.is_(None),
            Trap.route_position > position,
            Trap.id != trap.id,
        )
    )
    for each in following:
        each.route_position = (each.route_position or 0) + 1
    trap.route_position = position + 1
    session.flush()


def trap_as_input(trap: Trap) -> dict[str, Any]:
    """A stored trap in the shape `TrapCreate` takes, to merge changes into."""
    return {name: getattr(trap, name) for name in TrapCreate.model_fields}


def update_trap(*, session: Session, trap: Trap, changes: dict[str, Any]) -> Trap:
    data = merged_input(TrapCreate, trap_as_input(trap), changes)
    site = get(session, Site, trap.site_id)
    _check_trap(session, site, data, trap.id)
    for name, value in data.model_dump().items():
        setattr(trap, name, value)
    session.flush()
    return trap


def retire_or_delete_trap(*, session: Session, trap: Trap) -> bool:
    """Delete a trap that has no history; retire (take out of service) one that has.

    Returns True when the trap was deleted, False when it was retired.
    """
    history = session.scalar(
        select(func.count()).select_from(Finding).where(Finding.trap_id == trap.id)
    ) or session.scalar(select(func.count()).select_from(Repair).where(Repair.trap_id == trap.id))
    if history:
        trap.in_service = False
        session.flush()
        return False
    session.delete(trap)
    session.flush()
    return True


@dataclass(frozen=True, slots=True)
class TrapFilter:
    """What a register list may be narrowed to."""

    area_id: int | None = None
    condition: TrapCondition | None = None
    application: Application | None = None
    trap_type: TrapType | None = None
    tag_prefix: str | None = None
    in_service: bool | None = None


def list_traps(
    *, session: Session, site: Site, where: TrapFilter, limit: int, offset: int
) -> Page[Trap]:
    """The register in area route order and route position, narrowed by `where`.

    `condition` is each trap's latest finding across every survey.
    """
    query = (
        select(Trap)
        .outerjoin(Area, Trap.area_id == Area.id)
        .where(Trap.site_id == site.id)
        .order_by(*ROUTE_ORDER)
    )
    if where.area_id is not None:
        query = query.where(Trap.area_id == where.area_id)
    if where.application is not None:
        query = query.where(Trap.application == where.application)
    if where.trap_type is not None:
        query = query.where(Trap.trap_type == where.trap_type)
    if where.in_service is not None:
        query = query.where(Trap.in_service == where.in_service)
    if where.tag_prefix:
        query = query.where(Trap.tag.startswith(where.tag_prefix, autoescape=True))
    if where.condition is not None:
        query = query.join(Finding, is_latest_finding()).where(Finding.condition == where.condition)
    return paged(session, query, limit=limit, offset=offset)
