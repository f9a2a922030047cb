"""Small factories: a site, an area, a trap, a survey and a finding, through the API."""

from typing import Any

from fastapi.testclient import TestClient


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
