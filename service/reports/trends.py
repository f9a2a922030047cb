"""Every round of a site side by side: failure rate, failure losses (with their range),
installation losses, and the repairs made after each round, before the next."""

import bisect
from collections.abc import Callable
from dataclasses import dataclass

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.reports.summary import SiteSummary
from service.store import surveys
from service.store.models import Repair, Site, Survey, Trap


@dataclass(frozen=True, slots=True)
class RoundTrend:
    summary: SiteSummary
    repairs_after: int  # repairs dated from this round's start to the next round's


def site_trends(
    *, session: Session, site: Site, summary_of: Callable[[Survey], SiteSummary]
) -> list[RoundTrend]:
    """The site's rounds, oldest first, each with its summary (`summary_of`, a cache's)."""
    rounds = list(reversed(surveys.surveys_of(session=session, site=site)))
    starts = [survey.started_on for survey in rounds]
    repairs_after = [0] * len(rounds)
    for (repaired_on,) in session.execute(
        select(Repair.repaired_on)
        .join(Trap, Trap.id == Repair.trap_id)
        .where(Trap.site_id == site.id)
    ):
        index = bisect.bisect_right(starts, repaired_on) - 1
        if index >= 0:
            repairs_after[index] += 1
    return [
        RoundTrend(summary_of(survey), count)
        for survey, count in zip(rounds, repairs_after, strict=True)
    ]
