"""Many new records of one kind at once, as an import writes them: inserted through
SQLAlchemy Core in batches (one statement for many rows), with their audit entries and
the site's revision written from the rows in hand, as a flush of the same records would
write them, in the same transaction.

A 20,000-trap register through the ORM spent most of its time building and flushing
objects one by one; this is the path `service.store.imports` takes for new records.
"""

from typing import Any

from sqlalchemy import Table, func, insert, inspect, select
from sqlalchemy.orm import Session

from service.store import audit, revisions


def column_defaults(model: type[Any]) -> dict[str, Any]:
    """Every column of `model` a flush would fill when not given: scalar defaults, and
    those computed by a function (timestamps), computed now; the id and server defaults
    are left to the database."""
    defaults: dict[str, Any] = {}
    for column in inspect(model).columns:
        if column.primary_key or column.server_default is not None:
            continue
        default = column.default
        if default is None:
            defaults[column.key] = None
        elif default.is_scalar:
            defaults[column.key] = default.arg
        elif default.is_callable:
            defaults[column.key] = default.arg(None)
    return defaults


def _ids_in_order(session: Session, table: Table, complete: list[dict[str, Any]]) -> list[int]:
    """Insert the rows and return their ids in the rows' order.

    PostgreSQL numbers the rows of one INSERT from its sequence in the order asked, which
    SQLAlchemy's batched RETURNING with `sort_by_parameter_order` relies on. SQLite sends
    such a RETURNING row by row; but its writer holds the file's lock from BEGIN
    IMMEDIATE, and a table without AUTOINCREMENT numbers each new row one past the
    largest id (SQLite, "ROWIDs and the INTEGER PRIMARY KEY"): the ids are the next ones
    in order, which is checked after the insert.
    """
    connection = session.connection()
    if connection.dialect.name != "sqlite":
        inserted = connection.execute(
            insert(table).returning(table.c.id, sort_by_parameter_order=True), complete
        )
        return list(inserted.scalars())
    before = connection.scalar(select(func.max(table.c.id))) or 0
    connection.execute(insert(table), complete)
    after = connection.scalar(select(func.max(table.c.id))) or 0
    if after != before + len(complete):
        raise RuntimeError(f"{table.name}: new ids not numbered in order; nothing is kept")
    return list(range(before + 1, after + 1))


def insert_audited(
    session: Session, model: type[Any], rows: list[dict[str, Any]], site_id: int
) -> list[int]:
    """Insert new records of `model` (one dict of column values each, for one site) and
    write their audit entries, from the rows in hand, and the site's new revision.
    Returns their ids in the rows' order."""
    if not rows:
        return []
    defaults = column_defaults(model)
    complete = [{**defaults, **row} for row in rows]
    ids = _ids_in_order(session, inspect(model).local_table, complete)
    for row, record_id in zip(complete, ids, strict=True):
        row["id"] = record_id
    audit.write_created_entries(session, model, complete, site_id)
    revisions.bump_sites(session, {site_id})
    return ids
