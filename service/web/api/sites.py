"""Sites: their settings, their survey summary, and the comparison of two surveys."""

from typing import Annotated

from fastapi import APIRouter, Query, Request, Response
from sqlalchemy import select

from service.physics.pressure import STANDARD_ATMOSPHERE_KPA
from service.physics.steam_tables import CRITICAL_PRESSURE_KPA
from service.reports.compare import compare_surveys
from service.reports.opportunities import flash_recovery_what_if
from service.reports.pricing import SitePricing
from service.reports.schemas import ComparisonOut, FlashRecoveryWhatIfOut, SummaryOut
from service.store import register
from service.store.models import Site
from service.store.records import paged
from service.store.schemas import SiteCreate, SiteOut, SiteUpdate
from service.store.surveys import chosen_survey, survey_of_site
from service.web.access import Administering, Managing, Reading
from service.web.dependencies import MAX_RECORD_ID, Db, PageOut, PagingDep, RecordId, RecordIdQuery
from service.web.errors import reported_against
from service.web.rollups import summary_for, summary_json_for

router = APIRouter(tags=["sites"])


@router.post("/sites", status_code=201, summary="Create a site")
def create_site(body: SiteCreate, db: Db, viewer: Administering) -> SiteOut:
    with db.writing(viewer.actor) as session:
        return SiteOut.model_validate(register.create_site(session=session, data=body))


@router.get("/sites", summary="List sites")
def list_sites(db: Db, viewer: Reading, paging: PagingDep) -> PageOut[SiteOut]:
    with db.reading() as session:
        visible = select(Site).order_by(Site.name)
        if viewer.site_ids is not None:
            visible = visible.where(Site.id.in_(sorted(viewer.site_ids)))
        page = paged(session, visible, limit=paging.limit, offset=paging.offset)
        return PageOut.of(page, SiteOut)


@router.get("/sites/{site_id}", summary="One site and its settings")
def read_site(site_id: RecordId, db: Db, viewer: Reading) -> SiteOut:
    with db.reading() as session:
        return SiteOut.model_validate(viewer.get(session, Site, site_id))


@router.patch("/sites/{site_id}", summary="Change a site's settings")
def update_site(site_id: RecordId, body: SiteUpdate, db: Db, viewer: Managing) -> SiteOut:
    with db.writing(viewer.actor) as session:
        site = viewer.get(session, Site, site_id)
        changes = body.model_dump(exclude_unset=True)
        return SiteOut.model_validate(
            register.update_site(session=session, site=site, changes=changes)
        )


@router.delete("/sites/{site_id}", status_code=204, summary="Delete a site with no traps")
def delete_site(site_id: RecordId, db: Db, viewer: Administering) -> Response:
    with db.writing(viewer.actor) as session:
        register.delete_site(session=session, site=viewer.get(session, Site, site_id))
    return Response(status_code=204)


@router.get(
    "/sites/{site_id}/summary",
    summary="A survey priced and rolled up",
    response_model=SummaryOut,
)
def summary(
    site_id: RecordId,
    request: Request,
    db: Db,
    viewer: Reading,
    survey_id: Annotated[
        int | None,
        Query(ge=1, le=MAX_RECORD_ID, description="Default: the latest survey"),
    ] = None,
) -> Response:
    # The JSON is kept with the summary: at 100,000 traps FastAPI's own check and encoding
    # of the answer took longer than finding the kept summary.
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = chosen_survey(session=session, site=site, survey_id=survey_id)
        body = summary_json_for(request, session, site, survey)
    return Response(body, media_type="application/json")


@router.get(
    "/sites/{site_id}/flash-recovery", summary="What a flash vessel would recover from a survey"
)
def flash_recovery(
    site_id: RecordId,
    request: Request,
    db: Db,
    viewer: Reading,
    vessel_pressure_kpa_g: Annotated[
        float,
        Query(ge=-STANDARD_ATMOSPHERE_KPA, le=CRITICAL_PRESSURE_KPA, description="kPa(g)"),
    ],
    area: Annotated[str | None, Query(max_length=120, description="Default: every area")] = None,
    survey_id: Annotated[
        int | None,
        Query(ge=1, le=MAX_RECORD_ID, description="Default: the latest survey"),
    ] = None,
) -> FlashRecoveryWhatIfOut:
    """The survey's traps that vent their flash, in the area or all, their condensate
    flashed in a vessel at that pressure: yield by the mixing rule, value on the site's
    cost basis as live steam displaced from make-up water."""
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = chosen_survey(session=session, site=site, survey_id=survey_id)
        pricing = SitePricing.of(site)
        summary = summary_for(request, session, site, survey, pricing)
        with reported_against("query", "vessel_pressure_kpa_g", typed=vessel_pressure_kpa_g):
            what_if = flash_recovery_what_if(
                summary=summary,
                pricing=pricing,
                vessel_pressure_kpa_g=vessel_pressure_kpa_g,
                area_name=area,
            )
        return FlashRecoveryWhatIfOut.model_validate(what_if)


@router.get("/sites/{site_id}/compare", summary="What changed from one survey to another")
def compare(
    site_id: RecordId, from_survey: RecordIdQuery, to_survey: RecordIdQuery, db: Db, viewer: Reading
) -> ComparisonOut:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        before = survey_of_site(session=session, site=site, survey_id=from_survey)
        after = survey_of_site(session=session, site=site, survey_id=to_survey)
        return ComparisonOut.of(
            compare_surveys(session=session, site=site, before=before, after=after)
        )
