"""Every write to a site or its records bumps the site's revision, in its transaction."""

from collections.abc import Callable
from typing import Any

import pytest
from fastapi.testclient import TestClient

from service.store.database import Database
from tests.factories import make_finding, make_site, make_survey, make_trap


def _revision(store: Database, site_id: int) -> int:
    from sqlalchemy import text

    with store.reading() as session:
        value = session.execute(text(f"SELECT revision FROM sites WHERE id = {site_id}")).scalar()
    assert isinstance(value, int)
    return value


WRITES: dict[str, Callable[[TestClient, dict[str, Any]], Any]] = {
    "site settings": lambda api, w: api.patch(
        f"/api/v1/sites/{w['site']['id']}", json={"boiler_efficiency": 0.9}
    ),
    "new area": lambda api, w: api.post(
        f"/api/v1/sites/{w['site']['id']}/areas", json={"name": "Yard"}
    ),
    "trap change": lambda api, w: api.patch(
        f"/api/v1/traps/{w['trap']['id']}", json={"orifice_diameter_mm": 5}
    ),
    "new trap": lambda api, w: make_trap(api, w["site"], tag="T-9"),
    "new finding": lambda api, w: make_finding(api, w["survey"], w["trap"], condition="leaking"),
    "finding change": lambda api, w: api.patch(
        f"/api/v1/findings/{w['finding']['id']}", json={"condition": "plugged"}
    ),
    "finding deleted": lambda api, w: api.delete(f"/api/v1/findings/{w['finding']['id']}"),
    "new repair": lambda api, w: api.post(
        f"/api/v1/traps/{w['trap']['id']}/repairs",
        json={"repaired_on": "2026-04-01", "kind": "repaired"},
    ),
    "survey change": lambda api, w: api.patch(
        f"/api/v1/surveys/{w['survey']['id']}", json={"name": "Renamed"}
    ),
}


@pytest.mark.parametrize("write", list(WRITES))
def test_each_kind_of_write_bumps_the_revision(
    api: TestClient, store: Database, write: str
) -> None:
    site = make_site(api)
    trap = make_trap(api, site)
    survey = make_survey(api, site)
    world = {
        "site": site,
        "trap": trap,
        "survey": survey,
        "finding": make_finding(api, survey, trap),
    }
    before = _revision(store, site["id"])
    answer = WRITES[write](api, world)
    assert getattr(answer, "status_code", 201) < 300
    assert _revision(store, site["id"]) > before


def test_a_refused_write_and_a_read_leave_the_revision_alone(
    api: TestClient, store: Database
) -> None:
    site = make_site(api)
    before = _revision(store, site["id"])
    api.get(f"/api/v1/sites/{site['id']}/summary")
    assert (
        api.patch(f"/api/v1/sites/{site['id']}", json={"boiler_efficiency": 7}).status_code == 422
    )
    assert _revision(store, site["id"]) == before


def test_the_comparison_on_the_page_follows_a_change_to_the_survey_before(api: TestClient) -> None:
    site = make_site(api)
    trap = make_trap(api, site)
    spring = make_survey(api, site, name="Spring", started_on="2026-03-02")
    finding = make_finding(api, spring, trap, condition="working")
    autumn = make_survey(api, site, name="Autumn", started_on="2026-09-01")
    make_finding(api, autumn, trap, condition="leaking", tested_at="2026-09-02T09:00:00Z")
    first = api.get(f"/sites/{site['id']}/summary").context["comparison"]  # type: ignore[attr-defined]
    assert [change.tag for change in first.newly_failed] == ["T-001"]
    api.patch(f"/api/v1/findings/{finding['id']}", json={"condition": "leaking"})
    second = api.get(f"/sites/{site['id']}/summary").context["comparison"]  # type: ignore[attr-defined]
    assert second.newly_failed == []
    assert [change.tag for change in second.still_failed] == ["T-001"]
