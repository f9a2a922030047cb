"""Sites, areas and the trap register through the API, on SQLite and PostgreSQL."""

import pytest
from fastapi.testclient import TestClient

from service.physics.pressure import atmospheric_pressure_at_elevation_kpa
from tests.factories import make_area, make_finding, make_site, make_survey, make_trap, trap_fields


def test_a_site_takes_its_defaults_and_its_atmosphere_from_elevation(api: TestClient) -> None:
    site = make_site(api, elevation_m=1000.0)
    assert site["atmospheric_pressure_kpa"] == atmospheric_pressure_at_elevation_kpa(1000.0)
    assert site["loss_factors"]["leaking"] == [0.25, 0.1, 0.4]
    assert site["discharge_coefficient"] == 0.7
    assert set(site["repair_costs"]) >= {"thermodynamic", "inverted_bucket"}
    assert api.get(f"/api/v1/sites/{site['id']}").json() == site


@pytest.mark.parametrize(
    ("body", "field"),
    [
        ({"name": ""}, "name"),
        ({"name": "X", "currency": "pounds"}, "currency"),
        ({"name": "X", "cost_basis": "fuel_price"}, "fuel_price_per_gj"),
        ({"name": "X"}, "steam_cost_per_tonne"),
        ({"name": "X", "steam_cost_per_tonne": -1}, "steam_cost_per_tonne"),
        ({"name": "X", "steam_cost_per_tonne": 1, "boiler_efficiency": 1.5}, "boiler_efficiency"),
        (
            {"name": "X", "steam_cost_per_tonne": 1, "discharge_coefficient_low": 0.75},
            "discharge_coefficient_high",
        ),
        (
            {
                "name": "X",
                "steam_cost_per_tonne": 1,
                "loss_factors": {"leaking": {"typical": 0.5, "low": 0.6, "high": 0.9}},
            },
            "leaking",
        ),
        ({"name": "X\x00", "steam_cost_per_tonne": 1}, "name"),
    ],
)
def test_bad_site_fields_answer_422_naming_the_field(
    api: TestClient, body: dict[str, object], field: str
) -> None:
    answer = api.post("/api/v1/sites", json=body)
    assert answer.status_code == 422
    assert field in [str(part) for entry in answer.json()["detail"] for part in entry["loc"]]
    assert api.get("/api/v1/sites").json()["total"] == 0


def test_site_names_are_unique_and_sites_with_traps_are_kept(api: TestClient) -> None:
    site = make_site(api)
    assert (
        api.post("/api/v1/sites", json={"name": "Test Mill", "steam_cost_per_tonne": 1}).status_code
        == 409
    )
    make_trap(api, site)
    assert api.delete(f"/api/v1/sites/{site['id']}").status_code == 409
    empty = make_site(api, name="Empty Mill")
    assert api.delete(f"/api/v1/sites/{empty['id']}").status_code == 204
    assert api.get(f"/api/v1/sites/{empty['id']}").status_code == 404


def test_site_update_is_checked_as_a_whole(api: TestClient) -> None:
    site = make_site(api)
    changed = api.patch(f"/api/v1/sites/{site['id']}", json={"cost_basis": "fuel_price"})
    assert changed.status_code == 422
    assert changed.json()["detail"][0]["loc"] == ["body", "fuel_price_per_gj"]
    changed = api.patch(
        f"/api/v1/sites/{site['id']}", json={"cost_basis": "fuel_price", "fuel_price_per_gj": 9.5}
    )
    assert changed.status_code == 200
    assert changed.json()["fuel_price_per_gj"] == 9.5
    assert changed.json()["steam_cost_per_tonne"] == 30.0


def test_a_new_atmosphere_must_keep_every_trap_on_the_saturation_line(api: TestClient) -> None:
    site = make_site(api)
    make_trap(api, site, return_pressure_kpa_g=-100.0, inlet_pressure_kpa_g=50.0)
    answer = api.patch(f"/api/v1/sites/{site['id']}", json={"atmospheric_pressure_kpa": 60.0})
    assert answer.status_code == 422
    assert answer.json()["detail"][0]["loc"] == ["body", "atmospheric_pressure_kpa"]
    assert api.get(f"/api/v1/sites/{site['id']}").json()["atmospheric_pressure_kpa"] == 101.325


def test_areas_are_listed_in_route_order_and_kept_while_they_hold_traps(api: TestClient) -> None:
    site = make_site(api)
    second = make_area(api, site, name="Dryers", route_order=2)
    first = make_area(api, site, name="Boiler house", route_order=1)
    names = [area["name"] for area in api.get(f"/api/v1/sites/{site['id']}/areas").json()["items"]]
    assert names == ["Boiler house", "Dryers"]
    assert api.post(f"/api/v1/sites/{site['id']}/areas", json={"name": "Dryers"}).status_code == 409
    make_trap(api, site, area_id=first["id"])
    assert api.delete(f"/api/v1/areas/{first['id']}").status_code == 409
    renamed = api.patch(f"/api/v1/areas/{second['id']}", json={"name": "PM2 dryers"})
    assert renamed.json()["name"] == "PM2 dryers"
    assert api.delete(f"/api/v1/areas/{second['id']}").status_code == 204
    assert api.get(f"/api/v1/areas/{second['id']}").status_code == 404


def test_trap_tags_are_unique_within_a_site_only(api: TestClient) -> None:
    site, other = make_site(api), make_site(api, name="Other Mill")
    make_trap(api, site)
    duplicate = api.post(f"/api/v1/sites/{site['id']}/traps", json=trap_fields())
    assert duplicate.status_code == 409
    assert "T-001" in duplicate.json()["detail"]
    assert api.post(f"/api/v1/sites/{other['id']}/traps", json=trap_fields()).status_code == 201


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"tag": ""}, "tag"),
        ({"tag": " leading space"}, None),
        ({"orifice_diameter_mm": 0}, "orifice_diameter_mm"),
        ({"orifice_diameter_mm": 80}, "orifice_diameter_mm"),
        ({"inlet_pressure_kpa_g": "high"}, "inlet_pressure_kpa_g"),
        ({"inlet_pressure_kpa_g": 22000}, "inlet_pressure_kpa_g"),
        ({"return_pressure_kpa_g": 1000}, "return_pressure_kpa_g"),
        ({"return_pressure_kpa_g": -101.0}, "return_pressure_kpa_g"),
        ({"application": "kettle"}, "application"),
        ({"trap_type": "magic"}, "trap_type"),
        ({"hours_per_year": 9000}, "hours_per_year"),
        ({"area_id": 999}, "area_id"),
        ({"installed_on": "yesterday"}, "installed_on"),
    ],
)
def test_bad_trap_fields_answer_422_and_store_nothing(
    api: TestClient, changes: dict[str, object], field: str | None
) -> None:
    site = make_site(api)
    answer = api.post(f"/api/v1/sites/{site['id']}/traps", json=trap_fields(**changes))
    if field is None:  # surrounding spaces are trimmed, not refused
        assert answer.status_code == 201
        return
    assert answer.status_code == 422
    assert field in [entry["loc"][-1] for entry in answer.json()["detail"]]
    assert api.get(f"/api/v1/sites/{site['id']}/traps").json()["total"] == 0


def test_a_trap_update_is_checked_against_the_whole_trap(api: TestClient) -> None:
    site = make_site(api)
    trap = make_trap(api, site)
    answer = api.patch(f"/api/v1/traps/{trap['id']}", json={"inlet_pressure_kpa_g": -50.0})
    assert answer.status_code == 422
    assert answer.json()["detail"][0]["loc"] == ["body", "return_pressure_kpa_g"]
    moved = api.patch(f"/api/v1/traps/{trap['id']}", json={"location": "Header end, north"})
    assert moved.json()["location"] == "Header end, north"
    assert moved.json()["inlet_pressure_kpa_g"] == 1000.0


def test_a_trap_with_findings_is_retired_not_deleted(api: TestClient) -> None:
    site = make_site(api)
    kept, spare = make_trap(api, site), make_trap(api, site, tag="T-002")
    make_finding(api, make_survey(api, site), kept)
    retired = api.delete(f"/api/v1/traps/{kept['id']}").json()
    assert retired["retired"] is True
    assert retired["trap"]["in_service"] is False
    assert api.get(f"/api/v1/traps/{kept['id']}").status_code == 200
    assert api.delete(f"/api/v1/traps/{spare['id']}").json()["deleted"] is True
    assert api.get(f"/api/v1/traps/{spare['id']}").status_code == 404


def test_the_register_is_paged_and_filtered(api: TestClient) -> None:
    site = make_site(api)
    area = make_area(api, site)
    for number in range(1, 8):
        make_trap(
            api,
            site,
            tag=f"HP-{number:02d}" if number <= 4 else f"LP-{number:02d}",
            area_id=area["id"] if number % 2 else None,
            application="tracer" if number == 7 else "drip",
            route_position=10 * (8 - number),
        )
    listing = f"/api/v1/sites/{site['id']}/traps"
    page = api.get(listing, params={"limit": 3, "offset": 0}).json()
    assert (page["total"], len(page["items"]), page["limit"]) == (7, 3, 3)
    assert api.get(listing, params={"tag_prefix": "HP-"}).json()["total"] == 4
    assert api.get(listing, params={"tag_prefix": "%"}).json()["total"] == 0
    assert api.get(listing, params={"area_id": area["id"]}).json()["total"] == 4
    assert api.get(listing, params={"application": "tracer"}).json()["total"] == 1
    in_area = api.get(listing, params={"area_id": area["id"]}).json()["items"]
    assert [trap["route_position"] for trap in in_area] == sorted(
        trap["route_position"] for trap in in_area
    )
    assert api.get(listing, params={"limit": 0}).status_code == 422
    assert api.get(listing, params={"application": "kettle"}).status_code == 422


def test_the_register_filters_by_latest_condition(api: TestClient) -> None:
    site = make_site(api)
    first, second = make_trap(api, site), make_trap(api, site, tag="T-002")
    survey = make_survey(api, site)
    make_finding(api, survey, first, condition="leaking", tested_at="2026-03-02T08:00:00Z")
    make_finding(api, survey, first, condition="working", tested_at="2026-03-02T10:00:00Z")
    make_finding(api, survey, second, condition="leaking")
    found = api.get(f"/api/v1/sites/{site['id']}/traps", params={"condition": "leaking"}).json()
    assert [trap["tag"] for trap in found["items"]] == ["T-002"]


def test_missing_records_answer_404(api: TestClient) -> None:
    for path in (
        "/api/v1/sites/9",
        "/api/v1/traps/9",
        "/api/v1/areas/9",
        "/api/v1/surveys/9",
        "/api/v1/findings/9",
        "/api/v1/repairs/9",
        "/api/v1/sites/9/traps",
        "/api/v1/sites/9/summary",
        "/api/v1/traps/9/findings",
    ):
        assert api.get(path).status_code == 404, path
