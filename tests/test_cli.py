"""The `traptally` command line."""

from typing import Any

import pytest

from service import cli
from service.settings import DATABASE_URL_VARIABLE, DEFAULT_DATABASE_URL, Settings


def test_serve_starts_uvicorn_on_the_given_address(monkeypatch: pytest.MonkeyPatch) -> None:
    calls: list[dict[str, Any]] = []
    monkeypatch.setattr(cli.uvicorn, "run", lambda app, **options: calls.append(options))
    assert cli.main(["serve", "--host", "0.0.0.0", "--port", "8123"]) == 0
    assert calls == [{"host": "0.0.0.0", "port": 8123}]


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
