"""Areas of a site, in the order a route walks them."""

from fastapi import APIRouter, Response

from service.store import register
from service.store.models import Area, Site
from service.store.records import Page
from service.store.schemas import AreaCreate, AreaOut, AreaUpdate
from service.web.access import Managing, Reading
from service.web.dependencies import Db, PageOut, PagingDep, RecordId

router = APIRouter(tags=["areas"])


@router.post("/sites/{site_id}/areas", status_code=201, summary="Add an area to a site")
def create_area(site_id: RecordId, body: AreaCreate, db: Db, viewer: Managing) -> AreaOut:
    with db.writing(viewer.actor) as session:
        site = viewer.get(session, Site, site_id)
        return AreaOut.model_validate(register.create_area(session=session, site=site, data=body))


@router.get("/sites/{site_id}/areas", summary="A site's areas in route order")
def list_areas(site_id: RecordId, db: Db, viewer: Reading, paging: PagingDep) -> PageOut[AreaOut]:
    with db.reading() as session:
        areas = register.areas_of(session=session, site=viewer.get(session, Site, site_id))
        window = areas[paging.offset : paging.offset + paging.limit]
        return PageOut.of(Page(window, len(areas), paging.limit, paging.offset), AreaOut)


@router.get("/areas/{area_id}", summary="One area")
def read_area(area_id: RecordId, db: Db, viewer: Reading) -> AreaOut:
    with db.reading() as session:
        return AreaOut.model_validate(viewer.get(session, Area, area_id))


@router.patch("/areas/{area_id}", summary="Rename or reorder an area")
def update_area(area_id: RecordId, body: AreaUpdate, db: Db, viewer: Managing) -> AreaOut:
    with db.writing(viewer.actor) as session:
        area = viewer.get(session, Area, area_id)
        changes = body.model_dump(exclude_unset=True)
        return AreaOut.model_validate(
            register.update_area(session=session, area=area, changes=changes)
        )


@router.delete("/areas/{area_id}", status_code=204, summary="Delete an area with no traps")
def delete_area(area_id: RecordId, db: Db, viewer: Managing) -> Response:
    with db.writing(viewer.actor) as session:
        register.delete_area(session=session, area=viewer.get(session, Area, area_id))
    return Response(status_code=204)
