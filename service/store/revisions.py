"""Every write to a site or to its records bumps the site's revision, in the same
transaction, so a roll-up computed at one revision is known to hold until the next.

Writes through the ORM are seen here (a flush of new, changed or deleted sites, areas,
traps, surveys, findings or repairs); a write past the ORM (the bulk inserts of
`service.store.bulk`) calls `bump_sites` itself.
"""

from typing import Any

from sqlalchemy import select, update
from sqlalchemy.orm import Session

from service.store.models import Area, Finding, Repair, Site, Survey, Trap


def _touched_sites(session: Session, records: list[Any]) -> set[int]:
    sites: set[int] = set()
    surveys: set[int] = set()
    traps: set[int] = set()
    for record in records:
        if isinstance(record, Site):
            sites.add(record.id)
        elif isinstance(record, Area | Trap | Survey):
            sites.add(record.site_id)
        elif isinstance(record, Finding):
            surveys.add(record.survey_id)
        elif isinstance(record, Repair):
            traps.add(record.trap_id)
    connection = session.connection()
    if surveys:
        sites |= set(connection.scalars(select(Survey.site_id).where(Survey.id.in_(surveys))))
    if traps:
        sites |= set(connection.scalars(select(Trap.site_id).where(Trap.id.in_(traps))))
    return {site for site in sites if site is not None}


def bump_sites(session: Session, site_ids: set[int]) -> None:
    """Raise the revision of each site, in the session's transaction."""
    if site_ids:
        session.connection().execute(
            update(Site).where(Site.id.in_(site_ids)).values(revision=Site.revision + 1)
        )


def bump_revisions(session: Session, _flush_context: Any) -> None:
    """After a flush: raise the revision of every site whose records it wrote."""
    bump_sites(session, _touched_sites(session, [*session.new, *session.dirty, *session.deleted]))
