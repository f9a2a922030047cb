"""The audit trail: every flush that creates, changes or deletes a site (its settings), an
area, a trap, a survey, a finding, a repair, a user or a token writes one entry per record,
in the same transaction, with who did it and the values before and after.

Who: the `Actor` a caller hands to `Database.writing(actor)`; writes without one (the
command line's demo loader, migrations) are entered as "system". Secrets and hashes are
never copied into the trail; a password change shows as "(changed)".
"""

import datetime as dt
from dataclasses import dataclass
from enum import Enum
from typing import Any

from sqlalchemy import insert, inspect, select
from sqlalchemy.orm import Session

from service.store.models import (
    ApiToken,
    Area,
    AuditEntry,
    Finding,
    Repair,
    Site,
    Survey,
    Trap,
    User,
)
from service.store.records import Page, paged

ACTOR_KEY = "traptally_actor"

AUDITED: dict[type[Any], str] = {
    Site: "site",
    Area: "area",
    Trap: "trap",
    Survey: "survey",
    Finding: "finding",
    Repair: "repair",
    User: "user",
    ApiToken: "token",
}
_NOT_COPIED = {"id", "created_at", "updated_at", "revision", "request_fingerprint"}
_SECRET = {"password_hash", "secret_sha256"}


@dataclass(frozen=True, slots=True)
class Actor:
    """Who a write is done for: a user (id and name), or the system."""

    user_id: int | None
    name: str


SYSTEM = Actor(user_id=None, name="system")


_JSON_READY = (str, int, float, bool, type(None))


def _plain(value: Any) -> Any:
    """A stored value as JSON can hold it."""
    if type(value) in _JSON_READY:  # most are: no further test (a StrEnum is not)
        return value
    if isinstance(value, Enum):
        return value.value
    if isinstance(value, dt.date | dt.datetime):
        return value.isoformat()
    if isinstance(value, dict):
        return {str(key): _plain(item) for key, item in value.items()}
    if isinstance(value, list | tuple):
        return [_plain(item) for item in value]
    return value


def _shown(key: str, value: Any) -> Any:
    return "(changed)" if key in _SECRET else _plain(value)


def _values(record: Any) -> dict[str, Any]:
    state = inspect(record)
    return {
        attribute.key: _shown(attribute.key, state.attrs[attribute.key].loaded_value)
        for attribute in state.mapper.column_attrs
        if attribute.key not in _NOT_COPIED and attribute.key not in _SECRET
    }


def _changes(record: Any) -> tuple[dict[str, Any], dict[str, Any]]:
    state = inspect(record)
    old: dict[str, Any] = {}
    new: dict[str, Any] = {}
    for attribute in state.mapper.column_attrs:
        key = attribute.key
        history = state.attrs[key].history
        if key in _NOT_COPIED or not history.has_changes():
            continue
        before = history.deleted[0] if history.deleted else None
        after = history.added[0] if history.added else None
        if _plain(before) != _plain(after):
            old[key], new[key] = _shown(key, before), _shown(key, after)
    if isinstance(record, User):
        history = state.attrs["sites"].history
        if history.added or history.deleted:
            new["site_ids"] = sorted(site.id for site in record.sites)
            old["site_ids"] = sorted({site.id for site in [*history.unchanged, *history.deleted]})
    return old, new


def _trap_id(record: Any) -> int | None:
    if isinstance(record, Trap):
        return int(record.id)
    if isinstance(record, Finding | Repair):
        return int(record.trap_id)
    return None


def _site_ids(session: Session, trap_ids: set[int]) -> dict[int, int]:
    if not trap_ids:
        return {}
    rows = session.connection().execute(
        select(Trap.id, Trap.site_id).where(Trap.id.in_(sorted(trap_ids)))
    )
    return dict(rows.all())


def _who_and_when(session: Session) -> dict[str, Any]:
    """The columns every entry of one write shares: the session's actor, and now."""
    actor: Actor = session.info.get(ACTOR_KEY, SYSTEM)
    return {"at": dt.datetime.now(dt.UTC), "actor_user_id": actor.user_id, "actor_name": actor.name}


def _entry(
    shared: dict[str, Any],
    action: str,
    record_type: str,
    record_id: int,
    site_id: int | None,
    trap_id: int | None,
    old: dict[str, Any] | None,
    new: dict[str, Any] | None,
) -> dict[str, Any]:
    """One audit entry's columns, with the actor and moment of its write (`shared`)."""
    return {
        **shared,
        "action": action,
        "record_type": record_type,
        "record_id": record_id,
        "site_id": site_id,
        "trap_id": trap_id,
        "old_values": old,
        "new_values": new,
    }


def write_created_entries(
    session: Session, model: type[Any], rows: list[dict[str, Any]], site_id: int
) -> None:
    """One "created" entry for each row of `model` inserted past the ORM (each row holds
    every column, its "id" among them), in the session's transaction: the values a flush
    of the same record would record."""
    keys = [
        attribute.key
        for attribute in inspect(model).column_attrs
        if attribute.key not in _NOT_COPIED and attribute.key not in _SECRET
    ]
    shared = _who_and_when(session)
    entries = [
        _entry(
            shared,
            "created",
            AUDITED[model],
            row["id"],
            site_id,
            row["id"] if model is Trap else row.get("trap_id"),
            None,
            {key: _plain(row[key]) for key in keys},
        )
        for row in rows
    ]
    if entries:
        session.connection().execute(insert(AuditEntry), entries)


def write_audit_entries(session: Session, _flush_context: Any) -> None:
    """After a flush: one audit entry for each audited record it created, changed or deleted."""
    touched: list[tuple[str, Any]] = [
        *(("created", record) for record in session.new),
        *(("changed", record) for record in session.dirty if session.is_modified(record)),
        *(("deleted", record) for record in session.deleted),
    ]
    touched = [(action, record) for action, record in touched if type(record) in AUDITED]
    if not touched:
        return
    trap_sites = _site_ids(
        session, {trap for _, record in touched if (trap := _trap_id(record)) is not None}
    )
    shared = _who_and_when(session)
    entries = []
    for action, record in touched:
        if action == "created":
            old, new = None, _values(record)
        elif action == "deleted":
            old, new = _values(record), None
        else:
            old, new = _changes(record)
            if not new:
                continue
        trap_id = _trap_id(record)
        site_id = (
            record.id
            if isinstance(record, Site)
            else getattr(record, "site_id", None) or trap_sites.get(trap_id or 0)
        )
        entries.append(
            _entry(shared, action, AUDITED[type(record)], record.id, site_id, trap_id, old, new)
        )
    if entries:
        session.connection().execute(insert(AuditEntry), entries)


def trail_of_trap(session: Session, trap_id: int, *, limit: int = 50) -> list[AuditEntry]:
    """The trap's own entries and those of its findings and repairs, newest first."""
    return list(
        session.scalars(
            select(AuditEntry)
            .where(AuditEntry.trap_id == trap_id)
            .order_by(AuditEntry.at.desc(), AuditEntry.id.desc())
            .limit(limit)
        )
    )


def trail_of_site(session: Session, site_id: int, *, limit: int, offset: int) -> Page[AuditEntry]:
    """Every entry about the site and its records, newest first."""
    return paged(
        session,
        select(AuditEntry)
        .where(AuditEntry.site_id == site_id)
        .order_by(AuditEntry.at.desc(), AuditEntry.id.desc()),
        limit=limit,
        offset=offset,
    )
