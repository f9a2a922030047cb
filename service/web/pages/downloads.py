"""CSV and XLSX downloads of the repair list and of a survey's findings, for a person
signed in to the pages."""

from fastapi import APIRouter, Request
from fastapi.responses import Response

from service.reports.exports import repair_list_csv, repair_list_table, xlsx_bytes
from service.reports.schemas import SummaryOut
from service.store import exports, surveys
from service.store.models import Site, Survey
from service.web import files
from service.web.access import Reading
from service.web.dependencies import Db, RecordId
from service.web.pages.summary import SurveyId
from service.web.rollups import summary_for

router = APIRouter(include_in_schema=False)


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
        return files.download(repair_list_csv(summary), "repair-list.csv", files.CSV)
    if suffix == "xlsx":
        return files.download(
            xlsx_bytes("Repair list", *repair_list_table(summary)), "repair-list.xlsx", files.XLSX
        )
    return Response(status_code=404)


@router.get("/surveys/{survey_id}/downloads/findings.{suffix}")
def findings_download(survey_id: RecordId, suffix: str, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        viewer.get(session, Survey, survey_id)
        if suffix == "xlsx":
            headers, rows = exports.findings_rows(session=session, survey_id=survey_id)
            workbook = xlsx_bytes("Findings", headers, list(rows))
            return files.download(workbook, "findings.xlsx", files.XLSX)
    if suffix == "csv":
        return files.streamed_csv(
            db,
            lambda session: exports.findings_rows(session=session, survey_id=survey_id),
            "findings.csv",
        )
    return Response(status_code=404)
