"""Every page and API route against every role and no sign-in: the expected answer for
each, from one table. A route missing from the table fails the first test.

Viewers: nobody signed in; a technician and a manager assigned to site A; the same two
asking for site B's records (not theirs: 404, as if they did not exist); an admin, who
sees every site. Requests carry the session cookie and its CSRF token, as a browser would.
"""

from collections.abc import Iterator

import pytest
from fastapi.routing import APIRoute
from fastapi.testclient import TestClient

from service.store.database import Database
from service.store.models import Role
from service.web import pages
from service.web.app import API_ROUTERS, create_app
from tests.conftest import emptied
from tests.factories import (
    bearer,
    browser_session,
    make_area,
    make_finding,
    make_site,
    make_survey,
    make_trap,
    make_user,
)

R, C, M, A, PUBLIC, SIGNED_IN = "read", "record", "manage", "administer", "public", "signed-in"
# (method, path): (permission, names a site's record, answer when allowed)
# The allowed answer of a change is often 422: the table sends no valid body, and 422 shows
# the request got past sign-in, role and site checks without changing anything.
TABLE: dict[tuple[str, str], tuple[str, bool, int]] = {
    ("GET", "/api/v1/health"): (PUBLIC, False, 200),
    ("GET", "/api/v1/health/ready"): (PUBLIC, False, 200),
    ("GET", "/api/v1/session"): (R, False, 200),
    ("GET", "/surveys/walk-sw.js"): (PUBLIC, False, 200),
    ("GET", "/surveys/{survey_id}/walk/offline"): (R, True, 200),
    ("GET", "/api/v1/steam/saturation"): (R, False, 422),
    ("POST", "/api/v1/steam/state"): (R, False, 422),
    ("POST", "/api/v1/calc/flash"): (R, False, 422),
    ("POST", "/api/v1/calc/trap-loss"): (R, False, 422),
    ("POST", "/api/v1/calc/flash-recovery"): (R, False, 422),
    ("POST", "/api/v1/sites"): (A, False, 422),
    ("GET", "/api/v1/sites"): (R, False, 200),
    ("GET", "/api/v1/sites/{site_id}"): (R, True, 200),
    ("PATCH", "/api/v1/sites/{site_id}"): (M, True, 200),
    ("DELETE", "/api/v1/sites/{site_id}"): (A, True, 409),
    ("GET", "/api/v1/sites/{site_id}/summary"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/reliability"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/trends"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/exports/reliability.csv"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/compare"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/flash-recovery"): (R, True, 422),
    ("POST", "/api/v1/sites/{site_id}/areas"): (M, True, 422),
    ("GET", "/api/v1/sites/{site_id}/areas"): (R, True, 200),
    ("GET", "/api/v1/areas/{area_id}"): (R, True, 200),
    ("PATCH", "/api/v1/areas/{area_id}"): (M, True, 200),
    ("DELETE", "/api/v1/areas/{area_id}"): (M, True, 409),
    ("POST", "/api/v1/sites/{site_id}/traps"): (C, True, 422),
    ("GET", "/api/v1/sites/{site_id}/traps"): (R, True, 200),
    ("GET", "/api/v1/traps/{trap_id}"): (R, True, 200),
    ("PATCH", "/api/v1/traps/{trap_id}"): (M, True, 200),
    ("DELETE", "/api/v1/traps/{trap_id}"): (M, True, 200),
    ("POST", "/api/v1/sites/{site_id}/surveys"): (M, True, 422),
    ("GET", "/api/v1/sites/{site_id}/surveys"): (R, True, 200),
    ("GET", "/api/v1/surveys/{survey_id}"): (R, True, 200),
    ("PATCH", "/api/v1/surveys/{survey_id}"): (M, True, 200),
    ("DELETE", "/api/v1/surveys/{survey_id}"): (M, True, 409),
    ("POST", "/api/v1/surveys/{survey_id}/findings"): (C, True, 422),
    ("GET", "/api/v1/surveys/{survey_id}/findings"): (R, True, 200),
    ("GET", "/api/v1/traps/{trap_id}/findings"): (R, True, 200),
    ("GET", "/api/v1/findings/{finding_id}"): (R, True, 200),
    ("PATCH", "/api/v1/findings/{finding_id}"): (M, True, 200),
    ("DELETE", "/api/v1/findings/{finding_id}"): (M, True, 204),
    ("POST", "/api/v1/traps/{trap_id}/repairs"): (M, True, 422),
    ("GET", "/api/v1/traps/{trap_id}/repairs"): (R, True, 200),
    ("GET", "/api/v1/repairs/{repair_id}"): (R, True, 200),
    ("PATCH", "/api/v1/repairs/{repair_id}"): (M, True, 200),
    ("DELETE", "/api/v1/repairs/{repair_id}"): (M, True, 204),
    ("POST", "/api/v1/sites/{site_id}/imports/register"): (M, True, 200),
    ("POST", "/api/v1/surveys/{survey_id}/imports/findings"): (M, True, 200),
    ("POST", "/api/v1/sites/{site_id}/imports/repairs"): (M, True, 200),
    ("GET", "/api/v1/sites/{site_id}/exports/register.csv"): (R, True, 200),
    ("GET", "/api/v1/surveys/{survey_id}/exports/findings.csv"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/exports/repairs.csv"): (R, True, 200),
    ("GET", "/api/v1/sites/{site_id}/exports/repair-list.csv"): (R, True, 200),
    ("GET", "/sign-in"): (PUBLIC, False, 303),
    ("POST", "/sign-in"): (PUBLIC, False, 403),
    ("POST", "/sign-out"): (SIGNED_IN, False, 303),
    ("GET", "/account/password"): (SIGNED_IN, False, 200),
    ("POST", "/account/password"): (SIGNED_IN, False, 422),
    ("GET", "/sites/{site_id}/audit"): (M, True, 200),
    ("GET", "/admin/users"): (A, False, 200),
    ("POST", "/admin/users"): (A, False, 422),
    ("POST", "/admin/users/{user_id}/access"): (A, False, 303),
    ("GET", "/"): (R, False, 200),
    ("GET", "/sites/{site_id}"): (R, True, 200),
    ("POST", "/sites/{site_id}/surveys"): (M, True, 422),
    ("POST", "/surveys/{survey_id}/state"): (M, True, 422),
    ("GET", "/sites/{site_id}/summary"): (R, True, 200),
    ("GET", "/sites/{site_id}/report"): (R, True, 200),
    ("GET", "/sites/{site_id}/downloads/repair-list.{suffix}"): (R, True, 200),
    ("GET", "/surveys/{survey_id}/downloads/findings.{suffix}"): (R, True, 200),
    ("GET", "/sites/{site_id}/settings"): (M, True, 200),
    ("POST", "/sites/{site_id}/settings"): (M, True, 422),
    ("GET", "/sites/{site_id}/register"): (R, True, 200),
    ("GET", "/traps/{trap_id}"): (R, True, 200),
    ("GET", "/photos/{photo_id}"): (R, True, 404),
    ("GET", "/traps/{trap_id}/edit"): (M, True, 200),
    ("POST", "/traps/{trap_id}/edit"): (M, True, 303),
    ("POST", "/traps/{trap_id}/retire"): (M, True, 303),
    ("POST", "/traps/{trap_id}/repairs"): (M, True, 422),
    ("GET", "/sites/{site_id}/work-orders"): (R, True, 200),
    ("GET", "/sites/{site_id}/reliability"): (R, True, 200),
    ("GET", "/sites/{site_id}/labels"): (R, True, 200),
    ("GET", "/sites/{site_id}/tags/{tag:path}"): (R, True, 404),
    ("GET", "/surveys/{survey_id}/walk/find"): (R, True, 404),
    ("GET", "/sites/{site_id}/walk"): (R, True, 303),
    ("GET", "/surveys/{survey_id}/walk"): (R, True, 200),
    ("GET", "/surveys/{survey_id}/walk/traps/{trap_id}"): (R, True, 200),
    ("POST", "/surveys/{survey_id}/walk/traps/{trap_id}"): (C, True, 422),
    ("GET", "/surveys/{survey_id}/walk/new-trap"): (C, True, 200),
    ("POST", "/surveys/{survey_id}/walk/new-trap"): (C, True, 422),
    ("GET", "/sites/{site_id}/import"): (M, True, 200),
    ("POST", "/sites/{site_id}/import"): (M, True, 422),
    ("GET", "/sites/{site_id}/import/template/{kind}.csv"): (M, True, 200),
    ("GET", "/calculator"): (R, False, 200),
}
GRANTS = {
    Role.TECHNICIAN: {R, C},
    Role.MANAGER: {R, C, M},
    Role.ADMIN: {R, C, M, A},
}
QUERIES = {"/api/v1/sites/{site_id}/compare": "from_survey={survey_id}&to_survey={survey_id}"}


def _routes() -> list[tuple[str, str]]:
    mounted = [("/api/v1", router) for router in API_ROUTERS]
    mounted += [("", router) for router in pages.ROUTERS]
    return sorted(
        (method, prefix + route.path)
        for prefix, router in mounted
        for route in router.routes
        if isinstance(route, APIRoute)
        for method in route.methods or ()
    )


def test_the_table_names_every_route() -> None:
    assert sorted(TABLE) == _routes()


def _build_site(api: TestClient, name: str) -> dict[str, int]:
    site = make_site(api, name=name)
    area = make_area(api, site)
    trap = make_trap(api, site, area_id=area["id"])
    survey = make_survey(api, site)
    finding = make_finding(api, survey, trap, condition="leaking")
    repair = api.post(
        f"/api/v1/traps/{trap['id']}/repairs",
        json={"repaired_on": "2026-03-05", "kind": "repaired"},
    ).json()
    return {
        "site_id": site["id"],
        "area_id": area["id"],
        "trap_id": trap["id"],
        "survey_id": survey["id"],
        "finding_id": finding["id"],
        "repair_id": repair["id"],
    }


class World:
    """Sites A and B with one of each record, and a signed-in browser per role."""

    def __init__(self, store: Database) -> None:
        emptied(store)
        self.app = create_app(store)
        admin = make_user(store, "admin", Role.ADMIN)
        with TestClient(self.app, headers=bearer(store, admin)) as builder:
            self.a = _build_site(builder, "Site A")
            self.b = _build_site(builder, "Site B")
        self.sessions = {Role.ADMIN: browser_session(store, admin)}
        for role in (Role.TECHNICIAN, Role.MANAGER):
            user = make_user(store, role.value, role, site_ids=[self.a["site_id"]])
            self.sessions[role] = browser_session(store, user)
        self.target_user = make_user(store, "someone", Role.TECHNICIAN)

    def url(self, path: str, ids: dict[str, int]) -> str:
        values = {**ids, "suffix": "csv", "user_id": self.target_user, "tag": "NO-SUCH-TAG"}
        values.setdefault("photo_id", 999_999)
        values.setdefault("kind", "register")
        query = QUERIES.get(path, "").format(**values)
        return path.replace(":path}", "}").format(**values) + (f"?{query}" if query else "")

    def ask(self, method: str, url: str, role: Role | None) -> int:
        with TestClient(self.app, follow_redirects=False) as browser:
            headers = {}
            if role is not None:
                secret, csrf = self.sessions[role]
                browser.cookies.set("traptally_session", secret)
                headers["X-CSRF-Token"] = csrf
            content = b"" if "/imports/" not in url else b"tag\n"
            kind = "text/csv" if "/imports/" in url else "application/x-www-form-urlencoded"
            if method in {"POST", "PATCH"} and "/api/" in url and "/imports/" not in url:
                content, kind = b"{}", "application/json"
            headers["content-type"] = kind
            answer = browser.request(method, url, content=content, headers=headers)
            return answer.status_code


def _expected(permission: str, role: Role | None, page: bool, mine: bool, allowed: int) -> int:
    if permission == PUBLIC:
        if role is not None or not page:
            return allowed
        return 200 if allowed == 303 else allowed  # the sign-in form, to nobody
    if role is None:
        return 302 if page else 401
    if permission != SIGNED_IN and permission not in GRANTS[role]:
        return 403
    return allowed if mine else 404


@pytest.fixture(scope="module")
def database(sqlite_database: Database) -> Iterator[Database]:
    yield sqlite_database
    emptied(sqlite_database)


@pytest.mark.parametrize(("method", "path"), sorted(TABLE), ids=str)
def test_each_viewer_gets_the_expected_answer(database: Database, method: str, path: str) -> None:
    permission, scoped, allowed = TABLE[(method, path)]
    page = not path.startswith("/api/")
    cases: list[tuple[Role | None, bool]] = [(None, True)]
    cases += [(role, True) for role in (Role.TECHNICIAN, Role.MANAGER)]
    if scoped:
        cases += [(role, False) for role in (Role.TECHNICIAN, Role.MANAGER)]
    cases += [(Role.ADMIN, True)]
    world = World(database)
    seen: dict[str, int] = {}
    wanted: dict[str, int] = {}
    for role, mine in cases:
        name = f"{role.value if role else 'nobody'}{'' if mine else ' on site B'}"
        wanted[name] = _expected(permission, role, page, mine, allowed)
        seen[name] = world.ask(method, world.url(path, world.a if mine else world.b), role)
        if method != "GET" and seen[name] < 400:
            world = World(database)  # it changed something: start again from the same world
    assert seen == wanted
