"""Small factories: people who sign in (straight into the database), and a site, an area,
a trap, a survey and a finding, through the API."""

import datetime as dt
from functools import lru_cache
from typing import Any

from fastapi.testclient import TestClient

from service.accounts.passwords import hash_password
from service.accounts.sessions import start_session
from service.accounts.tokens import create_token
from service.settings import Settings
from service.store.database import Database
from service.store.models import Role, Site, User

PASSWORD = "steam-traps-on-line-4"


@lru_cache(maxsize=1)
def password_hash() -> str:
    """One Argon2id hash of PASSWORD for every test user: hashing costs ~50 ms each time."""
    return hash_password(PASSWORD)


def make_user(store: Database, name: str, role: Role, site_ids: list[int] | None = None) -> int:
    """A user with PASSWORD, assigned to the given sites; their id."""
    with store.writing() as session:
        user = User(name=name, role=role, password_hash=password_hash())
        user.sites = [session.get_one(Site, site) for site in site_ids or []]
        session.add(user)
        session.flush()
        return user.id


def bearer(store: Database, user_id: int) -> dict[str, str]:
    """Request headers with a new API token of the user."""
    with store.writing() as session:
        secret, _ = create_token(session, session.get_one(User, user_id), "test")
    return {"Authorization": f"Bearer {secret}"}


def browser_session(store: Database, user_id: int) -> tuple[str, str]:
    """A new signed-in session of the user: (cookie secret, CSRF token)."""
    with store.writing() as session:
        secret, started = start_session(
            session,
            session.get_one(User, user_id),
            Settings().session_limits,
            dt.datetime.now(dt.UTC),
        )
        return secret, started.csrf_token


def _created(answer: Any) -> dict[str, Any]:
    assert answer.status_code == 201, answer.text
    body: dict[str, Any] = answer.json()
    return body


def make_site(api: TestClient, **fields: Any) -> dict[str, Any]:
    body = {"name": "Test Mill", "steam_cost_per_tonne": 30.0, **fields}
    return _created(api.post("/api/v1/sites", json=body))


def make_area(api: TestClient, site: dict[str, Any], **fields: Any) -> dict[str, Any]:
    body = {"name": "Boiler house", "route_order": 1, **fields}
    return _created(api.post(f"/api/v1/sites/{site['id']}/areas", json=body))


def trap_fields(**fields: Any) -> dict[str, Any]:
    return {
        "tag": "T-001",
        "application": "drip",
        "trap_type": "thermodynamic",
        "orifice_diameter_mm": 4.0,
        "inlet_pressure_kpa_g": 1000.0,
        "return_pressure_kpa_g": 0.0,
        **fields,
    }


def make_trap(api: TestClient, site: dict[str, Any], **fields: Any) -> dict[str, Any]:
    return _created(api.post(f"/api/v1/sites/{site['id']}/traps", json=trap_fields(**fields)))


def make_survey(api: TestClient, site: dict[str, Any], **fields: Any) -> dict[str, Any]:
    body = {"name": "Survey 2026", "started_on": "2026-03-02", **fields}
    return _created(api.post(f"/api/v1/sites/{site['id']}/surveys", json=body))


def finding_fields(trap: dict[str, Any], **fields: Any) -> dict[str, Any]:
    return {
        "trap_id": trap["id"],
        "tested_at": "2026-03-02T09:00:00Z",
        "method": "ultrasonic",
        "condition": "working",
        **fields,
    }


def make_finding(
    api: TestClient, survey: dict[str, Any], trap: dict[str, Any], **fields: Any
) -> dict[str, Any]:
    answer = api.post(
        f"/api/v1/surveys/{survey['id']}/findings", json=finding_fields(trap, **fields)
    )
    return _created(answer)
