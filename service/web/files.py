"""Answers that are files to keep: whole (an XLSX workbook, a repair list) or streamed a
chunk at a time from the database (the register, findings and repairs as CSV)."""

from collections.abc import Callable, Iterator

from fastapi.responses import Response, StreamingResponse
from sqlalchemy.orm import Session

from service.store.csv_format import csv_chunks
from service.store.database import Database

CSV = "text/csv; charset=utf-8"
XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
RowsOf = Callable[[Session], tuple[list[str], Iterator[list[object]]]]


def _attachment(filename: str) -> dict[str, str]:
    return {"Content-Disposition": f'attachment; filename="{filename}"'}


def download(content: bytes | str, filename: str, media_type: str) -> Response:
    """A file the browser keeps, whole."""
    return Response(content=content, media_type=media_type, headers=_attachment(filename))


def streamed_csv(db: Database, rows_of: RowsOf, filename: str) -> StreamingResponse:
    """A CSV file sent as its rows are read, in a reading session of its own that lasts
    as long as the answer. Check who may read it before: once sending has begun, the
    answer can no longer be refused."""

    def chunks() -> Iterator[str]:
        with db.reading() as session:
            yield from csv_chunks(*rows_of(session))

    return StreamingResponse(chunks(), media_type=CSV, headers=_attachment(filename))
