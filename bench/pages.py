"""The summary page against the summary API for the same site; what a tablet downloads."""

import time
from pathlib import Path

from fastapi.testclient import TestClient
from sqlalchemy import select

from bench.common import bearer_for, fresh_sqlite, heading
from bench.scale import build_site
from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role, Site, Survey, Trap
from service.web.app import create_app


def _best_seconds(client: TestClient, path: str, repeats: int = 3) -> tuple[float, int]:
    best, size = float("inf"), 0
    for _ in range(repeats):
        start = time.perf_counter()
        answer = client.get(path)
        best = min(best, time.perf_counter() - start)
        assert answer.status_code == 200, (path, answer.status_code)
        size = len(answer.content)
    return best, size


def run(tmp: Path) -> None:
    heading("pages: the summary page against the summary API, 20,000 traps (in process)")
    url = fresh_sqlite(tmp / "pages.db")
    database = Database.at(url)
    with database.writing() as session:
        load_demo(session=session)  # only into an empty database: before the large site
    build_site(database, "Generated 20000", 20_000)
    with database.reading() as session:
        big = session.scalar(select(Site.id).where(Site.name == "Generated 20000"))
        first = session.scalar(
            select(Survey.id).where(Survey.site_id == big).order_by(Survey.started_on)
        )
        demo = session.scalar(select(Site.id).where(Site.name == "Wrenfield Board Mill"))
        survey = session.scalar(select(Survey.id).where(Survey.site_id == demo))
        trap = session.scalar(select(Trap.id).where(Trap.site_id == demo).order_by(Trap.id))
    headers = bearer_for(url, "bench-admin", Role.ADMIN)
    with TestClient(create_app(database), headers=headers) as client:
        api_seconds, api_bytes = _best_seconds(client, f"/api/v1/sites/{big}/summary")
        cold_seconds, _ = _best_seconds(client, f"/sites/{big}/summary", repeats=1)
        page_seconds, page_bytes = _best_seconds(client, f"/sites/{big}/summary")
        alone_seconds, _ = _best_seconds(client, f"/sites/{big}/summary?survey_id={first}")
        alone_api, _ = _best_seconds(client, f"/api/v1/sites/{big}/summary?survey_id={first}")
        report_seconds, report_bytes = _best_seconds(client, f"/sites/{big}/report", 1)
        print(f"summary API  : {api_seconds:6.3f} s, {api_bytes / 1e6:5.2f} MB of JSON")
        print(
            f"summary page : {page_seconds:6.3f} s, {page_bytes / 1e6:5.2f} MB of HTML "
            "(with the comparison to the survey before)"
        )
        print(
            f"page / API   : {page_seconds / api_seconds:6.2f} x (the survey before kept from the "
            f"first view; that first view {cold_seconds:6.3f} s, "
            f"{cold_seconds / api_seconds:4.2f} x)"
        )
        print(
            f"first survey, no survey before to compare: page {alone_seconds:6.3f} s, "
            f"API {alone_api:6.3f} s, page / API {alone_seconds / alone_api:4.2f} x"
        )
        print(f"print report : {report_seconds:6.3f} s, {report_bytes / 1e6:5.2f} MB (every row)")
        heading("pages: bytes a tablet downloads for the survey walk (demo, before compression)")
        css = len(client.get("/static/traptally.css").content)
        script = len(client.get("/static/walk.js").content)
        form_html = len(client.get(f"/surveys/{survey}/walk/traps/{trap}").content)
        route_html = len(client.get(f"/surveys/{survey}/walk").content)
        print(
            f"finding form : {form_html:7d} B HTML + {css} B CSS + {script} B JS = "
            f"{(form_html + css + script) / 1024:5.1f} KB"
        )
        route_kb = (route_html + css) / 1024
        print(f"route page   : {route_html:7d} B HTML + {css} B CSS = {route_kb:5.1f} KB")
    database.dispose()
