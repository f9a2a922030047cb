"""The trap register."""

from typing import Annotated

from fastapi import APIRouter, Query
from pydantic import BaseModel

from service.physics.conditions import TrapCondition
from service.store import register
from service.store.models import Site, Trap
from service.store.schemas import TrapCreate, TrapOut, TrapUpdate
from service.store.vocabulary import Application, TrapType
from service.web.access import Managing, Reading, Recording
from service.web.dependencies import Db, OptionalRecordIdQuery, PageOut, PagingDep, RecordId

router = APIRouter(tags=["traps"])


class TrapRemoved(BaseModel):
    """What DELETE did: a trap with findings or repairs is retired, never deleted."""

    deleted: bool
    retired: bool
    trap: TrapOut


@router.post("/sites/{site_id}/traps", status_code=201, summary="Add a trap to the register")
def create_trap(site_id: RecordId, body: TrapCreate, db: Db, viewer: Recording) -> TrapOut:
    with db.writing(viewer.actor) as session:
        site = viewer.get(session, Site, site_id)
        return TrapOut.model_validate(register.create_trap(session=session, site=site, data=body))


@router.get("/sites/{site_id}/traps", summary="The register, in route order")
def list_traps(
    site_id: RecordId,
    db: Db,
    viewer: Reading,
    paging: PagingDep,
    area_id: OptionalRecordIdQuery = None,
    condition: Annotated[
        TrapCondition | None, Query(description="Latest finding's condition")
    ] = None,
    application: Application | None = None,
    trap_type: TrapType | None = None,
    tag_prefix: Annotated[str | None, Query(max_length=40)] = None,
    in_service: bool | None = None,
) -> PageOut[TrapOut]:
    where = register.TrapFilter(
        area_id=area_id,
        condition=condition,
        application=application,
        trap_type=trap_type,
        tag_prefix=tag_prefix,
        in_service=in_service,
    )
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        page = register.list_traps(
            session=session, site=site, where=where, limit=paging.limit, offset=paging.offset
        )
        return PageOut.of(page, TrapOut)


@router.get("/traps/{trap_id}", summary="One trap")
def read_trap(trap_id: RecordId, db: Db, viewer: Reading) -> TrapOut:
    with db.reading() as session:
        return TrapOut.model_validate(viewer.get(session, Trap, trap_id))


@router.patch("/traps/{trap_id}", summary="Change a trap")
def update_trap(trap_id: RecordId, body: TrapUpdate, db: Db, viewer: Managing) -> TrapOut:
    with db.writing(viewer.actor) as session:
        trap = viewer.get(session, Trap, trap_id)
        changes = body.model_dump(exclude_unset=True)
        return TrapOut.model_validate(
            register.update_trap(session=session, trap=trap, changes=changes)
        )


@router.delete("/traps/{trap_id}", summary="Delete a trap, or retire one that has history")
def delete_trap(trap_id: RecordId, db: Db, viewer: Managing) -> TrapRemoved:
    with db.writing(viewer.actor) as session:
        trap = viewer.get(session, Trap, trap_id)
        deleted = register.retire_or_delete_trap(session=session, trap=trap)
        return TrapRemoved(deleted=deleted, retired=not deleted, trap=TrapOut.model_validate(trap))
