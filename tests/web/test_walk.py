"""The survey walk as a gloved technician uses it: readings that doubt a finding are
asked about (never overridden), the test method carries over only when pinned, a trap
found in the field goes next to the trap where it was found, and the re-test list."""

import re
from typing import Any

import pytest
from fastapi.testclient import TestClient

from tests.factories import make_area, make_site, make_survey, make_trap


@pytest.fixture
def walk(api: TestClient) -> dict[str, Any]:
    site = make_site(api)
    area = make_area(api, site)
    traps = [
        make_trap(api, site, tag=f"D-{number}", area_id=area["id"], route_position=number)
        for number in (1, 2, 3)
    ]
    return {"site": site, "area": area, "traps": traps, "survey": make_survey(api, site)}


def _path(walk: dict[str, Any], trap: dict[str, Any]) -> str:
    return f"/surveys/{walk['survey']['id']}/walk/traps/{trap['id']}"


def _findings(api: TestClient, walk: dict[str, Any]) -> list[dict[str, Any]]:
    items: list[dict[str, Any]] = api.get(
        f"/api/v1/surveys/{walk['survey']['id']}/findings"
    ).json()["items"]
    return items


def test_readings_that_doubt_the_finding_are_asked_about_then_saved_as_found(
    api: TestClient, walk: dict[str, Any]
) -> None:
    # The trap: 1,000 kPa(g) at the standard atmosphere, Tsat 184.1 °C (IAPWS R7-97(2012));
    # 95 °C before a trap said to work points to condensate backing up (common practice).
    form = {"condition": "working", "method": "temperature", "upstream_temperature": "95"}
    asked = api.post(_path(walk, walk["traps"][0]), data=form)
    assert asked.status_code == 200
    assert "Not saved yet" in asked.text
    assert "95.0 °C" in asked.text
    assert "184.1 °C" in asked.text
    assert "Checked: save as found" in asked.text
    assert _findings(api, walk) == []
    saved = api.post(
        _path(walk, walk["traps"][0]), data={**form, "confirmed": "yes"}, follow_redirects=False
    )
    assert saved.status_code == 303
    assert [f["condition"] for f in _findings(api, walk)] == ["working"]  # as found


def test_readings_that_agree_save_at_once(api: TestClient, walk: dict[str, Any]) -> None:
    form = {
        "condition": "working",
        "method": "ultrasonic_temperature",
        "upstream_temperature": "181",
        "downstream_temperature": "102",
    }
    saved = api.post(_path(walk, walk["traps"][0]), data=form, follow_redirects=False)
    assert saved.status_code == 303


def _checked_method(text: str) -> str | None:
    found = re.search(r'name="method" value="([a-z_]+)" checked', text)
    return found.group(1) if found else None


def test_the_method_carries_over_only_while_pinned(api: TestClient, walk: dict[str, Any]) -> None:
    first, second, third = walk["traps"]
    unpinned = {"condition": "working", "method": "visual"}
    api.post(_path(walk, first), data=unpinned, follow_redirects=False)
    assert _checked_method(api.get(_path(walk, second)).text) is None
    pinned = {"condition": "working", "method": "ultrasonic", "pin_method": "yes"}
    api.post(_path(walk, second), data=pinned, follow_redirects=False)
    page = api.get(_path(walk, third)).text
    assert _checked_method(page) == "ultrasonic"
    assert 'name="pin_method" value="yes" checked' in page
    api.post(_path(walk, third), data=unpinned, follow_redirects=False)  # unpinned again
    assert _checked_method(api.get(_path(walk, first)).text) is None


def test_a_trap_found_in_the_field_goes_right_after_the_trap_where_it_was_found(
    api: TestClient, walk: dict[str, Any]
) -> None:
    found_at = walk["traps"][0]
    survey_id = walk["survey"]["id"]
    form = api.get(f"/surveys/{survey_id}/walk/new-trap", params={"after": found_at["id"]})
    assert "right after the trap where you found it" in form.text
    added = api.post(
        f"/surveys/{survey_id}/walk/new-trap",
        data={
            "after": str(found_at["id"]),
            "area_id": str(walk["area"]["id"]),
            "tag": "D-1A",
            "application": "drip",
            "trap_type": "thermodynamic",
            "orifice_diameter": "3",
            "inlet_pressure": "1000",
            "return_pressure": "0",
        },
        follow_redirects=False,
    )
    assert added.status_code == 303
    route = api.get(f"/surveys/{survey_id}/walk").text
    assert re.findall(r">(D-[0-9A]+)</a>", route) == ["D-1", "D-1A", "D-2", "D-3"]


def test_traps_without_a_place_come_last_on_every_database(api: TestClient) -> None:
    site = make_site(api)
    make_trap(api, site, tag="A-unplaced")
    make_trap(api, site, tag="B-placed", route_position=1)
    survey = make_survey(api, site)
    route = api.get(f"/surveys/{survey['id']}/walk").text
    assert re.findall(r">([AB]-[a-z]+)</a>", route) == ["B-placed", "A-unplaced"]


def test_the_retest_list_holds_the_traps_found_not_accessible(
    api: TestClient, walk: dict[str, Any]
) -> None:
    first, second, _ = walk["traps"]
    api.post(
        _path(walk, first),
        data={"condition": "not_accessible", "method": "visual"},
        follow_redirects=False,
    )
    api.post(
        _path(walk, second),
        data={"condition": "working", "method": "visual"},
        follow_redirects=False,
    )
    route = api.get(f"/surveys/{walk['survey']['id']}/walk")
    assert "Test again: 1 not accessible" in route.text
    retest = api.get(f"/surveys/{walk['survey']['id']}/walk", params={"retest": "true"})
    assert re.findall(r">(D-\d)</a>", retest.text) == ["D-1"]


def test_tags_clash_whatever_their_case(api: TestClient, walk: dict[str, Any]) -> None:
    clash = api.post(
        f"/api/v1/sites/{walk['site']['id']}/traps",
        json={
            "tag": "d-1",
            "application": "drip",
            "trap_type": "thermodynamic",
            "orifice_diameter_mm": 3.0,
            "inlet_pressure_kpa_g": 1000.0,
            "return_pressure_kpa_g": 0.0,
        },
    )
    assert clash.status_code == 409
    assert "'D-1'" in clash.json()["detail"]
    content = "tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
    content += "return_pressure_kpa_g\nd-2,drip,thermodynamic,5,1000,0\n"
    answer = api.post(
        f"/api/v1/sites/{walk['site']['id']}/imports/register",
        params={"commit": "true"},
        content=content.encode(),
        headers={"content-type": "text/csv"},
    ).json()
    assert (answer["creates"], answer["updates"]) == (0, 1)
    traps = api.get(f"/api/v1/sites/{walk['site']['id']}/traps").json()["items"]
    assert {trap["tag"]: trap["orifice_diameter_mm"] for trap in traps}["D-2"] == 5.0


def test_the_round_for_offline_lists_the_route_and_each_traps_form(
    api: TestClient, walk: dict[str, Any]
) -> None:
    survey_id = walk["survey"]["id"]
    pages = api.get(f"/surveys/{survey_id}/walk/offline").json()["pages"]
    walk_url = f"/surveys/{survey_id}/walk"
    assert pages == [walk_url, *(f"{walk_url}/traps/{trap['id']}" for trap in walk["traps"])]


def test_the_service_worker_is_served_for_the_walk_pages_scope(api: TestClient) -> None:
    worker = TestClient(api.app).get("/surveys/walk-sw.js")  # no sign-in needed
    assert worker.status_code == 200
    assert worker.headers["content-type"].startswith("text/javascript")
    assert worker.headers["cache-control"] == "no-cache"
    assert 'addEventListener("fetch"' in worker.text


def test_a_form_says_where_a_save_kept_offline_goes_next(
    api: TestClient, walk: dict[str, Any]
) -> None:
    first, second, third = walk["traps"]
    survey_id = walk["survey"]["id"]
    assert (
        f'data-next-url="/surveys/{survey_id}/walk/traps/{second["id"]}"'
        in api.get(_path(walk, first)).text
    )
    assert f'data-next-url="/surveys/{survey_id}/walk"' in api.get(_path(walk, third)).text


def test_the_session_gives_a_script_a_fresh_csrf_token(store: Any, api: TestClient) -> None:
    from service.store.models import Role
    from tests.factories import browser_session, make_user

    user = make_user(store, "tablet", Role.TECHNICIAN)
    secret, raw = browser_session(store, user)
    with TestClient(api.app) as browser:
        browser.cookies.set("traptally_session", secret)
        first = browser.get("/api/v1/session").json()
        second = browser.get("/api/v1/session").json()
    assert (first["user"], first["role"]) == ("tablet", "technician")
    assert first["csrf_token"] != second["csrf_token"] != raw  # masked afresh
    assert api.get("/api/v1/session").json()["csrf_token"] is None  # a bearer token
    assert TestClient(api.app).get("/api/v1/session").status_code == 401
