"""The `traptally` command line."""

import getpass
import hashlib
import io
import json
import os
import socket
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

import httpx
import pytest
from sqlalchemy import text

from service import cli
from service.logs import LOG_CONFIG
from service.settings import DATABASE_URL_VARIABLE, DEFAULT_DATABASE_URL, Settings
from service.store.database import Database


@pytest.fixture
def served(monkeypatch: pytest.MonkeyPatch) -> list[dict[str, Any]]:
    calls: list[dict[str, Any]] = []
    monkeypatch.setattr("uvicorn.run", lambda app, **options: calls.append(options))
    return calls


def test_serve_upgrades_a_sqlite_file_and_starts_uvicorn(
    served: list[dict[str, Any]], tmp_path: Path
) -> None:
    url = f"sqlite:///{tmp_path / 'new.db'}"
    assert cli.main(["serve", "--host", "0.0.0.0", "--port", "8123", "--database-url", url]) == 0
    assert served == [
        {"host": "0.0.0.0", "port": 8123, "log_config": LOG_CONFIG, "access_log": False}
    ]
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


def test_users_and_tokens_from_the_command_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    url = f"sqlite:///{tmp_path / 'people.db'}"
    assert cli.main(["db", "upgrade", "--database-url", url]) == 0
    monkeypatch.setattr("sys.stdin", io.StringIO("password\n"))
    add = ["user", "add", "maria", "--role", "manager", "--password-stdin", "--database-url", url]
    assert cli.main(add) == 1
    assert "common passwords" in capsys.readouterr().err
    monkeypatch.setattr("sys.stdin", io.StringIO("four trap tags\n"))
    assert cli.main(add) == 0
    assert cli.main(["token", "create", "--user", "maria", "--database-url", url]) == 0
    secret = capsys.readouterr().out.strip().splitlines()[-1]
    assert secret.startswith("tt_")
    with Database.at(url).reading() as session:
        stored = session.execute(text("SELECT secret_sha256 FROM api_tokens")).scalar()
    assert stored == hashlib.sha256(secret.encode()).hexdigest()  # only the digest is kept
    assert cli.main(["token", "list", "--user", "maria", "--database-url", url]) == 0
    assert "live" in capsys.readouterr().out
    assert cli.main(["token", "revoke", "1", "--database-url", url]) == 0
    assert cli.main(["user", "disable", "maria", "--database-url", url]) == 0
    assert cli.main(["user", "list", "--database-url", url]) == 0
    assert "maria\tmanager\tdisabled" in capsys.readouterr().out
    assert cli.main(["user", "disable", "nobody", "--database-url", url]) == 1
    with Database.at(url).reading() as session:
        actors = set(session.execute(text("SELECT actor_name FROM audit_entries")).scalars())
    assert actors == {f"command line ({getpass.getuser()})"}


def test_serve_demo_prints_each_demo_account_once(
    served: list[dict[str, Any]], tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    url = f"sqlite:///{tmp_path / 'demo-people.db'}"
    assert cli.main(["serve", "--demo", "--database-url", url]) == 0
    printed = capsys.readouterr().out
    for role in ("technician", "manager", "admin"):
        assert f"sign in as demo-{role} with password " in printed
    assert cli.main(["serve", "--demo", "--database-url", url]) == 0
    assert "with password" not in capsys.readouterr().out


def test_serve_with_workers_hands_each_the_app_factory_and_the_database(
    served: list[dict[str, Any]], tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.delenv(DATABASE_URL_VARIABLE, raising=False)
    url = f"sqlite:///{tmp_path / 'workers.db'}"
    monkeypatch.setattr(
        "uvicorn.run", lambda app, **options: served.append({"app": app, **options})
    )
    assert cli.main(["serve", "--workers", "3", "--database-url", url]) == 0
    assert served[0]["app"] == cli.APP_FACTORY
    assert (served[0]["factory"], served[0]["workers"]) == (True, 3)
    assert os.environ[DATABASE_URL_VARIABLE] == url


def test_two_worker_processes_serve_and_log_json(tmp_path: Path) -> None:
    # A real server: `traptally serve --workers 2` on a free loopback port.
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        port = probe.getsockname()[1]
    command = [str(Path(sys.executable).parent / "traptally"), "serve", "--workers", "2"]
    command += ["--port", str(port), "--database-url", f"sqlite:///{tmp_path / 'w.db'}"]
    server = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        deadline = time.monotonic() + 30
        answers: list[int] = []
        while time.monotonic() < deadline and len(answers) < 10:
            try:
                answers.append(httpx.get(f"http://127.0.0.1:{port}/api/v1/health").status_code)
            except httpx.TransportError:
                time.sleep(0.2)
        assert answers == [200] * 10
    finally:
        server.terminate()
        _, log = server.communicate(timeout=30)
    lines = [json.loads(line) for line in log.splitlines() if line.startswith("{")]
    requests = [line for line in lines if line.get("message") == "request"]
    assert len(requests) == 10
    assert {line["path"] for line in requests} == {"/api/v1/health"}
