"""A site's summary and its printed report: one context, two renderings; and the
flash-vessel what-if on the summary."""

import datetime as dt
from typing import Annotated, Any

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse
from sqlalchemy.orm import Session

from service.physics.units import Dimension
from service.reports.compare import compare_surveys
from service.reports.opportunities import flash_recovery_what_if
from service.reports.pricing import SitePricing
from service.reports.schemas import ComparisonOut, FlashRecoveryWhatIfOut, RoundTrendOut, SummaryOut
from service.reports.summary import SiteSummary
from service.store import photos, surveys
from service.store.models import Site, Survey
from service.web.access import Reading
from service.web.dependencies import MAX_RECORD_ID, Db, RecordId
from service.web.display import Display
from service.web.forms import Form
from service.web.pages.templating import display_for, page
from service.web.rollups import summary_for, trends_for

router = APIRouter(include_in_schema=False)


def _previous(session: Session, site: Site, survey: Survey | None) -> Survey | None:
    if survey is None:
        return None
    earlier = [
        other
        for other in surveys.surveys_of(session=session, site=site)
        if (other.started_on, other.id) < (survey.started_on, survey.id)
    ]
    return earlier[0] if earlier else None


SCREEN_ROWS = 100  # rows of a list on screen; the downloads and the report hold them all
TAGS_SHOWN = 12  # tags named for each kind of change since the survey before


def summary_context(
    request: Request,
    session: Session,
    site: Site,
    survey: Survey | None,
    row_limit: int | None = SCREEN_ROWS,
    what_if: Form | None = None,
    compared_with: Survey | None = None,
    with_trends: bool = False,
) -> dict[str, Any]:
    """Everything the summary, the report and the site home show: one context. The
    round compared with (`compared_with`, else the survey before) comes from the app's
    cache of roll-ups. With `what_if` (the flash-recovery form), its answer or its errors;
    `with_trends`, every round side by side."""
    pricing = SitePricing.of(site)
    rolled_up = summary_for(request, session, site, survey, pricing)
    summary = SummaryOut.of(rolled_up)
    recovery = None
    if what_if is not None:
        recovery = _flash_recovery(what_if, rolled_up, pricing, display_for(site))
    previous = compared_with or _previous(session, site, survey)
    comparison = None
    if previous is not None and survey is not None:
        comparison = ComparisonOut.of(
            at_most=TAGS_SHOWN,
            comparison=compare_surveys(
                session=session,
                site=site,
                before=previous,
                after=survey,
                after_summary=rolled_up,
                before_summary=summary_for(request, session, site, previous, pricing),
                pricing=pricing,
            ),
        )
    return {
        "summary": summary,
        "comparison": comparison,
        "surveys": surveys.surveys_of(session=session, site=site),
        "survey": survey,
        "today": dt.date.today(),
        "row_limit": row_limit,
        "what_if": what_if or Form({}),
        "recovery": recovery,
        "trends": [RoundTrendOut.of(trend) for trend in trends_for(request, session, site)]
        if with_trends
        else [],
    }


def _flash_recovery(
    form: Form, summary: SiteSummary, pricing: SitePricing, show: Display
) -> FlashRecoveryWhatIfOut | None:
    """The summary's flash-recovery what-if, from its form (vessel pressure in the site's
    units, an area or every one); None with the errors in the form."""
    vessel_kpa_g = form.number("vessel", show, Dimension.PRESSURE)
    if vessel_kpa_g is None:
        form.errors.setdefault("vessel", "enter the vessel's pressure")
        return None
    area = form.text("area") or None
    if area is not None and area not in summary.by_area:
        form.errors["area"] = f"the survey has no area '{area}'"
        return None
    try:
        what_if = flash_recovery_what_if(
            summary=summary, pricing=pricing, vessel_pressure_kpa_g=vessel_kpa_g, area_name=area
        )
    except ValueError as error:
        form.errors["vessel"] = str(error)
        return None
    return FlashRecoveryWhatIfOut.model_validate(what_if)


SurveyId = Annotated[
    int | None, Query(ge=1, le=MAX_RECORD_ID, description="Default: the latest survey")
]


def _compared_with(session: Session, site: Site, survey_id: int | None) -> Survey | None:
    """The round a summary compares with, when one is chosen (else the one before)."""
    if survey_id is None:
        return None
    return surveys.survey_of_site(session=session, site=site, survey_id=survey_id)


@router.get("/sites/{site_id}/summary", response_class=HTMLResponse)
def summary_page(
    request: Request,
    site_id: RecordId,
    db: Db,
    viewer: Reading,
    survey_id: SurveyId = None,
    compared_with: SurveyId = None,
) -> HTMLResponse:
    """A round's summary, compared with the round before or with `compared_with`."""
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        typed = {name: str(value) for name, value in request.query_params.items()}
        what_if = Form(typed) if "vessel" in typed else None
        context = summary_context(
            request,
            session,
            site,
            surveys.chosen_survey(session=session, site=site, survey_id=survey_id),
            what_if=what_if,
            compared_with=_compared_with(session, site, compared_with),
        )
        status = 422 if what_if is not None and what_if.errors else 200
        return page(request, "summary.html", site=site, status_code=status, **context)


@router.get("/sites/{site_id}/report", response_class=HTMLResponse)
def report_page(
    request: Request, site_id: RecordId, db: Db, viewer: Reading, survey_id: SurveyId = None
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        context = summary_context(
            request,
            session,
            site,
            surveys.chosen_survey(session=session, site=site, survey_id=survey_id),
            row_limit=None,
            with_trends=True,
        )
        appendix = (
            photos.survey_photos(session=session, survey_id=context["survey"].id)
            if context["survey"] is not None
            else []
        )
        return page(request, "report.html", site=site, print_only=True, photos=appendix, **context)
