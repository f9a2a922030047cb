"""Roll-ups the API and the pages share, built on the app's roll-up cache."""

import datetime as dt
from typing import Annotated

from fastapi import Query, Request
from sqlalchemy.orm import Session

from service.reports.cache import RollupCache
from service.reports.pricing import SitePricing
from service.reports.reliability import SiteReliability, next_round_default, site_reliability
from service.reports.schemas import SummaryOut
from service.reports.summary import SiteSummary, site_summary
from service.reports.trends import RoundTrend, site_trends
from service.store import surveys
from service.store.models import Site, Survey

NextRoundOn = Annotated[
    dt.date | None,
    Query(description="The day of the next round (default: a year after the latest began)"),
]


def summary_for(
    request: Request,
    session: Session,
    site: Site,
    survey: Survey | None,
    pricing: SitePricing | None = None,
) -> SiteSummary:
    """A survey's summary from the app's roll-up cache, kept by the site's revision (which
    every write bumps), so the current round is priced once, not on every request."""
    pricing = pricing or SitePricing.of(site)
    if survey is None:
        return site_summary(session=session, site=site, survey=None, pricing=pricing)
    cache: RollupCache = request.app.state.rollups
    return cache.summary(session=session, site=site, survey=survey, pricing=pricing)


def summary_json_for(
    request: Request, session: Session, site: Site, survey: Survey | None
) -> bytes:
    """`summary_for` as the API's JSON, encoded once while the summary holds."""
    if survey is None:
        return SummaryOut.of(summary_for(request, session, site, None)).model_dump_json().encode()
    cache: RollupCache = request.app.state.rollups
    return cache.summary_json(
        session=session, site=site, survey=survey, pricing=SitePricing.of(site)
    )


def reliability_for(
    request: Request, session: Session, site: Site, next_round_on: dt.date | None
) -> SiteReliability:
    """The site's reliability, the latest round's summary (from the cache) pricing a
    failure; the next round a year after the latest began unless a day is given."""
    latest_survey = surveys.latest_survey(session=session, site=site)
    latest = summary_for(request, session, site, latest_survey) if latest_survey else None
    on = next_round_on or next_round_default(latest, dt.date.today())
    return site_reliability(session=session, site=site, latest=latest, next_round_on=on)


def trends_for(request: Request, session: Session, site: Site) -> list[RoundTrend]:
    """Every round of the site, oldest first, each summary from the app's roll-up cache."""
    pricing = SitePricing.of(site)
    return site_trends(
        session=session,
        site=site,
        summary_of=lambda survey: summary_for(request, session, site, survey, pricing),
    )
