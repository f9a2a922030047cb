"""Which writes change who may do what: a user (role, sites, password, disabled) or an
API token (made, revoked). Each committed write that touched one raises a counter of the
process, so a cache of signed-in viewers knows to start again (`web.viewer_cache`).
"""

from typing import Any

from sqlalchemy import Delete, Update
from sqlalchemy.orm import ORMExecuteState, Session

from service.store.models import ApiToken, User

_TOUCHED = "traptally_access_touched"
_ACCESS_RECORDS = (User, ApiToken)


class AccessChanges:
    """How many writes that touched access this process has committed."""

    def __init__(self) -> None:
        self.generation = 0

    def note_flush(self, session: Session, _flush_context: Any) -> None:
        records = [*session.new, *session.dirty, *session.deleted]
        if any(isinstance(record, _ACCESS_RECORDS) for record in records):
            session.info[_TOUCHED] = True

    def note_statement(self, state: ORMExecuteState) -> None:
        """A bulk UPDATE or DELETE of users or tokens (revoking a user's tokens at once)."""
        mapper = state.bind_mapper
        touches = mapper is not None and mapper.class_ in _ACCESS_RECORDS
        if touches and isinstance(state.statement, Update | Delete):
            state.session.info[_TOUCHED] = True

    def after_commit(self, session: Session) -> None:
        if session.info.pop(_TOUCHED, False):
            self.generation += 1
