"""How a site changed from one survey to the next: trap by trap, and in yearly cost.

A comparison is fair only over traps tested in operation in both rounds: a trap not
reached in one of them says nothing about the change, so it is left out and counted.
The change in failure losses is summed over those traps, and its range holds the
site's assumptions (Cd, loss factors, prices) fixed on both sides: the low estimate of
one round goes with the low of the other, since they are the same unknowns. A risk
(plugged, flooded) that was repaired is a risk removed, never a cost or a saving.
"""

import datetime as dt
from collections import defaultdict
from dataclasses import dataclass, field
from enum import StrEnum

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.physics.conditions import FindingCategory, TrapCondition
from service.physics.spread import Spread
from service.reports.pricing import SitePricing
from service.reports.summary import PricedTrap, SiteSummary, site_summary
from service.store.models import Repair, Site, Survey, Trap

# Findings that say a trap was tested in operation, in either round.
_TESTED = frozenset({FindingCategory.FAILURE, FindingCategory.RISK, FindingCategory.WORKING})


NOTHING = Spread.exact(0.0)


class Change(StrEnum):
    NEWLY_FAILED = "newly_failed"
    REPAIRED_AND_CONFIRMED = "repaired_and_confirmed"
    RECOVERED_WITHOUT_REPAIR = "recovered_without_repair"
    STILL_FAILED = "still_failed"
    NOT_RETESTED = "not_retested"
    NEW_RISK = "new_risk"
    RISK_REMOVED = "risk_removed"
    STILL_A_RISK = "still_a_risk"


@dataclass(frozen=True, slots=True)
class TrapChange:
    trap_id: int
    tag: str
    area_name: str
    change: Change
    condition_before: TrapCondition | None
    condition_after: TrapCondition | None
    repaired_on: dt.date | None
    yearly_cost_before: float  # failure loss
    yearly_cost_after: float


@dataclass(slots=True)
class SurveyComparison:
    before: SiteSummary
    after: SiteSummary
    changes: dict[Change, list[TrapChange]] = field(default_factory=dict)
    traps_compared: int = 0  # tested in operation in both rounds
    traps_only_before: int = 0  # tested in operation in the earlier round only
    traps_only_after: int = 0
    failure_cost_before: Spread = NOTHING  # over the traps compared
    failure_cost_after: Spread = NOTHING
    installation_cost_before: float = 0.0  # over the traps compared
    installation_cost_after: float = 0.0

    @property
    def cost_change(self) -> float:
        """Yearly failure loss of the later survey less the earlier's, over the traps
        compared (negative: saved)."""
        return self.failure_cost_after.typical - self.failure_cost_before.typical

    @property
    def cost_change_range(self) -> tuple[float, float]:
        """The change with the assumptions held fixed on both sides: (lowest, highest) of
        low-with-low and high-with-high, widened to hold the typical change."""
        low_with_low = self.failure_cost_after.low - self.failure_cost_before.low
        high_with_high = self.failure_cost_after.high - self.failure_cost_before.high
        ends = (low_with_low, high_with_high, self.cost_change)
        return min(ends), max(ends)

    @property
    def traps_left_out(self) -> int:
        return self.traps_only_before + self.traps_only_after


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


def _category(priced: PricedTrap | None) -> FindingCategory | None:
    return None if priced is None else priced.category


def _change(before: PricedTrap | None, after: PricedTrap | None) -> Change | None:
    was, now = _category(before), _category(after)
    failure, risk = FindingCategory.FAILURE, FindingCategory.RISK
    if now is failure:
        return Change.STILL_FAILED if was is failure else Change.NEWLY_FAILED
    if now is risk:
        return Change.STILL_A_RISK if was is risk else Change.NEW_RISK
    if was not in (failure, risk):
        return None
    if now is not FindingCategory.WORKING:
        return Change.NOT_RETESTED
    return Change.RECOVERED_WITHOUT_REPAIR if was is failure else Change.RISK_REMOVED


def _sum_spread(traps: list[PricedTrap]) -> Spread:
    return Spread(
        sum(priced.loss.failure.cost or 0.0 for priced in traps),
        sum(priced.loss.live_steam_low.cost or 0.0 for priced in traps),
        sum(priced.loss.live_steam_high.cost or 0.0 for priced in traps),
    )


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
    working finding, working again with no repair on record, still failed, failed and
    not tested since; risks new, removed or remaining. Costs over traps tested in both.
    A caller that has either summary already passes it."""
    pricing = pricing or SitePricing.of(site)
    comparison = SurveyComparison(
        before=before_summary
        or site_summary(session=session, site=site, survey=before, pricing=pricing),
        after=after_summary
        or site_summary(session=session, site=site, survey=after, pricing=pricing),
    )
    earlier = {priced.trap_id: priced for priced in comparison.before.priced}
    later = {priced.trap_id: priced for priced in comparison.after.priced}
    tested_before = {key for key, priced in earlier.items() if priced.category in _TESTED}
    tested_after = {key for key, priced in later.items() if priced.category in _TESTED}
    both = tested_before & tested_after
    comparison.traps_compared = len(both)
    comparison.traps_only_before = len(tested_before - tested_after)
    comparison.traps_only_after = len(tested_after - tested_before)
    comparison.failure_cost_before = _sum_spread([earlier[key] for key in both])
    comparison.failure_cost_after = _sum_spread([later[key] for key in both])
    comparison.installation_cost_before = sum(
        earlier[key].loss.installation.cost or 0.0 for key in both
    )
    comparison.installation_cost_after = sum(
        later[key].loss.installation.cost or 0.0 for key in both
    )
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
