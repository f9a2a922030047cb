"""What an operator relies on: compressed answers whose CSRF tokens stay secret, static
files cached by fingerprint, a JSON request log with ids and no secrets, and backups."""

import json
import logging
import logging.config
import re
import sqlite3
from pathlib import Path
from typing import Any

import pytest
from fastapi.testclient import TestClient

from service import cli
from service.logs import LOG_CONFIG, REQUESTS
from service.store.database import Database
from service.store.models import Role
from service.web.static import fingerprint
from tests.factories import PASSWORD, browser_session, make_site, make_user


def _csrf_in(page: str) -> str:
    found = re.search(r'name="csrf_token" value="([^"]+)"', page)
    assert found is not None
    return found.group(1)


def test_pages_are_compressed_for_a_client_that_takes_gzip(api: TestClient) -> None:
    plain = api.get("/calculator", headers={"Accept-Encoding": "identity"})
    packed = api.get("/calculator", headers={"Accept-Encoding": "gzip"})
    assert "content-encoding" not in plain.headers
    assert packed.headers["content-encoding"] == "gzip"
    assert packed.text == plain.text  # decoded by the client
    assert int(packed.headers["content-length"]) < len(plain.content) / 2


def test_each_page_masks_the_csrf_token_afresh_and_every_mask_is_accepted(
    store: Database, api: TestClient
) -> None:
    # BREACH (Gluck, Harris and Prado, Black Hat USA 2013): a secret repeated in every
    # compressed page can be guessed from the pages' sizes; a fresh mask each time stops it.
    site = make_site(api)
    manager = make_user(store, "masked", Role.MANAGER, site_ids=[site["id"]])
    secret, raw = browser_session(store, manager)
    with TestClient(api.app) as browser:
        browser.cookies.set("traptally_session", secret)
        first = _csrf_in(browser.get(f"/sites/{site['id']}").text)
        second = _csrf_in(browser.get(f"/sites/{site['id']}").text)
        assert len({first, second, raw}) == 3
        for token, name in ((first, "Round one"), (second, "Round two"), (raw, "Round three")):
            added = browser.post(
                f"/sites/{site['id']}/surveys",
                data={"csrf_token": token, "name": name, "started_on": "2026-11-02"},
                follow_redirects=False,
            )
            assert added.status_code == 303, name
        forged = browser.post(
            f"/sites/{site['id']}/surveys",
            data={"csrf_token": first[:-4] + "AAAA", "name": "Forged", "started_on": "2026-11-02"},
        )
        assert forged.status_code == 403


def test_static_files_are_kept_a_year_by_fingerprint_and_asked_again_otherwise(
    api: TestClient,
) -> None:
    make_site(api)
    page = api.get("/").text
    link = f"/static/traptally.css?v={fingerprint('traptally.css')}"
    assert link in page
    kept = api.get(link)
    assert kept.headers["cache-control"] == "public, max-age=31536000, immutable"
    unversioned = api.get("/static/traptally.css")
    assert unversioned.headers["cache-control"] == "no-cache"
    again = api.get("/static/traptally.css", headers={"If-None-Match": unversioned.headers["etag"]})
    assert again.status_code == 304


def _request_lines(caplog: pytest.LogCaptureFixture) -> list[logging.LogRecord]:
    return [record for record in caplog.records if record.name == REQUESTS]


def test_each_request_is_logged_with_its_id_and_no_secrets(
    store: Database, api: TestClient, caplog: pytest.LogCaptureFixture
) -> None:
    make_user(store, "logged", Role.TECHNICIAN)
    with caplog.at_level(logging.INFO, logger=REQUESTS), TestClient(api.app) as browser:
        form = browser.get("/sign-in").text
        signed_in = browser.post(
            "/sign-in",
            data={"name": "logged", "password": PASSWORD, "csrf_token": _csrf_in(form)},
            follow_redirects=False,
        )
        assert signed_in.status_code == 303
        asked = browser.get(
            "/calculator?token=tt_secret_in_a_query", headers={"X-Request-ID": "ticket-4711"}
        )
        odd = browser.get("/calculator", headers={"X-Request-ID": "no spaces <allowed>"})
    lines = _request_lines(caplog)
    assert [(line.method, line.path, line.status) for line in lines] == [  # type: ignore[attr-defined]
        ("GET", "/sign-in", 200),
        ("POST", "/sign-in", 303),
        ("GET", "/calculator", 200),
        ("GET", "/calculator", 200),
    ]
    assert asked.headers["x-request-id"] == "ticket-4711"
    assert lines[2].request_id == "ticket-4711"  # type: ignore[attr-defined]
    assert re.fullmatch(r"[0-9a-f]{32}", odd.headers["x-request-id"])
    assert lines[2].user_id is not None  # type: ignore[attr-defined]
    everything = caplog.text + " ".join(json.dumps(vars(line), default=str) for line in lines)
    for secret in (PASSWORD, "tt_secret_in_a_query", signed_in.cookies.get("traptally_session")):
        assert secret
        assert secret not in everything


def test_an_unexpected_error_is_logged_with_the_id_the_answer_carries(
    caplog: pytest.LogCaptureFixture,
) -> None:
    from service.web.app import create_app

    app = create_app()

    @app.get("/api/v1/boom")
    def boom() -> None:
        raise RuntimeError("a fault of the program")

    client = TestClient(app, raise_server_exceptions=False)
    with caplog.at_level(logging.INFO, logger="traptally"):
        answer = client.get("/api/v1/boom", headers={"X-Request-ID": "boom-0001"})
    assert answer.status_code == 500
    assert answer.headers["x-request-id"] == "boom-0001"
    errors = [record for record in caplog.records if record.levelno == logging.ERROR]
    assert [record.request_id for record in errors] == ["boom-0001"]  # type: ignore[attr-defined]
    assert [line.status for line in _request_lines(caplog)] == [500]  # type: ignore[attr-defined]


def test_the_log_is_one_json_object_a_line(capsys: pytest.CaptureFixture[str]) -> None:
    loggers = [logging.getLogger(name) for name in LOG_CONFIG["loggers"]]
    kept: list[dict[str, Any]] = [
        {**vars(logger), "handlers": logger.handlers[:]} for logger in loggers
    ]
    try:
        logging.config.dictConfig(LOG_CONFIG)
        logging.getLogger(REQUESTS).info(
            "request", extra={"request_id": "abc12345", "status": 200, "path": "/"}
        )
    finally:  # give pytest its loggers back
        for logger, state in zip(loggers, kept, strict=True):
            vars(logger).update(state)
    line = json.loads(capsys.readouterr().err.strip().splitlines()[-1])
    assert line["message"] == "request"
    assert (line["level"], line["logger"], line["request_id"], line["status"]) == (
        "INFO",
        REQUESTS,
        "abc12345",
        200,
    )


def test_db_backup_copies_a_sqlite_file_while_it_is_open(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    url = f"sqlite:///{tmp_path / 'live.db'}"
    live = Database.at(url)
    live.upgrade()
    with live.writing() as session:
        from service.store.demo import load_demo

        load_demo(session=session)
    with live.reading():  # a reader holds the database open while the copy is made
        assert cli.main(["db", "backup", str(tmp_path / "copy.db"), "--database-url", url]) == 0
    assert "backed up to" in capsys.readouterr().out
    with sqlite3.connect(tmp_path / "copy.db") as copy:
        assert copy.execute("SELECT count(*) FROM traps").fetchone() == (204,)
        assert copy.execute("PRAGMA integrity_check").fetchone() == ("ok",)
    live.dispose()


@pytest.mark.postgres
def test_db_backup_dumps_postgresql_for_pg_restore(
    postgresql_database: Database, tmp_path: Path
) -> None:
    url = postgresql_database.engine.url.render_as_string(hide_password=False)
    dump = tmp_path / "traptally.dump"
    assert cli.main(["db", "backup", str(dump), "--database-url", url]) == 0
    assert dump.read_bytes().startswith(b"PGDMP")  # pg_dump's custom format


def test_db_backup_says_why_it_cannot(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(["db", "backup", str(tmp_path / "x.db"), "--database-url", "sqlite://"]) == 1
    assert "in-memory" in capsys.readouterr().err


def test_ready_when_the_database_answers_and_its_schema_is_current(api: TestClient) -> None:
    answer = TestClient(api.app).get("/api/v1/health/ready")  # no sign-in: a load balancer
    assert (answer.status_code, answer.json()) == (200, {"status": "ready", "database": "ok"})


@pytest.mark.parametrize(
    ("where", "state"),
    [("missing-folder/traptally.db", "unreachable"), ("not-upgraded.db", "schema not current")],
)
def test_not_ready_says_which_and_answers_503(tmp_path: Path, where: str, state: str) -> None:
    from service.web.app import create_app

    with TestClient(create_app(Database.at(f"sqlite:///{tmp_path / where}"))) as client:
        answer = client.get("/api/v1/health/ready")
        assert answer.status_code == 503
        assert answer.json() == {"status": "not ready", "database": state}
        assert client.get("/api/v1/health").status_code == 200  # alive all the same
