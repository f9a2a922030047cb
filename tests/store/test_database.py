"""The schema comes from the migrations, and SQLite is configured for concurrent use."""

from pathlib import Path

import pytest
from alembic import command
from alembic.autogenerate import compare_metadata
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.util.exc import CommandError
from sqlalchemy import text

from service.store.database import Database
from service.store.models import Base
from service.store.register import create_site
from service.store.schemas import SiteCreate


def test_migrations_build_exactly_the_models_schema(store: Database) -> None:
    with store.engine.connect() as connection:
        differences = compare_metadata(
            MigrationContext.configure(connection, opts={"compare_type": True}), Base.metadata
        )
    assert differences == []
    assert store.schema_is_current()


def test_an_empty_database_is_not_current_until_upgraded(tmp_path: object) -> None:
    database = Database.at(f"sqlite:///{tmp_path}/empty.db")
    assert database.schema_revision() is None
    assert not database.schema_is_current()
    database.upgrade()
    assert database.schema_is_current()
    database.dispose()


def test_sqlite_connections_use_wal_foreign_keys_and_a_busy_timeout(
    sqlite_database: Database,
) -> None:
    with sqlite_database.reading() as session:
        assert session.execute(text("PRAGMA journal_mode")).scalar() == "wal"
        assert session.execute(text("PRAGMA foreign_keys")).scalar() == 1
        assert session.execute(text("PRAGMA busy_timeout")).scalar() == 30_000


def _add_a_site_then_fail(store: Database) -> None:
    with store.writing() as session:
        create_site(session=session, data=SiteCreate(name="Half", steam_cost_per_tonne=1.0))
        raise RuntimeError("the request failed after the site was added")


def test_a_failed_write_leaves_nothing_behind(store: Database) -> None:
    with pytest.raises(RuntimeError, match="failed after"):
        _add_a_site_then_fail(store)
    with store.reading() as session:
        assert session.execute(text("SELECT count(*) FROM sites")).scalar() == 0


def test_alembics_own_command_line_finds_the_models_and_migrations_agree(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # What DEVELOPERS.md documents: alembic.ini at the top, the database the program would
    # open. `alembic check` runs autogenerate and fails on any difference, or on a
    # database not at head.
    url = f"sqlite:///{tmp_path / 'at-head.db'}"
    Database.at(url).upgrade()
    monkeypatch.setenv("TRAPTALLY_DATABASE_URL", url)
    config = Config(str(Path(__file__).resolve().parents[2] / "alembic.ini"))
    command.check(config)
    empty = f"sqlite:///{tmp_path / 'empty.db'}"
    monkeypatch.setenv("TRAPTALLY_DATABASE_URL", empty)
    with pytest.raises(CommandError, match="not up to date"):
        command.check(config)
