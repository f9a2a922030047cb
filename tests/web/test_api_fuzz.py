"""schemathesis against the app's own OpenAPI schema, in process, on the demo plant, signed
in as an admin (who may reach every operation): whatever a generated request holds, the
answer is never a server error, its status is one the schema documents, and its body and
content type match the schema. On a SQLite file and on PostgreSQL."""

import os
import tempfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
import schemathesis
from hypothesis import HealthCheck, settings
from schemathesis.checks import not_a_server_error
from schemathesis.specs.openapi.checks import (
    content_type_conformance,
    response_schema_conformance,
    status_code_conformance,
)

from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role
from service.web.app import create_app
from tests.conftest import (
    POSTGRES_VARIABLE,
    drop_postgresql_database,
    new_postgresql_database,
    postgresql_server_url,
)
from tests.factories import bearer, make_user

CHECKS = [
    not_a_server_error,
    status_code_conformance,
    content_type_conformance,
    response_schema_conformance,
]
EXAMPLES = int(os.environ.get("TRAPTALLY_FUZZ_EXAMPLES", "8"))  # more: a deeper search


def _demo(database: Database) -> tuple[Any, dict[str, str]]:
    with database.writing() as session:
        load_demo(session=session)
    return create_app(database), bearer(database, make_user(database, "fuzz", Role.ADMIN))


def _sqlite_demo() -> tuple[Any, dict[str, str]]:
    # schemathesis parametrizes at import, so the demo database is made here, once.
    folder = Path(tempfile.mkdtemp(prefix="traptally-fuzz-"))
    database = Database.at(f"sqlite:///{folder / 'fuzz.db'}")
    database.upgrade()
    return _demo(database)


SQLITE_APP, SQLITE_HEADERS = _sqlite_demo()
sqlite_schema = schemathesis.openapi.from_asgi("/openapi.json", SQLITE_APP)


def _check(case: Any, headers: dict[str, str]) -> None:
    case.call_and_validate(headers=headers, checks=CHECKS)


@sqlite_schema.parametrize()
@settings(max_examples=EXAMPLES, deadline=None, suppress_health_check=list(HealthCheck))
def test_every_operation_on_sqlite_keeps_to_its_schema(case: Any) -> None:
    _check(case, SQLITE_HEADERS)


# schemathesis parametrizes at import: the PostgreSQL database is made here too, when the
# server is named, and dropped when the module's tests are done.
POSTGRES_URL = os.environ.get(POSTGRES_VARIABLE)
POSTGRES_DATABASE = new_postgresql_database(POSTGRES_URL) if POSTGRES_URL else None


@pytest.fixture(scope="module", autouse=True)
def _drop_the_postgresql_database() -> Iterator[None]:
    yield
    if POSTGRES_URL and POSTGRES_DATABASE:
        drop_postgresql_database(POSTGRES_URL, POSTGRES_DATABASE)


if POSTGRES_DATABASE is not None:
    POSTGRES_APP, POSTGRES_HEADERS = _demo(POSTGRES_DATABASE)
    postgresql_schema = schemathesis.openapi.from_asgi("/openapi.json", POSTGRES_APP)

    @postgresql_schema.parametrize()
    @settings(max_examples=EXAMPLES, deadline=None, suppress_health_check=list(HealthCheck))
    def test_every_operation_on_postgresql_keeps_to_its_schema(case: Any) -> None:
        _check(case, POSTGRES_HEADERS)

else:

    def test_every_operation_on_postgresql_keeps_to_its_schema() -> None:
        postgresql_server_url()  # fails in CI, skips elsewhere
