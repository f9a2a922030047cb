"""What routes share: the database, paging, and the records a path names."""

from dataclasses import dataclass
from typing import Annotated, Any, Generic, TypeVar

from fastapi import Depends, Path, Query, Request
from pydantic import BaseModel

from service.store.database import Database
from service.store.records import Page

T = TypeVar("T")

# Record ids are 32-bit integers on every database; a larger one names no record.
MAX_RECORD_ID = 2_147_483_647
RecordId = Annotated[int, Path(ge=1, le=MAX_RECORD_ID)]
RecordIdQuery = Annotated[int, Query(ge=1, le=MAX_RECORD_ID)]
OptionalRecordIdQuery = Annotated[int | None, Query(ge=1, le=MAX_RECORD_ID)]


def record_id(text: str) -> int | None:
    """A typed id from a form or filter, or None where it is none (blank, junk, too large)."""
    return int(text) if text.isdigit() and 0 < int(text) <= MAX_RECORD_ID else None


def database(request: Request) -> Database:
    """The application's database, opened by the app factory."""
    found: Database = request.app.state.database
    return found


Db = Annotated[Database, Depends(database)]


@dataclass(frozen=True, slots=True)
class Paging:
    limit: int
    offset: int


def paging(
    limit: Annotated[int, Query(ge=1, le=1000, description="Items per page")] = 100,
    offset: Annotated[int, Query(ge=0, le=10_000_000, description="Items to skip")] = 0,
) -> Paging:
    return Paging(limit=limit, offset=offset)


PagingDep = Annotated[Paging, Depends(paging)]


class PageOut(BaseModel, Generic[T]):
    """One page of a list, and how many items matched in all."""

    items: list[T]
    total: int
    limit: int
    offset: int

    @classmethod
    def of(cls, page: Page[Any], item: type[BaseModel]) -> "PageOut[T]":
        return cls.model_validate(
            {
                "items": [item.model_validate(record) for record in page.items],
                "total": page.total,
                "limit": page.limit,
                "offset": page.offset,
            }
        )
