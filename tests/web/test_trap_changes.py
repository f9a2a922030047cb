"""A manager's screens for the rest of the job: edit and retire a trap, record a repair,
and the fitters' work orders; a technician is not offered them."""

import re
from typing import Any

import pytest
from fastapi.testclient import TestClient

from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role
from tests.factories import bearer, make_finding, make_site, make_survey, make_trap, make_user


@pytest.fixture
def trap(api: TestClient) -> dict[str, Any]:
    site = make_site(api, unit_system="us")
    return make_trap(api, site, tag="K-7", connection_size="1/2 in")


def _csrf(text: str) -> str:
    found = re.search(r'name="csrf_token" value="([^"]*)"', text)
    assert found is not None
    return found.group(1)


def test_the_edit_form_shows_the_trap_in_the_sites_units_and_saves_changes(
    api: TestClient, trap: dict[str, Any]
) -> None:
    form = api.get(f"/traps/{trap['id']}/edit")
    assert form.status_code == 200
    assert 'value="145.038"' in form.text  # 1,000 kPa(g) in psig (NIST SP 811 factors)
    typed = {
        "in_service_shown": "yes",
        "in_service": "yes",
        "tag": "K-7",
        "application": "drip",
        "trap_type": "inverted_bucket",
        "condensate_destination": "vented_receiver",
        "orifice_diameter": "0.25",
        "inlet_pressure": "150",
        "return_pressure": "0",
        "route_position": "4",
        "location": "Dryer 3, front side",
    }
    saved = api.post(f"/traps/{trap['id']}/edit", data=typed, follow_redirects=False)
    assert saved.status_code == 303
    stored = api.get(f"/api/v1/traps/{trap['id']}").json()
    assert stored["orifice_diameter_mm"] == pytest.approx(6.35)  # 1/4 in, exact by definition
    assert stored["inlet_pressure_kpa_g"] == pytest.approx(1034.214, rel=1e-6)  # 150 psig
    assert (stored["trap_type"], stored["route_position"]) == ("inverted_bucket", 4)
    assert "Dryer 3, front side" in api.get(f"/traps/{trap['id']}").text


def test_a_refused_edit_keeps_what_was_typed_and_changes_nothing(
    api: TestClient, trap: dict[str, Any]
) -> None:
    make_trap(api, {"id": trap["site_id"]}, tag="K-8")
    typed = {"tag": "k-8", "orifice_diameter": "wide", "inlet_pressure": "150"}
    refused = api.post(f"/traps/{trap['id']}/edit", data=typed)
    assert refused.status_code == 422
    assert (
        "&#39;wide&#39; is not a number" in refused.text or "'wide' is not a number" in refused.text
    )
    assert 'value="wide"' in refused.text
    assert api.get(f"/api/v1/traps/{trap['id']}").json()["tag"] == "K-7"
    clash = api.post(f"/traps/{trap['id']}/edit", data={"tag": "k-8"})
    assert clash.status_code == 422
    assert "already has a trap tagged" in clash.text


def test_retiring_keeps_a_trap_with_history_and_deletes_one_without(
    api: TestClient, trap: dict[str, Any]
) -> None:
    survey = make_survey(api, {"id": trap["site_id"]})
    make_finding(api, survey, trap)
    retired = api.post(f"/traps/{trap['id']}/retire", follow_redirects=False)
    assert retired.headers["location"] == f"/traps/{trap['id']}"
    assert api.get(f"/api/v1/traps/{trap['id']}").json()["in_service"] is False
    bare = make_trap(api, {"id": trap["site_id"]}, tag="K-9")
    gone = api.post(f"/traps/{bare['id']}/retire", follow_redirects=False)
    assert gone.headers["location"] == f"/sites/{trap['site_id']}/register"
    assert api.get(f"/api/v1/traps/{bare['id']}").status_code == 404


def test_a_repair_is_recorded_from_the_traps_page(api: TestClient, trap: dict[str, Any]) -> None:
    page = api.get(f"/traps/{trap['id']}").text
    assert "Record a repair" in page
    assert "lock out the trap" in page
    refused = api.post(f"/traps/{trap['id']}/repairs", data={"cost": "85", "notes": "WO-1187"})
    assert refused.status_code == 422
    assert "WO-1187" in refused.text
    recorded = api.post(
        f"/traps/{trap['id']}/repairs",
        data={"repaired_on": "2026-11-20", "kind": "replaced", "cost": "85", "notes": "WO-1187"},
        follow_redirects=False,
    )
    assert recorded.status_code == 303
    repairs = api.get(f"/api/v1/traps/{trap['id']}/repairs").json()["items"]
    assert [(r["kind"], r["cost"], r["notes"]) for r in repairs] == [("replaced", 85.0, "WO-1187")]


def test_a_technician_is_not_offered_a_managers_changes(
    store: Database, api: TestClient, trap: dict[str, Any]
) -> None:
    user = make_user(store, "tech-k", Role.TECHNICIAN, site_ids=[trap["site_id"]])
    with TestClient(api.app, headers=bearer(store, user)) as technician:
        page = technician.get(f"/traps/{trap['id']}").text
        assert "Edit this trap" not in page
        assert "Record a repair" not in page
        assert technician.get(f"/traps/{trap['id']}/edit").status_code == 403
        assert technician.post(f"/traps/{trap['id']}/retire").status_code == 403


def test_work_orders_list_the_failed_traps_not_yet_repaired_in_route_order(
    store: Database, api: TestClient
) -> None:
    with store.writing() as session:
        site = load_demo(session=session)
    assert site is not None
    summary = api.get(f"/api/v1/sites/{site.id}/summary").json()
    waiting = [
        each["tag"]
        for each in summary["repair_list"] + summary["risks"]
        if each["repaired_on"] is None
    ]
    page = api.get(f"/sites/{site.id}/work-orders")
    assert page.status_code == 200
    listed = re.findall(r'class="tag">([^<]+)</a>', page.text)
    assert sorted(listed) == sorted(waiting)
    assert listed
    assert "lock out the trap" in page.text
    route = [
        row["tag"] for row in api.get(f"/api/v1/sites/{site.id}/traps?limit=500").json()["items"]
    ]
    assert listed == [tag for tag in route if tag in set(listed)]  # the walking order
