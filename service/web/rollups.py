"""Roll-ups the API and the pages share, built on the app's roll-up cache."""

import datetime as dt
from typing import Annotated

from fastapi import Query, Request
from sqlalchemy.orm import Session

from service.reports.pricing import SitePricing
from service.reports.reliability import SiteReliability, next_round_default, site_reliability
from service.reports.trends import RoundTrend, site_trends
from service.store import surveys
from service.store.models import Site

NextRoundOn = Annotated[
    dt.date | None,
    Query(description="The day of the next round (default: a year after the latest began)"),
]


def reliability_for(
    request: Request, session: Session, site: Site, next_round_on: dt.date | None
) -> SiteReliability:
    """The site's reliability, the latest round's summary (from the cache) pricing a
    failure; the next round a year after the latest began unless a day is given."""
    latest_survey = surveys.latest_survey(session=session, site=site)
    latest = (
        request.app.state.rollups.summary(
            session=session, site=site, survey=latest_survey, pricing=SitePricing.of(site)
        )
        if latest_survey is not None
        else None
    )
    on = next_round_on or next_round_default(latest, dt.date.today())
    return site_reliability(session=session, site=site, latest=latest, next_round_on=on)


def trends_for(request: Request, session: Session, site: Site) -> list[RoundTrend]:
    """Every round of the site, oldest first, each summary from the app's roll-up cache."""
    pricing = SitePricing.of(site)
    return site_trends(
        session=session,
        site=site,
        summary_of=lambda survey: request.app.state.rollups.summary(
            session=session, site=site, survey=survey, pricing=pricing
        ),
    )
