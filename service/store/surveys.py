"""Survey rounds, the findings recorded in them, and the repairs that follow."""

import hashlib
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from sqlalchemy import select
from sqlalchemy.exc import IntegrityError
from sqlalchemy.orm import Session

from service.physics.conditions import TrapCondition
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.store.models import Area, Finding, Repair, Site, Survey, Trap
from service.store.records import Page, get, merged_input, paged
from service.store.schemas import FindingCreate, RepairCreate, SurveyCreate
from service.store.vocabulary import SurveyStatus

IDEMPOTENCY_HEADER = "Idempotency-Key"

# Surveys ------------------------------------------------------------------------------


def _unique_survey_name(session: Session, site_id: int, name: str, survey_id: int | None) -> None:
    clash = session.scalar(
        select(Survey.id).where(
            Survey.site_id == site_id, Survey.name == name, Survey.id != (survey_id or -1)
        )
    )
    if clash is not None:
        raise ConflictError(f"the site already has a survey named '{name}'")


def create_survey(*, session: Session, site: Site, data: SurveyCreate) -> Survey:
    _unique_survey_name(session, site.id, data.name, None)
    survey = Survey(site_id=site.id, **data.model_dump())
    session.add(survey)
    session.flush()
    return survey


def update_survey(*, session: Session, survey: Survey, changes: dict[str, Any]) -> Survey:
    current = {name: getattr(survey, name) for name in SurveyCreate.model_fields}
    data = merged_input(SurveyCreate, current, changes)
    _unique_survey_name(session, survey.site_id, data.name, survey.id)
    for name, value in data.model_dump().items():
        setattr(survey, name, value)
    session.flush()
    return survey


def delete_survey(*, session: Session, survey: Survey) -> None:
    if session.scalar(select(Finding.id).where(Finding.survey_id == survey.id).limit(1)):
        raise ConflictError("a survey with findings cannot be deleted")
    session.delete(survey)
    session.flush()


def surveys_of(*, session: Session, site: Site) -> Sequence[Survey]:
    """A site's surveys, newest first."""
    return session.scalars(
        select(Survey)
        .where(Survey.site_id == site.id)
        .order_by(Survey.started_on.desc(), Survey.id.desc())
    ).all()


def latest_survey(*, session: Session, site: Site) -> Survey | None:
    surveys = surveys_of(session=session, site=site)
    return surveys[0] if surveys else None


def survey_of_site(*, session: Session, site: Site, survey_id: int) -> Survey:
    """The site's survey with this id; another site's survey is not found."""
    survey = get(session, Survey, survey_id)
    if survey.site_id != site.id:
        raise NotFoundError("survey", survey_id)
    return survey


def chosen_survey(*, session: Session, site: Site, survey_id: int | None) -> Survey | None:
    """The survey a summary, report or download asks for: by id, else the latest."""
    if survey_id is None:
        return latest_survey(session=session, site=site)
    return survey_of_site(session=session, site=site, survey_id=survey_id)


# Findings -----------------------------------------------------------------------------


def _fingerprint(survey: Survey, data: FindingCreate) -> str:
    return hashlib.sha256(f"{survey.id}:{data.model_dump_json()}".encode()).hexdigest()


def _replay(session: Session, key: str, fingerprint: str) -> Finding | None:
    earlier = session.scalar(select(Finding).where(Finding.idempotency_key == key))
    if earlier is not None and earlier.request_fingerprint != fingerprint:
        raise FieldError(
            IDEMPOTENCY_HEADER,
            "this Idempotency-Key was already used for a different finding; "
            "send a new key for a new finding",
        )
    return earlier


def _trap_of_site(session: Session, site_id: int, trap_id: int) -> Trap:
    trap = session.get(Trap, trap_id)
    if trap is None or trap.site_id != site_id:
        raise FieldError("trap_id", f"the survey's site has no trap {trap_id}")
    return trap


def check_open_for_findings(survey: Survey, *, correction: bool = False) -> None:
    """Findings are recorded while a round is in progress; a closed round takes only a
    correction (which the caller lets a manager make); a planned one none. ConflictError
    says why."""
    if survey.status == SurveyStatus.PLANNED:
        raise ConflictError(
            f"the round '{survey.name}' is planned and not started yet: a manager starts it "
            "before findings are recorded"
        )
    if survey.status == SurveyStatus.CLOSED and not correction:
        raise ConflictError(
            f"the round '{survey.name}' is closed: its findings change only by a manager's "
            "correction"
        )


def record_finding(
    *,
    session: Session,
    survey: Survey,
    data: FindingCreate,
    idempotency_key: str | None = None,
    correction: bool = False,
) -> tuple[Finding, bool]:
    """Store one finding; with a key already used for the same finding, return that one.

    Returns the finding and whether it was stored before (a replayed request). The
    same key with a different finding raises FieldError on the header. A round not in
    progress refuses a new finding (`check_open_for_findings`), but a save that reached
    the server before the round closed is still answered with what it stored.
    """
    fingerprint = _fingerprint(survey, data)
    if idempotency_key is not None:
        earlier = _replay(session, idempotency_key, fingerprint)
        if earlier is not None:
            return earlier, True
    check_open_for_findings(survey, correction=correction)
    _trap_of_site(session, survey.site_id, data.trap_id)
    finding = Finding(
        survey_id=survey.id,
        idempotency_key=idempotency_key,
        request_fingerprint=fingerprint if idempotency_key else None,
        **data.model_dump(),
    )
    try:
        with session.begin_nested():
            session.add(finding)
    except IntegrityError:
        # Another request with the same key committed between our look and our insert.
        if idempotency_key is None:
            raise
        earlier = _replay(session, idempotency_key, fingerprint)
        if earlier is None:
            raise
        return earlier, True
    return finding, False


def update_finding(*, session: Session, finding: Finding, changes: dict[str, Any]) -> Finding:
    current = {name: getattr(finding, name) for name in FindingCreate.model_fields}
    data = merged_input(FindingCreate, current, {**changes, "trap_id": finding.trap_id})
    for name, value in data.model_dump().items():
        setattr(finding, name, value)
    session.flush()
    return finding


@dataclass(frozen=True, slots=True)
class FindingFilter:
    condition: TrapCondition | None = None
    area_id: int | None = None
    tag_prefix: str | None = None


def list_findings(
    *,
    session: Session,
    survey: Survey | None = None,
    trap: Trap | None = None,
    where: FindingFilter = FindingFilter(),
    limit: int,
    offset: int,
) -> Page[Finding]:
    """Findings of a survey or of a trap, oldest first."""
    query = select(Finding).join(Trap, Trap.id == Finding.trap_id)
    if survey is not None:
        query = query.where(Finding.survey_id == survey.id)
    if trap is not None:
        query = query.where(Finding.trap_id == trap.id)
    if where.condition is not None:
        query = query.where(Finding.condition == where.condition)
    if where.area_id is not None:
        query = query.join(Area, Area.id == Trap.area_id).where(Area.id == where.area_id)
    if where.tag_prefix:
        query = query.where(Trap.tag.startswith(where.tag_prefix, autoescape=True))
    return paged(session, query.order_by(Finding.tested_at, Finding.id), limit=limit, offset=offset)


# Repairs ------------------------------------------------------------------------------


def record_repair(*, session: Session, trap: Trap, data: RepairCreate) -> Repair:
    repair = Repair(trap_id=trap.id, **data.model_dump())
    session.add(repair)
    session.flush()
    return repair


def update_repair(*, session: Session, repair: Repair, changes: dict[str, Any]) -> Repair:
    current = {name: getattr(repair, name) for name in RepairCreate.model_fields}
    data = merged_input(RepairCreate, current, changes)
    for name, value in data.model_dump().items():
        setattr(repair, name, value)
    session.flush()
    return repair


def repairs_of(*, session: Session, trap: Trap, limit: int, offset: int) -> Page[Repair]:
    query = select(Repair).where(Repair.trap_id == trap.id).order_by(Repair.repaired_on, Repair.id)
    return paged(session, query, limit=limit, offset=offset)
