"""How a site changed from one survey to the next: trap by trap, and in yearly cost."""

import datetime as dt
from collections import defaultdict
from dataclasses import dataclass, field
from enum import StrEnum

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.physics.conditions import TrapCondition
from service.reports.pricing import SitePricing
from service.reports.summary import PricedTrap, SiteSummary, site_summary
from service.store.models import Repair, Site, Survey, Trap


class Change(StrEnum):
    NEWLY_FAILED = "newly_failed"
    REPAIRED_AND_CONFIRMED = "repaired_and_confirmed"
    RECOVERED_WITHOUT_REPAIR = "recovered_without_repair"
    STILL_FAILED = "still_failed"
    NOT_RETESTED = "not_retested"


@dataclass(frozen=True, slots=True)
class TrapChange:
    trap_id: int
    tag: str
    area_name: str
    change: Change
    condition_before: TrapCondition | None
    condition_after: TrapCondition | None
    repaired_on: dt.date | None
    yearly_cost_before: float
    yearly_cost_after: float


@dataclass(slots=True)
class SurveyComparison:
    before: SiteSummary
    after: SiteSummary
    changes: dict[Change, list[TrapChange]] = field(default_factory=dict)

    @property
    def cost_change(self) -> float:
        """Yearly cost of the later survey less that of the earlier (negative: saved)."""
        return (self.after.totals.total.cost or 0.0) - (self.before.totals.total.cost or 0.0)

    @property
    def cost_change_low(self) -> float:
        return (self.after.totals.total_low.cost or 0.0) - (
            self.before.totals.total_high.cost or 0.0
        )

    @property
    def cost_change_high(self) -> float:
        return (self.after.totals.total_high.cost or 0.0) - (
            self.before.totals.total_low.cost or 0.0
        )


def _repair_dates(session: Session, site: Site) -> dict[int, list[dt.date]]:
    dates: dict[int, list[dt.date]] = defaultdict(list)
    rows = session.execute(
        select(Repair.trap_id, Repair.repaired_on)
        .join(Trap, Trap.id == Repair.trap_id)
        .where(Trap.site_id == site.id)
    )
    for trap_id, repaired_on in rows:
        dates[trap_id].append(repaired_on)
    return dates


def _change(before: PricedTrap | None, after: PricedTrap | None) -> Change | None:
    failed_before = before is not None and before.failed
    failed_after = after is not None and after.failed
    if failed_after:
        return Change.STILL_FAILED if failed_before else Change.NEWLY_FAILED
    if not failed_before:
        return None
    if after is None or after.condition in {
        TrapCondition.NOT_ACCESSIBLE,
        TrapCondition.OUT_OF_SERVICE,
    }:
        return Change.NOT_RETESTED
    return Change.RECOVERED_WITHOUT_REPAIR


def compare_surveys(
    *,
    session: Session,
    site: Site,
    before: Survey,
    after: Survey,
    after_summary: SiteSummary | None = None,
    before_summary: SiteSummary | None = None,
    pricing: SitePricing | None = None,
) -> SurveyComparison:
    """Trap by trap from `before` to `after`: newly failed, repaired and confirmed by a
    working finding, working again with no repair on record, still failed, or failed
    and not tested since. A caller that has either summary already passes it."""
    pricing = pricing or SitePricing.of(site)
    comparison = SurveyComparison(
        before=before_summary
        or site_summary(session=session, site=site, survey=before, pricing=pricing),
        after=after_summary
        or site_summary(session=session, site=site, survey=after, pricing=pricing),
    )
    earlier = {priced.trap_id: priced for priced in comparison.before.priced}
    later = {priced.trap_id: priced for priced in comparison.after.priced}
    repairs = _repair_dates(session, site)
    for trap_id in sorted(earlier.keys() | later.keys()):
        was, now = earlier.get(trap_id), later.get(trap_id)
        change = _change(was, now)
        if change is None:
            continue
        repaired_on = None
        if was is not None:
            after_date = now.tested_at.date() if now is not None else dt.date.max
            between = [
                day for day in repairs.get(trap_id, []) if was.tested_at.date() <= day <= after_date
            ]
            repaired_on = max(between) if between else None
        if change is Change.RECOVERED_WITHOUT_REPAIR and repaired_on is not None:
            change = Change.REPAIRED_AND_CONFIRMED
        either = now or was
        assert either is not None
        comparison.changes.setdefault(change, []).append(
            TrapChange(
                trap_id=trap_id,
                tag=either.tag,
                area_name=either.area_name,
                change=change,
                condition_before=was.condition if was else None,
                condition_after=now.condition if now else None,
                repaired_on=repaired_on,
                yearly_cost_before=was.yearly_cost if was else 0.0,
                yearly_cost_after=now.yearly_cost if now else 0.0,
            )
        )
    return comparison
