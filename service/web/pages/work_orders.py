"""Work orders for fitters: the traps a survey found needing repair (failures and
risks), by area in route order so a fitter walks them once, printable with a box to tick
and the lockout caution."""

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse
from sqlalchemy import select

from service.store import surveys
from service.store.models import Site, Trap
from service.web.access import Reading
from service.web.dependencies import Db, RecordId
from service.web.pages.summary import SurveyId
from service.web.pages.templating import page
from service.web.rollups import summary_for

router = APIRouter(include_in_schema=False)


@router.get("/sites/{site_id}/work-orders", response_class=HTMLResponse)
def work_orders(
    request: Request, site_id: RecordId, db: Db, viewer: Reading, survey_id: SurveyId = None
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = surveys.chosen_survey(session=session, site=site, survey_id=survey_id)
        summary = summary_for(request, session, site, survey)
        # Failed traps not yet repaired since the finding, in route order (the summary's).
        orders = [each for each in summary.priced if each.failed and each.repaired_on is None]
        payback_rank = {each.trap_id: rank for rank, each in enumerate(summary.repair_list, 1)}
        traps = {
            trap.id: trap
            for trap in session.scalars(
                select(Trap).where(Trap.id.in_([each.trap_id for each in orders]))
            )
        }
        return page(
            request,
            "work_orders.html",
            site=site,
            survey=survey,
            orders=orders,
            traps=traps,
            payback_rank=payback_rank,
        )
