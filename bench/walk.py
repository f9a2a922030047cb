"""The survey walk against the size of the site: the route page, the route page far down,
the "test again" list and one trap's finding form, for sites of 1,000, 10,000 and
100,000 traps (realistic shape), a round in progress with every other trap tested.
In process, signed in with a bearer token; min / median / max of five requests."""

import statistics
import time
from pathlib import Path

from fastapi.testclient import TestClient
from sqlalchemy import select, update

from bench.common import bearer_for, fresh_sqlite, heading
from bench.scale import findings_file, register_file
from service.store import imports, register, surveys
from service.store.database import Database
from service.store.models import Role, Trap
from service.store.schemas import SiteCreate, SurveyCreate
from service.web.app import create_app

SIZES = (1_000, 10_000, 100_000)
REPEATS = 5
CHUNK = 25_000


def _site_in_progress(database: Database, traps: int) -> tuple[int, int, int]:
    """A site of `traps` traps with a round in progress, every other trap tested;
    (site id, survey id, id of the trap halfway along the route)."""
    with database.writing() as session:
        site = register.create_site(
            session=session, data=SiteCreate(name=f"Walk {traps}", steam_cost_per_tonne=30.0)
        )
        lines = register_file(traps, "realistic").decode().splitlines()
        for start in range(1, len(lines), CHUNK):  # an import takes 5 MB at most
            part = "\n".join([lines[0], *lines[start : start + CHUNK]]).encode()
            plan = imports.plan_register(
                session=session, site=site, content=part, create_areas=True
            )
            assert plan.ready, plan.problems[:3]
            imports.apply_register(session=session, site=site, plan=plan)
        survey = surveys.create_survey(
            session=session, site=site, data=SurveyCreate(name="Round", started_on="2026-03-01")
        )
        lines = findings_file(traps, 2026, seed=5).decode().splitlines()
        tested = lines[1::2]
        for start in range(0, len(tested), CHUNK):
            part = "\n".join([lines[0], *tested[start : start + CHUNK]]).encode()
            found = imports.plan_findings(session=session, survey=survey, content=part)
            imports.apply_findings(session=session, survey=survey, plan=found)
        middle = session.scalar(
            select(Trap.id).where(Trap.site_id == site.id, Trap.tag == f"T{traps // 2:06d}")
        )
        assert middle is not None
        return site.id, survey.id, middle


def _figures(client: TestClient, path: str) -> str:
    seconds = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        answer = client.get(path)
        seconds.append((time.perf_counter() - start) * 1000)
        assert answer.status_code == 200, (path, answer.status_code)
    return f"{min(seconds):6.1f} / {statistics.median(seconds):6.1f} / {max(seconds):6.1f} ms"


def run(tmp: Path) -> None:
    heading("walk: the route and the finding form by site size (SQLite, in process)")
    url = fresh_sqlite(tmp / "walk.db")
    database = Database.at(url)
    rounds = {traps: _site_in_progress(database, traps) for traps in SIZES}
    headers = bearer_for(url, "bench-admin", Role.ADMIN)
    with TestClient(create_app(database), headers=headers) as client:
        for traps, (_, survey, middle) in rounds.items():
            _print_walk(client, f"{traps:7,d} traps", survey, middle, traps)
        # The largest site again with every trap out of its area: one area of 100,000.
        site, survey, middle = rounds[SIZES[-1]]
        with database.engine.begin() as connection:
            connection.execute(update(Trap).where(Trap.site_id == site).values(area_id=None))
        _print_walk(client, f"{SIZES[-1]:7,d} traps, no areas", survey, middle, SIZES[-1])
    database.dispose()


def _print_walk(client: TestClient, label: str, survey: int, middle: int, traps: int) -> None:
    walk = f"/surveys/{survey}/walk"
    print(f"{label}, min / median / max:")
    print(f"  route page, first 60      {_figures(client, walk)}")
    print(f"  route page, halfway along {_figures(client, f'{walk}?offset={traps // 2}')}")
    print(f"  test again list           {_figures(client, f'{walk}?retest=true')}")
    print(f"  finding form, halfway     {_figures(client, f'{walk}/traps/{middle}')}")
