"""CSV exports of the register, a survey's findings and a site's repairs.

Each is written in the columns `imports.py` reads, in the program's own units, so an
exported file imports back to the same records.
"""

import datetime as dt
from collections.abc import Iterable

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.store.csv_format import write_table
from service.store.imports import FINDINGS, REGISTER, REPAIRS, ImportFormat
from service.store.models import Area, Finding, Repair, Site, Survey, Trap
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


Table = tuple[list[str], list[list[object]]]


def _table(spec: ImportFormat, rows: Iterable[tuple[object, object]], joined: str) -> Table:
    """Records with one joined value each (a trap's area name, a record's trap tag)."""
    headers = _headers(spec)
    lines = [
        [_cell(value if name == joined else getattr(record, name)) for name in headers]
        for record, value in rows
    ]
    return headers, lines


def register_csv(*, session: Session, site: Site) -> str:
    rows = session.execute(
        select(Trap, Area.name)
        .outerjoin(Area, Area.id == Trap.area_id)
        .where(Trap.site_id == site.id)
        .order_by(*ROUTE_ORDER)
    )
    return write_table(*_table(REGISTER, rows, "area"))


def findings_table(*, session: Session, survey: Survey) -> Table:
    rows = session.execute(
        select(Finding, Trap.tag)
        .join(Trap, Trap.id == Finding.trap_id)
        .where(Finding.survey_id == survey.id)
        .order_by(Finding.tested_at, Finding.id)
    )
    return _table(FINDINGS, rows, "tag")


def findings_csv(*, session: Session, survey: Survey) -> str:
    return write_table(*findings_table(session=session, survey=survey))


def repairs_csv(*, session: Session, site: Site) -> str:
    rows = session.execute(
        select(Repair, Trap.tag)
        .join(Trap, Trap.id == Repair.trap_id)
        .where(Trap.site_id == site.id)
        .order_by(Repair.repaired_on, Repair.id)
    )
    return write_table(*_table(REPAIRS, rows, "tag"))
