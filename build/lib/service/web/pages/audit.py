"""A site's audit trail, for its managers: every change, newest first. Read-only: no
route changes or deletes an entry."""

from typing import Annotated

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse

from service.store import audit
from service.store.models import Site
from service.web.access import Managing
from service.web.dependencies import Db, RecordId
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False)

ENTRIES_SHOWN = 100


@router.get("/sites/{site_id}/audit", response_class=HTMLResponse)
def site_audit(
    request: Request,
    site_id: RecordId,
    db: Db,
    viewer: Managing,
    offset: Annotated[int, Query(ge=0, le=10_000_000)] = 0,
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        trail = audit.trail_of_site(session, site.id, limit=ENTRIES_SHOWN, offset=offset)
        return page(request, "audit.html", site=site, trail=trail, entries=trail.items)
