"""The reliability page: how long the site's traps last by group, how often each group is
worth testing beside the DOE's intervals, and what the next round can expect."""

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse

from service.reliability.estimates import CURVE_YEARS
from service.reports.reliability import BREAKDOWNS, CURVES_FOR
from service.reports.schemas import ReliabilityOut
from service.store.models import Site
from service.web import charts
from service.web.access import Reading
from service.web.dependencies import Db, RecordId
from service.web.pages.templating import page
from service.web.rollups import NextRoundOn, reliability_for

router = APIRouter(include_in_schema=False)
CHART_YEARS = CURVE_YEARS[-1]


@router.get("/sites/{site_id}/reliability", response_class=HTMLResponse)
def reliability_page(
    request: Request, site_id: RecordId, db: Db, viewer: Reading, next_round_on: NextRoundOn = None
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        found = ReliabilityOut.of(reliability_for(request, session, site, next_round_on))
        drawn = {
            group.key: (
                charts.survival_chart(group, CHART_YEARS),
                charts.cost_chart(group),
            )
            for group in found.groups
            if group.breakdown == CURVES_FOR
        }
        return page(
            request,
            "reliability.html",
            site=site,
            reliability=found,
            breakdowns=BREAKDOWNS,
            curves_for=CURVES_FOR,
            drawn=drawn,
        )
