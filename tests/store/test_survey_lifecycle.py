"""A survey round's life (planned, in progress, closed), who a finding says tested the
trap, and an in-progress round's figures read as "so far"."""

import datetime as dt
from pathlib import Path
from typing import Any

import pytest
from alembic import command
from alembic.config import Config
from fastapi.testclient import TestClient
from sqlalchemy import inspect, select, text

from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import AuditEntry, Role
from tests.factories import bearer, finding_fields, make_site, make_survey, make_trap, make_user


def _round(api: TestClient, **fields: Any) -> dict[str, Any]:
    site = make_site(api)
    trap = make_trap(api, site)
    return {"site": site, "trap": trap, "survey": make_survey(api, site, **fields)}


def _post_finding(
    client: TestClient, survey: dict[str, Any], trap: dict[str, Any], **params: Any
) -> Any:
    fields = finding_fields(trap, **params.pop("fields", {}))
    return client.post(
        f"/api/v1/surveys/{survey['id']}/findings", json=fields, params=params or None
    )


def _as(store: Database, api: TestClient, role: Role, site: dict[str, Any]) -> TestClient:
    user = make_user(store, f"{role.value}-{site['id']}", role, site_ids=[site["id"]])
    return TestClient(api.app, headers=bearer(store, user))


def test_a_new_round_is_in_progress_and_takes_findings(api: TestClient) -> None:
    made = _round(api)
    assert made["survey"]["status"] == "in_progress"
    assert _post_finding(api, made["survey"], made["trap"]).status_code == 201


def test_a_planned_round_takes_no_finding_until_it_is_started(api: TestClient) -> None:
    made = _round(api, status="planned")
    refused = _post_finding(api, made["survey"], made["trap"])
    assert refused.status_code == 409
    assert "planned and not started" in refused.json()["detail"]
    started = api.patch(f"/api/v1/surveys/{made['survey']['id']}", json={"status": "in_progress"})
    assert started.json()["status"] == "in_progress"
    assert _post_finding(api, made["survey"], made["trap"]).status_code == 201


def test_closing_ends_the_round_today_and_refuses_new_findings(
    store: Database, api: TestClient
) -> None:
    made = _round(api)
    survey = made["survey"]
    closed = api.patch(f"/api/v1/surveys/{survey['id']}", json={"status": "closed"}).json()
    assert closed["ended_on"] == dt.datetime.now(dt.UTC).date().isoformat()
    technician = _as(store, api, Role.TECHNICIAN, made["site"])
    refused = _post_finding(technician, survey, made["trap"])
    assert refused.status_code == 409
    assert "is closed" in refused.json()["detail"]
    # A technician may not make a correction; a manager must say it is one.
    assert _post_finding(technician, survey, made["trap"], correction="true").status_code == 403
    manager = _as(store, api, Role.MANAGER, made["site"])
    assert _post_finding(manager, survey, made["trap"]).status_code == 409
    corrected = _post_finding(manager, survey, made["trap"], correction="true")
    assert corrected.status_code == 201
    with store.reading() as session:
        entry = session.scalars(
            select(AuditEntry).where(
                AuditEntry.record_type == "finding",
                AuditEntry.record_id == corrected.json()["id"],
            )
        ).one()
        assert entry.actor_name == f"manager-{made['site']['id']}"


def test_a_save_that_reached_the_server_before_the_round_closed_is_answered_again(
    api: TestClient,
) -> None:
    made = _round(api)
    key = {"Idempotency-Key": "walk-0001-retry"}
    fields = finding_fields(made["trap"])
    path = f"/api/v1/surveys/{made['survey']['id']}/findings"
    first = api.post(path, json=fields, headers=key)
    api.patch(f"/api/v1/surveys/{made['survey']['id']}", json={"status": "closed"})
    again = api.post(path, json=fields, headers=key)
    assert again.status_code == 201
    assert again.headers["Idempotent-Replayed"] == "true"
    assert again.json()["id"] == first.json()["id"]


def test_a_finding_names_the_person_signed_in_and_a_manager_may_name_another(
    store: Database, api: TestClient
) -> None:
    made = _round(api)
    technician = _as(store, api, Role.TECHNICIAN, made["site"])
    own = _post_finding(technician, made["survey"], made["trap"], fields={"tested_by": "Someone"})
    assert own.json()["tested_by"] == f"technician-{made['site']['id']}"
    manager = _as(store, api, Role.MANAGER, made["site"])
    named = _post_finding(manager, made["survey"], made["trap"], fields={"tested_by": "R. Okafor"})
    assert named.json()["tested_by"] == "R. Okafor"
    blank = _post_finding(manager, made["survey"], made["trap"])
    assert blank.json()["tested_by"] == f"manager-{made['site']['id']}"


def test_a_findings_file_for_a_closed_round_writes_nothing(api: TestClient) -> None:
    made = _round(api, status="closed", ended_on="2026-03-20")
    content = (
        f"tag,tested_at,method,condition\n{made['trap']['tag']},2026-03-02,ultrasonic,working\n"
    )
    answer = api.post(
        f"/api/v1/surveys/{made['survey']['id']}/imports/findings",
        params={"commit": "true"},
        content=content.encode(),
        headers={"content-type": "text/csv"},
    )
    assert answer.status_code == 422
    assert answer.json()["committed"] is False
    assert "is closed" in answer.json()["problems"][0]["message"]
    findings = api.get(f"/api/v1/surveys/{made['survey']['id']}/findings").json()
    assert findings["total"] == 0


def test_a_round_in_progress_reads_as_so_far_and_compares_only_traps_tested_in_both(
    store: Database, api: TestClient
) -> None:
    with store.writing() as session:
        site = load_demo(session=session)
    assert site is not None
    demo_rounds = api.get(f"/api/v1/sites/{site.id}/surveys").json()["items"]
    assert {each["status"] for each in demo_rounds} == {"closed"}  # five yearly rounds
    assert len(demo_rounds) == 5
    survey = make_survey(api, {"id": site.id}, name="Autumn 2026", started_on="2026-11-02")
    traps = api.get(f"/api/v1/sites/{site.id}/traps", params={"limit": 3}).json()["items"]
    for trap in traps:
        assert _post_finding(api, survey, trap).status_code == 201
    summary = api.get(f"/api/v1/sites/{site.id}/summary").json()
    assert summary["survey"]["status"] == "in_progress"
    assert summary["traps_recorded"] == 3
    comparison = api.get(
        f"/api/v1/sites/{site.id}/compare",
        params={"from_survey": demo_rounds[0]["id"], "to_survey": survey["id"]},
    ).json()
    assert comparison["traps_compared"] <= 3
    home = api.get(f"/sites/{site.id}")
    in_service = summary["traps_in_service"]
    assert f"In progress: so far, 3 of {in_service} traps tested" in home.text
    assert "found so far in Autumn 2026" in api.get(f"/sites/{site.id}/summary").text


def test_a_manager_moves_a_round_on_its_page_and_a_technician_is_not_offered_it(
    store: Database, api: TestClient
) -> None:
    made = _round(api)
    survey_id = made["survey"]["id"]
    manager = _as(store, api, Role.MANAGER, made["site"])
    home = manager.get(f"/sites/{made['site']['id']}")
    assert "Close the round" in home.text
    assert "Add the survey round" in home.text
    technician = _as(store, api, Role.TECHNICIAN, made["site"])
    seen = technician.get(f"/sites/{made['site']['id']}").text
    assert "Close the round" not in seen
    assert "Add the survey round" not in seen
    wrong = manager.post(f"/surveys/{survey_id}/state", data={"status": "planned"})
    assert wrong.status_code == 422
    moved = manager.post(
        f"/surveys/{survey_id}/state", data={"status": "closed"}, follow_redirects=False
    )
    assert moved.status_code == 303
    assert api.get(f"/api/v1/surveys/{survey_id}").json()["status"] == "closed"
    walk = technician.get(f"/surveys/{survey_id}/walk/traps/{made['trap']['id']}")
    assert "This round is closed" in walk.text
    assert "Save and go to the next trap" not in walk.text
    correcting = manager.get(f"/surveys/{survey_id}/walk/traps/{made['trap']['id']}")
    assert "This is a correction to a closed round" in correcting.text


def test_the_walk_refuses_a_save_into_a_closed_round_and_keeps_what_was_typed(
    store: Database, api: TestClient
) -> None:
    made = _round(api, status="closed", ended_on="2026-03-20")
    manager = _as(store, api, Role.MANAGER, made["site"])
    path = f"/surveys/{made['survey']['id']}/walk/traps/{made['trap']['id']}"
    form = {"condition": "leaking", "method": "ultrasonic", "notes": "hisses at the vent"}
    refused = manager.post(path, data=form)
    assert refused.status_code == 422
    assert "is closed" in refused.text
    assert "hisses at the vent" in refused.text
    saved = manager.post(path, data={**form, "correction": "yes"}, follow_redirects=False)
    assert saved.status_code == 303


# A value for each type of column the 0004 sites table requires (invented).
OLD_VALUES = {
    "VARCHAR": "Old Mill",
    "TEXT": "{}",
    "JSON": "{}",
    "FLOAT": 1.0,
    "DOUBLE": 1.0,
    "DOUBLE_PRECISION": 1.0,
    "INTEGER": 1,
    "DATETIME": "2025-01-01 00:00:00",
    "TIMESTAMP": "2025-01-01 00:00:00",
    "BOOLEAN": True,
}


@pytest.mark.parametrize(("ended_on", "status"), [("2025-03-14", "closed"), (None, "in_progress")])
def test_rounds_stored_before_the_lifecycle_are_closed_where_they_ended(
    tmp_path: Path, ended_on: str | None, status: str
) -> None:
    database = Database.at(f"sqlite:///{tmp_path / 'old.db'}")
    config = Config()
    config.set_main_option(
        "script_location", str(Path(__file__).resolve().parents[2] / "service/store/migrations")
    )
    config.attributes["engine"] = database.engine
    command.upgrade(config, "0004")
    with database.engine.begin() as connection:  # a site row as the 0004 schema has it
        columns = inspect(connection).get_columns("sites")
        row = {
            column["name"]: OLD_VALUES[type(column["type"]).__name__]
            for column in columns
            if not column["nullable"] and column["default"] is None and column["name"] != "id"
        }
        names = ", ".join(row)
        connection.execute(
            text(f"INSERT INTO sites ({names}) VALUES ({', '.join(':' + n for n in row)})"), row
        )
        site_id = connection.execute(text("SELECT id FROM sites")).scalar_one()
    with database.engine.begin() as connection:
        connection.execute(
            text(
                "INSERT INTO surveys (site_id, name, started_on, ended_on, notes) "
                "VALUES (:site, 'Old', '2025-03-03', :ended, '')"
            ),
            {"site": site_id, "ended": ended_on},
        )
    database.upgrade()
    with database.engine.connect() as connection:
        assert connection.execute(text("SELECT status FROM surveys")).scalar() == status
    database.dispose()
