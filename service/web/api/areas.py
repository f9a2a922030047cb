"""Areas of a site, in the order a route walks them."""

from fastapi import APIRouter, Response

from service.store import register
from service.store.models import Area, Site
from service.store.records import Page, get
from service.store.schemas import AreaCreate, AreaOut, AreaUpdate
from service.web.dependencies import Db, PageOut, PagingDep, RecordId

router = APIRouter(tags=["areas"])


@router.post("/sites/{site_id}/areas", status_code=201, summary="Add an area to a site")
def create_area(site_id: RecordId, body: AreaCreate, db: Db) -> AreaOut:
    with db.writing() as session:
        site = get(session, Site, site_id)
        return AreaOut.model_validate(register.create_area(session=session, site=site, data=body))


@router.get("/sites/{site_id}/areas", summary="A site's areas in route order")
def list_areas(site_id: RecordId, db: Db, paging: PagingDep) -> PageOut[AreaOut]:
    with db.reading() as session:
        areas = register.areas_of(session=session, site=get(session, Site, site_id))
        window = areas[paging.offset : paging.offset + paging.limit]
        return PageOut.of(Page(window, len(areas), paging.limit, paging.offset), AreaOut)


@router.get("/areas/{area_id}", summary="One area")
def read_area(area_id: RecordId, db: Db) -> AreaOut:
    with db.reading() as session:
        return AreaOut.model_validate(get(session, Area, area_id))


@router.patch("/areas/{area_id}", summary="Rename or reorder an area")
def update_area(area_id: RecordId, body: AreaUpdate, db: Db) -> AreaOut:
    with db.writing() as session:
        area = get(session, Area, area_id)
        changes = body.model_dump(exclude_unset=True)
        return AreaOut.model_validate(
            register.update_area(session=session, area=area, changes=changes)
        )


@router.delete("/areas/{area_id}", status_code=204, summary="Delete an area with no traps")
def delete_area(area_id: RecordId, db: Db) -> Response:
    with db.writing() as session:
        register.delete_area(session=session, area=get(session, Area, area_id))
    return Response(status_code=204)
