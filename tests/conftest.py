"""Shared fixtures: real databases (a SQLite file, and PostgreSQL where there is one),
each migrated once per test session and emptied before every test that uses it."""

import os
import uuid
from collections.abc import Iterator
from pathlib import Path

import pytest
from fastapi.testclient import TestClient
from sqlalchemy import create_engine, make_url

from service.store.database import Database
from service.store.models import Base, Role
from service.web.app import create_app
from tests.factories import bearer, make_user

POSTGRES_VARIABLE = "TRAPTALLY_TEST_POSTGRES_URL"


@pytest.fixture(scope="session")
def sqlite_database(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Database]:
    path: Path = tmp_path_factory.mktemp("store") / "traptally-test.db"
    database = Database.at(f"sqlite:///{path}")
    database.upgrade()
    yield database
    database.dispose()


def new_postgresql_database(server_url: str) -> Database:
    """A new, migrated database of its own on the PostgreSQL server at `server_url`."""
    name = f"traptally_test_{uuid.uuid4().hex[:12]}"
    server = create_engine(server_url, isolation_level="AUTOCOMMIT")
    with server.connect() as connection:
        connection.exec_driver_sql(f"CREATE DATABASE {name}")
    server.dispose()
    url = make_url(server_url).set(database=name).render_as_string(hide_password=False)
    database = Database.at(url)
    database.upgrade()
    return database


def drop_postgresql_database(server_url: str, database: Database) -> None:
    database.dispose()
    server = create_engine(server_url, isolation_level="AUTOCOMMIT")
    with server.connect() as connection:
        connection.exec_driver_sql(f"DROP DATABASE {database.engine.url.database} WITH (FORCE)")
    server.dispose()


def postgresql_server_url() -> str:
    """The test server's URL; without one, a failure in CI and a skip elsewhere."""
    server_url = os.environ.get(POSTGRES_VARIABLE)
    if not server_url:
        if os.environ.get("CI"):
            pytest.fail(f"PostgreSQL is required in CI: .ci/run sets {POSTGRES_VARIABLE}")
        pytest.skip(f"no PostgreSQL here: set {POSTGRES_VARIABLE} to run these tests on it")
    return server_url


@pytest.fixture(scope="session")
def postgresql_database() -> Iterator[Database]:
    server_url = postgresql_server_url()
    database = new_postgresql_database(server_url)
    yield database
    drop_postgresql_database(server_url, database)


def emptied(database: Database) -> Database:
    with database.writing() as session:
        for table in reversed(Base.metadata.sorted_tables):
            session.execute(table.delete())
    return database


# Tests by the kind of run they need, so the everyday command can leave the long ones out
# (`make check`) and CI runs them all (`make test`). Markers are declared in pyproject.toml.
MARKERS_BY_PATH = {
    "tests/browser/": "browser",
    "tests/web/test_concurrency.py": "load",
    "tests/web/test_access.py": "slow",  # the whole role x route table: 410 requests
    "tests/web/test_api_fuzz.py": "slow",
    "tests/web/test_form_fuzz.py": "slow",
}


def pytest_collection_modifyitems(items: list[pytest.Item]) -> None:
    for item in items:
        path = item.path.as_posix()
        for part, marker in MARKERS_BY_PATH.items():
            if part in path:
                item.add_marker(marker)


@pytest.fixture(params=["sqlite", pytest.param("postgresql", marks=pytest.mark.postgres)])
def store(request: pytest.FixtureRequest) -> Database:
    """An empty, migrated database: each test that takes it runs on both backends."""
    return emptied(request.getfixturevalue(f"{request.param}_database"))


@pytest.fixture
def api(store: Database) -> Iterator[TestClient]:
    """A client signed in as an admin by a bearer token: it may do anything."""
    headers = bearer(store, make_user(store, "test-admin", Role.ADMIN))
    with TestClient(create_app(store), headers=headers) as test_client:
        yield test_client


@pytest.fixture
def client(sqlite_database: Database) -> Iterator[TestClient]:
    """A signed-in client for the endpoints that store nothing (steam properties,
    calculations)."""
    headers = bearer(emptied(sqlite_database), make_user(sqlite_database, "calc", Role.TECHNICIAN))
    with TestClient(create_app(sqlite_database), headers=headers) as test_client:
        yield test_client
