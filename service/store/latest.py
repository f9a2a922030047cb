"""Which finding counts: a trap's latest test (by when it was tested, then by entry)."""

from sqlalchemy import ColumnElement, ScalarSelect, select

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
