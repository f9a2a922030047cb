"""CSV exports of the register, a survey's findings and a site's repairs.

Each is written in the columns `imports.py` reads, in the program's own units, so an
exported file imports back to the same records. Rows are read a thousand at a time and
handed on as they come (`csv_format.csv_chunks`), so the web layer streams a file of
any size without holding it.
"""

import datetime as dt
from collections.abc import Iterator
from typing import Any

from sqlalchemy import Select, select
from sqlalchemy.orm import Session

from service.store.csv_format import write_table
from service.store.imports import FINDINGS, REGISTER, REPAIRS, ImportFormat
from service.store.models import Area, Finding, Repair, Trap
from service.store.register import ROUTE_ORDER


def _headers(spec: ImportFormat, unit_symbols: frozenset[str] = frozenset()) -> list[str]:
    """The file's columns; a quantity's in the unit among `unit_symbols` it may be given
    in (psig, °F), else in the program's."""
    names = [column.name for column in spec.columns]
    for quantity, _ in spec.unit_columns:
        chosen = [header for header, symbol in quantity.headers.items() if symbol in unit_symbols]
        names.append(chosen[0] if chosen else quantity.field)
    return names + list(spec.extra_columns)


TEMPLATES = {"register": REGISTER, "findings": FINDINGS, "repairs": REPAIRS}


def template_csv(kind: str, unit_symbols: frozenset[str]) -> str:
    """An empty file of one kind to fill in: its header row, each quantity in the unit
    of `unit_symbols` a person reads (a US site's psig, °F, in, lb/h).

    >>> template_csv("repairs", frozenset())
    'tag,repaired_on,kind,cost,notes\\r\\n'
    """
    return write_table(_headers(TEMPLATES[kind], unit_symbols), [])


# Figures are written to 12 significant digits: far finer than any gauge or scale reads,
# and coarse enough that a value converted from US units (14.5 psig) and back does not
# print as 99.99999999999999.
EXPORT_DIGITS = 12


def _cell(value: object) -> object:
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return float(f"{value:.{EXPORT_DIGITS}g}")
    if isinstance(value, dt.date):  # dates, and moments (datetime is a date)
        return value.isoformat()
    return value


ROWS_PER_FETCH = 1000


def _rows(
    session: Session, spec: ImportFormat, query: Select[Any, str], joined: str
) -> tuple[list[str], Iterator[list[object]]]:
    """The file's columns, and its rows read by SQLAlchemy Core a thousand at a time
    (no ORM objects): each column of `query`'s model by the header's name, the joined
    value (a trap's area name, a record's trap tag) labelled `joined`."""
    headers = _headers(spec)
    model = query.column_descriptions[0]["entity"]
    columns = [
        query.selected_columns[joined] if name == joined else getattr(model, name)
        for name in headers
    ]
    result = session.execute(
        query.with_only_columns(*columns).execution_options(yield_per=ROWS_PER_FETCH)
    )
    return headers, ([_cell(value) for value in row] for row in result)


def register_rows(*, session: Session, site_id: int) -> tuple[list[str], Iterator[list[object]]]:
    query = (
        select(Trap, Area.name.label("area"))
        .outerjoin(Area, Area.id == Trap.area_id)
        .where(Trap.site_id == site_id)
        .order_by(*ROUTE_ORDER)
    )
    return _rows(session, REGISTER, query, "area")


def findings_rows(*, session: Session, survey_id: int) -> tuple[list[str], Iterator[list[object]]]:
    query = (
        select(Finding, Trap.tag.label("tag"))
        .join(Trap, Trap.id == Finding.trap_id)
        .where(Finding.survey_id == survey_id)
        .order_by(Finding.tested_at, Finding.id)
    )
    return _rows(session, FINDINGS, query, "tag")


def repairs_rows(*, session: Session, site_id: int) -> tuple[list[str], Iterator[list[object]]]:
    query = (
        select(Repair, Trap.tag.label("tag"))
        .join(Trap, Trap.id == Repair.trap_id)
        .where(Trap.site_id == site_id)
        .order_by(Repair.repaired_on, Repair.id)
    )
    return _rows(session, REPAIRS, query, "tag")
