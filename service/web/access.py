"""Who is asking, and what they may see and do.

A request is signed in by a session cookie (pages, and the API from a browser) or by an
`Authorization: Bearer` token (the API from an integration). Each route names the
permission it needs (`Reading`, `Recording`, `Managing`, `Administering`); a viewer
without it gets 403, and a record of a site not assigned to the viewer is not found
(404), so one site's records do not show that another's exist. A request that changes
anything under a session must carry the session's CSRF token, as the form field
`csrf_token` or the header `X-CSRF-Token`; a bearer token needs none (no browser sends it
by itself).
"""

import base64
import binascii
import datetime as dt
import secrets
from dataclasses import dataclass
from typing import Annotated, Any, TypeVar

from fastapi import Depends, Request
from fastapi.concurrency import run_in_threadpool
from sqlalchemy.orm import Session

from service.accounts.roles import Permission, may, sees_every_site
from service.accounts.sessions import live_session, needs_touch, touch_session
from service.accounts.tokens import token_user
from service.settings import Settings
from service.store.audit import Actor
from service.store.database import Database
from service.store.errors import NotFoundError
from service.store.models import (
    Area,
    Finding,
    FindingPhoto,
    Repair,
    Role,
    Site,
    Survey,
    Trap,
    User,
)
from service.store.records import get, site_id_of
from service.web.dependencies import Db, record_id
from service.web.viewer_cache import ViewerCache

T = TypeVar("T")

SESSION_COOKIE = "traptally_session"
# Over HTTPS the cookie is Secure and carries the __Host- prefix: set by this host only.
SECURE_SESSION_COOKIE = "__Host-traptally_session"
CSRF_FIELD = "csrf_token"
CSRF_HEADER = "X-CSRF-Token"
SAFE_METHODS = frozenset({"GET", "HEAD", "OPTIONS"})
_FORM_TYPES = ("application/x-www-form-urlencoded", "multipart/form-data")


class NotSignedIn(Exception):  # noqa: N818 - an answer, not a fault
    """No live session or token: 401 on the API, a redirect to sign-in for a page."""


class NotPermitted(Exception):  # noqa: N818
    """Signed in, but the role does not allow it: 403."""


class CsrfRefused(Exception):  # noqa: N818
    """A change under a session without that session's CSRF token: 403, nothing changed."""


@dataclass(frozen=True, slots=True)
class Viewer:
    """A signed-in user, as one request sees them."""

    user_id: int
    name: str
    role: Role
    # None: every site (an admin).
    site_ids: frozenset[int] | None
    # The session's CSRF token; None when signed in by a bearer token.
    csrf_token: str | None = None

    @classmethod
    def of(cls, user: User, csrf_token: str | None = None) -> "Viewer":
        return cls(
            user_id=user.id,
            name=user.name,
            role=user.role,
            site_ids=None
            if sees_every_site(user.role)
            else frozenset(site.id for site in user.sites),
            csrf_token=csrf_token,
        )

    @property
    def actor(self) -> Actor:
        return Actor(user_id=self.user_id, name=self.name)

    def may(self, permission: Permission) -> bool:
        return may(self.role, permission)

    def tester(self, typed: str) -> str:
        """Who a finding this viewer records says tested the trap: the viewer, unless a
        manager names someone else (entering another's paper records, say)."""
        return typed if typed and self.may(Permission.MANAGE) else self.name

    def sees(self, site_id: int) -> bool:
        return self.site_ids is None or site_id in self.site_ids

    def get(self, session: Session, model: type[T], record_id: int) -> T:
        """The record, when it belongs to one of the viewer's sites; else NotFoundError."""
        record = get(session, model, record_id)
        if not self.sees(site_id_of(session, record)):
            raise NotFoundError(getattr(model, "__tablename__", "record").rstrip("s"), record_id)
        return record


def session_cookie_name(request: Request) -> str:
    return SECURE_SESSION_COOKIE if request.url.scheme == "https" else SESSION_COOKIE


def settings(request: Request) -> Settings:
    found: Settings = request.app.state.settings
    return found


def _bearer_secret(request: Request) -> str | None:
    scheme, _, secret = request.headers.get("authorization", "").partition(" ")
    return secret.strip() if scheme.lower() == "bearer" and secret.strip() else None


def signed_in(request: Request, db: Db) -> Viewer | None:
    """The viewer a request's token or session cookie names, if any is live."""
    if hasattr(request.state, "viewer"):
        known: Viewer | None = request.state.viewer
        return known
    viewer = None
    token = _bearer_secret(request)
    cookie = request.cookies.get(session_cookie_name(request))
    if token is not None:
        kept: ViewerCache[Viewer] = request.app.state.viewers
        viewer = kept.get(token)
        if viewer is None:
            generation = db.access_changes.generation
            with db.reading() as session:
                user = token_user(session, token)
                viewer = Viewer.of(user) if user is not None else None
            if viewer is not None:
                kept.keep(token, generation, viewer)
    elif cookie:
        now = dt.datetime.now(dt.UTC)
        limits = settings(request)
        with db.reading() as session:
            live = live_session(session, cookie, limits.session_limits, now)
            viewer = Viewer.of(live.user, live.csrf_token) if live is not None else None
            touch = live is not None and needs_touch(live, now)
            live_id = live.id if live is not None else 0
        if touch:
            with db.writing() as session:
                touch_session(session, live_id, now)
    request.state.viewer = viewer
    return viewer


SignedIn = Annotated[Viewer | None, Depends(signed_in)]


def current_viewer(viewer: SignedIn) -> Viewer:
    if viewer is None:
        raise NotSignedIn("Sign in first: this needs a session or an API token.")
    return viewer


def masked_csrf_token(token: str | None) -> str:
    """The session's CSRF token as a page carries it: XORed with a fresh random pad, the
    pad before it, so no two answers hold the same bytes and a compressed page's size
    tells an eavesdropper nothing of the token (BREACH, Gluck, Harris and Prado 2013; the
    masking Django uses). '' without a session.

    >>> masked_csrf_token("abc") != masked_csrf_token("abc")
    True
    >>> unmasked_csrf_token(masked_csrf_token("abc"))
    b'abc'
    """
    if token is None:
        return ""
    secret = token.encode()
    pad = secrets.token_bytes(len(secret))
    return base64.urlsafe_b64encode(
        pad + bytes(a ^ b for a, b in zip(pad, secret, strict=True))
    ).decode()


def unmasked_csrf_token(sent: str) -> bytes:
    """The token a masked one carries (b'' when it is not one); a raw token as it is."""
    try:
        raw = base64.urlsafe_b64decode(sent.encode())
    except (ValueError, binascii.Error):
        return b""
    half = len(raw) // 2
    if not raw or len(raw) % 2:
        return b""
    return bytes(a ^ b for a, b in zip(raw[:half], raw[half:], strict=True))


async def check_csrf(request: Request, expected: str) -> None:
    """The session's CSRF token must come with the request (header or form field), as the
    page masked it or plain."""
    sent = request.headers.get(CSRF_HEADER)
    if sent is None and request.headers.get("content-type", "").startswith(_FORM_TYPES):
        field = (await request.form()).get(CSRF_FIELD)
        sent = field if isinstance(field, str) else None
    if sent is None or not (
        secrets.compare_digest(sent.encode(), expected.encode())
        or secrets.compare_digest(unmasked_csrf_token(sent), expected.encode())
    ):
        raise CsrfRefused(
            "This form has expired or did not come from this session: nothing was changed. "
            "Go back, reload the page and send it again."
        )


# Path parameters that name a record of a site, and the record each names.
SITE_RECORDS: dict[str, type[Any]] = {
    "site_id": Site,
    "area_id": Area,
    "trap_id": Trap,
    "survey_id": Survey,
    "finding_id": Finding,
    "repair_id": Repair,
    "photo_id": FindingPhoto,
}


def _check_path_records(database: Database, viewer: Viewer, path: dict[str, Any]) -> None:
    """Each record the path names must be of the viewer's sites (else NotFoundError), checked
    before the body is: another site's record answers 404 even to a malformed request."""
    named = [
        (SITE_RECORDS[key], found)
        for key, value in path.items()
        if key in SITE_RECORDS and (found := record_id(str(value))) is not None
    ]
    if named:
        with database.reading() as session:
            for model, found in named:
                viewer.get(session, model, found)


def require(permission: Permission):  # type: ignore[no-untyped-def]
    """A dependency: the signed-in viewer, who must have `permission`; and, for a change
    made under a session, the session's CSRF token."""

    async def permitted(
        request: Request, viewer: Annotated[Viewer, Depends(current_viewer)]
    ) -> Viewer:
        if not viewer.may(permission):
            raise NotPermitted(f"A {viewer.role.value} may not do this ({permission.value}).")
        if viewer.site_ids is not None:
            database: Database = request.app.state.database
            await run_in_threadpool(_check_path_records, database, viewer, request.path_params)
        if request.method not in SAFE_METHODS and viewer.csrf_token is not None:
            await check_csrf(request, viewer.csrf_token)
        return viewer

    return permitted


Reading = Annotated[Viewer, Depends(require(Permission.READ))]
Recording = Annotated[Viewer, Depends(require(Permission.RECORD))]
Managing = Annotated[Viewer, Depends(require(Permission.MANAGE))]
Administering = Annotated[Viewer, Depends(require(Permission.ADMINISTER))]
