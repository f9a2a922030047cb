"""Surveys, findings and repairs through the API; a retried save is stored once."""

import json
import threading
from typing import Any

import pytest
from fastapi.testclient import TestClient

from tests.factories import finding_fields, make_finding, make_site, make_survey, make_trap

Setting = tuple[dict[str, Any], dict[str, Any], dict[str, Any]]


@pytest.fixture
def setting(api: TestClient) -> Setting:
    site = make_site(api)
    return site, make_trap(api, site), make_survey(api, site)


def test_the_same_key_twice_stores_one_finding_and_answers_with_it(
    api: TestClient,
    setting: Setting,
) -> None:
    _, trap, survey = setting
    path = f"/api/v1/surveys/{survey['id']}/findings"
    headers = {"Idempotency-Key": "tablet-7f3a-0001"}
    first = api.post(path, json=finding_fields(trap, condition="leaking"), headers=headers)
    again = api.post(path, json=finding_fields(trap, condition="leaking"), headers=headers)
    assert first.status_code == again.status_code == 201
    assert first.json() == again.json()
    assert again.headers["Idempotent-Replayed"] == "true"
    assert "Idempotent-Replayed" not in first.headers
    assert api.get(path).json()["total"] == 1


def test_the_same_key_with_another_finding_is_refused(
    api: TestClient,
    setting: Setting,
) -> None:
    _, trap, survey = setting
    path = f"/api/v1/surveys/{survey['id']}/findings"
    headers = {"Idempotency-Key": "tablet-7f3a-0002"}
    api.post(path, json=finding_fields(trap, condition="leaking"), headers=headers)
    other = api.post(path, json=finding_fields(trap, condition="plugged"), headers=headers)
    assert other.status_code == 422
    assert other.json()["detail"][0]["loc"] == ["header", "Idempotency-Key"]
    assert api.get(path).json()["total"] == 1


def test_a_malformed_key_is_refused(
    api: TestClient,
    setting: Setting,
) -> None:
    _, trap, survey = setting
    answer = api.post(
        f"/api/v1/surveys/{survey['id']}/findings",
        json=finding_fields(trap),
        headers={"Idempotency-Key": "no spaces allowed"},
    )
    assert answer.status_code == 422


def test_concurrent_retries_with_one_key_store_one_finding(
    api: TestClient,
    setting: Setting,
) -> None:
    _, trap, survey = setting
    path = f"/api/v1/surveys/{survey['id']}/findings"
    answers: list[int] = []

    def send() -> None:
        answer = api.post(
            path, json=finding_fields(trap), headers={"Idempotency-Key": "race-key-0001"}
        )
        answers.append(answer.status_code)

    threads = [threading.Thread(target=send) for _ in range(6)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join()
    assert answers == [201] * 6
    assert api.get(path).json()["total"] == 1


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"condition": "broken"}, "condition"),
        ({"method": "sniffing"}, "method"),
        ({"tested_at": "soon"}, "tested_at"),
        ({"condition": "working", "loss_factor_override": 0.3}, "loss_factor_override"),
        ({"condition": "leaking", "loss_factor_override": 1.3}, "loss_factor_override"),
        ({"upstream_temperature_c": 900}, "upstream_temperature_c"),
        ({"upstream_temperature_c": float("nan")}, "upstream_temperature_c"),
        ({"trap_id": 9999}, "trap_id"),
        ({"notes": "x" * 5000}, "notes"),
    ],
)
def test_bad_findings_answer_422_and_store_nothing(
    api: TestClient,
    setting: Setting,
    changes: dict[str, object],
    field: str,
) -> None:
    _, trap, survey = setting
    path = f"/api/v1/surveys/{survey['id']}/findings"
    answer = api.post(
        path,
        content=_json({**finding_fields(trap), **changes}),
        headers={"content-type": "application/json"},
    )
    assert answer.status_code == 422
    assert field in [entry["loc"][-1] for entry in answer.json()["detail"]]
    assert api.get(path).json()["total"] == 0


def _json(body: dict[str, object]) -> bytes:
    return json.dumps(body).encode()


def test_a_trap_of_another_site_cannot_be_recorded_in_this_survey(api: TestClient) -> None:
    site, other = make_site(api), make_site(api, name="Other Mill")
    stranger = make_trap(api, other)
    survey = make_survey(api, site)
    answer = api.post(f"/api/v1/surveys/{survey['id']}/findings", json=finding_fields(stranger))
    assert answer.status_code == 422
    assert answer.json()["detail"][0]["loc"] == ["body", "trap_id"]


def test_findings_are_listed_by_survey_and_by_trap_and_can_be_corrected(
    api: TestClient,
    setting: Setting,
) -> None:
    site, trap, survey = setting
    other = make_trap(api, site, tag="X-9")
    finding = make_finding(api, survey, trap, condition="leaking")
    make_finding(api, survey, other)
    listed = api.get(f"/api/v1/surveys/{survey['id']}/findings", params={"condition": "leaking"})
    assert [item["id"] for item in listed.json()["items"]] == [finding["id"]]
    by_tag = api.get(f"/api/v1/surveys/{survey['id']}/findings", params={"tag_prefix": "X-"})
    assert by_tag.json()["total"] == 1
    assert api.get(f"/api/v1/traps/{trap['id']}/findings").json()["total"] == 1
    corrected = api.patch(f"/api/v1/findings/{finding['id']}", json={"condition": "blow_through"})
    assert corrected.json()["condition"] == "blow_through"
    refused = api.patch(
        f"/api/v1/findings/{finding['id']}",
        json={"condition": "working", "loss_factor_override": 0.5},
    )
    assert refused.status_code == 422
    assert api.delete(f"/api/v1/findings/{finding['id']}").status_code == 204
    assert api.get(f"/api/v1/findings/{finding['id']}").status_code == 404


def test_surveys_are_unique_by_name_end_after_they_start_and_keep_their_findings(
    api: TestClient,
    setting: Setting,
) -> None:
    site, trap, survey = setting
    path = f"/api/v1/sites/{site['id']}/surveys"
    assert (
        api.post(path, json={"name": survey["name"], "started_on": "2026-01-01"}).status_code == 409
    )
    backwards = api.post(
        path, json={"name": "B", "started_on": "2026-05-01", "ended_on": "2026-04-01"}
    )
    assert backwards.status_code == 422
    assert backwards.json()["detail"][0]["loc"] == ["body", "ended_on"]
    make_finding(api, survey, trap)
    assert api.delete(f"/api/v1/surveys/{survey['id']}").status_code == 409
    renamed = api.patch(f"/api/v1/surveys/{survey['id']}", json={"name": "Spring round"})
    assert renamed.json()["name"] == "Spring round"
    empty = api.post(path, json={"name": "Empty", "started_on": "2026-06-01"}).json()
    assert api.delete(f"/api/v1/surveys/{empty['id']}").status_code == 204
    assert [s["name"] for s in api.get(path).json()["items"]] == ["Spring round"]


def test_repairs_are_recorded_listed_corrected_and_deleted(
    api: TestClient,
    setting: Setting,
) -> None:
    _, trap, _ = setting
    path = f"/api/v1/traps/{trap['id']}/repairs"
    repair = api.post(path, json={"repaired_on": "2026-04-01", "kind": "replaced", "cost": 480})
    assert repair.status_code == 201
    assert api.post(path, json={"repaired_on": "2026-04-01", "kind": "mended"}).status_code == 422
    assert (
        api.post(
            path, json={"repaired_on": "2026-04-01", "kind": "repaired", "cost": -5}
        ).status_code
        == 422
    )
    assert api.get(path).json()["total"] == 1
    fixed = api.patch(f"/api/v1/repairs/{repair.json()['id']}", json={"cost": 510})
    assert fixed.json()["cost"] == 510
    assert api.delete(f"/api/v1/repairs/{repair.json()['id']}").status_code == 204
    assert api.get(path).json()["total"] == 0
