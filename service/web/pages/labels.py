"""Trap tags: printable label sheets with a QR code a phone or the walk can read, and the
address each code holds, which opens the trap (in the round in progress, if there is one)."""

from typing import Annotated
from urllib.parse import quote

import segno
from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse, RedirectResponse
from markupsafe import Markup
from sqlalchemy import select

from service.store import register, surveys
from service.store.models import Area, Site, Trap
from service.store.register import ROUTE_ORDER
from service.store.vocabulary import SurveyStatus
from service.web.access import Reading
from service.web.dependencies import Db, RecordId, record_id
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False)


def tag_address(request: Request, site_id: int, tag: str) -> str:
    """What a trap's QR code holds: the address that opens it on this server."""
    return f"{str(request.base_url).rstrip('/')}/sites/{site_id}/tags/{quote(tag, safe='')}"


def qr_svg(text: str) -> Markup:
    """A QR code of `text` as inline SVG (segno; error correction M, ISO/IEC 18004),
    with a quiet zone of 2 modules; drawn in black, readable in print."""
    code = segno.make(text, error="m")
    return Markup(code.svg_inline(scale=3, border=2, omitsize=True, svgclass="qr"))


@router.get("/sites/{site_id}/labels", response_class=HTMLResponse)
def label_sheet(
    request: Request,
    site_id: RecordId,
    db: Db,
    viewer: Reading,
    area_id: Annotated[str, Query(max_length=12)] = "",
) -> HTMLResponse:
    """Labels for the traps in service, in route order; one area's, if chosen."""
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        query = (
            select(Trap, Area.name)
            .outerjoin(Area, Area.id == Trap.area_id)
            .where(Trap.site_id == site.id, Trap.in_service)
            .order_by(*ROUTE_ORDER)
        )
        chosen_area = record_id(area_id)
        if chosen_area is not None:
            query = query.where(Trap.area_id == chosen_area)
        labels = [
            (trap, qr_svg(tag_address(request, site.id, trap.tag)), area_name or "")
            for trap, area_name in session.execute(query)
        ]
        return page(
            request,
            "labels.html",
            site=site,
            labels=labels,
            areas=register.areas_of(session=session, site=site),
            area_id=area_id,
        )


@router.get("/sites/{site_id}/tags/{tag:path}")
def open_tag(site_id: RecordId, tag: str, db: Db, viewer: Reading) -> RedirectResponse:
    """A tag read from its label: the trap's form in the round in progress, else its page."""
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        trap = register.trap_tagged(session=session, site=site, tag=tag)
        open_round = next(
            (
                each
                for each in surveys.surveys_of(session=session, site=site)
                if each.status == SurveyStatus.IN_PROGRESS
            ),
            None,
        )
    target = (
        f"/surveys/{open_round.id}/walk/traps/{trap.id}"
        if open_round is not None
        else f"/traps/{trap.id}"
    )
    return RedirectResponse(target, status_code=303)
