"""The sites, a site's home, and starting a survey round."""

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from pydantic import ValidationError
from sqlalchemy import select
from sqlalchemy.orm import Session

from service.accounts.roles import Permission
from service.reports.pricing import SitePricing
from service.reports.schemas import SummaryOut
from service.store import surveys
from service.store.errors import ConflictError, FieldError
from service.store.models import Site, Survey
from service.store.schemas import SurveyCreate
from service.store.vocabulary import SurveyStatus, label
from service.web.access import Managing, Reading, Viewer
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


# The moves a manager may make on the page from each state of a round, with the button's
# words. A closed round is changed by a correction from its walk, not reopened by one tap
# (the API's PATCH can still reopen it, audited like every change).
ROUND_MOVES: dict[SurveyStatus, list[tuple[SurveyStatus, str]]] = {
    SurveyStatus.PLANNED: [(SurveyStatus.IN_PROGRESS, "Start the round")],
    SurveyStatus.IN_PROGRESS: [(SurveyStatus.CLOSED, "Close the round")],
    SurveyStatus.CLOSED: [],
}


def _site_home(
    request: Request,
    session: Session,
    site: Site,
    viewer: Viewer,
    form: Form | None = None,
    status_code: int = 200,
) -> HTMLResponse:
    latest = surveys.latest_survey(session=session, site=site)
    context = summary_context(request, session, site, latest, with_trends=True)
    return page(
        request,
        "site_home.html",
        site=site,
        form=form,
        managing=viewer.may(Permission.MANAGE),
        round_moves=ROUND_MOVES,
        status_code=status_code,
        **context,
    )


@router.get("/sites/{site_id}", response_class=HTMLResponse)
def site_home(request: Request, site_id: RecordId, db: Db, viewer: Reading) -> HTMLResponse:
    with db.reading() as session:
        return _site_home(request, session, viewer.get(session, Site, site_id), viewer)


@router.post("/sites/{site_id}/surveys", response_class=HTMLResponse)
async def start_survey(request: Request, site_id: RecordId, db: Db, viewer: Managing) -> Response:
    form = await Form.of(request)
    fields = {
        "name": form.text("name"),
        "started_on": form.text("started_on") or None,
        "notes": form.text("notes"),
        "status": form.text("status") or SurveyStatus.IN_PROGRESS,
    }
    try:
        with db.writing(viewer.actor) as session:
            site = viewer.get(session, Site, site_id)
            data = SurveyCreate.model_validate(fields)
            survey = surveys.create_survey(session=session, site=site, data=data)
        started = survey.status == SurveyStatus.IN_PROGRESS
        target = f"/surveys/{survey.id}/walk" if started else f"/sites/{site_id}"
        return RedirectResponse(target, status_code=303)
    except ValidationError as error:
        form.absorb(error)
    except ConflictError as error:
        form.errors["name"] = str(error)
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        return _site_home(request, session, site, viewer, form, status_code=422)


@router.post("/surveys/{survey_id}/state", response_class=HTMLResponse)
async def change_round_state(
    request: Request, survey_id: RecordId, db: Db, viewer: Managing
) -> Response:
    """Start, close or reopen a round; the moves offered are ROUND_MOVES'."""
    form = await Form.of(request)
    with db.writing(viewer.actor) as session:
        survey = viewer.get(session, Survey, survey_id)
        moves = {target.value for target, _ in ROUND_MOVES[survey.status]}
        if form.text("status") not in moves:
            raise FieldError(
                "status", f"a {label(survey.status).lower()} round cannot move to that"
            )
        surveys.update_survey(
            session=session, survey=survey, changes={"status": form.text("status")}
        )
        site_id = survey.site_id
    return RedirectResponse(f"/sites/{site_id}", status_code=303)
