"""CSV and XLSX downloads of the repair list and of a survey's findings, for a person
signed in to the pages."""

from fastapi import APIRouter, Request
from fastapi.responses import Response

from service.reports.exports import repair_list_csv, repair_list_table, xlsx_bytes
from service.reports.schemas import SummaryOut
from service.store import exports, surveys
from service.store.models import Site, Survey
from service.web.access import Reading
from service.web.dependencies import Db, RecordId
from service.web.pages.summary import SurveyId
from service.web.rollups import summary_for

router = APIRouter(include_in_schema=False)


def _download(content: bytes | str, filename: str, media_type: str) -> Response:
    return Response(
        content=content,
        media_type=media_type,
        headers={"Content-Disposition": f'attachment; filename="{filename}"'},
    )


XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"


@router.get("/sites/{site_id}/downloads/repair-list.{suffix}")
def repair_list_download(
    request: Request,
    site_id: RecordId,
    suffix: str,
    db: Db,
    viewer: Reading,
    survey_id: SurveyId = None,
) -> Response:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = surveys.chosen_survey(session=session, site=site, survey_id=survey_id)
        summary = SummaryOut.of(summary_for(request, session, site, survey))
    if suffix == "csv":
        return _download(repair_list_csv(summary), "repair-list.csv", "text/csv; charset=utf-8")
    if suffix == "xlsx":
        return _download(
            xlsx_bytes("Repair list", *repair_list_table(summary)), "repair-list.xlsx", XLSX
        )
    return Response(status_code=404)


@router.get("/surveys/{survey_id}/downloads/findings.{suffix}")
def findings_download(survey_id: RecordId, suffix: str, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        if suffix == "csv":
            text = exports.findings_csv(session=session, survey=survey)
            return _download(text, "findings.csv", "text/csv; charset=utf-8")
        if suffix == "xlsx":
            table = exports.findings_table(session=session, survey=survey)
            return _download(xlsx_bytes("Findings", *table), "findings.xlsx", XLSX)
    return Response(status_code=404)
