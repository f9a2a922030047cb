"""Small pieces every store module uses: a page of a list, a record by id, the site a
record belongs to, merged edits."""

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any, Generic, TypeVar

from pydantic import BaseModel
from sqlalchemy import Select, func, select
from sqlalchemy.orm import Session

from service.store.errors import NotFoundError
from service.store.models import Finding, Repair, Site, Trap

T = TypeVar("T")
Input = TypeVar("Input", bound=BaseModel)


@dataclass(frozen=True, slots=True)
class Page(Generic[T]):
    """One page of a list, with the count of everything that matched."""

    items: Sequence[T]
    total: int
    limit: int
    offset: int


def paged(session: Session, query: Select[Any], *, limit: int, offset: int) -> Page[Any]:
    """The page of `query` from `offset`, at most `limit` long, and the total it matches."""
    total = session.scalar(select(func.count()).select_from(query.order_by(None).subquery()))
    items = session.scalars(query.limit(limit).offset(offset)).all()
    return Page(items=items, total=total or 0, limit=limit, offset=offset)


def get(session: Session, model: type[T], record_id: int) -> T:
    """The record of `model` with this id, or NotFoundError."""
    record = session.get(model, record_id)
    if record is None:
        raise NotFoundError(getattr(model, "__tablename__", model.__name__).rstrip("s"), record_id)
    return record


def site_id_of(session: Session, record: Any) -> int:
    """The id of the site a site, area, trap, survey, finding or repair belongs to."""
    if isinstance(record, Site):
        return record.id
    if isinstance(record, Finding):
        return record.trap.site_id
    if isinstance(record, Repair):
        return get(session, Trap, record.trap_id).site_id
    site_id: int = record.site_id
    return site_id


def merged_input(model: type[Input], current: dict[str, Any], changes: dict[str, Any]) -> Input:
    """A stored record with the changes applied, checked as a whole (pydantic ValidationError)."""
    return model.model_validate({**current, **changes})
