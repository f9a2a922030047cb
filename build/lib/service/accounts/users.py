"""People who sign in: adding them, their sites, their passwords, disabling them.

A user is never deleted (the audit trail names them); a disabled user cannot sign in, and
disabling one, or changing their password, ends their sessions and revokes their tokens in
the same transaction.
"""

import datetime as dt
import re
from collections.abc import Iterable

from sqlalchemy import delete, func, select, update
from sqlalchemy.orm import Session

from service.accounts.passwords import hash_password, password_problem
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.store.models import ApiToken, Role, Site, User, UserSession

_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._@-]{1,79}$")


def user_named(session: Session, name: str) -> User | None:
    """The user with this name (names are compared without regard to case)."""
    return session.scalar(select(User).where(func.lower(User.name) == name.lower()))


def existing_user(session: Session, name: str) -> User:
    found = user_named(session, name)
    if found is None:
        raise NotFoundError("user", name)
    return found


def _sites(session: Session, site_ids: Iterable[int]) -> list[Site]:
    wanted = sorted(set(site_ids))
    found = list(session.scalars(select(Site).where(Site.id.in_(wanted))))
    missing = sorted(set(wanted) - {site.id for site in found})
    if missing:
        raise FieldError("site", f"There is no site {missing[0]}.")
    return found


def add_user(
    session: Session, *, name: str, role: Role, password: str, site_ids: Iterable[int] = ()
) -> User:
    """A new user with a checked password, assigned to the given sites."""
    if not _NAME.match(name):
        raise FieldError(
            "name", "A user name is 2-80 letters, digits, dots, dashes, underscores or @."
        )
    if user_named(session, name) is not None:
        raise ConflictError(f"There is already a user named {name}.")
    problem = password_problem(password, name)
    if problem:
        raise FieldError("password", problem)
    user = User(name=name, role=role, password_hash=hash_password(password))
    user.sites = _sites(session, site_ids)
    session.add(user)
    session.flush()
    return user


def assign_sites(session: Session, user: User, site_ids: Iterable[int]) -> User:
    """Replace the sites a user is assigned to."""
    user.sites = _sites(session, site_ids)
    session.flush()
    return user


def end_access(session: Session, user: User) -> None:
    """End every session of the user and revoke every token, at once."""
    session.execute(delete(UserSession).where(UserSession.user_id == user.id))
    session.execute(
        update(ApiToken)
        .where(ApiToken.user_id == user.id, ApiToken.revoked_at.is_(None))
        .values(revoked_at=dt.datetime.now(dt.UTC))
    )


def set_password(session: Session, user: User, password: str) -> None:
    """A new, checked password; the user's sessions and tokens end with the old one."""
    problem = password_problem(password, user.name)
    if problem:
        raise FieldError("password", problem)
    user.password_hash = hash_password(password)
    user.password_changed_at = dt.datetime.now(dt.UTC)
    end_access(session, user)
    session.flush()


def disable_user(session: Session, user: User) -> None:
    """The user can no longer sign in, and is signed out everywhere now."""
    user.disabled = True
    end_access(session, user)
    session.flush()


def enable_user(session: Session, user: User) -> None:
    user.disabled = False
    session.flush()
