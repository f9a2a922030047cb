"""Many new records of one kind at once, as an import writes them: inserted through
SQLAlchemy Core in batches (SQLAlchemy's "insertmanyvalues": one statement for many rows), with
their audit entries and the site's revision written from the rows in hand, as a flush of
the same records would write them, in the same transaction.

A 20,000-trap register through the ORM spent most of its time building and flushing
objects one by one; this is the path `service.store.imports` takes for new records.
"""

from typing import Any

from sqlalchemy import insert, inspect
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


def insert_audited(
    session: Session, model: type[Any], rows: list[dict[str, Any]], site_id: int
) -> list[int]:
    """Insert new records of `model` (one dict of column values each, for one site) and
    write their audit entries and the site's new revision. Returns their ids, in the
    order the database answered."""
    if not rows:
        return []
    table = inspect(model).local_table
    # Every column returned, so each entry is written from its own row whatever order the
    # database answers in (asking SQLite for the parameters' order sends rows one by one).
    defaults = column_defaults(model)
    inserted = session.connection().execute(
        insert(table).returning(*table.c), [{**defaults, **row} for row in rows]
    )
    columns = list(inserted.keys())
    stored = [dict(zip(columns, row, strict=True)) for row in inserted]
    audit.write_created_entries(session, model, stored, site_id)
    revisions.bump_sites(session, {site_id})
    return [row["id"] for row in stored]
