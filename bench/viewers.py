"""A bearer token's viewer kept a few seconds against read on every request, side by side:
the median of 500 kept-alive GETs of one site (in process, the demo mill)."""

import statistics
import time
from pathlib import Path

from fastapi.testclient import TestClient

from bench.common import bearer_for, fresh_sqlite, heading
from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role
from service.web.access import Viewer
from service.web.app import create_app
from service.web.viewer_cache import ViewerCache

REQUESTS = 500


def run(tmp: Path) -> None:
    heading(f"viewers: a token's viewer kept or read afresh, {REQUESTS} requests each, three times")
    url = fresh_sqlite(tmp / "viewers.db")
    database = Database.at(url)
    with database.writing() as session:
        load_demo(session=session)
    app = create_app(database)
    with TestClient(app, headers=bearer_for(url, "bench", Role.ADMIN)) as client:
        for _ in range(REQUESTS):  # warm: imports, pools, caches of the pages
            client.get("/api/v1/sites/1")
        for label, seconds in [("kept", 5.0), ("read", -1.0)] * 3:
            app.state.viewers = ViewerCache[Viewer](database.access_changes, seconds=seconds)
            times = []
            for _ in range(REQUESTS):
                start = time.perf_counter()
                client.get("/api/v1/sites/1")
                times.append((time.perf_counter() - start) * 1000)
            print(f"viewer {label}: median {statistics.median(times):.2f} ms a request")
    database.dispose()
