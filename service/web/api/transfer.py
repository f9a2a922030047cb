"""CSV in and out: register, findings and repairs import with a preview; exports."""

from collections.abc import Callable
from typing import Annotated, Any

from fastapi import APIRouter, Query, Request
from fastapi.concurrency import run_in_threadpool
from fastapi.responses import JSONResponse, Response
from pydantic import BaseModel, Field
from sqlalchemy.orm import Session

from service.reports.exports import repair_list_csv
from service.reports.schemas import SummaryOut
from service.store import exports, imports
from service.store.audit import Actor
from service.store.csv_format import MAX_CSV_BYTES
from service.store.database import Database
from service.store.models import Site, Survey
from service.store.surveys import chosen_survey
from service.web import files
from service.web.access import Managing, Reading
from service.web.dependencies import Db, OptionalRecordIdQuery, RecordId
from service.web.rollups import summary_for

router = APIRouter(tags=["import and export"])

CSV_BODY: dict[str, Any] = {
    "requestBody": {
        "required": True,
        "content": {"text/csv": {"schema": {"type": "string", "format": "binary"}}},
    }
}
Commit = Annotated[
    bool, Query(description="false: preview only. true: write all rows, or none if any is bad")
]


class ProblemOut(BaseModel):
    row: int
    column: str
    message: str


class ImportOut(BaseModel):
    """What a file holds, what it would do, and every problem found."""

    kind: str
    columns: list[str]
    rows: int
    creates: int
    updates: int
    problems: list[ProblemOut]
    warnings: list[ProblemOut] = Field(
        description="Written all the same: text a spreadsheet would run as a formula"
    )
    new_areas: list[str] = Field(
        description="Areas the file names that the site does not have; a commit creates "
        "them only with create_areas=true"
    )
    committed: bool


class TooLarge(Exception):  # noqa: N818 - an answer, not a fault
    pass


async def _upload(request: Request) -> bytes:
    """The request body, refused past MAX_CSV_BYTES before all of it is read."""
    declared = request.headers.get("content-length", "0")
    if declared.isdigit() and int(declared) > MAX_CSV_BYTES:
        raise TooLarge
    content = bytearray()
    async for chunk in request.stream():
        content += chunk
        if len(content) > MAX_CSV_BYTES:
            raise TooLarge
    return bytes(content)


def _run_import(
    database: Database,
    actor: Actor,
    content: bytes,
    commit: bool,
    plan: Callable[[Session], imports.ImportPlan[Any]],
    apply: Callable[[Session, imports.ImportPlan[Any]], None],
) -> JSONResponse:
    with database.writing(actor) as session:
        found = plan(session)
        committed = commit and found.ready
        if committed:
            apply(session, found)
        elif commit:
            found.problems += found.unconfirmed_areas()
    answer = ImportOut(
        kind=found.kind,
        columns=found.columns,
        rows=len(found.rows),
        creates=found.creates,
        updates=found.updates,
        problems=[ProblemOut.model_validate(p, from_attributes=True) for p in found.problems],
        warnings=[ProblemOut.model_validate(p, from_attributes=True) for p in found.warnings],
        new_areas=list(found.new_areas),
        committed=committed,
    )
    return JSONResponse(
        status_code=422 if commit and not committed else 200, content=answer.model_dump()
    )


async def _import(
    request: Request,
    database: Database,
    actor: Actor,
    commit: bool,
    plan: Callable[[Session, bytes], imports.ImportPlan[Any]],
    apply: Callable[[Session, imports.ImportPlan[Any]], None],
) -> JSONResponse:
    try:
        content = await _upload(request)
    except TooLarge:
        return JSONResponse(
            status_code=413,
            content={"detail": f"the file is larger than {MAX_CSV_BYTES // (1024 * 1024)} MB"},
        )
    return await run_in_threadpool(
        _run_import, database, actor, content, commit, lambda session: plan(session, content), apply
    )


RESPONSES: dict[int | str, dict[str, Any]] = {
    200: {"model": ImportOut},
    413: {"description": "The file is too large"},
    422: {
        "description": "commit=true and the file has problems (an ImportOut), or a bad "
        "query parameter (a validation error)",
        "content": {
            "application/json": {
                "schema": {
                    "anyOf": [
                        {"$ref": "#/components/schemas/ImportOut"},
                        {"$ref": "#/components/schemas/HTTPValidationError"},
                    ]
                }
            }
        },
    },
}


@router.post(
    "/sites/{site_id}/imports/register",
    summary="Import a trap register CSV (preview, or commit)",
    openapi_extra=CSV_BODY,
    responses=RESPONSES,
    response_model=None,
)
async def import_register(
    site_id: RecordId,
    request: Request,
    db: Db,
    viewer: Managing,
    commit: Commit = False,
    create_areas: Annotated[
        bool, Query(description="Create the areas the file names that the site lacks")
    ] = False,
) -> JSONResponse:
    def plan(session: Session, content: bytes) -> imports.ImportPlan[Any]:
        return imports.plan_register(
            session=session,
            site=viewer.get(session, Site, site_id),
            content=content,
            create_areas=create_areas,
        )

    def apply(session: Session, found: imports.ImportPlan[Any]) -> None:
        imports.apply_register(session=session, site=viewer.get(session, Site, site_id), plan=found)

    return await _import(request, db, viewer.actor, commit, plan, apply)


@router.post(
    "/surveys/{survey_id}/imports/findings",
    summary="Import a survey's findings CSV (preview, or commit)",
    openapi_extra=CSV_BODY,
    responses=RESPONSES,
    response_model=None,
)
async def import_findings(
    survey_id: RecordId, request: Request, db: Db, viewer: Managing, commit: Commit = False
) -> JSONResponse:
    def plan(session: Session, content: bytes) -> imports.ImportPlan[Any]:
        survey = viewer.get(session, Survey, survey_id)
        return imports.plan_findings(session=session, survey=survey, content=content)

    def apply(session: Session, found: imports.ImportPlan[Any]) -> None:
        imports.apply_findings(
            session=session, survey=viewer.get(session, Survey, survey_id), plan=found
        )

    return await _import(request, db, viewer.actor, commit, plan, apply)


@router.post(
    "/sites/{site_id}/imports/repairs",
    summary="Import a site's repairs CSV (preview, or commit)",
    openapi_extra=CSV_BODY,
    responses=RESPONSES,
    response_model=None,
)
async def import_repairs(
    site_id: RecordId, request: Request, db: Db, viewer: Managing, commit: Commit = False
) -> JSONResponse:
    def plan(session: Session, content: bytes) -> imports.ImportPlan[Any]:
        return imports.plan_repairs(
            session=session, site=viewer.get(session, Site, site_id), content=content
        )

    def apply(session: Session, found: imports.ImportPlan[Any]) -> None:
        imports.apply_repairs(session=session, site=viewer.get(session, Site, site_id), plan=found)

    return await _import(request, db, viewer.actor, commit, plan, apply)


CSV_RESPONSE: dict[int | str, dict[str, Any]] = {
    200: {"content": {"text/csv": {"schema": {"type": "string"}}}}
}


@router.get(
    "/sites/{site_id}/exports/register.csv",
    summary="The register as CSV",
    response_class=Response,
    responses=CSV_RESPONSE,
)
def export_register(site_id: RecordId, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        viewer.get(session, Site, site_id)
    return files.streamed_csv(
        db, lambda session: exports.register_rows(session=session, site_id=site_id), "register.csv"
    )


@router.get(
    "/surveys/{survey_id}/exports/findings.csv",
    summary="A survey's findings as CSV",
    response_class=Response,
    responses=CSV_RESPONSE,
)
def export_findings(survey_id: RecordId, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        viewer.get(session, Survey, survey_id)
    return files.streamed_csv(
        db,
        lambda session: exports.findings_rows(session=session, survey_id=survey_id),
        "findings.csv",
    )


@router.get(
    "/sites/{site_id}/exports/repairs.csv",
    summary="A site's repairs as CSV",
    response_class=Response,
    responses=CSV_RESPONSE,
)
def export_repairs(site_id: RecordId, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        viewer.get(session, Site, site_id)
    return files.streamed_csv(
        db, lambda session: exports.repairs_rows(session=session, site_id=site_id), "repairs.csv"
    )


@router.get(
    "/sites/{site_id}/exports/repair-list.csv",
    summary="The repair list as CSV",
    response_class=Response,
    responses=CSV_RESPONSE,
)
def export_repair_list(
    site_id: RecordId,
    request: Request,
    db: Db,
    viewer: Reading,
    survey_id: OptionalRecordIdQuery = None,
) -> Response:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = chosen_survey(session=session, site=site, survey_id=survey_id)
        summary = SummaryOut.of(summary_for(request, session, site, survey))
    return files.download(repair_list_csv(summary), "repair-list.csv", files.CSV)
