"""Eight technicians, each signed in on their own tablet, save 200 findings each at the
same moment on SQLite; one save in ten is sent twice with its idempotency key, as a tablet
does after a dropped answer. Every distinct finding must be stored exactly once, no
request may fail, and SQLite's own integrity check must pass afterwards."""

import datetime as dt
import threading
from typing import Any

from fastapi.testclient import TestClient
from sqlalchemy import func, select, text

from service.store.database import Database
from service.store.models import AuditEntry, Finding, Role
from service.web.app import create_app
from tests.conftest import emptied
from tests.factories import (
    bearer,
    browser_session,
    finding_fields,
    make_site,
    make_survey,
    make_trap,
    make_user,
)

TECHNICIANS = 8
FINDINGS_EACH = 200
TRAPS = 40
FIRST_TEST = dt.datetime(2026, 3, 2, 7, 0, tzinfo=dt.UTC)


def test_eight_signed_in_technicians_store_every_finding_once(sqlite_database: Database) -> None:
    app = create_app(emptied(sqlite_database))
    with TestClient(
        app, headers=bearer(sqlite_database, make_user(sqlite_database, "admin", Role.ADMIN))
    ) as admin:
        site = make_site(admin)
        traps = [make_trap(admin, site, tag=f"C-{number:03d}") for number in range(TRAPS)]
        survey = make_survey(admin, site)
    path = f"/api/v1/surveys/{survey['id']}/findings"
    answers: list[int] = []
    lock = threading.Lock()
    start = threading.Barrier(TECHNICIANS)

    def walk(number: int) -> None:
        user = make_user(sqlite_database, f"tech-{number}", Role.TECHNICIAN, [site["id"]])
        secret, csrf = browser_session(sqlite_database, user)
        with TestClient(app) as tablet:
            tablet.cookies.set("traptally_session", secret)
            start.wait()
            for index in range(FINDINGS_EACH):
                trap = traps[(number * FINDINGS_EACH + index) % TRAPS]
                tested_at = FIRST_TEST + dt.timedelta(minutes=number * FINDINGS_EACH + index)
                body: dict[str, Any] = finding_fields(
                    trap,
                    tested_at=tested_at.isoformat(),
                    condition="leaking" if index % 3 else "working",
                )
                headers = {
                    "X-CSRF-Token": csrf,
                    "Idempotency-Key": f"tech-{number}-finding-{index}",
                }
                for _ in range(2 if index % 10 == 0 else 1):
                    status = tablet.post(path, json=body, headers=headers).status_code
                    with lock:
                        answers.append(status)

    threads = [threading.Thread(target=walk, args=(number,)) for number in range(TECHNICIANS)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join()

    retries = TECHNICIANS * FINDINGS_EACH // 10
    assert len(answers) == TECHNICIANS * FINDINGS_EACH + retries
    assert set(answers) == {201}
    with sqlite_database.reading() as session:
        assert session.scalar(select(func.count()).select_from(Finding)) == 1600
        assert session.scalar(select(func.count(func.distinct(Finding.idempotency_key)))) == 1600
        assert (
            session.scalar(
                select(func.count())
                .select_from(AuditEntry)
                .where(AuditEntry.record_type == "finding", AuditEntry.actor_name.like("tech-%"))
            )
            == 1600
        )
        assert session.execute(text("PRAGMA integrity_check")).scalar() == "ok"
        assert session.execute(text("PRAGMA foreign_key_check")).all() == []
