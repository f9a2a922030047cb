"""Imports write new records through Core in batches: the same audit trail and the same
revision bump as records written one by one through the ORM."""

from typing import Any

from fastapi.testclient import TestClient
from sqlalchemy import select

from service.store.database import Database
from service.store.models import AuditEntry, Finding, Site, Trap
from tests.factories import make_site, make_survey, make_trap

TRAP = {
    "application": "drip",
    "trap_type": "thermodynamic",
    "orifice_diameter_mm": 3.2,
    "inlet_pressure_kpa_g": 1000.0,
    "return_pressure_kpa_g": 0.0,
    "condensate_destination": "vented_receiver",
    "condensate_load_kg_h": 20.0,
}


def _import(api: TestClient, path: str, content: str) -> None:
    answer = api.post(
        path,
        params={"commit": "true"},
        content=content.encode(),
        headers={"content-type": "text/csv"},
    )
    assert answer.status_code == 200, answer.text


def _created_values(store: Database, record_type: str, record_id: int) -> dict[str, Any]:
    with store.reading() as session:
        entry = session.scalars(
            select(AuditEntry).where(
                AuditEntry.record_type == record_type, AuditEntry.record_id == record_id
            )
        ).one()
        assert entry.action == "created"
        assert entry.new_values is not None
        return dict(entry.new_values)


def test_an_imported_trap_is_audited_as_one_created_through_the_api(
    api: TestClient, store: Database
) -> None:
    site = make_site(api)
    by_hand = make_trap(api, site, tag="BY-HAND", **TRAP)
    header = ",".join(["tag", *TRAP])
    row = ",".join(["IMPORTED", *(str(value) for value in TRAP.values())])
    _import(api, f"/api/v1/sites/{site['id']}/imports/register", f"{header}\n{row}\n")
    with store.reading() as session:
        imported = session.scalars(select(Trap).where(Trap.tag == "IMPORTED")).one()
        imported_id = imported.id
    by_hand_values = _created_values(store, "trap", by_hand["id"])
    imported_values = _created_values(store, "trap", imported_id)
    assert by_hand_values.pop("tag") == "BY-HAND"
    assert imported_values.pop("tag") == "IMPORTED"
    by_hand_values.pop("route_position")
    imported_values.pop("route_position")
    assert imported_values == by_hand_values


def test_an_import_names_its_actor_and_the_trap_on_every_entry(
    api: TestClient, store: Database
) -> None:
    site = make_site(api)
    trap = make_trap(api, site, tag="HP-01", **TRAP)
    survey = make_survey(api, site)
    _import(
        api,
        f"/api/v1/surveys/{survey['id']}/imports/findings",
        "tag,tested_at,method,condition\nHP-01,2026-03-02T09:00:00Z,ultrasonic,leaking\n",
    )
    with store.reading() as session:
        finding = session.scalars(select(Finding).where(Finding.survey_id == survey["id"])).one()
        entry = session.scalars(
            select(AuditEntry).where(
                AuditEntry.record_type == "finding", AuditEntry.record_id == finding.id
            )
        ).one()
        assert (entry.site_id, entry.trap_id) == (site["id"], trap["id"])
        assert entry.actor_name != "system"
        assert entry.new_values is not None
        assert entry.new_values["condition"] == "leaking"
        assert entry.new_values["tested_at"] == "2026-03-02T09:00:00+00:00"


def test_each_import_raises_the_site_revision(api: TestClient, store: Database) -> None:
    site = make_site(api)
    make_trap(api, site, tag="HP-01", **TRAP)
    survey = make_survey(api, site)

    def revision() -> int:
        with store.reading() as session:
            return session.get_one(Site, site["id"]).revision

    imports = [
        (
            f"/api/v1/sites/{site['id']}/imports/register",
            "tag,"
            + ",".join(TRAP)
            + "\nNEW-1,"
            + ",".join(str(value) for value in TRAP.values())
            + "\n",
        ),
        (
            f"/api/v1/surveys/{survey['id']}/imports/findings",
            "tag,tested_at,method,condition\nHP-01,2026-03-02T09:00:00Z,ultrasonic,working\n",
        ),
        (
            f"/api/v1/sites/{site['id']}/imports/repairs",
            "tag,repaired_on,kind\nHP-01,2026-03-05,repaired\n",
        ),
    ]
    for path, content in imports:
        before = revision()
        _import(api, path, content)
        assert revision() > before, path


def test_an_import_raises_the_collectors_threshold_only_while_it_runs() -> None:
    import gc

    from service.store.collection import YOUNG_OBJECTS_DURING_IMPORT, fewer_collections

    before = gc.get_threshold()
    with fewer_collections():
        with fewer_collections():  # two imports at once in one process
            assert gc.get_threshold()[0] == YOUNG_OBJECTS_DURING_IMPORT
        assert gc.get_threshold()[0] == YOUNG_OBJECTS_DURING_IMPORT
    assert gc.get_threshold() == before
