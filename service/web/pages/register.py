"""The register: traps by area and route, searchable and filterable; a trap's own page."""

import datetime as dt
from enum import StrEnum
from typing import Annotated, TypeVar
from urllib.parse import urlencode

from fastapi import APIRouter, Query, Request
from fastapi.responses import FileResponse, HTMLResponse, Response
from sqlalchemy import select
from sqlalchemy.orm import Session

from service.accounts.roles import Permission
from service.physics.conditions import TrapCondition
from service.reports.pricing import SitePricing
from service.store import audit, photos, register, surveys
from service.store.errors import NotFoundError
from service.store.latest import latest_conditions
from service.store.models import Finding, FindingPhoto, Repair, Site, Survey, Trap
from service.store.vocabulary import Application, RepairKind, TrapType
from service.web.access import Reading, Viewer
from service.web.dependencies import Db, RecordId, record_id
from service.web.forms import Form
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False)
PAGE_SIZE = 50


Word = TypeVar("Word", bound=StrEnum)


def _choice(value: str, vocabulary: type[Word]) -> Word | None:
    """A filter's word, or no filter for a blank or unknown one."""
    try:
        return vocabulary(value) if value else None
    except ValueError:
        return None


@router.get("/sites/{site_id}/register", response_class=HTMLResponse)
def register_page(
    request: Request,
    site_id: RecordId,
    db: Db,
    viewer: Reading,
    q: Annotated[str, Query(max_length=40)] = "",
    area_id: str = "",
    application: str = "",
    trap_type: str = "",
    condition: str = "",
    offset: Annotated[int, Query(ge=0)] = 0,
) -> HTMLResponse:
    where = register.TrapFilter(
        area_id=record_id(area_id),
        application=_choice(application, Application),
        trap_type=_choice(trap_type, TrapType),
        condition=_choice(condition, TrapCondition),
        tag_prefix=q.strip() or None,
    )
    filters = {
        "q": q,
        "area_id": area_id,
        "application": application,
        "trap_type": trap_type,
        "condition": condition,
    }
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        found = register.list_traps(
            session=session, site=site, where=where, limit=PAGE_SIZE, offset=offset
        )
        latest = latest_conditions(session, [trap.id for trap in found.items])
        areas = register.areas_of(session=session, site=site)
        return page(
            request,
            "register.html",
            site=site,
            traps=found,
            latest=latest,
            areas={area.id: area.name for area in areas},
            filters=filters,
            query=urlencode({name: value for name, value in filters.items() if value}),
            applications=list(Application),
            trap_types=list(TrapType),
            page_size=PAGE_SIZE,
        )


@router.get("/photos/{photo_id}")
def photo(photo_id: RecordId, db: Db, viewer: Reading, request: Request) -> Response:
    """A finding's photo, to those who may read its site."""
    with db.reading() as session:
        found = viewer.get(session, FindingPhoto, photo_id)
        path = request.app.state.photo_folder / found.stored_name
        content_type = found.content_type
    if not path.is_file():
        raise NotFoundError("photo file", photo_id)
    return FileResponse(
        path, media_type=content_type, headers={"Cache-Control": "private, max-age=86400"}
    )


@router.get("/traps/{trap_id}", response_class=HTMLResponse)
def trap_page(request: Request, trap_id: RecordId, db: Db, viewer: Reading) -> HTMLResponse:
    with db.reading() as session:
        return trap_page_answer(request, session, viewer.get(session, Trap, trap_id), viewer)


def trap_page_answer(
    request: Request,
    session: Session,
    trap: Trap,
    viewer: Viewer,
    repair_form: Form | None = None,
    status_code: int = 200,
) -> HTMLResponse:
    """A trap's page; `repair_form` is a repair typed on it that was not recorded."""
    site = viewer.get(session, Site, trap.site_id)
    findings = session.execute(
        select(Finding, Survey.name)
        .join(Survey, Survey.id == Finding.survey_id)
        .where(Finding.trap_id == trap.id)
    ).all()
    repairs = session.scalars(select(Repair).where(Repair.trap_id == trap.id)).all()
    finding_photos = photos.photos_of(
        session=session, finding_ids=[finding.id for finding, _ in findings]
    )
    events = sorted(
        [("finding", finding.tested_at.date(), finding, name) for finding, name in findings]
        + [("repair", repair.repaired_on, repair, None) for repair in repairs],
        key=lambda event: (event[1], event[0]),
    )
    latest = max(findings, key=lambda row: (row[0].tested_at, row[0].id))[0] if findings else None
    loss = None
    if latest is not None:
        pricing = SitePricing.of(site)
        service = pricing.trap_service(
            trap,
            condition=latest.condition,
            loss_factor_override=latest.loss_factor_override,
            upstream_temperature_c=latest.upstream_temperature_c,
        )
        loss = pricing.loss(service)
    return page(
        request,
        "trap.html",
        site=site,
        trap=trap,
        events=list(reversed(events)),
        latest=latest,
        loss=loss,
        surveys=surveys.surveys_of(session=session, site=site),
        entries=audit.trail_of_trap(session, trap.id),
        photos=finding_photos,
        managing=viewer.may(Permission.MANAGE),
        repair_form=repair_form or Form({"repaired_on": dt.date.today().isoformat()}),
        repair_kinds=list(RepairKind),
        status_code=status_code,
    )
