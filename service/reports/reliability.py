"""A site's fleet reliability from every round and repair it holds: how long traps last
by trap type, application and pressure class; how often each group is worth testing;
and what a round on a given day can expect to find, with a route that tests the traps
of the largest expected loss first. The calculations are `service.reliability`'s."""

import datetime as dt
import math
from collections import defaultdict
from collections.abc import Callable
from dataclasses import dataclass

from sqlalchemy import DateTime, select, type_coerce
from sqlalchemy.orm import Session

from service.physics.conditions import (
    FindingCategory,
    TrapCondition,
    category_of,
    is_failed,
)
from service.reliability.estimates import GroupEstimate, Rate, estimate
from service.reliability.intervals import (
    DOE_INTERVALS,
    best_test_interval_years,
    chance_failed_by,
    pressure_class,
    yearly_testing_cost,
)
from service.reliability.lives import DAYS_A_YEAR, Inspection, Life, lives_of
from service.reports.summary import SiteSummary
from service.store.models import Area, Finding, Repair, Site, Trap
from service.store.register import ROUTE_ORDER
from service.store.vocabulary import label

NO_EVIDENCE = frozenset({TrapCondition.NOT_ACCESSIBLE, TrapCondition.OUT_OF_SERVICE})
BREAKDOWNS: dict[str, str] = {
    "trap_type": "trap type",
    "application": "application",
    "pressure_class": "pressure class (US DOE)",
}
CURVE_INTERVALS_YEARS = (1 / 12, 0.25, 0.5, 1.0, 2.0)
CURVES_FOR = "trap_type"  # the breakdown whose survival curves are drawn
ROUTE_SHOWN = 30


@dataclass(frozen=True, slots=True)
class TrapHistory:
    """One trap in service: what it is, and every test and repair it has had."""

    trap_id: int
    tag: str
    area_name: str
    groups: dict[str, str]  # breakdown -> its group (trap type, application, class)
    inspections: list[Inspection]
    repairs: list[dt.date]
    installed_on: dt.date | None

    @property
    def last_working_on(self) -> dt.date | None:
        """When it was last known to work (a working test or a repair), if it works now."""
        events = sorted(
            [(inspection.on, inspection.failed) for inspection in self.inspections]
            + [(day, False) for day in self.repairs]
        )
        if not events:
            return self.installed_on
        day, failed = events[-1]
        return None if failed else day


@dataclass(frozen=True, slots=True)
class GroupReliability:
    breakdown: str
    key: str
    estimate: GroupEstimate
    mean_failure_loss: float | None  # a failed trap's yearly failure loss in this group
    best_interval_years: float | None
    doe_interval: str | None  # for pressure classes
    cost_curve: list[tuple[float, float]]  # (interval [years], yearly cost a trap)

    @property
    def label(self) -> str:
        if self.breakdown == "pressure_class":
            return f"{self.key.capitalize()} pressure"
        return label(self.key)


@dataclass(frozen=True, slots=True)
class ExpectedTrap:
    """A trap on the next round: the chance it will be found failed, and the loss that
    chance carries (the rate's typical, low and high)."""

    trap_id: int
    tag: str
    area_name: str
    chance: float
    expected_loss: float
    expected_loss_low: float
    expected_loss_high: float


@dataclass(frozen=True, slots=True)
class NextRound:
    on: dt.date
    traps: list[ExpectedTrap]  # by expected loss, largest first

    def by_area(self) -> dict[str, tuple[float, float, float, float]]:
        """Each area's expected failed traps and expected failure loss (typical, low,
        high), in route order."""
        areas: dict[str, list[float]] = {}
        for trap in sorted(self.traps, key=lambda each: each.area_name):
            sums = areas.setdefault(trap.area_name, [0.0, 0.0, 0.0, 0.0])
            sums[0] += trap.chance
            sums[1] += trap.expected_loss
            sums[2] += trap.expected_loss_low
            sums[3] += trap.expected_loss_high
        return {name: (a, b, c, d) for name, (a, b, c, d) in areas.items()}


@dataclass(frozen=True, slots=True)
class SiteReliability:
    site: Site
    traps: int
    lives: int
    failures: int
    overall: GroupEstimate
    groups: list[GroupReliability]
    next_round: NextRound


def _groups_of(trap_type: str, application: str, inlet_kpa_g: float) -> dict[str, str]:
    """A trap's group in each breakdown."""
    return {
        "trap_type": str(trap_type),
        "application": str(application),
        "pressure_class": pressure_class(inlet_kpa_g),
    }


def site_histories(session: Session, site: Site) -> list[TrapHistory]:
    """Every trap in service with its tests (those that told whether it worked) and
    repairs, in route order."""
    traps = session.execute(
        select(
            Trap.id,
            Trap.tag,
            Area.name,
            Trap.trap_type,
            Trap.application,
            Trap.inlet_pressure_kpa_g,
            Trap.installed_on,
        )
        .outerjoin(Area, Area.id == Trap.area_id)
        .where(Trap.site_id == site.id, Trap.in_service)
        .order_by(*ROUTE_ORDER)
    ).all()
    # Through the connection, past the ORM's row loading: a large site has 100,000 rows.
    connection = session.connection()
    inspections: dict[int, list[Inspection]] = defaultdict(list)
    # Only the day counts: read as a plain DateTime, past the UTC decorator's per-row work.
    tested_at = type_coerce(Finding.tested_at, DateTime())
    for trap_id, tested_on, condition in connection.execute(
        select(Finding.trap_id, tested_at, Finding.condition)
        .join(Trap, Trap.id == Finding.trap_id)
        .where(Trap.site_id == site.id)
    ):
        if condition not in NO_EVIDENCE:
            inspections[trap_id].append(Inspection(tested_on.date(), is_failed(condition)))
    repairs: dict[int, list[dt.date]] = defaultdict(list)
    for trap_id, repaired_on in connection.execute(
        select(Repair.trap_id, Repair.repaired_on)
        .join(Trap, Trap.id == Repair.trap_id)
        .where(Trap.site_id == site.id)
    ):
        repairs[trap_id].append(repaired_on)
    return [
        TrapHistory(
            trap_id=trap_id,
            tag=tag,
            area_name=area_name or "(no area)",
            groups=_groups_of(trap_type, application, inlet_kpa_g),
            inspections=inspections[trap_id],
            repairs=repairs[trap_id],
            installed_on=installed_on,
        )
        for trap_id, tag, area_name, trap_type, application, inlet_kpa_g, installed_on in traps
    ]


def _mean_failure_losses(summary: SiteSummary | None) -> Callable[[str, str], float | None]:
    """A failed trap's mean yearly failure loss in a group, from the latest round's priced
    failures; the site's mean where the group had none; None before any failure."""
    losses: dict[tuple[str, str], list[float]] = defaultdict(list)
    every: list[float] = []
    priced_traps = summary.priced if summary is not None else []
    atmosphere_kpa = summary.site.atmospheric_pressure_kpa if summary is not None else 0.0
    for priced in priced_traps:
        if category_of(priced.condition) != FindingCategory.FAILURE:
            continue
        inlet_kpa_g = priced.service.inlet_pressure_kpa_abs - atmosphere_kpa
        groups = _groups_of(priced.trap_type, priced.application, inlet_kpa_g)
        for breakdown, key in groups.items():
            losses[(breakdown, key)].append(priced.yearly_cost)
        every.append(priced.yearly_cost)
    site_mean = sum(every) / len(every) if every else None

    def mean(breakdown: str, key: str) -> float | None:
        found = losses.get((breakdown, key))
        return sum(found) / len(found) if found else site_mean

    return mean


def _group(
    breakdown: str, key: str, lives: list[Life], loss: float | None, test_cost: float
) -> GroupReliability:
    found = estimate(lives, with_curves=breakdown == CURVES_FOR)
    best = None
    curve: list[tuple[float, float]] = []
    if loss is not None and loss > 0 and found.rate.per_year > 0:
        best = best_test_interval_years(test_cost, found.rate.per_year, loss)
        curve = [
            (years, yearly_testing_cost(years, test_cost, found.rate.per_year, loss))
            for years in sorted({*CURVE_INTERVALS_YEARS, round(best, 3)})
            if years > 0
        ]
    doe = DOE_INTERVALS[key][1] if breakdown == "pressure_class" else None
    return GroupReliability(breakdown, key, found, loss, best, doe, curve)


def _next_round(
    histories: list[TrapHistory],
    rates: dict[str, Rate],
    loss_of: Callable[[str, str], float | None],
    known_losses: dict[int, float],
    on: dt.date,
) -> NextRound:
    """Each trap's chance of being found failed on `on` and the loss it carries: a trap
    failed now and not repaired since, its own priced loss for certain; one working, its
    type's rate since it was last known to work, and its type's mean failure loss."""
    expected = []
    for history in histories:
        trap_type = history.groups["trap_type"]
        rate, loss = rates.get(trap_type), loss_of("trap_type", trap_type)
        since = history.last_working_on
        if since is None:
            loss = known_losses.get(history.trap_id, loss)
        if rate is None or loss is None:
            continue
        if since is None:
            chances = (1.0, 1.0, 1.0)
        else:
            years = (on - since).days / DAYS_A_YEAR
            chances = (
                chance_failed_by(rate.per_year, years),
                chance_failed_by(rate.low, years),
                chance_failed_by(rate.high, years),
            )
        expected.append(
            ExpectedTrap(
                history.trap_id,
                history.tag,
                history.area_name,
                chances[0],
                chances[0] * loss,
                chances[1] * loss,
                chances[2] * loss,
            )
        )
    expected.sort(key=lambda trap: (-trap.expected_loss, trap.tag))
    return NextRound(on, expected)


def site_reliability(
    *, session: Session, site: Site, latest: SiteSummary | None, next_round_on: dt.date
) -> SiteReliability:
    """The site's reliability: `latest` is the latest round's summary (its failure losses
    price a failure), `next_round_on` the day the next round is expected."""
    histories = site_histories(session, site)
    lives_by_trap = {
        history.trap_id: lives_of(history.inspections, history.repairs, history.installed_on)
        for history in histories
    }
    every_life = [life for lives in lives_by_trap.values() for life in lives]
    loss_of = _mean_failure_losses(latest)
    known_losses = {
        priced.trap_id: priced.yearly_cost
        for priced in (latest.priced if latest is not None else [])
        if is_failed(priced.condition)
    }
    groups = []
    for breakdown in BREAKDOWNS:
        grouped: dict[str, list[Life]] = defaultdict(list)
        for history in histories:
            grouped[history.groups[breakdown]] += lives_by_trap[history.trap_id]
        groups += [
            _group(breakdown, key, lives, loss_of(breakdown, key), site.test_cost_per_trap)
            for key, lives in sorted(grouped.items())
            if lives
        ]
    rates = {group.key: group.estimate.rate for group in groups if group.breakdown == "trap_type"}
    overall = estimate(every_life or [Life(0.0, math.inf)], with_curves=False)
    return SiteReliability(
        site=site,
        traps=len(histories),
        lives=len(every_life),
        failures=sum(life.failed for life in every_life),
        overall=overall,
        groups=groups,
        next_round=_next_round(histories, rates, loss_of, known_losses, next_round_on),
    )


def next_round_default(latest: SiteSummary | None, today: dt.date) -> dt.date:
    """A year after the latest round began (rounds here are yearly), or a year from today."""
    started = latest.survey.started_on if latest is not None and latest.survey else today
    return started + dt.timedelta(days=365)
