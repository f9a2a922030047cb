"""Signing in and out, sessions kept on the server, CSRF tokens, bearer tokens, the
password policy and the audit trail. Practices checked are those of the OWASP Session
Management, CSRF Prevention and Password Storage cheat sheets (common practice)."""

import datetime as dt
import re
from typing import Any

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import func, select, update

from service.accounts import users
from service.accounts.passwords import hash_password, password_problem
from service.store.database import Database
from service.store.models import AuditEntry, Role, SignInFailure, Site, Survey, User, UserSession
from service.web.app import create_app
from tests.factories import (
    PASSWORD,
    bearer,
    browser_session,
    make_site,
    make_trap,
    make_user,
)


@pytest.fixture
def app(sqlite_database: Database) -> Any:
    from tests.conftest import emptied

    return create_app(emptied(sqlite_database))


def _browser(app: Any, https: bool = False) -> TestClient:
    base = "https://testserver" if https else "http://testserver"
    return TestClient(app, base_url=base, follow_redirects=False)


def _sign_in(browser: TestClient, name: str, password: str = PASSWORD) -> Any:
    form = browser.get("/sign-in?next=/calculator")
    token = re.search(r'name="csrf_token" value="([^"]+)"', form.text)
    assert token, form.text
    return browser.post(
        "/sign-in",
        data={"csrf_token": token.group(1), "name": name, "password": password, "next": "/x"},
    )


def _manager(database: Database) -> int:
    return make_user(database, "maria", Role.MANAGER)


def test_sign_in_starts_a_new_server_session_with_a_strict_cookie(
    app: Any, sqlite_database: Database
) -> None:
    _manager(sqlite_database)
    browser = _browser(app)
    answer = _sign_in(browser, "Maria")  # names are not case-sensitive
    assert answer.status_code == 303
    assert answer.headers["location"] == "/x"
    cookie = answer.headers["set-cookie"]
    assert cookie.startswith("traptally_session=")
    assert "HttpOnly" in cookie
    assert "SameSite=lax" in cookie
    assert "Path=/" in cookie
    assert "Secure" not in cookie
    first = browser.cookies["traptally_session"]
    assert browser.get("/calculator").status_code == 200
    second = _sign_in(_browser(app), "maria").headers["set-cookie"]
    assert first not in second  # a new session id at every sign-in
    with sqlite_database.reading() as session:
        assert session.scalar(select(func.count()).select_from(UserSession)) == 2


def test_over_https_the_cookie_is_secure_and_host_only(app: Any, sqlite_database: Database) -> None:
    _manager(sqlite_database)
    browser = _browser(app, https=True)
    cookie = _sign_in(browser, "maria").headers["set-cookie"]
    assert cookie.startswith("__Host-traptally_session=")
    assert "Secure" in cookie
    assert "Domain" not in cookie
    assert browser.get("/calculator").status_code == 200


def test_a_wrong_password_names_no_field_it_should_not_and_keeps_the_name(
    app: Any, sqlite_database: Database
) -> None:
    _manager(sqlite_database)
    answer = _sign_in(_browser(app), "maria", "not the password")
    assert answer.status_code == 401
    assert "do not match an active account" in answer.text
    assert 'value="maria"' in answer.text
    assert "not the password" not in answer.text  # a password is never written back


def test_a_sign_in_without_its_form_token_is_refused(app: Any, sqlite_database: Database) -> None:
    _manager(sqlite_database)
    answer = _browser(app).post("/sign-in", data={"name": "maria", "password": PASSWORD})
    assert answer.status_code == 403
    assert "set-cookie" not in answer.headers or "traptally_session=" not in answer.headers.get(
        "set-cookie", ""
    )


def test_failed_sign_ins_are_limited_per_account_then_the_right_user_waits_not_forever(
    app: Any, sqlite_database: Database
) -> None:
    _manager(sqlite_database)
    make_user(sqlite_database, "tomas", Role.TECHNICIAN)
    browser = _browser(app)
    for _ in range(5):  # the default: 5 failures in 15 minutes
        assert _sign_in(browser, "maria", "guess-guess").status_code == 401
    limited = _sign_in(browser, "maria")  # even with the right password
    assert limited.status_code == 429
    assert 0 < int(limited.headers["retry-after"]) <= 15 * 60
    assert "Too many failed sign-ins" in limited.text
    assert _sign_in(browser, "tomas").status_code == 303  # another account is not locked out
    with sqlite_database.writing() as session:  # as when the window has passed
        for failure in session.scalars(select(SignInFailure)):
            failure.at -= dt.timedelta(minutes=15)
    assert _sign_in(_browser(app), "maria").status_code == 303


def test_every_worker_process_counts_the_same_failures(sqlite_database: Database) -> None:
    # Two apps on one database stand for two worker processes of `traptally serve`.
    from tests.conftest import emptied

    first, second = create_app(emptied(sqlite_database)), create_app(sqlite_database)
    _manager(sqlite_database)
    for number in range(5):
        worker = first if number % 2 else second
        assert _sign_in(_browser(worker), "maria", "guess-guess").status_code == 401
    assert _sign_in(_browser(first), "maria").status_code == 429
    assert _sign_in(_browser(second), "maria").status_code == 429


def test_failed_sign_ins_are_limited_per_client_address(
    sqlite_database: Database,
) -> None:
    from tests.conftest import emptied

    app = create_app(emptied(sqlite_database))
    browser = _browser(app)
    for number in range(30):
        assert _sign_in(browser, f"nobody{number}", "guess-guess").status_code == 401
    assert _sign_in(browser, "someone-else", "guess-guess").status_code == 429


def _signed_in(app: Any, database: Database, user_id: int) -> tuple[TestClient, str]:
    secret, csrf = browser_session(database, user_id)
    browser = _browser(app)
    browser.cookies.set("traptally_session", secret)
    return browser, csrf


def test_sign_out_ends_the_session_on_the_server(app: Any, sqlite_database: Database) -> None:
    browser, csrf = _signed_in(app, sqlite_database, _manager(sqlite_database))
    cookie = browser.cookies["traptally_session"]
    assert browser.post("/sign-out", data={"csrf_token": csrf}).status_code == 303
    replay = _browser(app)
    replay.cookies.set("traptally_session", cookie)
    assert replay.get("/calculator").status_code == 302
    assert replay.get("/api/v1/sites").status_code == 401


@pytest.mark.parametrize("how", ["disable", "password change"])
def test_disabling_or_a_new_password_refuses_the_old_cookie_and_the_old_token(
    app: Any, sqlite_database: Database, how: str
) -> None:
    user_id = _manager(sqlite_database)
    browser, _ = _signed_in(app, sqlite_database, user_id)
    headers = bearer(sqlite_database, user_id)
    api = TestClient(app, headers=headers)
    assert browser.get("/api/v1/sites").status_code == 200
    assert api.get("/api/v1/sites").status_code == 200
    with sqlite_database.writing() as session:
        user = session.get_one(User, user_id)
        if how == "disable":
            users.disable_user(session, user)
        else:
            users.set_password(session, user, "a brand new passphrase")
    assert browser.get("/api/v1/sites").status_code == 401
    assert api.get("/api/v1/sites").status_code == 401
    if how == "disable":
        assert _sign_in(_browser(app), "maria").status_code == 401


def test_changing_the_password_in_the_browser_keeps_only_this_browser_signed_in(
    app: Any, sqlite_database: Database
) -> None:
    user_id = _manager(sqlite_database)
    browser, csrf = _signed_in(app, sqlite_database, user_id)
    other, _ = _signed_in(app, sqlite_database, user_id)
    form = {"csrf_token": csrf, "current_password": PASSWORD, "repeat_password": "x"}
    refused = browser.post("/account/password", data={**form, "new_password": "password123"})
    assert refused.status_code == 422
    assert "The two new passwords differ" in refused.text
    common = {**form, "new_password": "password123", "repeat_password": "password123"}
    assert "common passwords" in browser.post("/account/password", data=common).text
    good = {**form, "new_password": "four trap tags", "repeat_password": "four trap tags"}
    changed = browser.post("/account/password", data=good)
    assert changed.status_code == 303
    assert browser.get("/calculator").status_code == 200  # the new cookie
    assert other.get("/calculator").status_code == 302  # every other session ended


def test_sessions_end_after_the_idle_and_the_absolute_limits(
    app: Any, sqlite_database: Database
) -> None:
    browser, _ = _signed_in(app, sqlite_database, _manager(sqlite_database))
    assert browser.get("/calculator").status_code == 200
    now = dt.datetime.now(dt.UTC)
    with sqlite_database.writing() as session:
        session.execute(update(UserSession).values(last_seen_at=now - dt.timedelta(minutes=121)))
    assert browser.get("/calculator").status_code == 302
    browser, _ = _signed_in(app, sqlite_database, _manager_two(sqlite_database))
    with sqlite_database.writing() as session:
        session.execute(
            update(UserSession).values(started_at=now - dt.timedelta(hours=12, seconds=1))
        )
    assert browser.get("/calculator").status_code == 302


def _manager_two(database: Database) -> int:
    return make_user(database, "maria-2", Role.MANAGER)


def _surveys(database: Database) -> int:
    with database.reading() as session:
        return session.scalar(select(func.count()).select_from(Survey)) or 0


def _admin(app: Any, database: Database) -> TestClient:
    """An API client of an admin named "ad", by bearer token."""
    return TestClient(app, headers=bearer(database, make_user(database, "ad", Role.ADMIN)))


def test_a_form_without_its_token_or_with_another_sessions_changes_nothing(
    app: Any, sqlite_database: Database
) -> None:
    admin = _admin(app, sqlite_database)
    site = make_site(admin)
    browser, csrf = _signed_in(
        app, sqlite_database, make_user(sqlite_database, "m1", Role.MANAGER, [site["id"]])
    )
    _, other_csrf = _signed_in(
        app, sqlite_database, make_user(sqlite_database, "m2", Role.MANAGER, [site["id"]])
    )
    form = {"name": "Spring round", "started_on": "2026-04-01"}
    for token in (None, other_csrf, ""):
        sent = form if token is None else {**form, "csrf_token": token}
        answer = browser.post(f"/sites/{site['id']}/surveys", data=sent)
        assert answer.status_code == 403
        assert "nothing was changed" in answer.text
    api = browser.patch(f"/api/v1/sites/{site['id']}", json={"hours_per_year": 100.0})
    assert api.status_code == 403  # the API under a cookie needs X-CSRF-Token as well
    assert _surveys(sqlite_database) == 0
    assert browser.get(f"/api/v1/sites/{site['id']}").json()["hours_per_year"] == 8760
    accepted = browser.post(f"/sites/{site['id']}/surveys", data={**form, "csrf_token": csrf})
    assert accepted.status_code == 303
    assert _surveys(sqlite_database) == 1


def test_a_revoked_token_is_refused(app: Any, sqlite_database: Database) -> None:
    from service.accounts.tokens import revoke_token
    from service.store.models import ApiToken

    api = TestClient(app, headers=bearer(sqlite_database, _manager(sqlite_database)))
    assert api.get("/api/v1/sites").status_code == 200
    with sqlite_database.writing() as session:
        revoke_token(session, session.scalars(select(ApiToken.id)).one())
    refused = api.get("/api/v1/sites")
    assert refused.status_code == 401
    assert refused.headers["www-authenticate"] == "Bearer"
    assert (
        TestClient(app, headers={"Authorization": "Bearer tt_made-up"})
        .get("/api/v1/sites")
        .status_code
        == 401
    )


def test_passwords_are_argon2id_with_the_owasp_parameters_and_checked_against_the_list() -> None:
    # OWASP Password Storage Cheat Sheet: Argon2id, m=19456 (19 MiB), t=2, p=1.
    assert hash_password("four trap tags").startswith("$argon2id$v=19$m=19456,t=2,p=1$")
    assert password_problem("1234567", "x") == "A password needs at least 8 characters."
    assert password_problem("x" * 129, "x") is not None
    assert password_problem("a" * 64 + " long passphrases are fine", "x") is None
    for common in ("password", "iloveyou", "Sunshine", "qwertyuiop", "trustno1"):
        assert password_problem(common, "x") is not None, common
    assert password_problem("maria-kovacs", "maria-kovacs") is not None


def test_the_audit_trail_says_who_changed_what_from_what_to_what(
    app: Any, sqlite_database: Database
) -> None:
    admin = _admin(app, sqlite_database)
    site = make_site(admin)
    trap = make_trap(admin, site)
    manager = make_user(sqlite_database, "maria", Role.MANAGER, [site["id"]])
    api = TestClient(app, headers=bearer(sqlite_database, manager))
    assert (
        api.patch(f"/api/v1/traps/{trap['id']}", json={"orifice_diameter_mm": 6.0}).status_code
        == 200
    )
    with sqlite_database.reading() as session:
        entries = session.scalars(
            select(AuditEntry).where(AuditEntry.trap_id == trap["id"]).order_by(AuditEntry.id)
        ).all()
        assert [(e.action, e.actor_name) for e in entries] == [
            ("created", "ad"),
            ("changed", "maria"),
        ]
        assert entries[1].old_values == {"orifice_diameter_mm": 4.0}
        assert entries[1].new_values == {"orifice_diameter_mm": 6.0}
        assert entries[0].site_id == site["id"]
        secrets_kept = session.scalars(
            select(AuditEntry).where(AuditEntry.record_type == "token")
        ).all()
        assert all("secret_sha256" not in (entry.new_values or {}) for entry in secrets_kept)
    shown = api.get(f"/traps/{trap['id']}").text
    assert "changed trap" in shown
    assert "4.0 → 6.0" in shown
    assert "maria" in shown
    site_trail = api.get(f"/sites/{site['id']}/audit").text
    assert "created trap" in site_trail
    assert "changed trap" in site_trail
    technician = make_user(sqlite_database, "tom", Role.TECHNICIAN, [site["id"]])
    tech_api = TestClient(app, headers=bearer(sqlite_database, technician))
    assert tech_api.get(f"/sites/{site['id']}/audit").status_code == 403
    with sqlite_database.reading() as session:
        assert session.get_one(Site, site["id"]).name == site["name"]


def test_an_admin_adds_assigns_and_disables_people_from_the_people_page(
    app: Any, sqlite_database: Database
) -> None:
    admin_id = make_user(sqlite_database, "ad", Role.ADMIN)
    browser, csrf = _signed_in(app, sqlite_database, admin_id)
    site = make_site(TestClient(app, headers=bearer(sqlite_database, admin_id)))
    weak = {"csrf_token": csrf, "name": "new.tech", "role": "technician", "password": "12345678"}
    refused = browser.post("/admin/users", data=weak)
    assert refused.status_code == 422
    assert "common passwords" in refused.text
    assert 'value="new.tech"' in refused.text
    added = browser.post(
        "/admin/users",
        data={**weak, "password": "condensate pot 7", "site_id": str(site["id"])},
    )
    assert added.status_code == 303
    tech_browser = _browser(app)
    assert _sign_in(tech_browser, "new.tech", "condensate pot 7").status_code == 303
    assert tech_browser.get(f"/sites/{site['id']}").status_code == 200
    with sqlite_database.reading() as session:
        tech = session.scalars(select(User).where(User.name == "new.tech")).one()
        tech_id = tech.id
    access = f"/admin/users/{tech_id}/access"
    assert browser.post(access, data={"csrf_token": csrf, "action": "sites"}).status_code == 303
    assert tech_browser.get(f"/sites/{site['id']}").status_code == 404  # no longer theirs
    assert browser.post(access, data={"csrf_token": csrf, "action": "disable"}).status_code == 303
    assert tech_browser.get("/calculator").status_code == 302  # signed out at once
    with sqlite_database.reading() as session:
        changes = session.scalars(
            select(AuditEntry).where(
                AuditEntry.record_type == "user", AuditEntry.record_id == tech_id
            )
        ).all()
    assert [entry.action for entry in changes] == ["created", "changed", "changed"]
    assert changes[1].new_values == {"site_ids": []}
    assert changes[1].old_values == {"site_ids": [site["id"]]}
    assert changes[2].new_values == {"disabled": True}
    assert {entry.actor_name for entry in changes} == {"ad"}
