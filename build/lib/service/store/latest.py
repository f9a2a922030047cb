"""Which finding counts: a trap's latest test (by when it was tested, then by entry)."""

import datetime as dt
from collections.abc import Sequence

from sqlalchemy import ColumnElement, ScalarSelect, select
from sqlalchemy.orm import Session

from service.physics.conditions import TrapCondition
from service.store.models import Finding, Trap


def latest_finding_id(*, survey_id: int | None = None) -> ScalarSelect[int]:
    """The id of the enclosing query's trap's latest finding, in one survey or in all.

    A correlated subquery on `Trap.id`: with the index on (survey_id, trap_id,
    tested_at) each trap's lookup is one index probe, so a join on it stays linear
    in the number of traps on SQLite and PostgreSQL alike.
    """
    latest = select(Finding.id).where(Finding.trap_id == Trap.id)
    if survey_id is not None:
        latest = latest.where(Finding.survey_id == survey_id)
    return (
        latest.order_by(Finding.tested_at.desc(), Finding.id.desc())
        .limit(1)
        .correlate(Trap)
        .scalar_subquery()
    )


def is_latest_finding(*, survey_id: int | None = None) -> ColumnElement[bool]:
    """The join condition from a trap to its latest finding."""
    return Finding.id == latest_finding_id(survey_id=survey_id)


def latest_conditions(
    session: Session, trap_ids: Sequence[int]
) -> dict[int, tuple[TrapCondition, dt.datetime]]:
    """Each trap's latest condition across every survey, and when it was found."""
    if not trap_ids:
        return {}
    rows = session.execute(
        select(Trap.id, Finding.condition, Finding.tested_at)
        .join(Finding, is_latest_finding())
        .where(Trap.id.in_(trap_ids))
    )
    return {trap_id: (condition, tested_at) for trap_id, condition, tested_at in rows}
