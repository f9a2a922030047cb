"""schemathesis against the app's own OpenAPI schema, in process, on the demo plant in a
SQLite file: whatever a generated request holds, the answer is never a server error."""

import tempfile
from pathlib import Path
from typing import Any

import schemathesis
from hypothesis import HealthCheck, settings

from service.store.database import Database
from service.store.demo import load_demo
from service.web.app import create_app


def _demo_app() -> Any:
    # schemathesis parametrizes at import, so the demo database is made here, once.
    folder = Path(tempfile.mkdtemp(prefix="traptally-fuzz-"))
    database = Database.at(f"sqlite:///{folder / 'fuzz.db'}")
    database.upgrade()
    with database.writing() as session:
        load_demo(session=session)
    return create_app(database)


schema = schemathesis.openapi.from_asgi("/openapi.json", _demo_app())


@schema.parametrize()
@settings(max_examples=15, deadline=None, suppress_health_check=list(HealthCheck))
def test_no_request_makes_a_server_error(case: Any) -> None:
    response = case.call()
    assert response.status_code < 500, (case.method, case.formatted_path, response.text[:300])
