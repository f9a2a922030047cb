"""Survey rounds of a site."""

from fastapi import APIRouter, Response

from service.store import surveys
from service.store.models import Site, Survey
from service.store.records import Page
from service.store.schemas import SurveyCreate, SurveyOut, SurveyUpdate
from service.web.access import Managing, Reading
from service.web.dependencies import Db, PageOut, PagingDep, RecordId

router = APIRouter(tags=["surveys"])


@router.post("/sites/{site_id}/surveys", status_code=201, summary="Start a survey round")
def create_survey(site_id: RecordId, body: SurveyCreate, db: Db, viewer: Managing) -> SurveyOut:
    with db.writing(viewer.actor) as session:
        site = viewer.get(session, Site, site_id)
        return SurveyOut.model_validate(
            surveys.create_survey(session=session, site=site, data=body)
        )


@router.get("/sites/{site_id}/surveys", summary="A site's surveys, newest first")
def list_surveys(
    site_id: RecordId, db: Db, viewer: Reading, paging: PagingDep
) -> PageOut[SurveyOut]:
    with db.reading() as session:
        found = surveys.surveys_of(session=session, site=viewer.get(session, Site, site_id))
        window = found[paging.offset : paging.offset + paging.limit]
        return PageOut.of(Page(window, len(found), paging.limit, paging.offset), SurveyOut)


@router.get("/surveys/{survey_id}", summary="One survey")
def read_survey(survey_id: RecordId, db: Db, viewer: Reading) -> SurveyOut:
    with db.reading() as session:
        return SurveyOut.model_validate(viewer.get(session, Survey, survey_id))


@router.patch("/surveys/{survey_id}", summary="Change a survey")
def update_survey(survey_id: RecordId, body: SurveyUpdate, db: Db, viewer: Managing) -> SurveyOut:
    with db.writing(viewer.actor) as session:
        survey = viewer.get(session, Survey, survey_id)
        changes = body.model_dump(exclude_unset=True)
        return SurveyOut.model_validate(
            surveys.update_survey(session=session, survey=survey, changes=changes)
        )


@router.delete("/surveys/{survey_id}", status_code=204, summary="Delete a survey with no findings")
def delete_survey(survey_id: RecordId, db: Db, viewer: Managing) -> Response:
    with db.writing(viewer.actor) as session:
        surveys.delete_survey(session=session, survey=viewer.get(session, Survey, survey_id))
    return Response(status_code=204)
