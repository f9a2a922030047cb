"""The reliability page and API for a generated site of 20,000 traps and five yearly
rounds: cold (a new app, its roll-up cache empty) and warm, and the calculation alone,
timed in this one process (one core)."""

import datetime as dt
import time
from pathlib import Path

from fastapi.testclient import TestClient

from bench.common import bearer_for, heading
from bench.scale import build_site
from service.reports.reliability import site_reliability
from service.reports.summary import site_summary
from service.store import surveys
from service.store.database import Database
from service.store.models import Role, Site
from service.web.app import create_app

TRAPS = 20_000
YEARS = (2022, 2023, 2024, 2025, 2026)


def run(tmp: Path) -> None:
    heading(f"reliability: {TRAPS:,} traps x {len(YEARS)} rounds (generated), one process")
    path = tmp / "bench-reliability.db"
    path.unlink(missing_ok=True)
    database = Database.at(f"sqlite:///{path}")
    database.upgrade()
    started = time.perf_counter()
    site_id = build_site(database, "Reliability Works", TRAPS, years=YEARS)
    print(f"built in           : {time.perf_counter() - started:9.1f} s")
    with database.reading() as session:
        site = session.get_one(Site, site_id)
        latest = site_summary(
            session=session, site=site, survey=surveys.latest_survey(session=session, site=site)
        )
        timings = []
        for _ in range(3):
            start = time.perf_counter()
            found = site_reliability(
                session=session, site=site, latest=latest, next_round_on=dt.date(2027, 3, 1)
            )
            timings.append(time.perf_counter() - start)
    print(f"lives, failures    : {found.lives:,}, {found.failures:,}")
    print(f"calculation alone  : min {min(timings):.2f} s, max {max(timings):.2f} s")
    headers = bearer_for(f"sqlite:///{path}", "bench-reliability", Role.ADMIN)
    client = TestClient(create_app(database), headers=headers)
    for label in ("page, cold cache", "page, warm cache"):
        start = time.perf_counter()
        answer = client.get(f"/sites/{site_id}/reliability")
        print(f"{label:19s}: {time.perf_counter() - start:9.2f} s ({answer.status_code})")
    start = time.perf_counter()
    answer = client.get(f"/api/v1/sites/{site_id}/reliability")
    print(f"API, warm cache    : {time.perf_counter() - start:9.2f} s ({answer.status_code})")
    database.dispose()
