"""Signing in and out, and changing one's password.

Sign-in is rate limited per account and per client address (service/accounts/
sign_in_limits.py). Its form carries a token bound to a short-lived cookie (a
double-submit check, since there is no session yet); every later form carries the
session's own token. Passwords typed are never written back into a page.
"""

import datetime as dt
import secrets
from typing import Annotated
from urllib.parse import urlsplit

from fastapi import APIRouter, Depends, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response

from service.accounts import sessions, users
from service.accounts.passwords import (
    MIN_PASSWORD_LENGTH,
    password_matches,
    spend_time_as_if_checking,
)
from service.accounts.sign_in_limits import SignInLimits
from service.store.errors import FieldError
from service.store.models import User
from service.web.access import (
    CSRF_FIELD,
    CsrfRefused,
    SignedIn,
    Viewer,
    check_csrf,
    current_viewer,
    session_cookie_name,
    settings,
)
from service.web.dependencies import Db
from service.web.forms import Form
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False)

SIGN_IN_COOKIE = "traptally_sign_in"
PASSWORD_FIELDS = ("password", "current_password", "new_password", "repeat_password")


def _safe_next(target: str) -> str:
    """Only a path on this site: never another host (an open redirect)."""
    parts = urlsplit(target)
    if target.startswith("/") and not target.startswith("//") and not parts.netloc:
        return target
    return "/"


def _without_passwords(form: Form) -> Form:
    for name in PASSWORD_FIELDS:
        form.typed.pop(name, None)
    return form


def _set_session_cookie(request: Request, response: Response, secret: str) -> None:
    secure = request.url.scheme == "https"
    limit = settings(request).session_limits.absolute
    response.set_cookie(
        session_cookie_name(request),
        secret,
        max_age=int(limit.total_seconds()),
        path="/",
        httponly=True,
        samesite="lax",
        secure=secure,
    )


def _sign_in_page(
    request: Request, form: Form, next_path: str, message: str = "", status_code: int = 200
) -> HTMLResponse:
    token = secrets.token_urlsafe(32)
    response = page(
        request,
        "sign_in.html",
        form=_without_passwords(form),
        next=next_path,
        sign_in_token=token,
        message=message,
        status_code=status_code,
    )
    response.set_cookie(
        SIGN_IN_COOKIE,
        token,
        max_age=3600,
        path="/sign-in",
        httponly=True,
        samesite="strict",
        secure=request.url.scheme == "https",
    )
    return response


@router.get("/sign-in", response_class=HTMLResponse)
def sign_in_form(request: Request, viewer: SignedIn, next: str = "/") -> Response:
    if viewer is not None:
        return RedirectResponse(_safe_next(next), status_code=303)
    return _sign_in_page(request, Form({}), _safe_next(next))


def _limits(request: Request) -> SignInLimits:
    found: SignInLimits = request.app.state.sign_in_limits
    return found


@router.post("/sign-in", response_class=HTMLResponse)
async def sign_in(request: Request, db: Db) -> Response:
    form = await Form.of(request)
    next_path = _safe_next(form.text("next") or "/")
    expected = request.cookies.get(SIGN_IN_COOKIE, "")
    sent = form.typed.get(CSRF_FIELD, "")
    if not expected or not secrets.compare_digest(sent.encode(), expected.encode()):
        return _sign_in_page(
            request, form, next_path, "The sign-in form had expired. Please sign in again.", 403
        )
    name = form.text("name")
    password = form.typed.get("password", "")
    address = request.client.host if request.client else "unknown"
    limits = _limits(request)
    now = dt.datetime.now(dt.UTC)
    with db.reading() as session:
        wait_s = limits.wait_seconds(session, account=name, address=address, now=now)
    if wait_s:
        refused = _sign_in_page(
            request,
            form,
            next_path,
            f"Too many failed sign-ins. Try again in {max(1, round(wait_s / 60))} minute(s), "
            "or ask your administrator.",
            429,
        )
        refused.headers["Retry-After"] = str(wait_s)
        return refused
    with db.reading() as session:
        user = users.user_named(session, name) if name else None
        if user is None:
            spend_time_as_if_checking(password)
        accepted = (
            user is not None
            and not user.disabled
            and password_matches(user.password_hash, password)
        )
        user_id = user.id if user is not None else 0
    if not accepted:
        with db.writing() as session:
            limits.failed(session, account=name, address=address, now=now)
        form.errors["password"] = "That user name and password do not match an active account."
        return _sign_in_page(request, form, next_path, status_code=401)
    with db.writing() as session:
        signed = session.get(User, user_id)
        assert signed is not None
        secret, _ = sessions.start_session(session, signed, settings(request).session_limits, now)
        limits.succeeded(session, account=name)
    response = RedirectResponse(next_path, status_code=303)
    _set_session_cookie(request, response, secret)
    response.delete_cookie(SIGN_IN_COOKIE, path="/sign-in")
    return response


SignedInViewer = Annotated[Viewer, Depends(current_viewer)]


@router.post("/sign-out")
async def sign_out(request: Request, db: Db, viewer: SignedInViewer) -> Response:
    if viewer.csrf_token is None:
        raise CsrfRefused("Sign-out is for a browser session.")
    await check_csrf(request, viewer.csrf_token)
    with db.writing(viewer.actor) as session:
        sessions.end_session(session, request.cookies.get(session_cookie_name(request), ""))
    response = RedirectResponse("/sign-in", status_code=303)
    response.delete_cookie(session_cookie_name(request), path="/")
    return response


@router.get("/account/password", response_class=HTMLResponse)
def password_form(request: Request, viewer: SignedInViewer) -> HTMLResponse:
    return page(request, "password.html", form=Form({}), min_length=MIN_PASSWORD_LENGTH)


@router.post("/account/password", response_class=HTMLResponse)
async def change_password(request: Request, db: Db, viewer: SignedInViewer) -> Response:
    if viewer.csrf_token is None:
        raise CsrfRefused("Change a password from a browser session.")
    await check_csrf(request, viewer.csrf_token)
    form = await Form.of(request)
    new_password = form.typed.get("new_password", "")
    secret = ""
    with db.writing(viewer.actor) as session:
        user = session.get(User, viewer.user_id)
        assert user is not None  # a live session's user exists
        if not password_matches(user.password_hash, form.typed.get("current_password", "")):
            form.errors["current_password"] = "That is not your current password."
        elif new_password != form.typed.get("repeat_password", ""):
            form.errors["repeat_password"] = "The two new passwords differ."
        else:
            try:
                users.set_password(session, user, new_password)
            except FieldError as error:
                form.errors["new_password"] = str(error)
            else:
                secret, _ = sessions.start_session(
                    session, user, settings(request).session_limits, dt.datetime.now(dt.UTC)
                )
    if not form.ok:
        return page(
            request,
            "password.html",
            form=_without_passwords(form),
            min_length=MIN_PASSWORD_LENGTH,
            status_code=422,
        )
    response = RedirectResponse("/", status_code=303)
    _set_session_cookie(request, response, secret)
    return response
