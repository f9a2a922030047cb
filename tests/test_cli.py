"""The `traptally` command line."""

from pathlib import Path
from typing import Any

import pytest
from sqlalchemy import text

from service import cli
from service.settings import DATABASE_URL_VARIABLE, DEFAULT_DATABASE_URL, Settings
from service.store.database import Database


@pytest.fixture
def served(monkeypatch: pytest.MonkeyPatch) -> list[dict[str, Any]]:
    calls: list[dict[str, Any]] = []
    monkeypatch.setattr(cli.uvicorn, "run", lambda app, **options: calls.append(options))
    return calls


def test_serve_upgrades_a_sqlite_file_and_starts_uvicorn(
    served: list[dict[str, Any]], tmp_path: Path
) -> None:
    url = f"sqlite:///{tmp_path / 'new.db'}"
    assert cli.main(["serve", "--host", "0.0.0.0", "--port", "8123", "--database-url", url]) == 0
    assert served == [{"host": "0.0.0.0", "port": 8123}]
    assert Database.at(url).schema_is_current()


def test_serve_demo_loads_the_demo_plant_once(
    served: list[dict[str, Any]], tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    url = f"sqlite:///{tmp_path / 'demo.db'}"
    assert cli.main(["serve", "--demo", "--database-url", url]) == 0
    assert "Wrenfield Board Mill" in capsys.readouterr().out
    assert cli.main(["serve", "--demo", "--database-url", url]) == 0
    assert "demo data not loaded" in capsys.readouterr().out
    with Database.at(url).reading() as session:
        assert session.execute(text("SELECT count(*) FROM sites")).scalar() == 1
        assert session.execute(text("SELECT count(*) FROM traps")).scalar() == 204


def test_serve_refuses_a_server_database_that_is_out_of_date(
    served: list[dict[str, Any]],
    monkeypatch: pytest.MonkeyPatch,
    capsys: pytest.CaptureFixture[str],
) -> None:
    monkeypatch.setattr(Database, "is_sqlite", property(lambda self: False))
    monkeypatch.setattr(Database, "schema_revision", lambda self: None)
    assert cli.main(["serve", "--database-url", "sqlite://"]) == 2
    assert "run `traptally db upgrade` first" in capsys.readouterr().out
    assert served == []


def test_db_upgrade_and_current(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    url = f"sqlite:///{tmp_path / 'up.db'}"
    assert cli.main(["db", "current", "--database-url", url]) == 0
    assert "migration None" in capsys.readouterr().out
    assert cli.main(["db", "upgrade", "--database-url", url]) == 0
    latest = Database.at(url).latest_revision()
    assert f"migration {latest}" in capsys.readouterr().out


def test_database_url_comes_from_flag_then_environment_then_default(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    monkeypatch.delenv(DATABASE_URL_VARIABLE, raising=False)
    assert Settings.from_environment().database_url == DEFAULT_DATABASE_URL
    monkeypatch.setenv(DATABASE_URL_VARIABLE, "sqlite:///from-env.db")
    assert Settings.from_environment().database_url == "sqlite:///from-env.db"
    assert Settings.from_environment("sqlite:///flag.db").database_url == "sqlite:///flag.db"


def test_unknown_command_exits_with_usage(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit):
        cli.main(["dance"])
    assert "usage: traptally" in capsys.readouterr().err
