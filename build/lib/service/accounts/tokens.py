"""Bearer tokens for integrations: `Authorization: Bearer tt_...` on the JSON API.

A token acts as its user, with the user's role and sites. It is shown once, when made;
the table keeps its SHA-256. Revoking it, disabling the user or changing the user's
password refuses it from then on.
"""

import datetime as dt

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.accounts.credentials import digest, new_secret
from service.store.errors import NotFoundError
from service.store.models import ApiToken, User

TOKEN_PREFIX = "tt_"


def create_token(session: Session, user: User, label: str = "") -> tuple[str, ApiToken]:
    """A new token for `user`, and the secret to hand over (not stored)."""
    secret = TOKEN_PREFIX + new_secret()
    token = ApiToken(secret_sha256=digest(secret), user_id=user.id, label=label[:80])
    session.add(token)
    session.flush()
    return secret, token


def token_user(session: Session, secret: str) -> User | None:
    """The enabled user a live token acts for, else None."""
    token = session.scalar(select(ApiToken).where(ApiToken.secret_sha256 == digest(secret)))
    if token is None or token.revoked_at is not None or token.user.disabled:
        return None
    return token.user


def tokens_of(session: Session, user: User) -> list[ApiToken]:
    return list(
        session.scalars(select(ApiToken).where(ApiToken.user_id == user.id).order_by(ApiToken.id))
    )


def revoke_token(session: Session, token_id: int) -> ApiToken:
    token = session.get(ApiToken, token_id)
    if token is None:
        raise NotFoundError("token", token_id)
    if token.revoked_at is None:
        token.revoked_at = dt.datetime.now(dt.UTC)
    return token
