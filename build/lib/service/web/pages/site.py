"""The sites, a site's home, and starting a survey round."""

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from pydantic import ValidationError
from sqlalchemy import select

from service.reports.pricing import SitePricing
from service.reports.schemas import SummaryOut
from service.store import surveys
from service.store.errors import ConflictError
from service.store.models import Site
from service.store.schemas import SurveyCreate
from service.web.access import Managing, Reading
from service.web.dependencies import Db, RecordId
from service.web.forms import Form
from service.web.pages.summary import summary_context
from service.web.pages.templating import display_for, page

router = APIRouter(include_in_schema=False)


@router.get("/", response_class=HTMLResponse)
def sites(request: Request, db: Db, viewer: Reading) -> HTMLResponse:
    with db.reading() as session:
        found = [
            each
            for each in session.scalars(select(Site).order_by(Site.name))
            if viewer.sees(each.id)
        ]
        headlines: dict[int, SummaryOut | None] = {}
        for each in found:
            latest = surveys.latest_survey(session=session, site=each)
            headlines[each.id] = (
                SummaryOut.of(
                    request.app.state.rollups.summary(
                        session=session, site=each, survey=latest, pricing=SitePricing.of(each)
                    )
                )
                if latest is not None
                else None
            )
        return page(
            request,
            "sites.html",
            sites=found,
            headlines=headlines,
            displays={each.id: display_for(each) for each in found},
        )


@router.get("/sites/{site_id}", response_class=HTMLResponse)
def site_home(request: Request, site_id: RecordId, db: Db, viewer: Reading) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = surveys.latest_survey(session=session, site=site)
        context = summary_context(request, session, site, survey)
        return page(request, "site_home.html", site=site, **context)


@router.post("/sites/{site_id}/surveys", response_class=HTMLResponse)
async def start_survey(request: Request, site_id: RecordId, db: Db, viewer: Managing) -> Response:
    form = await Form.of(request)
    fields = {
        "name": form.text("name"),
        "started_on": form.text("started_on") or None,
        "notes": form.text("notes"),
    }
    try:
        with db.writing(viewer.actor) as session:
            site = viewer.get(session, Site, site_id)
            data = SurveyCreate.model_validate(fields)
            survey = surveys.create_survey(session=session, site=site, data=data)
        return RedirectResponse(f"/surveys/{survey.id}/walk", status_code=303)
    except ValidationError as error:
        form.absorb(error)
    except ConflictError as error:
        form.errors["name"] = str(error)
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        context = summary_context(
            request, session, site, surveys.latest_survey(session=session, site=site)
        )
        return page(request, "site_home.html", site=site, form=form, status_code=422, **context)
