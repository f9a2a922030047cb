"""Import a CSV file from the browser: preview every problem by row and column, then
confirm. The confirmed file is the previewed one, carried back in the form."""

import base64
import binascii
from typing import Any

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from sqlalchemy.orm import Session
from starlette.datastructures import UploadFile

from service.physics.units import Dimension
from service.store import exports, imports, surveys
from service.store.csv_format import MAX_CSV_BYTES, UnreadableFile
from service.store.errors import NotFoundError
from service.store.models import Site, Survey
from service.store.records import get
from service.web.access import Managing
from service.web.dependencies import Db, RecordId, record_id
from service.web.pages.templating import display_for, page

router = APIRouter(include_in_schema=False)
KINDS = {"register": "Trap register", "findings": "Findings of a survey", "repairs": "Repairs"}


def _plan(
    session: Session,
    site: Site,
    kind: str,
    survey_id: int | None,
    content: bytes,
    create_areas: bool,
) -> imports.ImportPlan[Any]:
    if kind == "findings":
        survey = get(session, Survey, survey_id or 0)
        if survey.site_id != site.id:
            raise UnreadableFile("choose a survey of this site")
        return imports.plan_findings(session=session, survey=survey, content=content)
    if kind == "repairs":
        return imports.plan_repairs(session=session, site=site, content=content)
    return imports.plan_register(
        session=session, site=site, content=content, create_areas=create_areas
    )


def _apply(session: Session, site: Site, kind: str, survey_id: int | None, plan: Any) -> None:
    if kind == "findings":
        imports.apply_findings(
            session=session, survey=get(session, Survey, survey_id or 0), plan=plan
        )
    elif kind == "repairs":
        imports.apply_repairs(session=session, site=site, plan=plan)
    else:
        imports.apply_register(session=session, site=site, plan=plan)


def _import_page(
    request: Request, session: Session, site: Site, status_code: int = 200, **context: Any
) -> HTMLResponse:
    return page(
        request,
        "import.html",
        site=site,
        kinds=KINDS,
        surveys=surveys.surveys_of(session=session, site=site),
        status_code=status_code,
        **context,
    )


@router.get("/sites/{site_id}/import/template/{kind}.csv")
def template(site_id: RecordId, kind: str, db: Db, viewer: Managing) -> Response:
    """An empty file of one kind, its columns in the site's units, to fill in and import."""
    if kind not in KINDS:
        raise NotFoundError("kind of file", kind)
    with db.reading() as session:
        show = display_for(viewer.get(session, Site, site_id))
    symbols = frozenset(show.unit(dimension) for dimension in Dimension)
    return Response(
        exports.template_csv(kind, symbols),
        media_type="text/csv; charset=utf-8",
        headers={"Content-Disposition": f'attachment; filename="{kind}-template.csv"'},
    )


@router.get("/sites/{site_id}/import", response_class=HTMLResponse)
def import_form(
    request: Request, site_id: RecordId, db: Db, viewer: Managing, done: str = ""
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        return _import_page(request, session, site, done=done, kind="register")


async def _upload(request: Request) -> tuple[dict[str, str], bytes | None, str | None]:
    """The form's fields, the file's content (uploaded, or carried back from a preview),
    and why there is no content, if there is none."""
    async with request.form(max_part_size=MAX_CSV_BYTES + 1024) as form:
        fields = {name: value for name, value in form.items() if isinstance(value, str)}
        upload = form.get("file")
        if isinstance(upload, UploadFile) and upload.filename:
            content = await upload.read(MAX_CSV_BYTES + 1)
            fields["filename"] = upload.filename
            if len(content) > MAX_CSV_BYTES:
                return fields, None, f"the file is larger than {MAX_CSV_BYTES // 1024 // 1024} MB"
            return fields, content, None
    try:
        return fields, base64.b64decode(fields.get("content", ""), validate=True), None
    except binascii.Error:
        return fields, None, "the file did not come back whole; choose it again"


@router.post("/sites/{site_id}/import", response_class=HTMLResponse)
async def preview_or_confirm(
    request: Request, site_id: RecordId, db: Db, viewer: Managing
) -> Response:
    fields, content, refusal = await _upload(request)
    kind = fields.get("kind", "register") if fields.get("kind") in KINDS else "register"
    survey_id = record_id(fields.get("survey_id", ""))
    confirm = fields.get("confirm") == "yes"
    with db.writing(viewer.actor) as session:
        site = viewer.get(session, Site, site_id)
        if content is None or not content:
            return _import_page(
                request,
                session,
                site,
                status_code=422,
                kind=kind,
                survey_id=survey_id,
                refusal=refusal or "choose a CSV file to import",
            )
        try:
            plan = _plan(
                session, site, kind, survey_id, content, fields.get("create_areas") == "yes"
            )
        except UnreadableFile as error:
            return _import_page(
                request,
                session,
                site,
                status_code=422,
                kind=kind,
                survey_id=survey_id,
                refusal=str(error),
            )
        if confirm and plan.ready:
            _apply(session, site, kind, survey_id, plan)
            done = f"{KINDS[kind]}: {plan.creates} created, {plan.updates} updated"
            return RedirectResponse(f"/sites/{site_id}/import?done={done}", status_code=303)
        return _import_page(
            request,
            session,
            site,
            status_code=200 if plan.clean else 422,
            kind=kind,
            survey_id=survey_id,
            plan=plan,
            filename=fields.get("filename", ""),
            content=base64.b64encode(content).decode(),
        )
