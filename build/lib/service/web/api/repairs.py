"""Repairs and replacements of a trap. Its next finding confirms them."""

from fastapi import APIRouter, Response

from service.store import surveys
from service.store.models import Repair, Trap
from service.store.schemas import RepairCreate, RepairOut, RepairUpdate
from service.web.access import Managing, Reading
from service.web.dependencies import Db, PageOut, PagingDep, RecordId

router = APIRouter(tags=["repairs"])


@router.post("/traps/{trap_id}/repairs", status_code=201, summary="Record a repair")
def record_repair(trap_id: RecordId, body: RepairCreate, db: Db, viewer: Managing) -> RepairOut:
    with db.writing(viewer.actor) as session:
        trap = viewer.get(session, Trap, trap_id)
        return RepairOut.model_validate(
            surveys.record_repair(session=session, trap=trap, data=body)
        )


@router.get("/traps/{trap_id}/repairs", summary="A trap's repairs, oldest first")
def trap_repairs(
    trap_id: RecordId, db: Db, viewer: Reading, paging: PagingDep
) -> PageOut[RepairOut]:
    with db.reading() as session:
        trap = viewer.get(session, Trap, trap_id)
        return PageOut.of(
            surveys.repairs_of(
                session=session, trap=trap, limit=paging.limit, offset=paging.offset
            ),
            RepairOut,
        )


@router.get("/repairs/{repair_id}", summary="One repair")
def read_repair(repair_id: RecordId, db: Db, viewer: Reading) -> RepairOut:
    with db.reading() as session:
        return RepairOut.model_validate(viewer.get(session, Repair, repair_id))


@router.patch("/repairs/{repair_id}", summary="Correct a repair")
def update_repair(repair_id: RecordId, body: RepairUpdate, db: Db, viewer: Managing) -> RepairOut:
    with db.writing(viewer.actor) as session:
        repair = viewer.get(session, Repair, repair_id)
        changes = body.model_dump(exclude_unset=True)
        return RepairOut.model_validate(
            surveys.update_repair(session=session, repair=repair, changes=changes)
        )


@router.delete(
    "/repairs/{repair_id}", status_code=204, summary="Delete a repair entered by mistake"
)
def delete_repair(repair_id: RecordId, db: Db, viewer: Managing) -> Response:
    with db.writing(viewer.actor) as session:
        session.delete(viewer.get(session, Repair, repair_id))
    return Response(status_code=204)
