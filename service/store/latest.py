"""Which finding counts: a trap's latest test (by when it was tested, then by entry)."""

from typing import Any

from sqlalchemy import Select, func, select

from service.store.models import Finding, Survey


def latest_findings(*, site_id: int, survey_id: int | None = None) -> Select[Any]:
    """Each trap's latest finding, in one survey or (without `survey_id`) in all of them.

    A select of the findings table's columns, one row per tested trap.
    """
    order = func.row_number().over(
        partition_by=Finding.trap_id, order_by=(Finding.tested_at.desc(), Finding.id.desc())
    )
    ranked = select(Finding, order.label("rank")).join(Survey, Survey.id == Finding.survey_id)
    ranked = ranked.where(Survey.site_id == site_id)
    if survey_id is not None:
        ranked = ranked.where(Finding.survey_id == survey_id)
    numbered = ranked.subquery()
    columns = [numbered.c[column.name] for column in Finding.__table__.columns]
    return select(*columns).where(numbered.c.rank == 1)
