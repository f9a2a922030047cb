"""A bearer token's viewer is kept a few seconds, and set aside the moment a write in the
process revokes the token, disables its user or changes the user's sites."""

import time
from typing import Any

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import text

from service.accounts import users
from service.store.database import Database
from service.store.models import Role, User
from service.web.app import create_app
from tests.factories import bearer, make_site, make_user


@pytest.fixture
def app(sqlite_database: Database) -> Any:
    from tests.conftest import emptied

    return create_app(emptied(sqlite_database))


def _forget_tokens_behind_the_apps_back(database: Database) -> None:
    """Delete every token by plain SQL on a connection of its own: no write the process
    would notice, as if another worker had done it."""
    with database.engine.begin() as connection:
        connection.execute(text("DELETE FROM api_tokens"))


def test_a_token_is_read_once_and_kept_a_few_seconds(
    app: Any, sqlite_database: Database, monkeypatch: pytest.MonkeyPatch
) -> None:
    api = TestClient(
        app, headers=bearer(sqlite_database, make_user(sqlite_database, "ann", Role.MANAGER))
    )
    assert api.get("/api/v1/sites").status_code == 200
    _forget_tokens_behind_the_apps_back(sqlite_database)
    assert api.get("/api/v1/sites").status_code == 200  # kept: the database was not asked
    later = time.monotonic() + 6.0
    monkeypatch.setattr(time, "monotonic", lambda: later)
    assert api.get("/api/v1/sites").status_code == 401  # five seconds on, asked again


def test_a_revoke_through_the_app_is_refused_at_once(app: Any, sqlite_database: Database) -> None:
    admin = TestClient(
        app, headers=bearer(sqlite_database, make_user(sqlite_database, "root", Role.ADMIN))
    )
    ann = make_user(sqlite_database, "ann", Role.MANAGER)
    api = TestClient(app, headers=bearer(sqlite_database, ann))
    assert api.get("/api/v1/sites").status_code == 200
    with sqlite_database.writing() as session:
        users.disable_user(session, session.get_one(User, ann))
    assert api.get("/api/v1/sites").status_code == 401
    assert admin.get("/api/v1/sites").status_code == 200


def test_new_sites_are_seen_at_once(app: Any, sqlite_database: Database) -> None:
    admin = TestClient(
        app, headers=bearer(sqlite_database, make_user(sqlite_database, "root", Role.ADMIN))
    )
    site = make_site(admin)
    ann = make_user(sqlite_database, "ann", Role.TECHNICIAN)
    api = TestClient(app, headers=bearer(sqlite_database, ann))
    assert api.get(f"/api/v1/sites/{site['id']}").status_code == 404
    with sqlite_database.writing() as session:
        users.assign_sites(session, session.get_one(User, ann), [site["id"]])
    assert api.get(f"/api/v1/sites/{site['id']}").status_code == 200
