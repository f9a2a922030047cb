"""A whole round without a connection: a technician walks 20 traps with the server out
of reach, the session ends meanwhile, and when the connection is back they sign in and
every finding is stored once.

"Out of reach" is the server stopped as well as the browser set offline: Chromium's
offline emulation does not cover a service worker's own fetches (microsoft/playwright
issue 2311), and a stopped server fails them as a basement without Wi-Fi would."""

import threading
import time
from collections.abc import Iterator
from pathlib import Path
from typing import NamedTuple

import httpx
import pytest
import uvicorn
from playwright.sync_api import Browser, BrowserContext, Page, expect
from sqlalchemy import delete

from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role, UserSession
from service.web.app import create_app
from tests.browser.conftest import _free_port, sign_in
from tests.browser.test_flows import TABLET_PORTRAIT
from tests.factories import PASSWORD, bearer, make_user

TRAPS_OFFLINE = 20


class Server:
    """A server on one loopback port that can be stopped and started again."""

    def __init__(self, database: Database) -> None:
        self.database = database
        self.port = _free_port()
        self.base = f"http://127.0.0.1:{self.port}"
        self._server: uvicorn.Server | None = None
        self._thread: threading.Thread | None = None

    def start(self) -> None:
        config = uvicorn.Config(
            create_app(self.database), host="127.0.0.1", port=self.port, log_level="warning"
        )
        self._server = uvicorn.Server(config)
        self._thread = threading.Thread(target=self._server.run, daemon=True)
        self._thread.start()
        deadline = time.monotonic() + 30
        while not self._server.started and time.monotonic() < deadline:
            time.sleep(0.05)
        assert self._server.started, "the test server did not start"

    def stop(self) -> None:
        assert self._server is not None
        assert self._thread is not None
        self._server.should_exit = True
        self._thread.join(timeout=10)


@pytest.fixture
def server(tmp_path: Path) -> Iterator[Server]:
    database = Database.at(f"sqlite:///{tmp_path / 'offline.db'}")
    database.upgrade()
    with database.writing() as session:
        load_demo(session=session)
    running = Server(database)
    running.start()
    yield running
    running.stop()
    database.dispose()


def _waiting(page: Page, count: int) -> None:
    expect(page.locator("#outbox-message")).to_contain_text(f"{count} waiting to send")


class Tablet(NamedTuple):
    page: Page
    context: BrowserContext
    survey_id: int
    headers: dict[str, str]  # a manager's, to read back what the server stored


def _tablet_with_a_round_kept(server: Server, browser: Browser, technician: str) -> Tablet:
    """A technician signed in on a tablet whose walk has kept a new round's pages."""
    admin = make_user(server.database, f"{technician}-admin", Role.ADMIN)
    make_user(server.database, technician, Role.TECHNICIAN, site_ids=[1])
    headers = bearer(server.database, admin)
    created = httpx.post(
        f"{server.base}/api/v1/sites/1/surveys",
        json={"name": f"{technician} round", "started_on": "2026-11-30"},
        headers=headers,
    )
    survey_id = created.json()["id"]
    context = browser.new_context(viewport=TABLET_PORTRAIT, has_touch=True)
    page = context.new_page()
    sign_in(page, server.base, name=technician, then=f"/surveys/{survey_id}/walk")
    # Online, the walk keeps the round's pages on the tablet: the route and 204 traps.
    expect(page.locator("#offline-ready")).to_contain_text("205 of 205 pages", timeout=60_000)
    page.wait_for_function("navigator.serviceWorker.controller !== null")
    return Tablet(page, context, survey_id, headers)


def test_a_round_walked_offline_is_sent_once_when_the_connection_is_back(
    server: Server, browser: Browser
) -> None:
    page, context, survey_id, headers = _tablet_with_a_round_kept(server, browser, "basement")
    page.get_by_role("link", name="Next trap to test").click()
    first_url = page.url

    server.stop()
    context.set_offline(True)
    for number in range(1, TRAPS_OFFLINE + 1):
        page.locator("label.condition-choice").filter(has_text="Working").tap()
        page.get_by_label("Ultrasonic", exact=True).tap()
        with page.expect_navigation():
            page.get_by_role("button", name="Save and go to the next trap").tap()
        expect(page.locator("#outbox-message")).to_contain_text("Kept on this tablet")
        _waiting(page, number)
    assert page.url != first_url
    # Meanwhile the session ends (as after the idle limit).
    with server.database.writing() as session:
        session.execute(delete(UserSession))

    server.start()
    context.set_offline(False)
    sign_in_link = page.get_by_role("link", name="Sign in to send them")
    expect(sign_in_link).to_be_visible()
    expect(page.locator("#outbox-message")).to_contain_text("20 findings wait on this tablet")
    with page.expect_navigation():
        sign_in_link.click()
    page.get_by_label("User name").fill("basement")
    page.get_by_label("Password").fill(PASSWORD)
    with page.expect_navigation():
        page.get_by_role("button", name="Sign in").click()
    expect(page.locator("#outbox")).to_be_hidden(timeout=30_000)

    findings = httpx.get(
        f"{server.base}/api/v1/surveys/{survey_id}/findings",
        params={"limit": 100},
        headers=headers,
    ).json()["items"]
    assert len(findings) == TRAPS_OFFLINE
    assert len({finding["trap_id"] for finding in findings}) == TRAPS_OFFLINE  # once each
    assert {(f["condition"], f["method"], f["tested_by"]) for f in findings} == {
        ("working", "ultrasonic", "basement")
    }
    context.close()


def test_a_trap_recorded_twice_offline_waits_for_a_decision(
    server: Server, browser: Browser
) -> None:
    page, context, survey_id, headers = _tablet_with_a_round_kept(server, browser, "twice")
    trap_url = f"{server.base}/surveys/{survey_id}/walk/traps/1"
    server.stop()
    context.set_offline(True)
    for condition in ("Leaking", "Blowing through"):  # found again, worse, on a second look
        page.goto(trap_url)
        page.locator("label.condition-choice").filter(has_text=condition).tap()
        page.get_by_label("Ultrasonic", exact=True).tap()
        with page.expect_navigation():
            page.get_by_role("button", name="Save and go to the next trap").tap()
    server.start()
    context.set_offline(False)
    decide = page.get_by_role("button", name="Keep only the latest")
    expect(decide).to_be_visible()
    expect(page.locator("#outbox")).to_contain_text("recorded 2 times on this tablet")
    nothing_yet = httpx.get(f"{server.base}/api/v1/surveys/{survey_id}/findings", headers=headers)
    assert nothing_yet.json()["total"] == 0  # held until the technician decides
    decide.click()
    expect(page.locator("#outbox")).to_be_hidden(timeout=30_000)
    findings = httpx.get(
        f"{server.base}/api/v1/surveys/{survey_id}/findings", headers=headers
    ).json()["items"]
    assert [finding["condition"] for finding in findings] == ["blow_through"]
    context.close()
