"""Findings: one test of one trap in one survey. A retried save is stored once."""

from typing import Annotated

from fastapi import APIRouter, Header, Query, Response
from starlette.status import HTTP_201_CREATED

from service.accounts.roles import Permission
from service.physics.conditions import TrapCondition
from service.store import surveys
from service.store.models import Finding, Survey, Trap
from service.store.schemas import FindingCreate, FindingOut, FindingUpdate
from service.web.access import Managing, NotPermitted, Reading, Recording
from service.web.dependencies import Db, OptionalRecordIdQuery, PageOut, PagingDep, RecordId

router = APIRouter(tags=["findings"])

IdempotencyKey = Annotated[
    str | None,
    Header(
        alias=surveys.IDEMPOTENCY_HEADER,
        min_length=8,
        max_length=100,
        pattern=r"^[A-Za-z0-9._:-]+$",
        description="A key of the client's choosing; the same key and finding sent again "
        "store one finding and answer with it",
    ),
]


@router.post(
    "/surveys/{survey_id}/findings",
    status_code=HTTP_201_CREATED,
    summary="Record a finding (idempotent with an Idempotency-Key header)",
    description="`tested_by` is the signed-in person's name; a manager may name another. "
    "A round must be in progress (409 otherwise), or closed with `correction=true` from a "
    "manager.",
)
def record_finding(
    survey_id: RecordId,
    body: FindingCreate,
    db: Db,
    viewer: Recording,
    response: Response,
    idempotency_key: IdempotencyKey = None,
    correction: Annotated[
        bool,
        Query(
            description="A manager's correction to a closed round (recorded in the audit "
            "trail like every finding); a round not in progress refuses findings otherwise"
        ),
    ] = False,
) -> FindingOut:
    if correction and not viewer.may(Permission.MANAGE):
        raise NotPermitted
    body = body.model_copy(update={"tested_by": viewer.tester(body.tested_by)})
    with db.writing(viewer.actor) as session:
        survey = viewer.get(session, Survey, survey_id)
        finding, replayed = surveys.record_finding(
            session=session,
            survey=survey,
            data=body,
            idempotency_key=idempotency_key,
            correction=correction,
        )
        answer = FindingOut.model_validate(finding)
    if replayed:
        response.headers["Idempotent-Replayed"] = "true"
    return answer


@router.get("/surveys/{survey_id}/findings", summary="A survey's findings, oldest first")
def survey_findings(
    survey_id: RecordId,
    db: Db,
    viewer: Reading,
    paging: PagingDep,
    condition: TrapCondition | None = None,
    area_id: OptionalRecordIdQuery = None,
    tag_prefix: Annotated[str | None, Query(max_length=40)] = None,
) -> PageOut[FindingOut]:
    where = surveys.FindingFilter(condition=condition, area_id=area_id, tag_prefix=tag_prefix)
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        page = surveys.list_findings(
            session=session, survey=survey, where=where, limit=paging.limit, offset=paging.offset
        )
        return PageOut.of(page, FindingOut)


@router.get("/traps/{trap_id}/findings", summary="A trap's findings, oldest first")
def trap_findings(
    trap_id: RecordId, db: Db, viewer: Reading, paging: PagingDep
) -> PageOut[FindingOut]:
    with db.reading() as session:
        trap = viewer.get(session, Trap, trap_id)
        page = surveys.list_findings(
            session=session, trap=trap, limit=paging.limit, offset=paging.offset
        )
        return PageOut.of(page, FindingOut)


@router.get("/findings/{finding_id}", summary="One finding")
def read_finding(finding_id: RecordId, db: Db, viewer: Reading) -> FindingOut:
    with db.reading() as session:
        return FindingOut.model_validate(viewer.get(session, Finding, finding_id))


@router.patch("/findings/{finding_id}", summary="Correct a finding")
def update_finding(
    finding_id: RecordId, body: FindingUpdate, db: Db, viewer: Managing
) -> FindingOut:
    with db.writing(viewer.actor) as session:
        finding = viewer.get(session, Finding, finding_id)
        changes = body.model_dump(exclude_unset=True)
        return FindingOut.model_validate(
            surveys.update_finding(session=session, finding=finding, changes=changes)
        )


@router.delete(
    "/findings/{finding_id}", status_code=204, summary="Delete a finding entered by mistake"
)
def delete_finding(finding_id: RecordId, db: Db, viewer: Managing) -> Response:
    with db.writing(viewer.actor) as session:
        session.delete(viewer.get(session, Finding, finding_id))
    return Response(status_code=204)
