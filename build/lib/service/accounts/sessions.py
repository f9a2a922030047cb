"""Sessions kept on the server: one row per signed-in browser.

The browser's cookie holds a random secret; the table holds its SHA-256, the user, the
session's CSRF token and two moments. A session ends when its user signs out, is
disabled or changes password (the row is deleted), after `idle` without a request, or
`absolute` after sign-in, whichever comes first.
"""

import datetime as dt
import secrets
from dataclasses import dataclass

from sqlalchemy import delete, or_, select
from sqlalchemy.orm import Session

from service.accounts.credentials import digest, new_secret
from service.store.models import User, UserSession

# last_seen_at is written at most this often, so that reading pages is not a write each time.
TOUCH_INTERVAL = dt.timedelta(seconds=60)


@dataclass(frozen=True, slots=True)
class SessionLimits:
    """How long a session lasts: `idle` without a request, `absolute` in all."""

    idle: dt.timedelta
    absolute: dt.timedelta

    def expired(self, started: UserSession, now: dt.datetime) -> bool:
        return now - started.last_seen_at > self.idle or now - started.started_at > self.absolute


def start_session(
    session: Session, user: User, limits: SessionLimits, now: dt.datetime
) -> tuple[str, UserSession]:
    """A new session for `user` (always a new secret), and its cookie value. Expired
    sessions of every user are cleared on the way."""
    session.execute(
        delete(UserSession).where(
            or_(
                UserSession.last_seen_at < now - limits.idle,
                UserSession.started_at < now - limits.absolute,
            )
        )
    )
    secret = new_secret()
    started = UserSession(
        secret_sha256=digest(secret),
        user_id=user.id,
        csrf_token=secrets.token_urlsafe(32),
        started_at=now,
        last_seen_at=now,
    )
    session.add(started)
    session.flush()
    return secret, started


def live_session(
    session: Session, secret: str, limits: SessionLimits, now: dt.datetime
) -> UserSession | None:
    """The session this cookie secret opens, if it is still live and its user enabled."""
    found = session.scalar(select(UserSession).where(UserSession.secret_sha256 == digest(secret)))
    if found is None or found.user.disabled or limits.expired(found, now):
        return None
    return found


def needs_touch(found: UserSession, now: dt.datetime) -> bool:
    return now - found.last_seen_at > TOUCH_INTERVAL


def touch_session(session: Session, session_id: int, now: dt.datetime) -> None:
    """Record that the session was used now (keeps it from going idle)."""
    found = session.get(UserSession, session_id)
    if found is not None:
        found.last_seen_at = now


def end_session(session: Session, secret: str) -> None:
    """Sign-out: the session's row goes, so its cookie opens nothing again."""
    session.execute(delete(UserSession).where(UserSession.secret_sha256 == digest(secret)))
