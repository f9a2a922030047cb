"""The site roll-up: every tested trap priced, summed by condition, area, application
and condensate destination, in the accounting a manager signs.

One pass over the traps and their latest findings in the survey. Each trap is priced
by the calculation core exactly as `POST /api/v1/calc/trap-loss` would price it (see
`pricing.py`); the roll-up only adds those figures up and ranks the repairs.

Failure losses (live steam of leaking, blowing and rapid-cycling traps) are what a
repair removes: the repair list, its order and every payback rest on them alone.
Installation losses (flash vented, condensate drained) follow from where traps
discharge, whatever their condition, and are summed apart as opportunities. Risks
(plugged, flooded) and unknowns (not accessible, untested) are counted and listed.
"""

import datetime as dt
from dataclasses import dataclass, field
from typing import NamedTuple, TypeVar

from sqlalchemy import func, or_, select
from sqlalchemy.orm import Session

from service.physics.annual import YearlyLoss
from service.physics.conditions import (
    FindingCategory,
    TrapCondition,
    category_of,
    is_failed,
    is_flooding_risk,
)
from service.physics.trap_loss import CondensateDestination, TrapLoss, TrapService
from service.reports.pricing import SitePricing
from service.store.latest import is_latest_finding
from service.store.models import Area, Finding, Repair, Site, Survey, Trap
from service.store.register import ROUTE_ORDER
from service.store.vocabulary import Application, RecommendedAction, RepairKind, TrapType

NO_AREA = "(no area)"


class SummaryRow(NamedTuple):
    """A trap and its latest finding in the survey, as the summary reads them."""

    trap_id: int
    tag: str
    location: str
    area_id: int | None
    area_name: str | None
    route_order: int | None
    application: Application
    trap_type: TrapType
    orifice_diameter_mm: float
    inlet_pressure_kpa_g: float
    steam_temperature_c: float | None
    return_pressure_kpa_g: float
    condensate_destination: CondensateDestination
    condensate_load_kg_h: float | None
    hours_per_year: float | None
    in_service: bool
    finding_id: int | None
    tested_at: dt.datetime | None
    condition: TrapCondition | None
    loss_factor_override: float | None
    upstream_temperature_c: float | None
    recommended_action: RecommendedAction | None


@dataclass(frozen=True, slots=True)
class PricedTrap:
    """One tested trap, its latest finding in the survey, and what that costs a year."""

    trap_id: int
    tag: str
    location: str
    area_id: int | None
    area_name: str
    application: Application
    trap_type: TrapType
    finding_id: int
    tested_at: dt.datetime
    condition: TrapCondition
    recommended_action: RecommendedAction
    loss_factor_override: float | None
    service: TrapService
    loss: TrapLoss
    repair_kind: RepairKind
    repair_cost: float | None
    repaired_on: dt.date | None  # a repair since the finding, awaiting its confirming test

    failed: bool  # needs repair: wastes steam or floods the equipment

    @property
    def category(self) -> FindingCategory:
        return category_of(self.condition)

    @property
    def yearly_cost(self) -> float:
        """The yearly cost of its failure loss: what a repair saves."""
        return self.loss.failure.cost or 0.0

    @property
    def payback(self) -> float | None:
        """Simple payback [years] on the typical failure loss."""
        return self.payback_years(self.loss.failure.cost)

    def payback_years(self, yearly_cost: float | None) -> float | None:
        """Simple payback = repair cost / yearly saving; None where nothing is saved."""
        if self.repair_cost is None or not yearly_cost:
            return None
        return self.repair_cost / yearly_cost


class _Sum:
    """A running sum of yearly losses, added to in place (a summary adds 80 000 of them)."""

    __slots__ = ("co2_t", "cost", "energy_gj", "fuel_gj", "mass_t", "priced")

    def __init__(self) -> None:
        self.mass_t = self.energy_gj = self.fuel_gj = self.cost = self.co2_t = 0.0
        self.priced = True

    def add(self, loss: YearlyLoss) -> None:
        self.mass_t += loss.mass_t
        self.energy_gj += loss.energy_gj
        self.fuel_gj += loss.fuel_gj
        self.co2_t += loss.co2_t
        if loss.cost is None:
            self.priced = False
        else:
            self.cost += loss.cost

    def absorb(self, other: "_Sum") -> None:
        self.mass_t += other.mass_t
        self.energy_gj += other.energy_gj
        self.fuel_gj += other.fuel_gj
        self.co2_t += other.co2_t
        self.cost += other.cost
        self.priced = self.priced and other.priced

    @property
    def loss(self) -> YearlyLoss:
        return YearlyLoss(
            mass_t=self.mass_t,
            energy_gj=self.energy_gj,
            fuel_gj=self.fuel_gj,
            cost=self.cost if self.priced else None,
            co2_t=self.co2_t,
        )


class Tally:
    """Sums over a group of priced traps: failure losses with their range, installation
    losses, and the count of traps in each accounting category."""

    __slots__ = (
        "_drain",
        "_flash",
        "_live",
        "_live_high",
        "_live_low",
        "failed",
        "failures",
        "risks",
        "traps",
        "unknown",
    )

    def __init__(self) -> None:
        self.traps = 0
        self.failed = 0
        self.failures = self.risks = self.unknown = 0
        self._live, self._live_low, self._live_high = _Sum(), _Sum(), _Sum()
        self._flash, self._drain = _Sum(), _Sum()

    def add(self, priced: PricedTrap) -> None:
        loss = priced.loss
        category = priced.category
        self.traps += 1
        self.failed += priced.failed
        self.failures += category is FindingCategory.FAILURE
        self.risks += category is FindingCategory.RISK
        self.unknown += category is FindingCategory.UNKNOWN
        self._live.add(loss.live_steam)
        self._live_low.add(loss.live_steam_low)
        self._live_high.add(loss.live_steam_high)
        self._flash.add(loss.condensate.flash_vented)
        self._drain.add(loss.condensate.condensate_to_drain)

    def absorb(self, other: "Tally") -> None:
        """Add another group's sums to this one."""
        self.traps += other.traps
        self.failed += other.failed
        self.failures += other.failures
        self.risks += other.risks
        self.unknown += other.unknown
        self._live.absorb(other._live)
        self._live_low.absorb(other._live_low)
        self._live_high.absorb(other._live_high)
        self._flash.absorb(other._flash)
        self._drain.absorb(other._drain)

    @property
    def failure(self) -> YearlyLoss:
        """Live steam of failed traps: the loss repairs remove."""
        return self._live.loss

    @property
    def failure_low(self) -> YearlyLoss:
        return self._live_low.loss

    @property
    def failure_high(self) -> YearlyLoss:
        return self._live_high.loss

    @property
    def flash_vented(self) -> YearlyLoss:
        return self._flash.loss

    @property
    def condensate_to_drain(self) -> YearlyLoss:
        return self._drain.loss

    @property
    def installation(self) -> YearlyLoss:
        """Flash vented and condensate drained: what projects, not repairs, remove."""
        return self.flash_vented + self.condensate_to_drain


@dataclass(slots=True)
class SiteSummary:
    """A survey's findings at a site, priced and rolled up."""

    site: Site
    survey: Survey | None
    traps_in_service: int = 0
    traps_untested: int = 0
    traps_not_accessible: int = 0
    traps_out_of_service: int = 0
    totals: Tally = field(default_factory=Tally)
    by_condition: dict[TrapCondition, Tally] = field(default_factory=dict)
    by_area: dict[str, Tally] = field(default_factory=dict)
    by_application: dict[Application, Tally] = field(default_factory=dict)
    by_destination: dict[CondensateDestination, Tally] = field(default_factory=dict)
    priced: list[PricedTrap] = field(default_factory=list)

    @property
    def traps_tested(self) -> int:
        """Traps tested in operation: found with a condition other than not accessible
        or out of service."""
        return self.totals.traps - self.traps_not_accessible - self.traps_out_of_service

    @property
    def failed_count(self) -> int:
        return self.totals.failed

    @property
    def failure_rate(self) -> float | None:
        """Failed traps over traps tested in operation; None before any test."""
        return self.failed_count / self.traps_tested if self.traps_tested else None

    @property
    def risks(self) -> list[PricedTrap]:
        """Plugged and flooded traps: no steam lost, but the equipment floods."""
        return [priced for priced in self.priced if is_flooding_risk(priced.condition)]

    @property
    def repair_list(self) -> list[PricedTrap]:
        """Traps whose failure loss costs money, quickest payback first (those without a
        repair cost last), then the costliest; one order for screen, report and CSV."""
        costly = [p for p in self.priced if p.failed and p.yearly_cost > 0.0]

        def order(priced: PricedTrap) -> tuple[bool, float, float, str]:
            payback = priced.payback
            return (payback is None, payback or 0.0, -priced.yearly_cost, priced.tag)

        return sorted(costly, key=order)


def _repair_cost(
    site: Site, trap_type: TrapType, action: RecommendedAction
) -> tuple[RepairKind, float | None]:
    kind = RepairKind.REPLACED if action is RecommendedAction.REPLACE else RepairKind.REPAIRED
    costs = site.repair_costs.get(trap_type.value)
    return kind, None if costs is None else costs.get(kind.value)


def _repairs_since(session: Session, site: Site) -> dict[int, dt.date]:
    rows = session.execute(
        select(Repair.trap_id, func.max(Repair.repaired_on))
        .join(Trap, Trap.id == Repair.trap_id)
        .where(Trap.site_id == site.id)
        .group_by(Repair.trap_id)
    )
    return dict(rows.all())


def summary_rows(session: Session, site: Site, survey: Survey | None) -> list[SummaryRow]:
    """Traps in service (and any tested in the survey since retired) with their latest
    finding in the survey, in route order: what a summary reads, and nothing else."""
    query = (
        select(
            Trap.id,
            Trap.tag,
            Trap.location,
            Trap.area_id,
            Area.name,
            Area.route_order,
            Trap.application,
            Trap.trap_type,
            Trap.orifice_diameter_mm,
            Trap.inlet_pressure_kpa_g,
            Trap.steam_temperature_c,
            Trap.return_pressure_kpa_g,
            Trap.condensate_destination,
            Trap.condensate_load_kg_h,
            Trap.hours_per_year,
            Trap.in_service,
            Finding.id,
            Finding.tested_at,
            Finding.condition,
            Finding.loss_factor_override,
            Finding.upstream_temperature_c,
            Finding.recommended_action,
        )
        .outerjoin(Area, Area.id == Trap.area_id)
        .outerjoin(Finding, is_latest_finding(survey_id=survey.id if survey else -1))
        .where(Trap.site_id == site.id, or_(Trap.in_service, Finding.id.is_not(None)))
        .order_by(*ROUTE_ORDER)
    )
    return [SummaryRow._make(row) for row in session.execute(query)]


def _priced(
    site: Site,
    pricing: SitePricing,
    row: SummaryRow,
    repaired_on: dt.date | None,
) -> PricedTrap:
    # A finding's columns are all NOT NULL: with its id present, so are the others.
    assert row.finding_id is not None
    assert row.tested_at is not None
    assert row.condition is not None
    assert row.recommended_action is not None
    service = pricing.trap_service(
        row,
        condition=row.condition,
        loss_factor_override=row.loss_factor_override,
        upstream_temperature_c=row.upstream_temperature_c,
    )
    kind, cost = _repair_cost(site, row.trap_type, row.recommended_action)
    return PricedTrap(
        trap_id=row.trap_id,
        tag=row.tag,
        location=row.location,
        area_id=row.area_id,
        area_name=row.area_name or NO_AREA,
        application=row.application,
        trap_type=row.trap_type,
        finding_id=row.finding_id,
        tested_at=row.tested_at,
        condition=row.condition,
        recommended_action=row.recommended_action,
        loss_factor_override=row.loss_factor_override,
        service=service,
        loss=pricing.loss(service),
        repair_kind=kind,
        repair_cost=cost,
        failed=is_failed(row.condition),
        repaired_on=repaired_on
        if repaired_on is not None and repaired_on >= row.tested_at.date()
        else None,
    )


Key = TypeVar("Key")


def _tally_of(tallies: dict[Key, Tally], key: Key) -> Tally:
    tally = tallies.get(key)
    if tally is None:
        tally = tallies[key] = Tally()
    return tally


def site_summary(
    *, session: Session, site: Site, survey: Survey | None, pricing: SitePricing | None = None
) -> SiteSummary:
    """The survey's findings at the site, each trap priced, then rolled up.

    Summaries of one site may share a `pricing`, which prices traps alike once. Sums go
    first into one tally per (condition, area, application); the breakdowns and the
    totals are sums of those.
    """
    summary = SiteSummary(site=site, survey=survey)
    pricing = pricing or SitePricing.of(site)
    repaired = _repairs_since(session, site)
    cells: dict[tuple[TrapCondition, str, Application, CondensateDestination], Tally] = {}
    for row in summary_rows(session, site, survey):
        summary.traps_in_service += row.in_service
        if row.finding_id is None:
            summary.traps_untested += 1
            continue
        priced = _priced(site, pricing, row, repaired.get(row.trap_id))
        summary.priced.append(priced)
        cell_key = (
            priced.condition,
            priced.area_name,
            priced.application,
            row.condensate_destination,
        )
        _tally_of(cells, cell_key).add(priced)
    for (condition, area_name, application, destination), cell in cells.items():
        for tally in (
            summary.totals,
            _tally_of(summary.by_condition, condition),
            _tally_of(summary.by_area, area_name),
            _tally_of(summary.by_application, application),
            _tally_of(summary.by_destination, destination),
        ):
            tally.absorb(cell)
        if condition is TrapCondition.NOT_ACCESSIBLE:
            summary.traps_not_accessible += cell.traps
        elif condition is TrapCondition.OUT_OF_SERVICE:
            summary.traps_out_of_service += cell.traps
    # Areas come in route order (the rows' order); conditions and uses in the trade's order.
    summary.by_condition = {
        c: summary.by_condition[c] for c in TrapCondition if c in summary.by_condition
    }
    summary.by_application = {
        a: summary.by_application[a] for a in Application if a in summary.by_application
    }
    summary.by_destination = {
        d: summary.by_destination[d] for d in CondensateDestination if d in summary.by_destination
    }
    return summary
